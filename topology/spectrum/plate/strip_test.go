package plate

import (
	"context"
	"fmt"
	"math"
	"slices"
	"testing"

	"phasonhull/pattern"
	"phasonhull/topology/spectrum"
)

// Edge states of the Hofstadter model at flux p/q on a strip (open along
// a1, closed along a2), the seam phase through one turn: the signed count
// of the states crossing the middle of the r-th bulk gap on one edge is
// the Hall conductance t_r, which solves r = q·s_r + p·t_r with
// |t_r| ≤ q/2 (Thouless, Kohmoto, Nightingale & den Nijs, PRL 49, 405,
// 1982; Laughlin's argument and its edge form, Halperin, PRB 25, 2185,
// 1982). t_r is computed here by the Diophantine equation; the bulk gaps
// and their labels come from a periodic plate. The overall sign is a
// convention (which edge, which way round the seam); one convention must
// give every gap's t_r, whose signs differ from gap to gap.
func TestHofstadterStripEdgeStatesCountHallConductance(t *testing.T) {
	for _, c := range []struct{ p, q int }{{1, 3}, {2, 5}, {3, 7}, {1, 4}} {
		t.Run(fmt.Sprintf("%d/%d", c.p, c.q), func(t *testing.T) {
			flux := Rational(int64(c.p), int64(c.q))
			L := 3 * c.q
			pts, l := grid(L, L, square)
			bulk := analyze(t, build(t, pts, l, Model{Flux: flux, Ends: spectrum.Periodic}), Options{Method: Values, Generators: []float64{flux.Float()}})
			var gaps []Gap
			for r := 1; r < c.q; r++ {
				k := slices.IndexFunc(bulk.Gaps, func(g Gap) bool { return int(math.Round(g.IDS*float64(bulk.Sites))) == r*bulk.Sites/c.q })
				if k < 0 {
					if c.q%2 == 0 && 2*r == c.q {
						continue // the middle gap of an even q is closed (Dirac points)
					}
					t.Fatalf("no bulk gap at %d/%d", r, c.q)
				}
				gaps = append(gaps, bulk.Gaps[k])
			}
			spts, sl := grid(40, 2, square)
			s := &Sample{Plane: &pattern.Plane{Points: spts}, Lattice: sl}
			res, err := EdgeStates(context.Background(), s, Model{Flux: flux}, gaps, 0, EdgeOptions{Samples: 64, Rows: 2})
			if err != nil {
				t.Fatal(err)
			}
			for _, g := range res.Gaps {
				r := int(math.Round(g.IDS * float64(c.q)))
				_, tr := hallConductance(r, c.p, c.q)
				if g.Unresolved > 0 || g.Count != tr {
					t.Errorf("gap %d/%d at E = %.3f: %d crossings (%d steps unresolved), want t = %d", r, c.q, g.Energy, g.Count, g.Unresolved, tr)
				}
				if g.Expected == nil || *g.Expected != tr || g.Agrees != (g.Count == tr) {
					t.Errorf("gap %d/%d: expected %v from the label %v, want %d", r, c.q, g.Expected, g.Label, tr)
				}
			}
		})
	}
}
