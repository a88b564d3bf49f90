package plate

import (
	"math"
	"slices"
	"testing"

	"phasonhull/pattern"
	"phasonhull/topology/spectrum"
)

// A separable potential V1(n1) + V2(n2) on a square lattice with unit
// hopping is H = H1⊗1 + 1⊗H2, H1 and H2 the chains along each direction:
// its spectrum is every sum e_i + f_j of the chains' levels (common
// practice). The chains are the 1D spectrum's operators.
func TestSeparablePotentialSumsChainSpectra(t *testing.T) {
	const l1, l2 = 24, 20
	v1, v2 := make([]float64, l1), make([]float64, l2)
	for n := range v1 {
		v1[n] = 1.3 * math.Cos(2*math.Pi*(0.618034*float64(n)+0.1))
	}
	for n := range v2 {
		v2[n] = 0.8 * math.Cos(2*math.Pi*(0.414214*float64(n)+0.3))
	}
	chain := func(v []float64) []float64 {
		x := make([]float64, len(v))
		for i := range x {
			x[i] = float64(i)
		}
		p, err := pattern.New(x, "", "chain")
		if err != nil {
			t.Fatal(err)
		}
		op, err := spectrum.New(p, spectrum.Model{OnSite: spectrum.OnSite{Values: v}})
		if err != nil {
			t.Fatal(err)
		}
		e, err := op.Eigenvalues()
		if err != nil {
			t.Fatal(err)
		}
		return e
	}
	e1, e2 := chain(v1), chain(v2)
	var want []float64
	for _, a := range e1 {
		for _, b := range e2 {
			want = append(want, a+b)
		}
	}
	slices.Sort(want)

	pts, l := grid(l1, l2, square)
	vals := make([]float64, len(pts))
	for i, n := range l.Index {
		vals[i] = v1[n[0]] + v2[n[1]]
	}
	op := build(t, pts, l, Model{OnSite: OnSite{Values: vals}})
	got, err := op.Eigenvalues()
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != len(want) {
		t.Fatalf("%d levels, want %d", len(got), len(want))
	}
	for k := range got {
		if math.Abs(got[k]-want[k]) > 1e-9 {
			t.Fatalf("level %d: %.12f, want the sum of chain levels %.12f", k, got[k], want[k])
		}
	}
}
