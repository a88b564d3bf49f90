package plate

import (
	"context"
	"errors"
	"math"
	"sort"
	"testing"

	"phasonhull/topology/spectrum"
)

// The KPM IDS agrees with the count of exact levels within the stated
// resolution and statistical error: at every energy E of a grid,
//
//	count(E − 3σ_E)/N − 3·err − τ ≤ IDS(E) ≤ count(E + 3σ_E)/N + 3·err + τ,
//
// σ_E the resolution π·a/M, err the standard error over the vectors, and
// τ the kernel's weight beyond 3σ on one side (the Jackson kernel is
// positive and close to a Gaussian of width σ_E: Weiße et al., Rev. Mod.
// Phys. 78, 275, 2006; TestJacksonKernelWidth bounds τ). On a 40×40 plate
// with a two-wave potential (real) and on a 21×21 plate with flux 2/7
// (complex).
func TestKPMAgreesWithDenseCounts(t *testing.T) {
	pts, l := grid(40, 40, square)
	pot := Potential{Rotation: [][]float64{{0.618034, 0.2}, {-0.2, 0.618034}}, Lambda: []float64{0.7, 0.7}}
	fpts, fl := grid(21, 21, square)
	for name, op := range map[string]*Operator{
		"two-wave potential": build(t, pts, l, Model{OnSite: OnSite{Potential: pot}}),
		"flux 2/7":           build(t, fpts, fl, Model{Flux: Rational(2, 7), OnSite: OnSite{Constant: 0.3}}),
	} {
		t.Run(name, func(t *testing.T) {
			v, err := op.Eigenvalues()
			if err != nil {
				t.Fatal(err)
			}
			d, err := NewDensity(context.Background(), op, KPMOptions{Moments: 256, Vectors: 16, Seed: 3})
			if err != nil {
				t.Fatal(err)
			}
			N := float64(op.Len())
			res := d.Resolution()
			count := func(e float64) float64 { return float64(sort.SearchFloat64s(v, e)) / N }
			worst := 0.0
			for k := 0; k <= 200; k++ {
				e := v[0] + (v[len(v)-1]-v[0])*(float64(k)/200*1.2-0.1)
				ids, se := d.IDS(e)
				if lo, hi := count(e-3*res)-3*se-kernelTail, count(e+3*res)+3*se+kernelTail; ids < lo || ids > hi {
					t.Errorf("E = %.4f: KPM IDS %.4f ± %.2g outside the counts [%.4f, %.4f] within 3 resolutions", e, ids, se, lo, hi)
				}
				worst = max(worst, se)
			}
			// The error scales as 1/√(R·N) (random-phase vectors:
			// variance ≤ IDS(1 − IDS)/(R·N), common practice).
			if bound := 0.5 / math.Sqrt(float64(d.Vectors)*N); worst > 2*bound {
				t.Errorf("largest standard error %.3g, above twice %.3g = 1/(2√(R·N))", worst, bound)
			}
		})
	}
}

// The Jackson kernel's variance at the centre is (π/M)² to leading order
// in 1/M (Weiße et al., Rev. Mod. Phys. 78, 275, 2006, Sec. II.C.3, from
// memory; computed here by integrating the kernel-smoothed delta
// function): the resolution Density.Resolution states.
func TestJacksonKernelWidth(t *testing.T) {
	for _, M := range []int{128, 512} {
		g := jackson(M)
		// δ(x − 0) smoothed: [g0 + 2Σ g_n T_n(0) T_n(x)]/(π√(1−x²)); with
		// x = cos φ the integral of x²·K over x is ∫_0^π cos²φ·K dφ·sinφ.
		var mass, second, tail3 float64
		const steps = 20000
		for s := range steps {
			phi := math.Pi * (float64(s) + 0.5) / steps
			x := math.Cos(phi)
			k := g[0]
			for n := 2; n < M; n += 2 { // T_n(0) = cos(nπ/2)
				k += 2 * g[n] * math.Cos(float64(n)*math.Pi/2) * math.Cos(float64(n)*phi)
			}
			k /= math.Pi // dx/√(1−x²) = dφ
			mass += k * math.Pi / steps
			second += x * x * k * math.Pi / steps
			if x > 3*math.Pi/float64(M) {
				tail3 += k * math.Pi / steps
			}
		}
		if math.Abs(mass-1) > 1e-6 {
			t.Errorf("M = %d: kernel mass %.8f, want 1", M, mass)
		}
		sigma := math.Sqrt(second)
		if want := math.Pi / float64(M); math.Abs(sigma/want-1) > 0.05 {
			t.Errorf("M = %d: kernel width %.5g, want π/M = %.5g within 5%%", M, sigma, want)
		}
		if tail := tail3 / mass; tail > kernelTail {
			t.Errorf("M = %d: kernel weight beyond 3π/M on one side %.3g, above the %.3g TestKPMAgreesWithDenseCounts allows", M, tail, kernelTail)
		} else {
			t.Logf("M = %d: kernel width %.5g (π/M = %.5g), weight beyond 3π/M on one side %.3g", M, sigma, math.Pi/float64(M), tail)
		}
	}
}

// kernelTail bounds the Jackson kernel's weight beyond 3π/M on one side
// (a Gaussian's is 0.00135; the Jackson kernel's, computed in TestJacksonKernelWidth, 0.0025).
const kernelTail = 0.003

// Moments do not depend on the number of workers (vector r draws from its
// own stream), and a cancelled context stops the method.
func TestKPMDeterministicAndCancellable(t *testing.T) {
	pts, l := grid(20, 20, hex)
	op := build(t, pts, l, Model{Flux: Rational(1, 5)})
	a, err := NewDensity(context.Background(), op, KPMOptions{Moments: 64, Vectors: 4, Seed: 9, Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	b, err := NewDensity(context.Background(), op, KPMOptions{Moments: 64, Vectors: 4, Seed: 9, Workers: 3})
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range []float64{-2, 0, 1.5} {
		x, _ := a.IDS(e)
		y, _ := b.IDS(e)
		if x != y {
			t.Errorf("IDS(%g): %v with 1 worker, %v with 3", e, x, y)
		}
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := NewDensity(ctx, op, KPMOptions{}); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled: error %v, want one wrapping context.Canceled", err)
	}
	if _, err := Analyze(ctx, op, Options{Method: KPM}); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled Analyze: error %v, want one wrapping context.Canceled", err)
	}
	_ = spectrum.Open
}
