package spectrum

import (
	"cmp"
	"math"
	"slices"
	"testing"

	"phasonhull/pattern/design"
	"phasonhull/topology"
)

// widest returns the k widest gaps, widest first.
func widest(gaps []Gap, k int) []Gap {
	g := slices.Clone(gaps)
	slices.SortStableFunc(g, func(a, b Gap) int { return cmp.Compare(b.Width, a.Width) })
	return g[:min(k, len(g))]
}

// nearestM returns the angle coefficient m, |m| ≤ maxM, whose frac(mθ) is
// nearest to ids, and that distance — computed here, independently of
// topology.Labels.
func nearestM(ids, theta float64, maxM int) (int, float64) {
	best, dist := 0, math.Inf(1)
	for m := -maxM; m <= maxM; m++ {
		if m == 0 {
			continue
		}
		if d := math.Abs(frac(float64(m)*theta) - ids); d < dist {
			best, dist = m, d
		}
	}
	return best, dist
}

// The almost-Mathieu (Harper) operator, hopping 1 and on-site
// 2λ cos 2π(nθ+φ), at θ = (√5−1)/2: its widest gaps are those of labels
// m = ±1, then ±2, then ±3, with IDS = frac(mθ) (Hofstadter, Phys. Rev. B
// 14, 1976, the gaps of the butterfly; the values by the gap labelling of
// Johnson & Moser, Commun. Math. Phys. 84, 1982, and Bellissard 1992). At
// λ = 1 (critical) and λ = 2 (localized), open and periodic ends, and both
// the dense and the counting method.
func TestAlmostMathieuGoldenGaps(t *testing.T) {
	const n = 1000
	res := DefaultResolution / float64(n)
	for _, lambda := range []float64{1, 2} {
		for _, ends := range []Ends{Open, Periodic} {
			for _, method := range []Method{Values, Counting} {
				if ends == Periodic && method == Values && testing.Short() {
					continue
				}
				op := harper(t, n, lambda, golden, 0.1, ends)
				r := analyze(t, op, Options{Angles: []float64{golden}, Method: method})
				top := widest(r.Gaps, 6)
				if len(top) < 6 {
					t.Fatalf("λ %g %s %s: %d gaps, want at least 6", lambda, ends, method, len(top))
				}
				for i, g := range top {
					m, d := nearestM(g.IDS, golden, 6)
					if want := i/2 + 1; abs(m) != want || d > res {
						t.Errorf("λ %g %s %s: gap %d by width (IDS %.4f, width %.4g): nearest label m = %d at %.2g/N; want |m| = %d within %g/N",
							lambda, ends, method, i+1, g.IDS, g.RelWidth, m, d*n, want, float64(DefaultResolution))
					}
					// The label Analyze attached is the same one.
					if g.Label == nil || g.Label.Coeffs[1] != m || math.Abs(g.Label.IDS-frac(float64(m)*golden)) > 1e-12 {
						t.Errorf("λ %g %s %s: gap at IDS %.4f labelled %+v, want m = %d", lambda, ends, method, g.IDS, g.Label, m)
					}
				}
				// The ±m pairs are mirror images: IDS x and 1 − x.
				for i := 0; i < 6; i += 2 {
					if s := top[i].IDS + top[i+1].IDS; math.Abs(s-1) > 2*res {
						t.Errorf("λ %g %s %s: gaps %d and %d at IDS %.4f and %.4f do not sum to 1", lambda, ends, method, i+1, i+2, top[i].IDS, top[i+1].IDS)
					}
				}
			}
		}
	}
}

// fibonacciChain is a Fibonacci tiling of n sites from the substitution
// A → AB, B → A, tiles A = 1 and B = (1+√5)/2.
func fibonacciChain(_ testing.TB, n int) design.Spec {
	s := design.NewSpec("substitution")
	s.Sites, s.Rule = n, "fibonacci"
	return s
}

// The Fibonacci tight-binding chain — hopping by tile, from a two-row
// table, or spacing-dependent by the exponential law — has every gap's IDS
// in Z + Zθ, θ = (√5−1)/2 the frequency of the long tile (Kohmoto,
// Kadanoff & Tang, Phys. Rev. Lett. 50, 1983; the gap labelling of
// Bellissard, Bovier & Ghez, Rev. Math. Phys. 4, 1992). On 20000 sites
// every gap wider than 10⁻³ of the band matches a label n + mθ with
// |m| ≤ 80 within 3/N (these chains open gaps up to |m| = 72). The labels
// then cover 2·160·3/N ≈ 5% of [0, 1]; with a wrong irrational angle,
// √2 − 1, only about that share of the same gaps matches one: the check
// can fail.
func TestFibonacciGapsInModule(t *testing.T) {
	const n, maxM = 20000, 80
	phi := (1 + math.Sqrt(5)) / 2
	models := []struct {
		name string
		m    Model
	}{
		{"tile table", Model{Law: Table{D: []float64{1, phi}, T: []float64{1, 0.5}}}},
		{"exp law", Model{Law: Exp{T0: 1, Decay: 2}}},
		{"exp law, on-site", Model{Law: Exp{T0: 1, Decay: 1}, OnSite: OnSite{Constant: 0.3}}},
	}
	if testing.Short() {
		models = models[:1]
	}
	p := generate(t, fibonacciChain(t, n))
	res := DefaultResolution / float64(n)
	wrongLabels := topology.Labels([]float64{math.Sqrt2 - 1}, maxM)
	for _, c := range models {
		op := build(t, p, c.m)
		r := analyze(t, op, Options{Angles: []float64{golden}, MaxCoeff: maxM})
		if r.Method != Counting || len(r.Gaps) < 20 {
			t.Errorf("%s: %d gaps by %s; a Fibonacci chain of %d sites has many, found by counting", c.name, len(r.Gaps), r.Method, n)
		}
		wrong := 0
		for _, g := range r.Gaps {
			m, d := nearestM(g.IDS, golden, maxM)
			if d > res || g.Label == nil || g.Label.Coeffs[1] != m {
				t.Errorf("%s: gap at IDS %.5f (width %.3g): nearest n + mθ is m = %d at %.2f/N, label %+v",
					c.name, g.IDS, g.RelWidth, m, d*n, g.Label)
			}
			if _, ok := topology.MatchLabel(g.IDS, wrongLabels, res); ok {
				wrong++
			}
		}
		cover := 2 * 2 * maxM * res
		if f := float64(wrong) / float64(len(r.Gaps)); f > 2*cover {
			t.Errorf("%s: with θ = √2 − 1, %d of %d gaps still matched a label (labels cover %.3f of [0, 1]): the check cannot fail",
				c.name, wrong, len(r.Gaps), cover)
		}
	}
}

// A periodic chain with a p-site cell has gaps only at IDS k/p (Bloch's
// theorem; common practice): on a ring of whole cells closed by the cell's
// own spacing the count below each gap is exactly k·N/p, and generic
// couplings open all p − 1 gaps; an open chain's IDS lie within the
// resolution of k/p and carry the labels k/p. Hopping and springs.
func TestPeriodicCellGaps(t *testing.T) {
	cell := []float64{1, 1.4, 0.8, 1.2, 0.9}
	const p, n = 5, 500
	s := design.NewSpec("periodic")
	s.Sites, s.Cell = n, cell
	pat := generate(t, s)
	for _, kind := range []Kind{Hopping, Springs} {
		for _, ends := range []Ends{Periodic, Open} {
			m := Model{Kind: kind, Law: Exp{T0: 1, Decay: 1.5}, Ends: ends, OnSite: OnSite{Constant: 0.2}}
			if ends == Periodic {
				m.Closing = cell[(n-1)%p]
			}
			r := analyze(t, build(t, pat, m), Options{Period: p, MinGap: 1e-2})
			if len(r.Gaps) != p-1 {
				t.Errorf("%s %s: %d gaps, want %d", kind, ends, len(r.Gaps), p-1)
			}
			for k, g := range r.Gaps {
				want := topology.PeriodicLabels(p)[min(k, p-2)]
				if ends == Periodic && g.Below != (k+1)*n/p {
					t.Errorf("%s ring: gap %d has %d levels below, want exactly %d", kind, k+1, g.Below, (k+1)*n/p)
				}
				if math.Abs(g.IDS-float64(k+1)/p) > DefaultResolution/float64(n) || g.Label == nil || !slices.Equal(g.Label.Coeffs, want.Coeffs) {
					t.Errorf("%s %s: gap %d at IDS %.4f labelled %+v, want %d/%d", kind, ends, k+1, g.IDS, g.Label, k+1, p)
				}
			}
		}
	}
}

// At a rational angle θ = p/q the almost-Mathieu operator has q bands,
// all q − 1 gaps open for odd q (Choi, Elliott & Yui, Commun. Math. Phys.
// 132, 1990), at IDS k/q; on a ring of whole periods the counts are exact.
// The spectra come from ScanTheta over a uniform chain.
func TestScanThetaRationalBands(t *testing.T) {
	s := design.NewSpec("periodic")
	s.Sites, s.Cell = 420, []float64{1}
	m := Model{Ends: Periodic, OnSite: OnSite{Lambda: 1, Phase: 0.13}}
	thetas := []float64{1.0 / 3, 2.0 / 5, 3.0 / 7}
	seen := 0
	err := ScanTheta(s, m, thetas, func(theta float64, v []float64) error {
		q := int(math.Round(1 / frac(theta*float64(map[float64]int{1.0 / 3: 1, 2.0 / 5: 3, 3.0 / 7: 5}[theta]))))
		r, err := AnalyzeMeasured(v, Options{MinGap: 1e-2})
		if err != nil {
			return err
		}
		if len(r.Gaps) != q-1 {
			t.Errorf("θ = %.4f: %d gaps, want %d", theta, len(r.Gaps), q-1)
		}
		for k, g := range r.Gaps {
			if g.Below != (k+1)*420/q {
				t.Errorf("θ = %.4f: gap %d has %d levels below, want %d", theta, k+1, g.Below, (k+1)*420/q)
			}
		}
		seen++
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	if seen != len(thetas) {
		t.Fatalf("ScanTheta handed over %d spectra, want %d", seen, len(thetas))
	}
}
