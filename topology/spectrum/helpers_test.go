package spectrum

import (
	"math"
	"testing"

	"phasonhull/pattern"
	"phasonhull/pattern/design"
)

// golden is θ = (√5 − 1)/2, the inverse golden ratio.
var golden = (math.Sqrt(5) - 1) / 2

// lattice returns n sites one unit apart.
func lattice(t testing.TB, n int) *pattern.Pattern {
	t.Helper()
	x := make([]float64, n)
	for i := range x {
		x[i] = float64(i)
	}
	p, err := pattern.New(x, "", "lattice")
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// generate builds a design or fails the test.
func generate(t testing.TB, s design.Spec) *pattern.Pattern {
	t.Helper()
	p, err := design.Generate(s)
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// build builds an operator or fails the test.
func build(t testing.TB, p *pattern.Pattern, m Model) *Operator {
	t.Helper()
	op, err := New(p, m)
	if err != nil {
		t.Fatal(err)
	}
	return op
}

// analyze runs Analyze or fails the test.
func analyze(t testing.TB, op *Operator, opt Options) *Result {
	t.Helper()
	r, err := Analyze(op, opt)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// harper is the almost-Mathieu operator on n sites: hopping 1, on-site
// 2λ cos 2π(nθ + φ).
func harper(t testing.TB, n int, lambda, theta, phase float64, ends Ends) *Operator {
	t.Helper()
	return build(t, lattice(t, n), Model{OnSite: OnSite{Lambda: lambda, Theta: theta, Phase: phase}, Ends: ends})
}

// frac is the fractional part in [0, 1).
func frac(x float64) float64 { return x - math.Floor(x) }
