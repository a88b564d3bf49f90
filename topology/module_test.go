package topology

import (
	"math"
	"math/rand/v2"
	"testing"
)

func TestFold(t *testing.T) {
	// Closed form: Fold(θ) = min(θ mod 1, 1 − θ mod 1).
	cases := []struct{ in, want float64 }{
		{0, 0}, {0.25, 0.25}, {0.5, 0.5}, {0.75, 0.25}, {1, 0},
		{-0.3, 0.3}, {2.2, 0.2}, {-2.2, 0.2}, {0.999, 0.001}, {-1e-20, 0},
	}
	for _, c := range cases {
		if got := Fold(c.in); math.Abs(got-c.want) > 1e-12 {
			t.Errorf("Fold(%g) = %g, want %g", c.in, got, c.want)
		}
	}
	if !math.IsNaN(Fold(math.Inf(1))) || !math.IsNaN(Fold(math.NaN())) {
		t.Error("Fold of a non-finite angle is not NaN")
	}
	// The two symmetries of the module leave the folded angle unchanged.
	rng := rand.New(rand.NewPCG(1, 0))
	for range 1000 {
		x := 10*rng.Float64() - 5
		f := Fold(x)
		if f < 0 || f > 0.5 {
			t.Fatalf("Fold(%g) = %g outside [0, ½]", x, f)
		}
		if math.Abs(Fold(-x)-f) > 1e-12 || math.Abs(Fold(x+3)-f) > 1e-12 {
			t.Fatalf("Fold(%g) = %g breaks θ → −θ or θ → θ+3: %g, %g", x, f, Fold(-x), Fold(x+3))
		}
	}
}

func TestIntDet(t *testing.T) {
	// Closed-form determinants.
	cases := []struct {
		m    [][]int
		want int64
	}{
		{[][]int{{3}}, 3},
		{[][]int{{1, 2}, {3, 4}}, -2},
		{[][]int{{0, 1}, {1, 0}}, -1},
		{[][]int{{2, 0, 1}, {1, 3, 2}, {1, 1, 2}}, 6},
		{[][]int{{0, 0, 1}, {0, 1, 0}, {1, 0, 0}}, -1},
		{[][]int{{1, 2, 3}, {2, 4, 6}, {1, 0, 1}}, 0},
	}
	for _, c := range cases {
		if got := intDet(c.m); got != c.want {
			t.Errorf("det %v = %d, want %d", c.m, got, c.want)
		}
	}
}

// golden is (√5 − 1)/2.
var golden = (math.Sqrt(5) - 1) / 2

func TestSameModuleOneAngle(t *testing.T) {
	th := golden
	// θ, −θ, θ+n, 1−θ all generate Z + Zθ: closed form.
	for _, b := range []float64{th, -th, th + 3, 1 - th, Fold(th), th - 7} {
		if !SameModule([]float64{th}, []float64{b}, 3, 1e-9) {
			t.Errorf("Z+Z%.6f and Z+Z%.6f reported different", th, b)
		}
	}
	// 2θ generates an index-2 subgroup; √2−1 an unrelated module.
	for _, b := range []float64{2 * th, math.Sqrt2 - 1, th / 2} {
		if SameModule([]float64{th}, []float64{b}, 5, 1e-9) {
			t.Errorf("Z+Z%.6f and Z+Z%.6f reported equal", th, b)
		}
	}
	if SameModule([]float64{th}, []float64{th, th}, 3, 1e-9) {
		t.Error("bases of different length reported equal")
	}
	if !SameModule(nil, nil, 1, 0) {
		t.Error("Z and Z reported different")
	}
}

func TestSameModuleTorus(t *testing.T) {
	a := []float64{golden, math.Sqrt2 - 1}
	// Random unimodular changes of basis: products of elementary matrices.
	rng := rand.New(rand.NewPCG(7, 0))
	for trial := range 40 {
		M := [2][2]int{{1, 0}, {0, 1}}
		for range 3 {
			k := rng.IntN(5) - 2
			var E [2][2]int
			switch rng.IntN(3) {
			case 0:
				E = [2][2]int{{1, k}, {0, 1}}
			case 1:
				E = [2][2]int{{1, 0}, {k, 1}}
			default:
				E = [2][2]int{{0, 1}, {1, 0}}
			}
			M = [2][2]int{
				{M[0][0]*E[0][0] + M[0][1]*E[1][0], M[0][0]*E[0][1] + M[0][1]*E[1][1]},
				{M[1][0]*E[0][0] + M[1][1]*E[1][0], M[1][0]*E[0][1] + M[1][1]*E[1][1]},
			}
		}
		n := []int{rng.IntN(7) - 3, rng.IntN(7) - 3}
		b := make([]float64, 2)
		for i := range b {
			b[i] = float64(n[i]) + float64(M[i][0])*a[0] + float64(M[i][1])*a[1]
		}
		mc := 0
		for _, r := range M {
			mc = max(mc, abs(r[0]), abs(r[1]))
		}
		if !SameModule(a, b, mc, 1e-9) {
			t.Errorf("trial %d: unimodular M = %v: modules reported different", trial, M)
		}
		if !SameModule(a, CanonicalBasis(b), 50, 1e-9) {
			t.Errorf("trial %d: the canonical basis of %v does not generate the same module", trial, b)
		}
	}
	// det 2 and det 0 changes of basis are refused.
	for _, b := range [][]float64{
		{a[0], 2 * a[1]},
		{a[0] + a[1], a[0] - a[1]},
		{a[0], a[0] + 1},
	} {
		if SameModule(a, b, 5, 1e-9) {
			t.Errorf("%v reported to generate the module of %v", b, a)
		}
	}
}

func TestCanonicalBasis(t *testing.T) {
	got := CanonicalBasis([]float64{0.9, -0.2, 0.45})
	want := []float64{0.1, 0.2, 0.45}
	for i := range want {
		if math.Abs(got[i]-want[i]) > 1e-12 {
			t.Fatalf("CanonicalBasis = %v, want %v", got, want)
		}
	}
}
