package rips_test

import (
	"fmt"
	"math"

	"phasonhull/topology/rips"
)

// The regular hexagon of unit side: one H1 class from the side length to
// the short diagonal √3, and one H2 class from √3 to the long diagonal 2.
func ExampleVietorisRips() {
	var hexagon [][]float64
	for k := range 6 {
		a := float64(k) * math.Pi / 3
		hexagon = append(hexagon, []float64{math.Cos(a), math.Sin(a)})
	}
	d, err := rips.VietorisRips(hexagon, rips.Options{MaxDim: 2})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, b := range d.Bars {
		if b.Dim > 0 {
			fmt.Printf("H%d [%.4f, %.4f)\n", b.Dim, b.Birth, b.Death)
		}
	}
	fmt.Printf("threshold %.4f\n", d.Threshold)
	// Output:
	// H1 [1.0000, 1.7321)
	// H2 [1.7321, 2.0000)
	// threshold 2.0000
}

// Estimate sizes a computation before running it.
func ExampleEstimate() {
	var square [][]float64
	for i := range 3 {
		for j := range 3 {
			square = append(square, []float64{float64(i), float64(j)})
		}
	}
	c, err := rips.Estimate(square, rips.Options{MaxDim: 1})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%d points, %v edges up to %.4f\n", c.Points, c.Simplices[1], c.Threshold)
	// Output:
	// 9 points, 20 edges up to 1.4142
}
