package plate_test

import (
	"context"
	"fmt"

	"phasonhull/pattern/lattice"
	"phasonhull/topology/notation"
	"phasonhull/topology/spectrum"
	"phasonhull/topology/spectrum/plate"
)

// The Hofstadter model at flux 1/3 on a periodic 48×48 square lattice,
// by the kernel polynomial method: two gaps, at IDS 1/3 and 2/3, labelled n + t·α with t the Hall
// conductance.
func Example() {
	const L = 48
	l := &lattice.Lattice{Basis: [2][2]float64{{1, 0}, {0, 1}}}
	var pts [][2]float64
	for i := range L {
		for j := range L {
			pts = append(pts, [2]float64{float64(i), float64(j)})
			l.Index = append(l.Index, [2]int{i, j})
			l.OnLattice = append(l.OnLattice, true)
			l.Displacement = append(l.Displacement, [2]float64{})
		}
	}
	flux, err := plate.ParseFlux("1/3")
	if err != nil {
		panic(err)
	}
	op, err := plate.New(l, pts, plate.Model{Flux: flux, Ends: spectrum.Periodic})
	if err != nil {
		panic(err)
	}
	res, err := plate.Analyze(context.Background(), op, plate.Options{Method: plate.KPM, Generators: []float64{flux.Float()}})
	if err != nil {
		panic(err)
	}
	fmt.Printf("%s, %d moments, %d vectors, resolution %.3f\n", res.Method, res.Moments, res.Vectors, res.Resolution)
	for _, g := range res.Gaps {
		label := "unlabelled"
		if g.Label != nil {
			label = g.Label.CoeffString()
		}
		fmt.Printf("gap [%.1f, %.1f]: IDS %s, label %s\n", g.Lower, g.Upper, notation.PlusMinus(g.IDS, g.IDSError), label)
	}
	// Output:
	// kpm, 512 moments, 16 vectors, resolution 0.025
	// gap [-2.0, -0.7]: IDS 0.3355 ± 0.0026, label (0, 1)
	// gap [0.7, 2.0]: IDS 0.6688 ± 0.0020, label (1, -1)
}
