package shortchain_test

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"

	"phasonhull/topology/shortchain"
	"phasonhull/topology/shortchain/internal/null"
)

// testSeed differs from the calibration's, so the tests re-measure the
// rates on fresh draws.
const testSeed = 0x7e57

func decide(t *testing.T, ctx context.Context, x []float64) shortchain.Decision {
	t.Helper()
	d, err := shortchain.Decide(ctx, x, shortchain.Options{})
	if err != nil {
		t.Fatal(err)
	}
	return d
}

// TestFalseCallRate re-measures the calibrated false-call rate on fresh
// draws of every class at 32 and 64 sites and 1% noise: at most 1% of the
// chains of each class may be called another class.
func TestFalseCallRate(t *testing.T) {
	ctx := t.Context()
	kinds := shortchain.Kinds()
	for _, N := range []int{32, 64} {
		for fi, f := range null.Families {
			var calls [5]int
			for i := range 1000 {
				if ctx.Err() != nil {
					t.Fatal(ctx.Err())
				}
				x := null.Draw(f, N, 0.01, null.Rand(testSeed, N, 2, f, i))
				d := decide(t, ctx, x)
				k := 4
				for j, v := range kinds {
					if v == d.Kind {
						k = j
					}
				}
				calls[k]++
			}
			wrong := 0
			for k := range 4 {
				if k != fi {
					wrong += calls[k]
				}
			}
			t.Logf("%d sites, 1%% noise, %s: calls %v (lattice, cell, harmonic, independent, undecided)", N, kinds[fi], calls)
			if wrong > 10 {
				t.Errorf("%d sites, 1%% noise: %d of 1000 %s chains called another class, above 1%%", N, wrong, kinds[fi])
			}
		}
	}
}

// TestIndependentSpacingsAreNotLattice: independent spacings ±12% on 16 to
// 64 sites, which a noise level measured from the same spacings would call
// equal, are never called a lattice.
func TestIndependentSpacingsAreNotLattice(t *testing.T) {
	ctx := t.Context()
	for _, N := range []int{16, 24, 32, 48, 64} {
		r := rand.New(rand.NewPCG(testSeed, uint64(N)))
		var calls = map[shortchain.Kind]int{}
		for range 300 {
			d := decide(t, ctx, null.IndependentChain(N, 0.12, 0, r))
			calls[d.Kind]++
		}
		t.Logf("%d sites: %v", N, calls)
		if calls[shortchain.Lattice] > 0 {
			t.Errorf("%d sites: %d of 300 chains of independent spacings called lattice", N, calls[shortchain.Lattice])
		}
		if N >= 48 && calls[shortchain.Independent] < 270 {
			t.Errorf("%d sites: only %d of 300 chains of independent spacings called independent", N, calls[shortchain.Independent])
		}
	}
}

// TestShakenLattice: a lattice with 1 to 3% position noise is called
// lattice or undecided, never another class beyond the calibrated rate,
// and lattice at 64 sites and more.
func TestShakenLattice(t *testing.T) {
	ctx := t.Context()
	for _, N := range []int{24, 64, 150} {
		for _, s := range []float64{0.01, 0.02, 0.03} {
			r := rand.New(rand.NewPCG(testSeed, uint64(N)))
			calls := map[shortchain.Kind]int{}
			for range 200 {
				d := decide(t, ctx, null.Draw(null.Lattice, N, s, r))
				calls[d.Kind]++
				if d.Kind == shortchain.Lattice && d.FalseCallRate > 0.01 {
					t.Errorf("%d sites, noise %g: false-call rate %g above 1%%", N, s, d.FalseCallRate)
				}
			}
			other := 200 - calls[shortchain.Lattice] - calls[shortchain.Undecided]
			if calls[shortchain.Independent] > 0 || other > 2 {
				t.Errorf("%d sites, noise %g: calls %v", N, s, calls)
			}
			if N >= 64 && calls[shortchain.Lattice] < 180 {
				t.Errorf("%d sites, noise %g: only %d of 200 called lattice: %v", N, s, calls[shortchain.Lattice], calls)
			}
		}
	}
}

// TestCells finds a dimerised chain (offsets ±0.06, period 2) and a period-3
// cell at 64 sites and 1% noise, and an exact dimer at 16 sites; at 32
// sites the period-3 cell is found or left undecided, never called another
// class.
func TestCells(t *testing.T) {
	ctx := t.Context()
	r := rand.New(rand.NewPCG(testSeed, 3))
	for _, tc := range []struct {
		N     int
		u     []float64
		sigma float64
	}{
		{64, []float64{0.06, -0.06}, 0.01},
		{64, []float64{0, 0.08, -0.05}, 0.01},
		{32, []float64{0, 0.08, -0.05}, 0.01},
		{16, []float64{0.06, -0.06}, 0},
	} {
		x := make([]float64, tc.N)
		for i := range x {
			x[i] = float64(i) + tc.u[i%len(tc.u)] + tc.sigma*r.NormFloat64()
		}
		d := decide(t, ctx, x)
		if tc.N == 32 && d.Kind == shortchain.Undecided {
			continue
		}
		if d.Kind != shortchain.Cell || d.Period != len(tc.u) {
			t.Errorf("%d sites, cell %v: %s period %d (%s)", tc.N, tc.u, d.Kind, d.Period, d.Reason)
		}
	}
}

// TestModulatedChain: θ = golden mean − 1 (folded to 2 − φ = 0.381966…),
// amplitude 10% of the spacing, 64 sites, 1% noise is called harmonic with
// the angle within its stated error: within 3 standard errors for one
// chain, and within 2 for at least 90% of 200 chains (95.4% for a Gaussian
// estimate).
func TestModulatedChain(t *testing.T) {
	ctx := t.Context()
	theta := (math.Sqrt(5) - 1) / 2
	want := 1 - theta
	r := rand.New(rand.NewPCG(testSeed, 64))
	within := 0
	for i := range 200 {
		x := null.HarmonicChain(64, theta, []float64{0.1}, 0.01, r)
		d := decide(t, ctx, x)
		if d.Kind != shortchain.Harmonic {
			t.Fatalf("chain %d: %s (%s)", i, d.Kind, d.Reason)
		}
		e := math.Abs(d.Angle - want)
		if i == 0 && e > 3*d.AngleErr {
			t.Errorf("angle %.6f ± %.6f, want %.6f", d.Angle, d.AngleErr, want)
		}
		if e <= 2*d.AngleErr {
			within++
		}
	}
	if within < 180 {
		t.Errorf("only %d of 200 angles within 2 standard errors", within)
	}
}

// TestLag1 checks on simulated chains that position noise on a lattice
// leaves the spacings' lag-1 autocorrelation at −½, and independent
// spacings at 0 (common practice), within the sampling error of the mean
// of 300 chains of 200 sites and the O(1/N) bias of the estimate.
func TestLag1(t *testing.T) {
	ctx := t.Context()
	r := rand.New(rand.NewPCG(testSeed, 200))
	for _, tc := range []struct {
		f           null.Family
		sigma, want float64
	}{{null.Lattice, 0.01, -0.5}, {null.Independent, 0, 0}} {
		var sum, se float64
		for range 300 {
			d := decide(t, ctx, null.Draw(tc.f, 200, tc.sigma, r))
			sum += d.Lag1
			se += d.Lag1Err
		}
		mean := sum / 300
		tol := 3*se/300/math.Sqrt(300) + 2.0/200
		if math.Abs(mean-tc.want) > tol {
			t.Errorf("family %d: mean lag-1 autocorrelation %.4f, want %g ± %.4f", tc.f, mean, tc.want, tol)
		}
	}
}

// TestUndecidedNamesSize: 16-site shaken lattices are mostly undecided
// (independent spacings look alike at that size); each such answer names a
// larger calibrated size that would decide.
func TestUndecidedNamesSize(t *testing.T) {
	r := rand.New(rand.NewPCG(testSeed, 16))
	sizes, _ := shortchain.Grid()
	undecided := 0
	for range 20 {
		d := decide(t, t.Context(), null.Draw(null.Lattice, 16, 0.01, r))
		if d.Kind != shortchain.Undecided {
			continue
		}
		undecided++
		if d.MinSites <= 16 || d.MinSites > sizes[len(sizes)-1] || d.Reason == "" {
			t.Errorf("undecided with MinSites %d: %s", d.MinSites, d.Reason)
		}
	}
	if undecided == 0 {
		t.Error("no 16-site shaken lattice of 20 was undecided")
	}
}

func TestExactLattice(t *testing.T) {
	x := make([]float64, 20)
	for i := range x {
		x[i] = 3.5 + 0.25*float64(i)
	}
	d := decide(t, t.Context(), x)
	if d.Kind != shortchain.Lattice || d.Noise != 0 {
		t.Errorf("exact lattice: %s, noise %g (%s)", d.Kind, d.Noise, d.Reason)
	}
}

func TestDecideRefuses(t *testing.T) {
	ctx := context.Background()
	lat := func(n int) []float64 {
		x := make([]float64, n)
		for i := range x {
			x[i] = float64(i)
		}
		return x
	}
	bad := lat(20)
	bad[3] = math.NaN()
	unsorted := lat(20)
	unsorted[5] = unsorted[4]
	for name, x := range map[string][]float64{"short": lat(15), "long": lat(shortchain.Largest + 1), "nan": bad, "unsorted": unsorted} {
		if _, err := shortchain.Decide(ctx, x, shortchain.Options{}); err == nil {
			t.Errorf("%s: no error", name)
		}
	}
	if _, err := shortchain.Decide(ctx, lat(20), shortchain.Options{Resolution: -1}); err == nil {
		t.Error("negative resolution: no error")
	}
	cancelled, cancel := context.WithCancel(ctx)
	cancel()
	x := null.Draw(null.Harmonic, 64, 0.01, rand.New(rand.NewPCG(1, 2)))
	if _, err := shortchain.Decide(cancelled, x, shortchain.Options{}); err == nil {
		t.Error("cancelled context: no error")
	}
}
