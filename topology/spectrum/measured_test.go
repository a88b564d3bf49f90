package spectrum

import (
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"

	"phasonhull/pattern/design"
	"phasonhull/topology"
)

// Measured levels — here the exact levels of an almost-Mathieu chain,
// given in shuffled order — give the same gaps, IDS and labels as the
// operator's own analysis, apart from gaps that boundary states split (the
// operator tells them by their eigenvectors; a list of levels cannot).
func TestMeasuredMatchesOperator(t *testing.T) {
	op := harper(t, 800, 1.5, golden, 0.3, Open)
	want := analyze(t, op, Options{Angles: []float64{golden}, Method: Values})
	v := slices.Clone(want.Values)
	rng := rand.New(rand.NewPCG(3, 0))
	rng.Shuffle(len(v), func(i, j int) { v[i], v[j] = v[j], v[i] })
	got, err := AnalyzeMeasured(v, Options{Angles: []float64{golden}})
	if err != nil {
		t.Fatal(err)
	}
	if got.Method != Measured {
		t.Errorf("method %s", got.Method)
	}
	byBelow := map[int]Gap{}
	for _, g := range got.Gaps {
		byBelow[g.Below] = g
	}
	compared := 0
	for _, w := range want.Gaps {
		if len(w.Boundary) > 0 {
			continue
		}
		g, ok := byBelow[w.Below]
		if !ok || g.Lower != w.Lower || g.Upper != w.Upper || g.IDS != w.IDS || (g.Label == nil) != (w.Label == nil) ||
			(g.Label != nil && !slices.Equal(g.Label.Coeffs, w.Label.Coeffs)) {
			t.Errorf("operator gap %+v: measured %+v (found %v)", w, g, ok)
		}
		compared++
	}
	if compared < 6 {
		t.Errorf("only %d gaps without boundary states compared", compared)
	}
	// And no measured gap is missing from the operator's list, unless a
	// boundary state splits an operator gap there.
	for _, g := range got.Gaps {
		found := false
		for _, w := range want.Gaps {
			found = found || (w.Below == g.Below && w.Lower == g.Lower) || (len(w.Boundary) > 0 && g.Lower >= w.Lower && g.Upper <= w.Upper)
		}
		if !found {
			t.Errorf("measured gap %+v has no operator gap", g)
		}
	}
}

// A NaN level is refused.
func TestAnalyzeMeasuredRefusesNaN(t *testing.T) {
	if _, err := AnalyzeMeasured([]float64{1, math.NaN()}, Options{}); err == nil {
		t.Error("NaN level accepted")
	}
}

// Bad options are refused with the reason.
func TestOptionsRefused(t *testing.T) {
	op := harper(t, 50, 1, golden, 0, Open)
	for _, c := range []struct {
		o    Options
		want string
	}{
		{Options{MinGap: -1}, "minimum gap"},
		{Options{MinGap: 1}, "minimum gap"},
		{Options{Angles: []float64{0}}, "angle"},
		{Options{Angles: []float64{0.3}, Period: 3}, "not both"},
		{Options{Angles: []float64{0.1, 0.2, 0.3}}, "at most two"},
		{Options{MaxCoeff: -1}, "coefficient"},
		{Options{Method: "magic"}, "method"},
	} {
		if _, err := Analyze(op, c.o); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("Analyze with %+v: %v, want an error about %q", c.o, err, c.want)
		}
	}
	nnn := build(t, lattice(t, DenseLimit+1), Model{NNN: 0.1})
	if _, err := Analyze(nnn, Options{}); err == nil || !strings.Contains(err.Error(), "next-nearest") {
		t.Errorf("next-nearest bonds on %d sites: %v, want a refusal", DenseLimit+1, err)
	}
}

// An explicit label set labels like the period it lists (k/p, Bloch's
// theorem; common practice), and mixing it with a period is refused.
func TestExplicitLabels(t *testing.T) {
	s := design.NewSpec("periodic")
	s.Sites, s.Cell = 300, []float64{1, 1.4, 0.8}
	op := build(t, generate(t, s), Model{Law: Exp{T0: 1, Decay: 1.5}, Ends: Periodic, Closing: 0.8})
	byPeriod := analyze(t, op, Options{Period: 3, MinGap: 0.01})
	byList := analyze(t, op, Options{Labels: topology.PeriodicLabels(3), MinGap: 0.01})
	if len(byPeriod.Gaps) != 2 || len(byList.Gaps) != 2 {
		t.Fatalf("%d and %d gaps, want 2", len(byPeriod.Gaps), len(byList.Gaps))
	}
	for i := range byPeriod.Gaps {
		a, b := byPeriod.Gaps[i].Label, byList.Gaps[i].Label
		if a == nil || b == nil || !slices.Equal(a.Coeffs, b.Coeffs) || a.IDS != b.IDS {
			t.Errorf("gap %d: by period %+v, by list %+v", i, a, b)
		}
	}
	if _, err := Analyze(op, Options{Labels: topology.PeriodicLabels(3), Period: 3}); err == nil {
		t.Error("a label set with a period was accepted")
	}
}
