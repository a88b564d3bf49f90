package topology

import (
	"errors"
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"

	"phasonhull/pattern/tiling"
)

// Closed-form relations: minimal polynomials and Machin's formula.
func TestFindRelationKnown(t *testing.T) {
	phi := (1 + math.Sqrt(5)) / 2
	a := math.Sqrt2 + math.Sqrt(3)
	c7 := math.Cos(2 * math.Pi / 7)
	cases := []struct {
		name string
		x    []float64
		want []int
	}{
		// φ² = φ + 1.
		{"golden ratio", []float64{1, phi, phi * phi}, []int{-1, -1, 1}},
		// √2 + √3 is a root of x⁴ − 10x² + 1.
		{"√2+√3", []float64{1, a, a * a, a * a * a, a * a * a * a}, []int{1, 0, -10, 0, 1}},
		// cos(2π/7) is a root of 8x³ + 4x² − 4x − 1.
		{"cos 2π/7", []float64{1, c7, c7 * c7, c7 * c7 * c7}, []int{-1, -4, 4, 8}},
		// Machin: π = 16 arctan(1/5) − 4 arctan(1/239).
		{"Machin", []float64{math.Pi, math.Atan(1.0 / 5), math.Atan(1.0 / 239)}, []int{1, -16, 4}},
	}
	const eps = 1e-13
	for _, c := range cases {
		r, ok := FindRelation(c.x, eps, CoefficientBound(len(c.x), eps))
		if !ok {
			t.Errorf("%s: no relation found (bound %d)", c.name, CoefficientBound(len(c.x), eps))
			continue
		}
		if !slices.Equal(r.Coeffs, c.want) {
			t.Errorf("%s: relation %v, want %v", c.name, r.Coeffs, c.want)
		}
		if r.Residual > eps*float64(absSum(r.Coeffs)) {
			t.Errorf("%s: residual %g", c.name, r.Residual)
		}
	}
	// π is transcendental: no polynomial relation of degree 3 exists.
	if r, ok := FindRelation([]float64{1, math.Pi, math.Pi * math.Pi, math.Pi * math.Pi * math.Pi}, eps, CoefficientBound(4, eps)); ok {
		t.Errorf("relation %v among powers of π", r.Coeffs)
	}
	// A relation with a coefficient above the bound is not accepted.
	if r, ok := FindRelation([]float64{math.Pi, math.Atan(1.0 / 5), math.Atan(1.0 / 239)}, eps, 15); ok {
		t.Errorf("Machin's relation accepted with bound 15: %v", r.Coeffs)
	}
}

// CoefficientBound keeps chance relations among generic numbers near the
// stated rate α = 0.01 per search, and a bound five times larger does not.
func TestCoefficientBoundChanceRate(t *testing.T) {
	const trials, eps = 2000, 1e-5
	rng := rand.New(rand.NewPCG(11, 0))
	b := CoefficientBound(3, eps)
	if b < 1 {
		t.Fatalf("bound %d", b)
	}
	var atBound, above int
	for range trials {
		x := []float64{1, rng.Float64(), rng.Float64()}
		// Move the numbers by up to eps, as measurement does.
		if _, ok := FindRelation(x, eps, b); ok {
			atBound++
		}
		if _, ok := FindRelation(x, eps, 5*b); ok {
			above++
		}
	}
	// α·trials = 20 expected at the bound (a Poisson count: 40 is 4.5
	// standard deviations above).
	if atBound > 40 {
		t.Errorf("%d chance relations in %d searches with bound %d; α = 0.01 expects about %d", atBound, trials, b, trials/100)
	}
	if above < 4*max(atBound, 5) {
		t.Errorf("bound %d: %d chance relations, bound %d: %d; expected many more at the larger bound", b, atBound, 5*b, above)
	}
	t.Logf("chance relations in %d searches: %d at bound %d, %d at bound %d", trials, atBound, b, above, 5*b)
}

// fibonacciWord returns the first n letters of the fixed point of
// A → AB, B → A.
func fibonacciWord(n int) string {
	w := "A"
	for len(w) < n {
		w = strings.NewReplacer("A", "AB", "B", "A").Replace(w)
	}
	return w[:n]
}

func thueMorseWord(n int) string {
	w := "A"
	for len(w) < n {
		w = strings.NewReplacer("A", "AB", "B", "BA").Replace(w)
	}
	return w[:n]
}

// factorFrequencies returns the frequencies of every factor of length 1
// to maxLen of a word.
func factorFrequencies(t *testing.T, word string, maxLen int) []float64 {
	t.Helper()
	st, err := tiling.Analyze(word, tiling.WordOptions{MaxLength: maxLen, FactorLength: maxLen})
	if err != nil {
		t.Fatal(err)
	}
	var x []float64
	for _, f := range st.Factors {
		x = append(x, f.Freq)
	}
	return x
}

// checkModule checks the bookkeeping a Module promises: each number equals
// its coordinates in the basis, and each relation holds.
func checkModule(t *testing.T, m *Module, x []float64, eps float64) {
	t.Helper()
	if len(m.Basis) != m.Rank || len(m.Coords) != len(x) || m.Basis[0] != 1/float64(m.Denominator) {
		t.Fatalf("rank %d, basis %v, %d coordinates for %d numbers", m.Rank, m.Basis, len(m.Coords), len(x))
	}
	for i, c := range m.Coords {
		var s, tol float64
		for j, v := range c {
			s += float64(v) * m.Basis[j]
			tol += math.Abs(float64(v))
		}
		if math.Abs(s-x[i]) > 10*eps*(1+tol) || math.Abs(m.Residuals[i]-math.Abs(s-x[i])) > 1e-12 {
			t.Errorf("number %d = %.9g: coordinates %v give %.9g", i, x[i], c, s)
		}
	}
	for _, r := range m.Relations {
		var s float64
		for l, c := range r.Coeffs {
			v := 1.0
			if l > 0 {
				v = x[l-1]
			}
			s += float64(c) * v
		}
		if math.Abs(math.Abs(s)-r.Residual) > 1e-12 || r.Residual > 10*eps*float64(absSum(r.Coeffs)) {
			t.Errorf("relation %v: residual %g (recomputed %g)", r.Coeffs, r.Residual, s)
		}
	}
}

// The factor frequencies of the Fibonacci word generate Z + Zτ⁻¹
// (τ the golden mean): rank 2, folded basis {1, 2 − τ = 0.381966…}
// (Bellissard, Bovier & Ghez, Rev. Math. Phys. 4, 1, 1992; closed form
// from the substitution matrix).
func TestFrequencyModuleFibonacci(t *testing.T) {
	const n = 1_000_000
	x := factorFrequencies(t, fibonacciWord(n), 4)
	// Sturmian factor counts deviate from N·frequency by a bounded
	// amount: frequencies within a few /N.
	const eps = 4.0 / n
	m, err := FrequencyModule(x, eps)
	if err != nil {
		t.Fatal(err)
	}
	checkModule(t, m, x, eps)
	theta := 2 - (1+math.Sqrt(5))/2
	if m.Rank != 2 || m.Denominator != 1 || math.Abs(m.Basis[1]-theta) > 10*eps {
		t.Fatalf("rank %d, denominator %d, basis %v; want rank 2, {1, %.6f}", m.Rank, m.Denominator, m.Basis, theta)
	}
	if !SameModule(m.Basis[1:], []float64{(math.Sqrt(5) - 1) / 2}, 3, 1e-4) {
		t.Errorf("basis %v does not generate Z + Zτ⁻¹", m.Basis)
	}
	if len(m.Relations) != len(x)-1 {
		t.Errorf("%d relations for %d numbers of rank 2", len(m.Relations), len(x))
	}
}

// A Sturmian word of slope √2 − 1: the module is Z + Z(√2 − 1).
func TestFrequencyModuleSturmian(t *testing.T) {
	const n = 500_000
	theta := math.Sqrt2 - 1
	w := make([]byte, n)
	for i := range w {
		w[i] = 'A'
		if math.Floor(float64(i+1)*theta) > math.Floor(float64(i)*theta) {
			w[i] = 'B'
		}
	}
	x := factorFrequencies(t, string(w), 3)
	const eps = 4.0 / n
	m, err := FrequencyModule(x, eps)
	if err != nil {
		t.Fatal(err)
	}
	checkModule(t, m, x, eps)
	if m.Rank != 2 || math.Abs(m.Basis[1]-Fold(theta)) > 10*eps {
		t.Errorf("rank %d, basis %v; want {1, %.6f}", m.Rank, m.Basis, Fold(theta))
	}
}

// Thue–Morse factor frequencies are rational with denominators 3·2^k (the
// gap labels m/(3·2^k) of Bellissard 1990 — recalled from memory; checked
// here is what 2^18 letters support: rank 1 and a denominator of that
// form).
func TestFrequencyModuleThueMorse(t *testing.T) {
	const n = 1 << 18
	x := factorFrequencies(t, thueMorseWord(n), 4)
	const eps = 4.0 / n
	m, err := FrequencyModule(x, eps)
	if err != nil {
		t.Fatal(err)
	}
	checkModule(t, m, x, eps)
	q := m.Denominator
	for q%2 == 0 {
		q /= 2
	}
	if m.Rank != 1 || q != 3 {
		t.Errorf("rank %d, denominator %d; want rank 1 and 3·2^k", m.Rank, m.Denominator)
	}
	t.Logf("Thue–Morse factors of length ≤ 4: module (1/%d)Z", m.Denominator)
}

// A periodic word's factor frequencies are multiples of 1/P; with factors
// as long as the period each rotation occurs once per period, so the
// module is exactly (1/P)Z.
func TestFrequencyModulePeriodic(t *testing.T) {
	for _, cell := range []string{"AABABBB", "AB", "AAB", "ABBABAB"} {
		p := len(cell)
		w := strings.Repeat(cell, 100_000/p)
		x := factorFrequencies(t, w, p)
		eps := 4.0 / float64(len(w))
		m, err := FrequencyModule(x, eps)
		if err != nil {
			t.Fatal(err)
		}
		checkModule(t, m, x, eps)
		if m.Rank != 1 || m.Denominator != p {
			t.Errorf("cell %s: rank %d, denominator %d; want rank 1, %d", cell, m.Rank, m.Denominator, p)
		}
	}
}

// Rational numbers: 1/3 and 1/4 generate (1/12)Z, with 1/3 = 4·(1/12) and
// 1/4 = 3·(1/12).
func TestFrequencyModuleRational(t *testing.T) {
	m, err := FrequencyModule([]float64{1.0 / 3, 1.0 / 4}, 1e-9)
	if err != nil {
		t.Fatal(err)
	}
	if m.Rank != 1 || m.Denominator != 12 || !slices.Equal(m.Coords[0], []int{4}) || !slices.Equal(m.Coords[1], []int{3}) {
		t.Errorf("rank %d, denominator %d, coordinates %v", m.Rank, m.Denominator, m.Coords)
	}
	// 1/2 and (√2 − 1)/3: Z/2 + Z(√2 − 1)/3, with 1 not primitive.
	x := []float64{0.5, (math.Sqrt2 - 1) / 3}
	m, err = FrequencyModule(x, 1e-9)
	if err != nil {
		t.Fatal(err)
	}
	checkModule(t, m, x, 1e-9)
	if m.Rank != 2 || m.Denominator != 2 || m.Basis[1] < 0 || m.Basis[1] > 0.25 {
		t.Errorf("rank %d, denominator %d, basis %v", m.Rank, m.Denominator, m.Basis)
	}
	// With 1/2 in the basis the other element is determined up to sign
	// and multiples of 1/2; folded to [0, ¼] it is (√2 − 1)/3 itself.
	if math.Abs(m.Basis[1]-x[1]) > 1e-8 {
		t.Errorf("basis %v, want {1/2, %.9g}", m.Basis, x[1])
	}
	if len(m.Coords) != 2 || m.Coords[0][0] != 1 {
		t.Errorf("1/2 has coordinates %v", m.Coords[0])
	}
}

// Numbers of a two-angle module n + m1·θ1 + m2·θ2, measured with bounded
// errors: rank 3, the same module as {θ1, θ2}. The first two numbers,
// θ1 + θ2 and θ1 − θ2, span a sublattice of index 2: the later ones refine
// it.
func TestFrequencyModuleTorus(t *testing.T) {
	theta1, theta2 := math.Sqrt2-1, (math.Sqrt(5)-1)/2
	const eps = 1e-7
	rng := rand.New(rand.NewPCG(2, 0))
	noise := func() float64 { return eps * (2*rng.Float64() - 1) }
	x := []float64{theta1 + theta2 + noise(), theta1 - theta2 + noise()}
	for range 12 {
		n, m1, m2 := rng.IntN(5)-2, rng.IntN(7)-3, rng.IntN(7)-3
		x = append(x, float64(n)+float64(m1)*theta1+float64(m2)*theta2+noise())
	}
	m, err := FrequencyModule(x, eps)
	if err != nil {
		t.Fatal(err)
	}
	checkModule(t, m, x, eps)
	if m.Rank != 3 || m.Denominator != 1 {
		t.Fatalf("rank %d, denominator %d, basis %v", m.Rank, m.Denominator, m.Basis)
	}
	if !SameModule(m.Basis[1:], []float64{theta1, theta2}, 4, 1e-5) {
		t.Errorf("basis %v is not a basis of Z + Zθ1 + Zθ2", m.Basis)
	}
}

// Independent numbers each raise the rank.
func TestFrequencyModuleIndependent(t *testing.T) {
	x := []float64{math.Sqrt2 - 1, math.Pi - 3, math.E - 2}
	m, err := FrequencyModule(x, 1e-10)
	if err != nil {
		t.Fatal(err)
	}
	checkModule(t, m, x, 1e-10)
	if m.Rank != 4 || len(m.Relations) != 0 {
		t.Errorf("rank %d, relations %v", m.Rank, m.Relations)
	}
}

func TestFrequencyModuleRefuses(t *testing.T) {
	if _, err := FrequencyModule([]float64{0.5}, 0); err == nil {
		t.Error("no error for eps 0")
	}
	if _, err := FrequencyModule([]float64{math.NaN()}, 1e-6); err == nil {
		t.Error("no error for NaN")
	}
	if _, err := FrequencyModule([]float64{0.5}, 0.01); !errors.Is(err, ErrPrecision) {
		t.Errorf("eps 0.01: error %v, want ErrPrecision", err)
	}
	m, err := FrequencyModule(nil, 1e-6)
	if err != nil || m.Rank != 1 || m.Denominator != 1 {
		t.Errorf("no numbers: %+v, %v", m, err)
	}
}

// The change of basis stays exactly invertible under its steps.
func TestUnimodularInverse(t *testing.T) {
	rng := rand.New(rand.NewPCG(4, 0))
	u := newUnimodular(4)
	for range 200 {
		switch rng.IntN(3) {
		case 0:
			a, b := rng.IntN(4), rng.IntN(4)
			if a != b {
				u.addRow(a, b, int64(rng.IntN(5)-2))
			}
		case 1:
			u.negate(rng.IntN(4))
		case 2:
			u.swap(rng.IntN(4), rng.IntN(4))
		}
	}
	for i := range 4 {
		for j := range 4 {
			var s int64
			for l := range 4 {
				s += u.w[i][l] * u.v[l][j]
			}
			if want := int64(map[bool]int{true: 1}[i == j]); s != want {
				t.Fatalf("(W·V)[%d][%d] = %d", i, j, s)
			}
		}
	}
	c := []int64{6, 10, 15}
	u = newUnimodular(3)
	orig := slices.Clone(c)
	u.clearRow(c, 2)
	if !slices.Equal(c[:2], []int64{0, 0}) || absInt64(c[2]) != 1 {
		t.Errorf("cleared row %v", c)
	}
	if got := u.coords(orig); !slices.Equal(got, c) {
		t.Errorf("c·V = %v, cleared row %v", got, c)
	}
}
