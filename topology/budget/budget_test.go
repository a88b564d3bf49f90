package budget

import (
	"context"
	"math"
	"reflect"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"phasonhull/pattern/design"
	"phasonhull/topology/spectrum"
)

// testChain is a modulated chain of n sites, x_j = j + a·sin 2πjθ, with
// hoppings t = exp(−3(d/d̄ − 1)) between neighbours, labelled by its θ.
func testChain(t *testing.T, n int, a float64) Chain {
	t.Helper()
	spec := design.NewSpec(design.Modulated)
	spec.Sites, spec.Theta, spec.Sin = n, 0.3183, []float64{a}
	l, err := spectrum.ChooseLabels(context.Background(), spectrum.LabelSources{Design: &spec})
	if err != nil {
		t.Fatal(err)
	}
	return Chain{Spec: spec, Model: spectrum.Model{Kind: spectrum.Hopping, Law: spectrum.Exp{T0: 1, Decay: 3}},
		Options: l.Apply(spectrum.Options{MinGap: spectrum.MinGapFor(n)})}
}

// designSpectrum is the design's own gap analysis, computed here without
// the package.
func designSpectrum(t *testing.T, c Chain) (*spectrum.Operator, *spectrum.Result) {
	t.Helper()
	p, err := design.Generate(c.Spec)
	if err != nil {
		t.Fatal(err)
	}
	op, err := spectrum.New(p, c.Model)
	if err != nil {
		t.Fatal(err)
	}
	res, err := spectrum.Analyze(op, c.Options)
	if err != nil {
		t.Fatal(err)
	}
	return op, res
}

// At zero error every trial is the design: every labelled gap survives in
// every trial with the design's width, computed here directly.
func TestZeroErrorKeepsEveryGap(t *testing.T) {
	c := testChain(t, 200, 0.1)
	_, want := designSpectrum(t, c)
	r, err := Run(context.Background(), c, Options{Sigmas: []float64{0}, Trials: 20})
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Design.Gaps) == 0 {
		t.Fatal("no gap")
	}
	for _, g := range r.Levels[0].Gaps {
		if g.Open.Count != 20 {
			t.Errorf("gap %s open in %d/20 trials at zero error", g.Label.CoeffString(), g.Open.Count)
		}
		var w float64
		for _, d := range want.Gaps {
			if d.Label != nil && slices.Equal(d.Label.Coeffs, g.Label.Coeffs) {
				w = max(w, d.Width)
			}
		}
		if g.Width.Median != w || g.Width.P05 != w || g.Width.P95 != w {
			t.Errorf("gap %s: width %+v at zero error, the design's is %g", g.Label.CoeffString(), g.Width, w)
		}
	}
}

// Property: survival does not increase with the error, within the Monte
// Carlo error — a larger σ's Wilson interval never lies wholly above a
// smaller σ's (common practice: more disorder closes gaps).
func TestSurvivalNonIncreasing(t *testing.T) {
	c := testChain(t, 150, 0.1)
	sigmas := []float64{0, 0.01, 0.02, 0.04, 0.08, 0.16}
	for _, seed := range []uint64{1, 7, 42} {
		r, err := Run(context.Background(), c, Options{Sigmas: sigmas, Trials: 40, Seed: seed})
		if err != nil {
			t.Fatal(err)
		}
		for gi := range r.Design.Gaps {
			for k := 1; k < len(r.Levels); k++ {
				a, b := r.Levels[k-1].Gaps[gi].Open, r.Levels[k].Gaps[gi].Open
				if b.Low > a.High {
					t.Errorf("seed %d, gap %s: survival rises from %d/%d at σ = %g to %d/%d at σ = %g beyond the Monte Carlo error",
						seed, r.Design.Gaps[gi].Label.CoeffString(), a.Count, a.Trials, sigmas[k-1], b.Count, b.Trials, sigmas[k])
				}
			}
		}
	}
}

// Results depend on the seed alone, not on the number of workers.
func TestWorkersDoNotChangeTheResult(t *testing.T) {
	c := testChain(t, 120, 0.1)
	opt := Options{Sigmas: []float64{0.02, 0.05}, Trials: 16, Missing: 0.02, Drift: 0.01}
	var got []*Result
	for _, w := range []int{1, 3} {
		opt.Workers = w
		r, err := Run(context.Background(), c, opt)
		if err != nil {
			t.Fatal(err)
		}
		got = append(got, r)
	}
	if !reflect.DeepEqual(got[0], got[1]) {
		t.Error("1 and 3 workers gave different results")
	}
}

// For weak disorder the mean shift of a gap's edges agrees with
// second-order perturbation theory over the same draws (common practice:
// δE_k = V_kk + Σ_{j≠k} |V_jk|²/(E_k − E_j), V = H − H0 in the
// eigenbasis of the design's H0), computed here from the dense matrices.
// σ = 0.0005 keeps |V| well below the level spacing near the edges; the
// third-order remainder, about 2% here, grows in proportion to σ (7% at
// σ = 0.001), hence the 10% tolerance.
func TestEdgeShiftMatchesPerturbationTheory(t *testing.T) {
	c := testChain(t, 160, 0.1)
	const sigma, trials = 0.0005, 24
	r, err := Run(context.Background(), c, Options{Sigmas: []float64{sigma}, Trials: trials, Seed: DefaultSeed})
	if err != nil {
		t.Fatal(err)
	}
	op0, _ := designSpectrum(t, c)
	var es mat.EigenSym
	if !es.Factorize(op0.Dense(), true) {
		t.Fatal("eigen decomposition failed")
	}
	e0 := es.Values(nil)
	var u mat.Dense
	es.VectorsTo(&u)
	// The design's widest gap: its edges are levels k and ku (boundary
	// states may lie between them; weak disorder keeps them inside).
	g := r.Design.Gaps[0]
	for _, d := range r.Design.Gaps {
		if d.Width > g.Width {
			g = d
		}
	}
	k, ku := nearest(e0, g.Lower), nearest(e0, g.Upper)
	var pt [2]float64
	for i := range trials {
		spec := c.Spec
		spec.Noise, spec.Seed = sigma, TrialSeed(DefaultSeed, i)
		p, err := design.Generate(spec)
		if err != nil {
			t.Fatal(err)
		}
		op, err := spectrum.New(p, c.Model)
		if err != nil {
			t.Fatal(err)
		}
		var v mat.Dense
		v.Sub(op.Dense(), op0.Dense())
		var vu, w mat.Dense
		vu.Mul(&v, &u)
		w.Mul(u.T(), &vu) // V in the eigenbasis
		for e, kk := range []int{k, ku} {
			shift := w.At(kk, kk)
			for j := range e0 {
				if j != kk {
					shift += w.At(j, kk) * w.At(j, kk) / (e0[kk] - e0[j])
				}
			}
			pt[e] += shift / trials
		}
	}
	for _, s := range r.Levels[0].Gaps {
		if !slices.Equal(s.Label.Coeffs, g.Label.Coeffs) {
			continue
		}
		if s.Open.Count != trials {
			t.Fatalf("the gap closed in weak disorder: %d/%d", s.Open.Count, trials)
		}
		got := [2]float64{s.MeanLower - g.Lower, s.MeanUpper - g.Upper}
		for e := range 2 {
			t.Logf("edge %d: mean shift %.6g, perturbation theory %.6g", e, got[e], pt[e])
			if math.Abs(got[e]-pt[e]) > 0.1*math.Abs(pt[e])+1e-6 {
				t.Errorf("edge %d: mean shift %.6g, second-order perturbation theory %.6g", e, got[e], pt[e])
			}
		}
	}
}

func nearest(v []float64, x float64) int {
	k := 0
	for i := range v {
		if math.Abs(v[i]-x) < math.Abs(v[k]-x) {
			k = i
		}
	}
	return k
}

// A gap closes once the spread of the hoppings the error causes is of the
// order of its width (order of magnitude, common practice: disorder of
// strength W' smears band edges by about W'). The σ where half the trials
// keep the gap open, found by the budget at confidence 1/2, must give an
// RMS hopping change within a factor 10 of the gap's width.
func TestGapClosesWhenDisorderMatchesItsWidth(t *testing.T) {
	c := testChain(t, 150, 0.1)
	// No level given: the search starts from 1% of the mean spacing.
	r, err := Run(context.Background(), c, Options{Trials: 40, Gap: []int{0, 1}, Confidence: 0.5})
	if err != nil {
		t.Fatal(err)
	}
	b := r.Budget
	if !b.Bracketed {
		t.Fatalf("no closing σ found: %+v", b)
	}
	op0, _ := designSpectrum(t, c)
	spec := c.Spec
	spec.Noise = b.Sigma
	p, err := design.Generate(spec)
	if err != nil {
		t.Fatal(err)
	}
	op, err := spectrum.New(p, c.Model)
	if err != nil {
		t.Fatal(err)
	}
	var ss float64
	for i := range op.Len() - 1 {
		d := op.Bond(i, 1) - op0.Bond(i, 1)
		ss += d * d
	}
	spread := math.Sqrt(ss / float64(op.Len()-1))
	ratio := spread / b.Gap.Width
	t.Logf("closing σ %.4g: RMS hopping change %.4g, gap width %.4g, ratio %.3g", b.Sigma, spread, b.Gap.Width, ratio)
	if ratio < 0.1 || ratio > 10 {
		t.Errorf("the gap closes at an RMS hopping change %.3g times its width, not of its order", ratio)
	}
}

// The bisection's answer is reproduced by a direct Monte Carlo at that
// error with fresh draws: at Sigma the survival's interval reaches the
// confidence, at High it stays below it.
func TestBudgetReproducedByDirectMonteCarlo(t *testing.T) {
	c := testChain(t, 150, 0.1)
	r, err := Run(context.Background(), c, Options{Sigmas: []float64{0.02}, Trials: 100, Gap: []int{0, 1}})
	if err != nil {
		t.Fatal(err)
	}
	b := r.Budget
	if !b.Bracketed || !(b.Low <= b.Sigma && b.Sigma < b.High) {
		t.Fatalf("budget %+v", b)
	}
	direct, err := Run(context.Background(), c, Options{Sigmas: []float64{b.Sigma, b.High}, Trials: 200, Seed: 99})
	if err != nil {
		t.Fatal(err)
	}
	at := func(l int) Proportion {
		for _, g := range direct.Levels[l].Gaps {
			if slices.Equal(g.Label.Coeffs, []int{0, 1}) {
				return g.Open
			}
		}
		t.Fatal("gap (0, 1) missing")
		return Proportion{}
	}
	if p := at(0); p.High < b.Confidence {
		t.Errorf("at the budget σ = %g a direct run keeps the gap open in %d/%d, interval [%.3f, %.3f] below %g", b.Sigma, p.Count, p.Trials, p.Low, p.High, b.Confidence)
	}
	if p := at(1); p.Low >= b.Confidence {
		t.Errorf("at the high end σ = %g a direct run keeps the gap open in %d/%d, interval [%.3f, %.3f] above %g", b.High, p.Count, p.Trials, p.Low, p.High, b.Confidence)
	}
}

// A target gap the design does not open is refused with the list of the
// gaps it does open.
func TestClosedTargetRefused(t *testing.T) {
	c := testChain(t, 120, 0.1)
	_, err := Run(context.Background(), c, Options{Sigmas: []float64{0.01}, Trials: 4, Gap: []int{3, -5}})
	if err == nil || !strings.Contains(err.Error(), "does not open the gap (3, -5)") || !strings.Contains(err.Error(), "(0, 1)") {
		t.Errorf("error %v, want a refusal listing the open gaps", err)
	}
}

// The Wilson score interval against values worked by hand from its
// formula (Wilson 1927): 0 of 10 → [0, 0.2775], 10 of 10 → [0.7225, 1],
// 5 of 10 → [0.2366, 0.7634] (z = 1.95996).
func TestWilsonInterval(t *testing.T) {
	for _, c := range []struct {
		k, n   int
		lo, hi float64
	}{{0, 10, 0, 0.2775}, {10, 10, 0.7225, 1}, {5, 10, 0.2366, 0.7634}} {
		p := NewProportion(c.k, c.n)
		if math.Abs(p.Low-c.lo) > 1e-4 || math.Abs(p.High-c.hi) > 1e-4 {
			t.Errorf("%d/%d: [%.4f, %.4f], want [%.4f, %.4f]", c.k, c.n, p.Low, p.High, c.lo, c.hi)
		}
	}
}
