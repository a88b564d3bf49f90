package hull_test

import (
	"context"
	"fmt"
	"math"
	"testing"

	"phasonhull/pattern/design"
	"phasonhull/pattern/lattice"
	"phasonhull/topology/hull"
)

// BenchmarkAnalyzePlate times what analyze does with a generated plate:
// the average lattice (lattice.Recover) and the hull (AnalyzePlane), on a
// square plate displaced by two incommensurate waves with 0.3% position
// noise, at 100×100 (goal: under 2 s)
// and 1000×1000 sites (goal: under 60 s and 4 GiB; run it alone with
// -bench 'AnalyzePlate/sites=1000000' -benchtime 1x under /usr/bin/time -v
// for the peak memory). The class is checked once before timing.
func BenchmarkAnalyzePlate(b *testing.B) {
	A := [][]float64{{(math.Sqrt(5) - 1) / 8, (math.Sqrt(2) - 1) / 3}, {(math.Sqrt(3) - 1) / 5, (math.Sqrt(7) - 2) / 2}}
	for _, side := range []int{100, 1000} {
		b.Run(fmt.Sprintf("sites=%d", side*side), func(b *testing.B) {
			p, err := design.GeneratePlane(design.Spec{Family: "plate", Sites: side, Matrix: A, Amps: []float64{0.06, 0.06},
				Noise: 0.003, Seed: 1})
			if err != nil {
				b.Fatal(err)
			}
			analyze := func() *hull.Result {
				l, err := lattice.Recover(context.Background(), p, lattice.Options{})
				if err != nil {
					b.Fatal(err)
				}
				r, err := hull.AnalyzePlane(context.Background(), l, hull.Options{})
				if err != nil {
					b.Fatal(err)
				}
				return r
			}
			if r := analyze(); r.Hull.Class != hull.Torus {
				b.Fatalf("class %s %v (%s), want torus", r.Hull.Class, r.Hull.Betti, r.Hull.Reason)
			}
			b.ReportAllocs()
			for b.Loop() {
				analyze()
			}
		})
	}
}
