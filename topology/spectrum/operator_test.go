package spectrum

import (
	"math"
	"slices"
	"strings"
	"testing"

	"phasonhull/pattern/design"
)

// closeTo compares two sorted spectra entry by entry.
func closeTo(t *testing.T, what string, got, want []float64, tol float64) {
	t.Helper()
	if len(got) != len(want) {
		t.Fatalf("%s: %d levels, want %d", what, len(got), len(want))
	}
	for k := range want {
		if math.Abs(got[k]-want[k]) > tol {
			t.Fatalf("%s: level %d = %.15g, want %.15g", what, k, got[k], want[k])
		}
	}
}

// Uniform chains have closed-form spectra (common practice): open
// hopping −2t cos(πj/(N+1)), j = 1..N; a ring −2t cos(2πj/N); free–free
// springs 4k sin²(πj/2N), j = 0..N−1; a ring of springs 4k sin²(πj/N); a
// ring with next-nearest hopping t2 −2t cos q − 2t2 cos 2q, q = 2πj/N.
func TestUniformChainsClosedForm(t *testing.T) {
	const n, tt = 61, 1.3
	p := lattice(t, n)
	cases := []struct {
		name string
		m    Model
		want func(j int) float64
		js   [2]int
	}{
		{"open hopping", Model{Law: Exp{T0: tt}}, func(j int) float64 { return -2 * tt * math.Cos(math.Pi*float64(j)/(n+1)) }, [2]int{1, n + 1}},
		{"ring hopping", Model{Law: Exp{T0: tt}, Ends: Periodic}, func(j int) float64 { return -2 * tt * math.Cos(2*math.Pi*float64(j)/n) }, [2]int{0, n}},
		{"free springs", Model{Kind: Springs, Law: Power{T0: tt, Power: 3}}, func(j int) float64 {
			s := math.Sin(math.Pi * float64(j) / (2 * n))
			return 4 * tt * s * s
		}, [2]int{0, n}},
		{"ring of springs", Model{Kind: Springs, Law: Exp{T0: tt, Decay: 2}, Ends: Periodic}, func(j int) float64 {
			s := math.Sin(math.Pi * float64(j) / n)
			return 4 * tt * s * s
		}, [2]int{0, n}},
		{"ring with next-nearest", Model{Law: Exp{T0: tt, Decay: 1}, NNN: 0.3, Ends: Periodic}, func(j int) float64 {
			// The next-nearest bond spans 2d̄; its coupling is NNN·t(d̄).
			q := 2 * math.Pi * float64(j) / n
			return -2*tt*math.Cos(q) - 2*0.3*tt*math.Cos(2*q)
		}, [2]int{0, n}},
	}
	for _, c := range cases {
		op := build(t, p, c.m)
		got, err := op.Eigenvalues()
		if err != nil {
			t.Fatal(err)
		}
		var want []float64
		for j := c.js[0]; j < c.js[1]; j++ {
			want = append(want, c.want(j))
		}
		slices.Sort(want)
		closeTo(t, c.name, got, want, 1e-11)
	}
}

// The matrix entries follow the definitions: hoppings −t(d), next-nearest
// −NNN·t((d_n+d_{n+1})/2), on-site terms added, springs' diagonal the sum
// of the attached springs plus the ground spring, the ring closed across
// the given spacing.
func TestOperatorEntries(t *testing.T) {
	s := design.NewSpec("modulated")
	s.Sites, s.Theta, s.Amp = 40, 0.2763, 0.2
	p := generate(t, s)
	d, mean := p.Spacings(), p.MeanSpacing()
	law := Exp{T0: 1.5, Decay: 2.5}
	tf := func(x float64) float64 { v, _ := law.Coupling(x, mean); return v }
	vals := make([]float64, 40)
	for i := range vals {
		vals[i] = 0.01 * float64(i)
	}
	op := build(t, p, Model{Law: law, NNN: 0.2, OnSite: OnSite{Constant: 0.5, Values: vals, Lambda: 0.7, Theta: 0.3, Phase: 0.25}, Ends: Periodic, Closing: 1.25})
	for _, i := range []int{0, 7, 38} {
		if got, want := op.Bond(i, 1), -tf(d[i]); math.Abs(got-want) > 1e-15 {
			t.Errorf("bond %d: %g, want %g", i, got, want)
		}
		if got, want := op.Bond(i, 2), -0.2*tf((d[i]+d[(i+1)%39])/2); i < 38 && math.Abs(got-want) > 1e-15 {
			t.Errorf("next-nearest bond %d: %g, want %g", i, got, want)
		}
	}
	if got, want := op.Bond(39, 1), -tf(1.25); math.Abs(got-want) > 1e-15 {
		t.Errorf("closing bond: %g, want %g", got, want)
	}
	if got, want := op.Bond(38, 2), -0.2*tf((d[38]+1.25)/2); math.Abs(got-want) > 1e-15 {
		t.Errorf("closing next-nearest bond 39–1: %g, want %g", got, want)
	}
	if got, want := op.Bond(39, 2), -0.2*tf((1.25+d[0])/2); math.Abs(got-want) > 1e-15 {
		t.Errorf("closing next-nearest bond 40–2: %g, want %g", got, want)
	}
	diag := op.Diagonal()
	for _, n := range []int{0, 9, 39} {
		want := 0.5 + vals[n] + 2*0.7*math.Cos(2*math.Pi*(0.3*float64(n)+0.25))
		if math.Abs(diag[n]-want) > 1e-14 {
			t.Errorf("on-site %d: %g, want %g", n, diag[n], want)
		}
	}
	// Springs: each row of D sums to the ground spring (rigid motion
	// costs nothing else).
	sp := build(t, p, Model{Kind: Springs, Law: law, OnSite: OnSite{Constant: 0.1}})
	a := sp.Dense()
	for i := range 40 {
		sum := 0.0
		for j := range 40 {
			sum += a.At(i, j)
		}
		if math.Abs(sum-0.1) > 1e-13 {
			t.Errorf("springs row %d sums to %g, want the ground spring 0.1", i, sum)
		}
	}
}

func TestNewRefuses(t *testing.T) {
	p := lattice(t, 20)
	for _, c := range []struct {
		m    Model
		want string
	}{
		{Model{Kind: "waves"}, "model"},
		{Model{Ends: "twisted"}, "ends"},
		{Model{Closing: 1}, "periodic"},
		{Model{Ends: Periodic, Closing: -1}, "closing"},
		{Model{Law: Table{D: []float64{0.5, 0.9}, T: []float64{1, 2}}}, "outside"},
		{Model{Kind: Springs, Law: Table{D: []float64{0.5, 1.5}, T: []float64{-1, -1}}}, "positive"},
		{Model{OnSite: OnSite{Values: []float64{1, 2}}}, "2 given for 20 sites"},
		{Model{OnSite: OnSite{Lambda: math.NaN()}}, "finite"},
		{Model{Law: Exp{T0: math.Inf(1)}, NNN: 0.5}, "gives"},
	} {
		_, err := New(p, c.m)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("New(%+v): %v, want an error about %q", c.m, err, c.want)
		}
	}
}
