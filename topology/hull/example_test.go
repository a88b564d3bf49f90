package hull_test

import (
	"context"
	"fmt"
	"log"
	"math"

	"phasonhull/pattern/design"
	"phasonhull/pattern/lattice"
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

// A square plate of 30×30 sites, each displaced along the wave vector by
// u_n = 0.05 sin 2π(q·n), q = ((√2 − 1)/1.5, (√3 − 1)/5.3) turns per
// lattice step: its hull is a circle moved by the 1×2 rotation matrix
// A = q, and its gap labels lie in Z + Z·A11 + Z·A12. (A decimal q such as
// (0.2763, 0.1382) is rational, and the group of exact data is then
// (1/q)Z with q in the thousands.)
func ExampleAnalyzePlane() {
	q := [2]float64{(math.Sqrt(2) - 1) / 1.5, (math.Sqrt(3) - 1) / 5.3}
	e := [2]float64{q[0] / math.Hypot(q[0], q[1]), q[1] / math.Hypot(q[0], q[1])}
	l := &lattice.Lattice{Basis: [2][2]float64{{1, 0}, {0, 1}}, Unit: "mm"}
	for n1 := range 30 {
		for n2 := range 30 {
			s := 0.05 * math.Sin(2*math.Pi*(q[0]*float64(n1)+q[1]*float64(n2)))
			l.Index = append(l.Index, [2]int{n1, n2})
			l.OnLattice = append(l.OnLattice, true)
			l.Displacement = append(l.Displacement, [2]float64{s * e[0], s * e[1]})
		}
	}
	r, err := hull.AnalyzePlane(context.Background(), l, hull.Options{})
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println("class:", r.Hull.Class, "Betti", r.Hull.Betti)
	fmt.Printf("A = (%.4f, %.4f)\n", r.Rotation[0][0], r.Rotation[0][1])
	fmt.Println("generators:", len(r.GapLabels.Generators))
	// Output:
	// class: circle Betti [1 1 0]
	// A = (0.2761, 0.1381)
	// generators: 3
}
