package tiling_test

import (
	"fmt"
	"math"

	"phasonhull/pattern/design"
	"phasonhull/pattern/tiling"
)

// A Fibonacci chain of two tiles, 1 and the golden ratio long, measured
// with position noise of 3% of the shorter tile.
func ExampleDetect() {
	p, err := design.Generate(design.Spec{
		Family: "substitution", Rule: "fibonacci", Sites: 2000, Noise: 0.03, Seed: 1,
		Tiles: map[string]float64{"A": 1, "B": (1 + math.Sqrt(5)) / 2},
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	t, ok := tiling.Detect(p.Spacings(), tiling.Options{})
	if !ok {
		fmt.Println("not a tiling:", t.Reason)
		return
	}
	for j := range t.Lengths {
		fmt.Printf("tile %c: length %.2f, %d spacings, scatter %.3f\n", t.Letters[j], t.Lengths[j], t.Counts[j], t.Scatter[j])
	}
	fmt.Println("word:", t.Word[:21], "...")
	fmt.Println("same as the design:", t.Word == p.Word)
	// Output:
	// tile A: length 1.00, 1236 spacings, scatter 0.042
	// tile B: length 1.62, 763 spacings, scatter 0.044
	// word: ABAABABAABAABABAABABA ...
	// same as the design: true
}

func ExampleComplexity() {
	fibonacci := "ABAABABAABAABABAABABAABAABABAABAAB"
	fmt.Println(tiling.Complexity(fibonacci, 8))
	fmt.Println(tiling.Complexity("AABAABAABAABAAB", 5))
	// Output:
	// [2 3 4 5 6 7 8 9]
	// [2 3 3 3 3]
}

func ExampleAnalyze() {
	p, err := design.Generate(design.Spec{
		Family: "sturmian", Theta: math.Sqrt2 - 1, Sites: 20000, Seed: 1,
		Tiles: map[string]float64{"A": 1, "B": 1.4},
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	st, err := tiling.Analyze(p.Word, tiling.WordOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("class:", st.Class, "examined to n =", st.Examined)
	fmt.Println("p(1..6):", st.Complexity[:6])
	fmt.Printf("angle %.4f (√2 − 1 = %.4f)\n", st.Angle, math.Sqrt2-1)
	// Output:
	// class: sturmian examined to n = 48
	// p(1..6): [2 3 4 5 6 7]
	// angle 0.4142 (√2 − 1 = 0.4142)
}
