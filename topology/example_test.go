package topology_test

import (
	"fmt"
	"math"

	"phasonhull/topology"
	"phasonhull/topology/rips"
)

// The gap labels of a circle hull rotated by the golden mean, for angle
// coefficients |m| ≤ 2: each IDS is n + m·θ.
func ExampleLabels() {
	theta := (math.Sqrt(5) - 1) / 2
	for _, l := range topology.Labels([]float64{theta}, 2) {
		fmt.Printf("IDS %.6f = %d + (%d)θ\n", l.IDS, l.Coeffs[0], l.Coeffs[1])
	}
	// Output:
	// IDS 0.236068 = -1 + (2)θ
	// IDS 0.381966 = 1 + (-1)θ
	// IDS 0.618034 = 0 + (1)θ
	// IDS 0.763932 = 2 + (-2)θ
}

// The rotation number of a quasiperiodic sequence of circle coordinates
// c_n = h(nρ) mod 1, h a smooth circle diffeomorphism: the weighted
// Birkhoff average is exact to rounding where the plain mean is off by
// about 1/N.
func ExampleWeightedRotationNumber() {
	rho := math.Sqrt2 - 1
	c := make([]float64, 1000)
	for n := range c {
		u := float64(n) * rho
		v := u + 0.05*math.Sin(2*math.Pi*u)
		c[n] = v - math.Floor(v)
	}
	plain, _ := topology.RotationNumber(c)
	weighted, _ := topology.WeightedRotationNumber(c)
	fmt.Printf("plain mean error    %.0e\n", math.Abs(plain-rho))
	fmt.Printf("weighted average    %.12f\n", weighted)
	fmt.Printf("folded step angle   %.12f\n", topology.Fold(weighted))
	// Output:
	// plain mean error    5e-05
	// weighted average    0.414213562373
	// folded step angle   0.414213562373
}

// Refining the step angle of a modulated chain x_n = n + 0.1 sin 2πnθ with
// one site missing, from a rough start.
func ExampleRefineFrequency() {
	theta := (3 - math.Sqrt(5)) / 2
	var n []int
	var x []float64
	for i := range 400 {
		if i == 123 {
			continue // a missing site
		}
		n = append(n, i)
		x = append(x, float64(i)+0.1*math.Sin(2*math.Pi*theta*float64(i)))
	}
	fit, err := topology.RefineFrequency(n, x, 0.3821, 1)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("f = %.12f (θ = %.12f)\n", fit.Freq[0], theta)
	// Output:
	// f = 0.381966011250 (θ = 0.381966011250)
}

// Circular coordinates of eight points on a circle, from the cocycle that
// is 1 on the edges crossing the ray at angle 0 (edges oriented from lower
// to higher index). The harmonic representative spreads the turn evenly:
// the coordinate steps by 1/8 from point to point.
func ExampleCircularCoordinates() {
	const n = 8
	pts := make([][]float64, n)
	for i := range pts {
		a := 2 * math.Pi * float64(i) / n
		pts[i] = []float64{math.Cos(a), math.Sin(a)}
	}
	// At r = 1 each point is joined to its two neighbours; the edge
	// {0, 7} crosses the cut going backwards.
	c := rips.Cocycle{Edges: []rips.CocycleEdge{{I: 0, J: n - 1, Value: -1}}}
	m, err := topology.CircularCoordinates(pts, c, 1)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, v := range m.Coordinates() {
		fmt.Printf("%.3f ", math.Mod(v-m.Coordinates()[0]+1, 1))
	}
	fmt.Println()
	// Output:
	// 0.000 0.125 0.250 0.375 0.500 0.625 0.750 0.875
}
