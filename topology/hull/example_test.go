package hull_test

import (
	"fmt"
	"log"

	"phasonhull/pattern/design"
	"phasonhull/topology/hull"
)

// A chain of 600 sites modulated as x_n = n + 0.1 sin 2πnθ, θ = 0.2763:
// its hull is a circle turned by θ, and the gap labels are n + mθ in
// (0, 1), |m| ≤ 6, the smallest being 4θ − 1.
func ExampleAnalyze() {
	p, err := design.Generate(design.Spec{Family: "modulated", Sites: 600, Theta: 0.2763, Sin: []float64{0.1}})
	if err != nil {
		log.Fatal(err)
	}
	r, err := hull.Analyze(p, hull.Options{})
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println("class:", r.Hull.Class, "Betti", r.Hull.Betti)
	fmt.Printf("angle: %.6f\n", r.Angles[0])
	fmt.Println("labels:", len(r.GapLabels.Labels), "first", r.GapLabels.Labels[0].Coeffs, fmt.Sprintf("%.4f", r.GapLabels.Labels[0].IDS))
	// Output:
	// class: circle Betti [1 1 0]
	// angle: 0.276300
	// labels: 12 first [-1 4] 0.1052
}
