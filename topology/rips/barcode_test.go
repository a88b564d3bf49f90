package rips_test

import (
	"math"
	"os"
	"slices"
	"testing"

	"phasonhull/topology/rips"
)

// Barcode keeps the bars at least the minimum persistence long, in the
// order of ComparePersistence, and counts them per dimension.
func TestBarcodeFilterAndOrder(t *testing.T) {
	inf := math.Inf(1)
	d := &rips.Diagram{Points: 5, Prime: 2, Threshold: 3, Radius: 3, Bars: []rips.Bar{
		{Dim: 0, Birth: 0, Death: 0.5}, {Dim: 0, Birth: 0, Death: inf}, {Dim: 0, Birth: 0, Death: 2},
		{Dim: 1, Birth: 1, Death: 1.1}, {Dim: 1, Birth: 1, Death: 2.5}, {Dim: 1, Birth: 0.5, Death: 2},
	}}
	b := d.Barcode("cloud", 1, 0.4)
	want := []rips.Bar{
		{Dim: 0, Birth: 0, Death: inf}, {Dim: 0, Birth: 0, Death: 2}, {Dim: 0, Birth: 0, Death: 0.5},
		{Dim: 1, Birth: 0.5, Death: 2}, {Dim: 1, Birth: 1, Death: 2.5},
	}
	if !slices.Equal(b.Bars, want) {
		t.Errorf("bars %v, want %v", b.Bars, want)
	}
	if !slices.Equal(b.Counts, []int{3, 2}) {
		t.Errorf("counts %v, want [3 2]", b.Counts)
	}
	if b.Source != "cloud" || b.Points != 5 || b.Dim != 1 || b.MinPersistence != 0.4 {
		t.Errorf("heading %+v", b)
	}
}

// The barcode of the regular hexagon of unit side as a table.
func ExampleDiagram_Barcode() {
	var hexagon [][]float64
	for k := range 6 {
		a := float64(k) * math.Pi / 3
		hexagon = append(hexagon, []float64{math.Cos(a), math.Sin(a)})
	}
	d, err := rips.VietorisRips(hexagon, rips.Options{MaxDim: 2})
	if err != nil {
		panic(err)
	}
	if err := d.Barcode("hexagon", 2, 0.1).WriteText(os.Stdout); err != nil {
		panic(err)
	}
	// Output:
	// barcode of hexagon: 6 points, coefficients Z/2, dimensions 0 to 2
	// edges up to the cloud's radius 2, past which no bar changes (one point is joined to all others)
	// H0: 6 bars, H1: 1 bar, H2: 1 bar (at least 0.1 long)
	//
	//   dim    birth    death  persistence
	//     0        0      inf          inf
	//     0        0        1            1
	//     0        0        1            1
	//     0        0        1            1
	//     0        0        1            1
	//     0        0        1            1
	//     1        1  1.73205     0.732051
	//     2  1.73205        2     0.267949
}
