package plate

import (
	"fmt"
	"math"
	"slices"
	"testing"

	"phasonhull/topology/spectrum"
)

// The Hofstadter model at flux p/q on a periodic L×L square lattice
// (q | L): the r-th gap's IDS is r/q, and its label (s_r, t_r) in
// Z + Zα solves r = q·s_r + p·t_r with |t_r| ≤ q/2, t_r the Hall
// conductance (Thouless, Kohmoto, Nightingale & den Nijs, PRL 49, 405,
// 1982). For odd q all q − 1 gaps are open. Checked on every level and by
// the kernel polynomial method.
func TestHofstadterGapsAndHallConductances(t *testing.T) {
	for _, c := range []struct {
		p, q         int
		lDense, lKPM int
	}{
		{1, 3, 21, 45}, {2, 5, 20, 45}, {3, 7, 21, 42},
	} {
		for _, method := range []Method{Values, KPM} {
			t.Run(fmt.Sprintf("%d/%d/%s", c.p, c.q, method), func(t *testing.T) {
				L := c.lDense
				if method == KPM {
					L = c.lKPM
				}
				pts, l := grid(L, L, square)
				flux := Rational(int64(c.p), int64(c.q))
				op := build(t, pts, l, Model{Flux: flux, Ends: spectrum.Periodic})
				if op.Real() {
					t.Fatal("a flux p/q with q > 2 must give a complex operator")
				}
				res := analyze(t, op, Options{Method: method, Generators: []float64{flux.Float()}, KPM: KPMOptions{Seed: 1}})
				// KPM: the q−1 widest gaps, in ascending energy. Every level:
				// the gap at each r/q (a finite torus samples the magnetic
				// bands at L²/q² momenta, and the spacings of those levels
				// near a band's edge can be wider than a true gap).
				gaps := slices.Clone(res.Gaps)
				if method == KPM {
					slices.SortFunc(gaps, func(a, b Gap) int { return -cmpFloat(a.Width, b.Width) })
					if len(gaps) < c.q-1 {
						t.Fatalf("%d gaps found, want at least %d: %+v", len(gaps), c.q-1, res.Gaps)
					}
					gaps = gaps[:c.q-1]
					slices.SortFunc(gaps, func(a, b Gap) int { return cmpFloat(a.Lower, b.Lower) })
				} else {
					gaps = gaps[:0]
					for r := 1; r < c.q; r++ {
						k := slices.IndexFunc(res.Gaps, func(g Gap) bool { return int(math.Round(g.IDS*float64(res.Sites))) == r*res.Sites/c.q })
						if k < 0 {
							t.Fatalf("no gap with %d/%d of the levels below it: %+v", r, c.q, res.Gaps)
						}
						gaps = append(gaps, res.Gaps[k])
					}
				}
				for i, g := range gaps {
					r := i + 1
					want := float64(r) / float64(c.q)
					if d := math.Abs(g.IDS - want); d > g.Tolerance {
						t.Errorf("gap %d [%.4f, %.4f]: IDS %.5f ± %.2g, want %d/%d", r, g.Lower, g.Upper, g.IDS, g.IDSError, r, c.q)
					}
					s, tr := hallConductance(r, c.p, c.q)
					if g.Label == nil || !slices.Equal(g.Label.Coeffs, []int{s, tr}) {
						t.Errorf("gap %d (IDS %.5f): label %v, want (%d, %d)", r, g.IDS, g.Label, s, tr)
					}
				}
				if method == KPM && res.Resolution <= 0 {
					t.Errorf("KPM resolution %g", res.Resolution)
				}
			})
		}
	}
}

func cmpFloat(a, b float64) int {
	switch {
	case a < b:
		return -1
	case a > b:
		return 1
	}
	return 0
}

// On open ends the chiral edge states fill every bulk gap of the
// Hofstadter model at a density ∝ perimeter/N (Halperin, PRB 25, 2185,
// 1982; the bulk–edge correspondence): the KPM density dips near its
// floor across the gap, and its runs below the floor, split by edge
// states, join into one gap per bulk gap, with the bulk label. Flux 1/3
// on an open 150×150 plate: two gaps, labelled (0, 1) and (1, −1).
func TestOpenHofstadterEdgeStatesDoNotSplitGaps(t *testing.T) {
	pts, l := grid(150, 150, square)
	op := build(t, pts, l, Model{Flux: Rational(1, 3)})
	res := analyze(t, op, Options{Method: KPM, Generators: []float64{1.0 / 3}, KPM: KPMOptions{Seed: 2}})
	if len(res.Gaps) != 2 {
		t.Fatalf("%d gaps, want 2: %+v", len(res.Gaps), res.Gaps)
	}
	for r, g := range res.Gaps {
		s, tr := hallConductance(r+1, 1, 3)
		if g.Label == nil || !slices.Equal(g.Label.Coeffs, []int{s, tr}) {
			t.Errorf("gap %d [%.3f, %.3f] IDS %.4f: label %v, want (%d, %d)", r+1, g.Lower, g.Upper, g.IDS, g.Label, s, tr)
		}
	}
}
