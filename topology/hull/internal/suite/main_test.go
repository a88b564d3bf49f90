package main

import (
	"bytes"
	"encoding/json"
	"math"
	"strings"
	"testing"

	"phasonhull/topology"
	"phasonhull/topology/hull"
)

// quickCase returns the case of the quick grid with the given name.
func quickCase(t *testing.T, name string) Case {
	t.Helper()
	cases, err := Grid(Config{Quick: true, Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range cases {
		if c.Name == name {
			return c
		}
	}
	t.Fatalf("no case %q in the quick grid", name)
	return Case{}
}

// Four quick cases through the suite's own code path (grid, generation,
// centroid route, analysis, comparison, report), so that the program keeps
// compiling and measuring what it says.
func TestQuickCases(t *testing.T) {
	names := []string{"circle/N500/σ0%", "point/N500/σ1%", "finite/N100/σ1%", "circle/centroids/N500/σ1%"}
	if testing.Short() {
		names = names[1:3]
	}
	rep := &Report{Seed: 1, Quick: true}
	for _, name := range names {
		o, err := RunCase(quickCase(t, name), 1)
		if err != nil {
			t.Fatal(err)
		}
		rep.Outcomes = append(rep.Outcomes, o)
		if !o.Correct {
			t.Errorf("%s: reported %s period %d (%s), want %s period %d", name, o.Reported, o.Period, o.Reason, o.Case.Class, o.Case.Period)
			continue
		}
		// The scatter about the fitted hull is the position noise (common
		// practice: the residual RMS estimates σ, to about 1/√(2N)).
		if o.Case.Noise > 0 {
			if o.Residual == nil || math.Abs(*o.Residual/o.Case.Noise-1) > 0.2 {
				t.Errorf("%s: residual %v, want the noise %g within 20%%", name, o.Residual, o.Case.Noise)
			}
		}
		switch {
		case o.Case.Class != hull.Circle:
			if o.AngleError != nil {
				t.Errorf("%s: an angle error for a %s hull", name, o.Case.Class)
			}
		case o.AngleError == nil || o.Uncertainty == nil:
			t.Errorf("%s: no angle error for a circle", name)
		case o.Case.Noise == 0:
			// x_n = n + a sin 2π(nθ+φ) has a circle hull turned by θ
			// (common practice); noise-free the fit recovers it exactly.
			if *o.AngleError > exactAngleGoal {
				t.Errorf("%s: angle error %.3g, want ≤ %g", name, *o.AngleError, exactAngleGoal)
			}
		default:
			// A Gaussian error beyond 5 standard uncertainties has odds
			// below 1e-6.
			if *o.AngleError > 5**o.Uncertainty {
				t.Errorf("%s: angle error %.3g beyond 5 × the uncertainty %.3g", name, *o.AngleError, *o.Uncertainty)
			}
		}
	}
	rep.Confusion = confusion(rep.Outcomes)
	rep.Breakdown = breakdowns(rep.Outcomes)
	total := 0
	for _, row := range rep.Confusion.Counts {
		for _, n := range row {
			total += n
		}
	}
	if total != len(names) {
		t.Errorf("confusion matrix holds %d cases, want %d", total, len(names))
	}
	var text bytes.Buffer
	if err := writeText(&text, rep); err != nil {
		t.Fatal(err)
	}
	for _, name := range names {
		if !strings.Contains(text.String(), name) {
			t.Errorf("the text report does not list %s", name)
		}
	}
	var js bytes.Buffer
	if err := writeJSON(&js, rep); err != nil {
		t.Fatal(err)
	}
	var back Report
	if err := json.Unmarshal(js.Bytes(), &back); err != nil {
		t.Fatalf("the JSON report does not read back: %v", err)
	}
	if len(back.Outcomes) != len(names) {
		t.Errorf("JSON report holds %d cases, want %d", len(back.Outcomes), len(names))
	}
}

// The grid covers every true class, and the full grid has at least 60
// cases; case seeds depend on the name and the suite seed only.
func TestGrid(t *testing.T) {
	full, err := Grid(Config{Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	if len(full) < 60 {
		t.Errorf("full grid has %d cases, want at least 60", len(full))
	}
	seen := map[hull.Class]bool{}
	names := map[string]bool{}
	for _, c := range full {
		seen[c.Class] = true
		if names[c.Name] {
			t.Errorf("case name %s used twice", c.Name)
		}
		names[c.Name] = true
		if err := c.Spec.Validate(); err != nil {
			t.Errorf("%s: %v", c.Name, err)
		}
	}
	for _, class := range trueClasses {
		if !seen[class] {
			t.Errorf("no case of class %s", class)
		}
	}
	if caseSeed(1, "a") != caseSeed(1, "a") || caseSeed(1, "a") == caseSeed(1, "b") || caseSeed(1, "a") == caseSeed(2, "a") {
		t.Error("case seeds are not a function of the suite seed and the name")
	}
}

// The closed-form Cramér–Rao bound for a real sinusoid's frequency (Kay,
// Fundamentals of Statistical Signal Processing, 1993, Example 3.14) is a
// large-N approximation without the linear trend; the bound from inverting
// the Fisher information of the fitted model (trend included) must agree
// with it closely at N = 500, since the trend is asymptotically orthogonal
// to the sinusoid's parameters.
func TestCramerRao(t *testing.T) {
	for _, n := range []int{500, 1000} {
		kay := kayCRB(n, 0.1, 0.01)
		exact, err := exactCRB(n, 0.1, sqrt2m1, 0.13, 0.01)
		if err != nil {
			t.Fatal(err)
		}
		if r := exact / kay; math.Abs(r-1) > 0.02 {
			t.Errorf("N = %d: exact CRB %.4g, closed form %.4g: ratio %.4f, want within 2%%", n, exact, kay, r)
		}
	}
	// The bound scales as σ² and as 1/N³ (common practice).
	if r := kayCRB(1000, 0.1, 0.02) / kayCRB(500, 0.1, 0.01); math.Abs(r-4*(500.0*(500*500-1))/(1000*(1000*1000-1))) > 1e-12 {
		t.Errorf("closed-form CRB scaling ratio %v", r)
	}
}

// The rotation-number reference of the circle-map cases: a rigid rotation
// (K = 0) turns by Ω exactly (common practice); at K = 1 and
// Ω = 0.6066610635 the rotation number is the golden mean (Shenker,
// Physica D 5, 1982; Ω from memory, so only to the digits given); and the
// Ω found for K = 0.5 gives the golden mean.
func TestCircleMapReference(t *testing.T) {
	rho, bound, _, err := circleMapRotation(0.3, 0)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(rho-0.3) > 1e-12 || bound > 1e-12 {
		t.Errorf("K = 0, Ω = 0.3: ρ = %.15f ± %.2g, want 0.3", rho, bound)
	}
	rho, bound, _, err = circleMapRotation(0.6066610635, 1)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(rho-golden) > 1e-8 {
		t.Errorf("K = 1: ρ = %.15f ± %.2g, want the golden mean %.15f", rho, bound, golden)
	}
	if testing.Short() {
		return
	}
	omega, err := omegaFor(golden, 0.5)
	if err != nil {
		t.Fatal(err)
	}
	rho, bound, _, err = circleMapRotation(omega, 0.5)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(rho-golden) > 1e-10 || bound > 1e-12 {
		t.Errorf("K = 0.5, Ω = %v: ρ = %.15f ± %.2g, want the golden mean", omega, rho, bound)
	}
}

// Two bases of the same module are at distance 0; moving one angle by δ
// puts them about δ apart.
func TestAngleDistance(t *testing.T) {
	a := []float64{sqrt2m1, sqrt3m1}
	b := topology.CanonicalBasis([]float64{sqrt2m1, sqrt2m1 + sqrt3m1})
	if d := angleDistance(a, b); d != 0 {
		t.Errorf("same module in two bases: distance %v, want 0", d)
	}
	const delta = 1e-6
	b[0] += delta
	if d := angleDistance(a, b); d < delta/3 || d > 1.01*delta {
		t.Errorf("one angle moved by %g: distance %v", delta, d)
	}
	if d := angleDistance([]float64{0.3}, []float64{0.7}); d > 1e-15 {
		t.Errorf("0.3 and 0.7 fold to the same angle: distance %v", d)
	}
}
