package main

import (
	"bytes"
	"encoding/json"
	"math"
	"slices"
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
	if d := angleDistance(a, b, 1); d != 0 {
		t.Errorf("same module in two bases: distance %v, want 0", d)
	}
	const delta = 1e-6
	b[0] += delta
	if d := angleDistance(a, b, 1); d < delta/3 || d > 1.01*delta {
		t.Errorf("one angle moved by %g: distance %v", delta, d)
	}
	if d := angleDistance([]float64{0.3}, []float64{0.7}, 1); d > 1e-15 {
		t.Errorf("0.3 and 0.7 fold to the same angle: distance %v", d)
	}
}

// On p components the module is (1/p)Z + Zθ: θ + k/p and −θ are the same
// answer, another angle is not.
func TestAngleDistanceComponents(t *testing.T) {
	theta := sqrt2m1
	for _, b := range []float64{theta + 0.5, 1 - theta, 0.5 - theta} {
		if d := angleDistance([]float64{theta}, []float64{b}, 2); d > 1e-12 {
			t.Errorf("p = 2: %v against θ = %v: distance %v, want 0", b, theta, d)
		}
	}
	if d := angleDistance([]float64{theta}, []float64{theta + 0.5}, 1); d < 0.1 {
		t.Errorf("p = 1: θ + ½ at distance %v from θ", d)
	}
	const delta = 1e-6
	if d := angleDistance([]float64{theta}, []float64{theta + 1.0/3 + delta}, 3); d < delta/3 || d > 1.01*delta {
		t.Errorf("p = 3: θ + ⅓ + δ at distance %v, want about δ = %g", d, delta)
	}
	// Three angles, another basis of the same module.
	a := threeAngles
	b := topology.CanonicalBasis([]float64{a[0] + a[1], a[1], a[2] - a[0]})
	if d := angleDistance(a, b, 1); d != 0 {
		t.Errorf("3-torus, same module in two bases: distance %v", d)
	}
}

// The class of p components × a d-torus (Künneth: Betti numbers
// p·C(d, k); common practice), and the grid's new families computed from
// their parameters.
func TestHullOf(t *testing.T) {
	for _, c := range []struct {
		p, d   int
		class  hull.Class
		period int
		comps  int
	}{
		{1, 0, hull.Point, 1, 0}, {3, 0, hull.Finite, 3, 0}, {1, 1, hull.Circle, 0, 0},
		{2, 1, hull.Circle, 0, 2}, {1, 2, hull.Torus, 0, 0}, {4, 2, hull.Torus, 0, 4}, {1, 3, torus3, 0, 0},
	} {
		var k Case
		k.setHull(c.p, c.d)
		if k.Class != c.class || k.Period != c.period || k.Components != c.comps {
			t.Errorf("p = %d, d = %d: %s period %d components %d, want %s %d %d", c.p, c.d, k.Class, k.Period, k.Components, c.class, c.period, c.comps)
		}
	}
	full, err := Grid(Config{Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	count := map[string]int{}
	for _, c := range full {
		count[label(c.Class, 0, c.Components)]++
		if c.Spec.Family == "decorated" && c.Components != cellPeriodOf(c.Spec.Cell) {
			t.Errorf("%s: %d components for a cell of period %d", c.Name, c.Components, cellPeriodOf(c.Spec.Cell))
		}
	}
	for _, l := range []string{"circle×2", "circle×3", "circle×4", "torus×2", "torus×3", "torus3"} {
		if count[l] == 0 {
			t.Errorf("no case of %s in the full grid", l)
		}
	}
}

// The deciding sizes: a lattice with position noise against independent
// spacings needs ((2.326+1.282)/0.5)² ≈ 52.1 spacings, so 54 sites; a
// noise-free lattice or a noise-free harmonic decides at any size; a cell
// needs three periods.
func TestDecidingSites(t *testing.T) {
	if n := autocorrSites(); n != 54 {
		t.Errorf("autocorrSites = %d, want 54", n)
	}
	for _, c := range []struct {
		c    Case
		want int
	}{
		{shortChain(hull.Point, 16, 0), 0},
		{shortChain(hull.Point, 16, 0.01), 54},
		{shortChain(disordered, 16, 0), 54},
		{shortChain(hull.Circle, 16, 0), 0},
		{shortChain(hull.Finite, 16, 0), 10},
	} {
		if got := decidingSites(c.c); got != c.want {
			t.Errorf("%s: deciding size %d, want %d", c.c.Name, got, c.want)
		}
	}
	// A cell decorating two angles decides where its cell and its weaker
	// line both do: where the same cell decorating that line alone does.
	for _, noise := range []float64{0, 0.01, 0.1} {
		two := decoratedAngles(scaleToMean([]float64{0.88, 1.12}), []float64{sqrt2m1, 2 - math.Sqrt(3)}, []float64{0.08, 0.06}, noise)
		one := decorated(scaleToMean([]float64{0.88, 1.12}), sqrt2m1, 0.06, noise)
		if a, b := decidingSites(two), decidingSites(one); a != b || a >= 1_000_000 {
			t.Errorf("σ = %g: a cell decorating two angles decides at %d sites, the cell with the weaker line alone at %d", noise, a, b)
		}
	}
	// A line of amplitude 0.1 under 3% noise decides where
	// n·a²/(4σ²) = 2 ln(n/0.02), between 10 and 11 sites by hand:
	// 10·0.01/0.0036 = 27.8 < 2 ln 500 = 12.4 is already true, so the
	// line decides from 8 on; at σ = 10% it needs n·0.25 ≥ 2 ln(50n).
	if !lineDetected(8, 0.1, 0.03) || lineDetected(40, 0.1, 0.1) || !lineDetected(80, 0.1, 0.1) {
		t.Error("lineDetected disagrees with the hand computation")
	}
}

// Confident wrong answers: a wrong class, a wrong number of components, an
// angle beyond 5 uncertainties; unresolved never is one, and below the
// deciding size it is correct.
func TestConfidentWrong(t *testing.T) {
	circle2 := decorated(scaleToMean([]float64{0.88, 1.12}), sqrt2m1, 0.1, 0.01)
	circle2.Name, circle2.Spec.Sites = "c2", 2000
	short := shortChain(hull.Point, 16, 0.01)
	short.MinSites = decidingSites(short)
	outs := []Outcome{
		{Case: circle2, Reported: hull.Circle, Components: 2, Angles: []float64{0.5 - sqrt2m1 + 1e-4}}, // right, angle 1e-4 off
		{Case: circle2, Reported: hull.Circle, Angles: []float64{sqrt2m1}},                             // one circle: wrong
		{Case: short, Reported: hull.Unresolved},
		{Case: short, Reported: disordered},
	}
	for i, unc := range [][]float64{{1e-4}, {1e-4}, nil, nil} {
		outs[i].assess(unc)
	}
	for i, want := range []struct{ correct, wrong bool }{{true, false}, {false, true}, {true, false}, {false, true}} {
		if outs[i].Correct != want.correct || outs[i].ConfidentWrong != want.wrong {
			t.Errorf("outcome %d (%s, %s): correct %v, confident wrong %v (%s), want %v, %v", i, outs[i].Case.Name, outs[i].Reported,
				outs[i].Correct, outs[i].ConfidentWrong, outs[i].Wrong, want.correct, want.wrong)
		}
	}
	// The same angle with a stated uncertainty 10 times smaller is
	// confidently wrong.
	o := Outcome{Case: circle2, Reported: hull.Circle, Components: 2, Angles: []float64{sqrt2m1 + 1e-4}}
	if o.assess([]float64{1e-5}); !o.ConfidentWrong || !strings.Contains(o.Wrong, "stated uncertainties") {
		t.Errorf("an angle 10 uncertainties off: confident wrong %v (%s)", o.ConfidentWrong, o.Wrong)
	}
	cf := confusion(outs)
	if !slices.Equal(cf.Rows, []string{"point", "finite", "circle", "circle×2", "torus", "torus3", "cantor", "disordered"}) {
		t.Errorf("rows %v", cf.Rows)
	}
	i, j := slices.Index(cf.Rows, "circle×2"), slices.Index(cf.Cols, "circle×2")
	if j < 0 || cf.Counts[i][j] != 1 || cf.Counts[i][slices.Index(cf.Cols, "circle")] != 1 || cf.Wrong[i] != 1 || cf.Correct[i] != 1 {
		t.Errorf("circle×2 row: cols %v, counts %v, correct %v, wrong %v", cf.Cols, cf.Counts[i], cf.Correct, cf.Wrong)
	}
	n, by := falseCalls(outs)
	if n != 2 || len(by) != 2 || by[0].Sites != 16 || by[0].Rate != 0.5 || by[1].Rate != 0.5 {
		t.Errorf("false calls %d, by size %+v", n, by)
	}
}
