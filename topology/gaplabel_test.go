package topology

import (
	"encoding/json"
	"math"
	"slices"
	"testing"
)

// checkLabels verifies the invariants every label list must hold: sorted,
// strictly inside (0, 1), each IDS equal to its integer combination.
func checkLabels(t *testing.T, angles []float64, ls []Label) {
	t.Helper()
	for i, l := range ls {
		if len(l.Coeffs) != len(angles)+1 {
			t.Fatalf("label %d: %d coefficients for %d angles", i, len(l.Coeffs), len(angles))
		}
		v := float64(l.Coeffs[0]) + dotInt(l.Coeffs[1:], angles)
		if math.Abs(v-l.IDS) > 1e-12 {
			t.Fatalf("label %d: IDS %.15f but coefficients %v give %.15f", i, l.IDS, l.Coeffs, v)
		}
		if !(l.IDS > 0 && l.IDS < 1) {
			t.Fatalf("label %d: IDS %g not inside (0, 1)", i, l.IDS)
		}
		if i > 0 && !(ls[i-1].IDS < l.IDS) {
			t.Fatalf("labels %d, %d not strictly increasing: %g, %g", i-1, i, ls[i-1].IDS, l.IDS)
		}
	}
}

func TestLabelsOneAngle(t *testing.T) {
	// For irrational θ every m ≠ 0 gives exactly one n with n + mθ in
	// (0, 1), so |m| ≤ M gives 2M labels (common practice).
	for _, th := range []float64{golden, math.Sqrt2 - 1, math.Pi - 3} {
		for _, M := range []int{1, 2, 5, 13, 40} {
			ls := Labels([]float64{th}, M)
			if len(ls) != 2*M {
				t.Errorf("θ = %g, M = %d: %d labels, want %d", th, M, len(ls), 2*M)
			}
			checkLabels(t, []float64{th}, ls)
			// Each m appears once.
			seen := map[int]bool{}
			for _, l := range ls {
				if seen[l.Coeffs[1]] || l.Coeffs[1] == 0 || abs(l.Coeffs[1]) > M {
					t.Fatalf("θ = %g, M = %d: coefficient m = %d repeated or out of range", th, M, l.Coeffs[1])
				}
				seen[l.Coeffs[1]] = true
			}
		}
	}
	// m = ±1 for the golden mean: θ and 1 − θ (closed form).
	ls := Labels([]float64{golden}, 1)
	if math.Abs(ls[0].IDS-(1-golden)) > 1e-15 || !slices.Equal(ls[0].Coeffs, []int{1, -1}) ||
		math.Abs(ls[1].IDS-golden) > 1e-15 || !slices.Equal(ls[1].Coeffs, []int{0, 1}) {
		t.Errorf("golden labels, M = 1: %v", ls)
	}
}

func TestLabelsTwoAngles(t *testing.T) {
	// For 1, θ1, θ2 rationally independent, each (m1, m2) ≠ (0, 0) gives one
	// label: (2M+1)² − 1 (common practice).
	angles := []float64{golden, math.Sqrt2 - 1}
	for _, M := range []int{1, 3, 6} {
		ls := Labels(angles, M)
		want := (2*M+1)*(2*M+1) - 1
		if len(ls) != want {
			t.Errorf("M = %d: %d labels, want %d", M, len(ls), want)
		}
		checkLabels(t, angles, ls)
	}
}

func TestLabelsRational(t *testing.T) {
	// θ = 1/4 with |m| ≤ 6: the values are 1/4, 1/2, 3/4 (m ≡ 0 mod 4 gives
	// an integer and no label).
	ls := Labels([]float64{0.25}, 6)
	want := []Label{{0.25, []int{0, 1}}, {0.5, []int{0, 2}}, {0.75, []int{1, -1}}}
	if len(ls) != len(want) {
		t.Fatalf("θ = 1/4: labels %v, want %v", ls, want)
	}
	for i := range want {
		if ls[i].IDS != want[i].IDS || !slices.Equal(ls[i].Coeffs, want[i].Coeffs) {
			t.Errorf("θ = 1/4: label %d = %v, want %v", i, ls[i], want[i])
		}
	}
	// Non-dyadic rationals merge duplicates that differ only by rounding.
	for _, p := range []int{3, 5, 7, 10, 12} {
		ls := Labels([]float64{1 / float64(p)}, 3*p)
		if len(ls) != p-1 {
			t.Errorf("θ = 1/%d: %d labels, want %d", p, len(ls), p-1)
		}
	}
}

func TestPeriodicLabels(t *testing.T) {
	for _, p := range []int{2, 3, 4, 5, 8, 13, 21} {
		ls := PeriodicLabels(p)
		if len(ls) != p-1 {
			t.Fatalf("p = %d: %d labels", p, len(ls))
		}
		ref := Labels([]float64{1 / float64(p)}, p-1)
		if len(ref) != p-1 {
			t.Fatalf("p = %d: Labels gives %d", p, len(ref))
		}
		for k := 1; k < p; k++ {
			l := ls[k-1]
			if l.IDS != float64(k)/float64(p) {
				t.Errorf("p = %d: label %d IDS %g, want %d/%d", p, k, l.IDS, k, p)
			}
			// Exact integer check: n·p + m = k.
			if l.Coeffs[0]*p+l.Coeffs[1] != k {
				t.Errorf("p = %d: label %d coefficients %v do not give %d/%d", p, k, l.Coeffs, k, p)
			}
			if math.Abs(ref[k-1].IDS-l.IDS) > 1e-15 || !slices.Equal(ref[k-1].Coeffs, l.Coeffs) {
				t.Errorf("p = %d: label %d = %v, Labels gives %v", p, k, l, ref[k-1])
			}
		}
	}
	if PeriodicLabels(1) != nil || PeriodicLabels(0) != nil {
		t.Error("PeriodicLabels(p < 2) is not nil")
	}
}

func TestMatchLabel(t *testing.T) {
	ls := Labels([]float64{golden}, 3)
	// The labels for |m| ≤ 3 of the golden mean: the smallest gap between
	// them bounds what can be resolved.
	minGap, closest := 1.0, 0
	for i := 1; i < len(ls); i++ {
		if g := ls[i].IDS - ls[i-1].IDS; g < minGap {
			minGap, closest = g, i
		}
	}
	for _, l := range ls {
		got, ok := MatchLabel(l.IDS+0.1*minGap, ls, 0.3*minGap)
		if !ok || !slices.Equal(got.Coeffs, l.Coeffs) {
			t.Errorf("IDS %g: matched %v, %v; want %v", l.IDS+0.1*minGap, got, ok, l)
		}
	}
	// Too far from every label.
	if _, ok := MatchLabel(ls[0].IDS+0.45*minGap, ls, 0.3*minGap); ok {
		t.Error("matched a value farther than tol from every label")
	}
	// Ambiguous: tol wider than the gap between two labels, whether the
	// second one is within tol of the value or only of the nearest label.
	if _, ok := MatchLabel(ls[closest].IDS, ls, 1.01*minGap); ok {
		t.Error("matched with two labels inside tol")
	}
	three := []Label{{0.3, []int{0, 1}}, {0.4, []int{0, 2}}, {0.8, []int{0, 3}}}
	if _, ok := MatchLabel(0.42, three, 0.11); ok {
		t.Error("matched 0.4 with 0.3 within tol of it")
	}
	if got, ok := MatchLabel(0.42, three, 0.09); !ok || got.IDS != 0.4 {
		t.Errorf("MatchLabel(0.42, tol 0.09) = %v, %v; want 0.4", got, ok)
	}
	if _, ok := MatchLabel(0.5, nil, 1); ok {
		t.Error("matched in an empty list")
	}
}

// TestLabelJSON pins the JSON form of a label, which the analysis and the
// spectrum reports both print: {"ids": …, "coeffs": […]}.
func TestLabelJSON(t *testing.T) {
	b, err := json.Marshal(Label{IDS: 0.25, Coeffs: []int{1, -2}})
	if err != nil {
		t.Fatal(err)
	}
	if got, want := string(b), `{"ids":0.25,"coeffs":[1,-2]}`; got != want {
		t.Errorf("JSON form %s, want %s", got, want)
	}
	var back Label
	if err := json.Unmarshal(b, &back); err != nil || back.IDS != 0.25 || !slices.Equal(back.Coeffs, []int{1, -2}) {
		t.Errorf("read back %+v (%v)", back, err)
	}
}

func TestCoeffString(t *testing.T) {
	for _, c := range []struct {
		l    Label
		want string
	}{
		{Label{IDS: 0.2, Coeffs: []int{-1, 4}}, "(-1, 4)"},
		{Label{IDS: 0.3, Coeffs: []int{0, 1, -2}}, "(0, 1, -2)"},
		{Label{}, "()"},
	} {
		if got := c.l.CoeffString(); got != c.want {
			t.Errorf("%v: CoeffString() = %q, want %q", c.l.Coeffs, got, c.want)
		}
	}
}

// List puts the labels of lowest order first, carries each IDS's
// uncertainty Σ|m_i|·σ_i, and blurs exactly the labels whose uncertainty
// exceeds half the distance to their nearest neighbour.
func TestList(t *testing.T) {
	theta, sigma := 0.2763, 0.0015
	labels := Labels([]float64{theta}, 12)
	got := List(labels, []float64{sigma})
	if len(got) != len(labels) {
		t.Fatalf("%d listed, want %d", len(got), len(labels))
	}
	for i := 1; i < len(got); i++ {
		a, b := got[i-1], got[i]
		if a.Order() > b.Order() || (a.Order() == b.Order() && a.IDS >= b.IDS) {
			t.Errorf("rows %d and %d out of order: %v (order %d) before %v (order %d)", i-1, i, a.Label, a.Order(), b.Label, b.Order())
		}
	}
	if got[0].Order() != 1 || got[0].IDS != theta {
		t.Errorf("first row %v, want (0, 1) at θ", got[0].Label)
	}
	blurred := 0
	for _, l := range got {
		m := l.Coeffs[1]
		if m < 0 {
			m = -m
		}
		if want := float64(m) * sigma; math.Abs(l.Uncertainty-want) > 1e-15 {
			t.Errorf("%v: uncertainty %g, want %g", l.Label, l.Uncertainty, want)
		}
		near := math.Inf(1)
		for _, o := range labels {
			if o.IDS != l.IDS {
				near = min(near, math.Abs(o.IDS-l.IDS))
			}
		}
		if want := l.Uncertainty > near/2; l.Blurred != want {
			t.Errorf("%v: blurred %v, want %v (uncertainty %g, neighbour at %g)", l.Label, l.Blurred, want, l.Uncertainty, near)
		}
		if l.Blurred {
			blurred++
		}
	}
	// At this uncertainty the order-12 labels (±0.018) are blurred, the
	// order-1 ones (±0.0015) are not: the test sees both kinds.
	if blurred == 0 || got[0].Blurred {
		t.Errorf("%d blurred, first row blurred %v: want some, not the first", blurred, got[0].Blurred)
	}
	// Exact angles: no uncertainty, nothing blurred.
	for _, l := range List(labels, nil) {
		if l.Uncertainty != 0 || l.Blurred {
			t.Errorf("%v with exact angles: uncertainty %g, blurred %v", l.Label, l.Uncertainty, l.Blurred)
		}
	}
}
