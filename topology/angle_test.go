package topology

import (
	"math"
	"math/rand/v2"
	"testing"
)

// conjugated returns c_n = h(nρ + φ) mod 1 with h(x) = x + ε sin 2πx, a
// circle diffeomorphism for 2πε < 1: a quasiperiodic sequence with rotation
// number ρ.
func conjugated(N int, rho, phi, eps float64) []float64 {
	c := make([]float64, N)
	for n := range c {
		x := float64(n)*rho + phi
		c[n] = mod1(x + eps*math.Sin(2*math.Pi*x))
	}
	return c
}

func TestRotationNumberConjugated(t *testing.T) {
	const eps = 0.05
	for _, rho := range []float64{golden, golden - 1, math.Sqrt2 - 1, 0.5 - golden/10} {
		for _, N := range []int{1000, 4000} {
			c := conjugated(N, rho, 0.1, eps)
			plain, err := RotationNumber(c)
			if err != nil {
				t.Fatal(err)
			}
			// Closed form: the lifted mean telescopes to
			// ρ + ε(sin 2πx_{N−1} − sin 2πx_0)/(N−1).
			x0, x1 := 0.1, float64(N-1)*rho+0.1
			want := rho + eps*(math.Sin(2*math.Pi*x1)-math.Sin(2*math.Pi*x0))/float64(N-1)
			if math.Abs(Fold(plain)-Fold(want)) > 1e-12 || math.Abs(plain-want-math.Round(plain-want)) > 1e-12 {
				t.Errorf("ρ = %g, N = %d: plain mean %.15f, closed form %.15f", rho, N, plain, want)
			}
			w, err := WeightedRotationNumber(c)
			if err != nil {
				t.Fatal(err)
			}
			// Super-convergence (Das & Yorke 2018): already at N = 1000 the
			// weighted average is exact to rounding for this smooth conjugacy.
			if e := math.Abs(w - rho - math.Round(w-rho)); e > 1e-12 {
				t.Errorf("ρ = %g, N = %d: weighted error %.3g", rho, N, e)
			}
		}
	}
}

func TestRotationNumberErrors(t *testing.T) {
	if _, err := RotationNumber([]float64{0.1}); err == nil {
		t.Error("one coordinate accepted")
	}
	if _, err := WeightedRotationNumber([]float64{0.1, 0.2}); err == nil {
		t.Error("weighted average of one increment accepted")
	}
	if _, err := RotationNumber([]float64{0.1, math.NaN(), 0.3}); err == nil {
		t.Error("NaN coordinate accepted")
	}
}

// sineMap is the lifted sine circle map ψ → ψ + Ω − (K/2π) sin 2πψ.
func sineMap(psi, omega, K float64) float64 {
	return psi + omega - K/(2*math.Pi)*math.Sin(2*math.Pi*psi)
}

// TestSineCircleMapGolden checks the rotation number of the critical sine
// circle map at the golden-mean winding (Shenker, "Scaling behavior in a map
// of a circle onto itself", Physica D 5, 1982).
func TestSineCircleMapGolden(t *testing.T) {
	const K = 1.0
	// Ω∞ from memory: 0.6066610635. Compute it independently: the
	// superstable orbits through the critical point ψ = 0 with rotation
	// number F_k/F_{k+1} solve f^{F_{k+1}}(0) = F_k, and f^q(0) − p is
	// increasing in Ω, so bisection finds each Ω_k; they converge
	// geometrically (ratio ≈ −1/2.83) to Ω∞.
	omegaK := func(p, q int) float64 {
		lo, hi := 0.5, 0.7
		for range 60 {
			mid := 0.5 * (lo + hi)
			psi := 0.0
			for range q {
				psi = sineMap(psi, mid, K)
			}
			if psi < float64(p) {
				lo = mid
			} else {
				hi = mid
			}
		}
		return 0.5 * (lo + hi)
	}
	fib := []int{1, 1}
	for fib[len(fib)-1] < 30000 {
		fib = append(fib, fib[len(fib)-1]+fib[len(fib)-2])
	}
	var omegas []float64
	for k := 6; k+1 < len(fib); k++ {
		omegas = append(omegas, omegaK(fib[k], fib[k+1]))
	}
	last := omegas[len(omegas)-1]
	if diff := math.Abs(omegas[len(omegas)-2] - last); diff > 1e-8 {
		t.Errorf("Ω_k not converging: last two differ by %g", diff)
	}
	if math.Abs(last-0.6066610635) > 2e-9 {
		t.Errorf("Ω∞ ≈ %.11f from superstable orbits, recalled value 0.6066610635", last)
	}

	// The rotation number at Ω∞ is the golden mean.
	const N = 100000
	psi := make([]float64, N+1)
	for n := 1; n <= N; n++ {
		psi[n] = sineMap(psi[n-1], last, K)
	}
	lifted := (psi[N] - psi[0]) / N
	if math.Abs(lifted-golden) > 1e-4 {
		t.Errorf("lifted rotation number %.8f, want (√5−1)/2 = %.8f", lifted, golden)
	}
	c := make([]float64, N+1)
	for n, v := range psi {
		c[n] = mod1(v)
	}
	// The steps Ω − sin(2πψ)/2π straddle ½, so this also checks the
	// unwrapping around the circular mean. Both functions return a lift of
	// the rotation number: compare modulo 1.
	mod := func(x float64) float64 { return x - math.Round(x) }
	plain, err := RotationNumber(c)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(mod(plain-lifted)) > 1e-10 {
		t.Errorf("RotationNumber %.12f, lifted orbit %.12f", plain, lifted)
	}
	w, err := WeightedRotationNumber(c)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(mod(w-golden)) > 1e-4 || math.Abs(mod(w-lifted)) > 1e-4 {
		t.Errorf("weighted rotation number %.8f, lifted %.8f, golden %.8f", w, lifted, golden)
	}
	if math.Abs(Fold(w)-(1-golden)) > 1e-4 {
		t.Errorf("folded weighted rotation number %.8f, want 1 − (√5−1)/2", Fold(w))
	}
	t.Logf("Ω∞ = %.12f; rotation number: lifted %.3g off, weighted %.3g off", last, lifted-golden, mod(w-golden))
}

// TestSineCircleMapSubcritical checks super-convergence where the theory
// holds: below K = 1 an orbit with Diophantine rotation number is
// analytically conjugate to a rotation (Arnold 1961; Herman 1979), so the
// weighted average at N and 2N agree far beyond the plain mean's 1/N.
func TestSineCircleMapSubcritical(t *testing.T) {
	orbit := func(N int) []float64 {
		c := make([]float64, N)
		psi := 0.0
		for n := range c {
			c[n] = mod1(psi)
			psi = sineMap(psi, 0.61, 0.5)
		}
		return c
	}
	w1, _ := WeightedRotationNumber(orbit(20000))
	w2, _ := WeightedRotationNumber(orbit(40000))
	p1, _ := RotationNumber(orbit(20000))
	if d := math.Abs(w1 - w2); d > 1e-11 {
		t.Errorf("weighted averages at N and 2N differ by %.3g", d)
	}
	if d := math.Abs(p1 - w2); d > 1e-3 || d < 1e-10 {
		t.Errorf("plain mean off by %.3g: expected an O(1/N) error", d)
	}
	t.Logf("K = 0.5, Ω = 0.61: ρ = %.15f (weighted, N and 2N differ by %.2g; plain off by %.2g)", w2, w1-w2, p1-w2)
}

// loop returns positions x_n = 1.3n + Σ_k A_k sin(2πk f n + φ_k) at the
// given indices, plus Gaussian noise of standard deviation sigma.
func loop(idx []int, f float64, amp, phase []float64, sigma float64, rng *rand.Rand) []float64 {
	x := make([]float64, len(idx))
	for i, n := range idx {
		v := 0.7 + 1.3*float64(n)
		for k := range amp {
			v += amp[k] * math.Sin(2*math.Pi*float64(k+1)*f*float64(n)+phase[k])
		}
		if sigma > 0 {
			v += sigma * rng.NormFloat64()
		}
		x[i] = v
	}
	return x
}

func consecutive(n0, N int) []int {
	idx := make([]int, N)
	for i := range idx {
		idx[i] = n0 + i
	}
	return idx
}

func TestRefineFrequencyNoiseFree(t *testing.T) {
	const N = 2000
	cases := []struct {
		name       string
		f          float64
		amp, phase []float64
		H          int
	}{
		{"one harmonic", 1 - golden, []float64{0.2}, []float64{0.4}, 1},
		{"deformed loop", math.Sqrt2 - 1, []float64{0.2, 0.05, 0.02}, []float64{0.4, 1.1, -2}, 3},
		{"deformed loop, more harmonics fitted", 0.1234567, []float64{0.2, 0.05, 0.02}, []float64{0, 2, 1}, 5},
	}
	for _, c := range cases {
		idx := consecutive(-37, N)
		x := loop(idx, c.f, c.amp, c.phase, 0, nil)
		for _, off := range []float64{0.6 / N, -0.9 / N, 0} {
			fit, err := RefineFrequency(idx, x, c.f+off, c.H)
			if err != nil {
				t.Fatalf("%s: %v", c.name, err)
			}
			if e := math.Abs(fit.Freq[0] - c.f); e > 1e-12 {
				t.Errorf("%s, f0 off by %.2g/N: |f̂ − f| = %.3g", c.name, off*N, e)
			}
			if fit.RMS > 1e-9 {
				t.Errorf("%s: residual RMS %.3g for noise-free data", c.name, fit.RMS)
			}
		}
	}
}

// fisherCRB returns the Cramér–Rao bound on f for x_n = c0 + c1 n +
// a sin 2πfn + b cos 2πfn in white noise σ², from a Fisher information
// (1/σ²)JᵀJ whose Jacobian is taken by central differences, independently
// of the code under test.
func fisherCRB(idx []int, p []float64, sigma float64) float64 {
	model := func(p []float64, n int) float64 {
		w := 2 * math.Pi * p[4] * float64(n)
		return p[0] + p[1]*float64(n) + p[2]*math.Sin(w) + p[3]*math.Cos(w)
	}
	const P = 5
	var F [P][P]float64
	for _, n := range idx {
		var g [P]float64
		for j := range P {
			h := 1e-6 * math.Max(1, math.Abs(p[j]))
			if j == 4 {
				h = 1e-9
			}
			up := append([]float64(nil), p...)
			dn := append([]float64(nil), p...)
			up[j] += h
			dn[j] -= h
			g[j] = (model(up, n) - model(dn, n)) / (2 * h)
		}
		for i := range P {
			for j := range P {
				F[i][j] += g[i] * g[j] / (sigma * sigma)
			}
		}
	}
	// (F⁻¹)_44 by Gauss–Jordan elimination on [F | e_4].
	var a [P][P + 1]float64
	for i := range P {
		copy(a[i][:P], F[i][:])
	}
	a[4][P] = 1
	for k := range P {
		piv := k
		for i := k + 1; i < P; i++ {
			if math.Abs(a[i][k]) > math.Abs(a[piv][k]) {
				piv = i
			}
		}
		a[k], a[piv] = a[piv], a[k]
		for i := range P {
			if i != k {
				r := a[i][k] / a[k][k]
				for j := k; j <= P; j++ {
					a[i][j] -= r * a[k][j]
				}
			}
		}
	}
	return a[4][P] / a[4][4]
}

func TestRefineFrequencyCramerRao(t *testing.T) {
	const (
		N     = 500
		A     = 0.1
		sigma = 0.01
		draws = 200
	)
	f := 1 - golden
	phase := 0.4
	idx := consecutive(0, N)
	// Rife & Boorstyn (1974) give var(f̂) ≥ 12σ²/((2π)²A²N(N²−1)) for a
	// complex sinusoid with noise σ² in each quadrature; for real data, as
	// here, the bound doubles (Kay, Fundamentals of Statistical Signal
	// Processing I, 1993, Example 3.14, with η = A²/2σ²).
	closed := 24 * sigma * sigma / (4 * math.Pi * math.Pi * A * A * N * (N*N - 1))
	p := []float64{0.7, 1.3, A * math.Cos(phase), A * math.Sin(phase), f}
	crb := fisherCRB(idx, p, sigma)
	if r := crb / closed; math.Abs(r-1) > 0.02 {
		t.Errorf("numerical Fisher bound %.4g vs closed form 24σ²/((2π)²A²N(N²−1)) = %.4g: ratio %.4f", crb, closed, r)
	}
	t.Logf("CRB on f: numerical %.4g, closed form %.4g (ratio %.4f; the 12σ² form would give %.4f)", crb, closed, crb/closed, crb/(closed/2))

	rng := rand.New(rand.NewPCG(2024, 0))
	var se2, sumSE, sumErr float64
	for range draws {
		x := loop(idx, f, []float64{A}, []float64{phase}, sigma, rng)
		fit, err := RefineFrequency(idx, x, f+0.3/N, 1)
		if err != nil {
			t.Fatal(err)
		}
		e := fit.Freq[0] - f
		se2 += e * e
		sumErr += e
		sumSE += fit.StdErr[0]
	}
	rmse := math.Sqrt(se2 / draws)
	meanSE := sumSE / draws
	t.Logf("%d draws: RMSE %.4g, √CRB %.4g (ratio %.3f), mean reported standard error %.4g (ratio to RMSE %.3f), mean error %.3g",
		draws, rmse, math.Sqrt(crb), rmse/math.Sqrt(crb), meanSE, meanSE/rmse, sumErr/draws)
	if rmse > 1.5*math.Sqrt(crb) {
		t.Errorf("RMSE %.4g above 1.5·√CRB = %.4g", rmse, 1.5*math.Sqrt(crb))
	}
	if r := meanSE / rmse; r > 1.3 || r < 1/1.3 {
		t.Errorf("reported standard error %.4g vs empirical RMSE %.4g: ratio %.3f", meanSE, rmse, r)
	}
	if m := math.Abs(sumErr / draws); m > 3*rmse/math.Sqrt(draws) {
		t.Errorf("mean error %.3g exceeds 3 standard errors of the mean (%.3g)", m, 3*rmse/math.Sqrt(draws))
	}
}

func TestRefineFrequencyGaps(t *testing.T) {
	const (
		N     = 500
		draws = 200
		sigma = 0.01
	)
	f := math.Sqrt2 - 1
	amp, phase := []float64{0.1, 0.03}, []float64{0.4, 1}
	rng := rand.New(rand.NewPCG(99, 0))
	// 1% of the sites missing, at seeded random places.
	var idx []int
	for n := range N {
		if rng.Float64() >= 0.01 {
			idx = append(idx, n)
		}
	}
	if len(idx) == N {
		t.Fatal("no site removed")
	}
	// Noise-free: exact despite the gaps.
	fit, err := RefineFrequency(idx, loop(idx, f, amp, phase, 0, nil), f-0.5/N, 2)
	if err != nil {
		t.Fatal(err)
	}
	if e := math.Abs(fit.Freq[0] - f); e > 1e-12 {
		t.Errorf("noise-free with %d missing sites: |f̂ − f| = %.3g", N-len(idx), e)
	}
	// Noisy: no bias beyond the Monte Carlo error.
	var sum, sum2 float64
	for range draws {
		fit, err := RefineFrequency(idx, loop(idx, f, amp, phase, sigma, rng), f+0.2/N, 2)
		if err != nil {
			t.Fatal(err)
		}
		e := fit.Freq[0] - f
		sum += e
		sum2 += e * e
	}
	mean, rmse := sum/draws, math.Sqrt(sum2/draws)
	if math.Abs(mean) > 3*rmse/math.Sqrt(draws) {
		t.Errorf("%d missing sites: mean error %.3g beyond 3·RMSE/√draws = %.3g", N-len(idx), mean, 3*rmse/math.Sqrt(draws))
	}
	t.Logf("%d of %d sites missing: mean error %.3g, RMSE %.3g", N-len(idx), N, mean, rmse)
}

// torus returns x_n = 0.7 + 1.3n + Σ tones, noise added.
func torus(idx []int, f1, f2, sigma float64, rng *rand.Rand) []float64 {
	x := make([]float64, len(idx))
	for i, n := range idx {
		t := float64(n)
		v := 0.7 + 1.3*t + 0.1*math.Sin(2*math.Pi*f1*t+0.3) + 0.08*math.Cos(2*math.Pi*f2*t-1) +
			0.02*math.Sin(2*math.Pi*(f1+f2)*t) + 0.015*math.Sin(2*math.Pi*2*f1*t+2)
		if sigma > 0 {
			v += sigma * rng.NormFloat64()
		}
		x[i] = v
	}
	return x
}

func TestRefineFrequenciesTorus(t *testing.T) {
	f1, f2 := 1-golden, math.Sqrt2-1
	const N = 1500
	idx := consecutive(0, N)
	x := torus(idx, f1, f2, 0, nil)
	fit, err := RefineFrequencies(idx, x, []float64{f1 + 0.5/N, f2 - 0.4/N}, FitOptions{Harmonics: 2, Combinations: true})
	if err != nil {
		t.Fatal(err)
	}
	if e1, e2 := math.Abs(fit.Freq[0]-f1), math.Abs(fit.Freq[1]-f2); e1 > 1e-12 || e2 > 1e-12 {
		t.Errorf("noise-free torus: errors %.3g, %.3g", e1, e2)
	}
	// Without the combination tones the model is wrong: the fit is worse.
	bare, err := RefineFrequencies(idx, x, []float64{f1, f2}, FitOptions{Harmonics: 2})
	if err != nil {
		t.Fatal(err)
	}
	if bare.RMS < 1e-3 {
		t.Errorf("the model without combination tones fits to RMS %.3g", bare.RMS)
	}

	// Noisy: the reported standard errors track the empirical spread.
	const draws = 60
	rng := rand.New(rand.NewPCG(5, 0))
	var se2, sumSE [2]float64
	for range draws {
		fit, err := RefineFrequencies(idx, torus(idx, f1, f2, 0.01, rng), []float64{f1, f2}, FitOptions{Harmonics: 2, Combinations: true})
		if err != nil {
			t.Fatal(err)
		}
		for i, f := range []float64{f1, f2} {
			e := fit.Freq[i] - f
			se2[i] += e * e
			sumSE[i] += fit.StdErr[i]
		}
	}
	for i := range 2 {
		rmse, se := math.Sqrt(se2[i]/draws), sumSE[i]/draws
		if r := se / rmse; r > 1.3 || r < 1/1.3 {
			t.Errorf("f%d: reported standard error %.3g vs RMSE %.3g (ratio %.3f)", i+1, se, rmse, r)
		}
		t.Logf("f%d: RMSE %.3g, mean standard error %.3g", i+1, rmse, se)
	}
}

// A three-torus modulation with a combination tone: exact data are fitted
// to rounding from starting values half a resolution off, and the
// combination tone m·f with three nonzero m_i is in the model (least
// squares of an exact model leaves no residual; common practice).
func TestRefineFrequenciesThreeTorus(t *testing.T) {
	// Every two tones of order ≤ 3 lie at least 0.0033 apart: resolved.
	f := []float64{1 - golden, math.Sqrt2 - 1, math.E - 2}
	const N = 2000
	idx := consecutive(0, N)
	x := make([]float64, N)
	for i, n := range idx {
		t := float64(n)
		x[i] = 0.7 + 1.3*t + 0.05*math.Sin(2*math.Pi*f[0]*t+0.3) + 0.04*math.Cos(2*math.Pi*f[1]*t-1) +
			0.03*math.Sin(2*math.Pi*f[2]*t+2) + 0.01*math.Sin(2*math.Pi*(f[0]-f[1]+f[2])*t)
	}
	fit, err := RefineFrequencies(idx, x, []float64{f[0] + 0.5/N, f[1] - 0.4/N, f[2] + 0.3/N}, FitOptions{Harmonics: 3, Combinations: true})
	if err != nil {
		t.Fatal(err)
	}
	for i := range f {
		if e := math.Abs(fit.Freq[i] - f[i]); e > 1e-12 {
			t.Errorf("f%d: error %.3g", i+1, e)
		}
	}
	if fit.RMS > 1e-9 {
		t.Errorf("exact three-torus data fitted to RMS %.3g", fit.RMS)
	}
}

func TestRefineFrequencyErrors(t *testing.T) {
	idx := consecutive(0, 50)
	x := loop(idx, 0.3, []float64{0.1}, []float64{0}, 0, nil)
	bad := []struct {
		name string
		run  func() error
	}{
		{"no harmonics", func() error { _, err := RefineFrequency(idx, x, 0.3, 0); return err }},
		{"length mismatch", func() error { _, err := RefineFrequency(idx[:10], x, 0.3, 1); return err }},
		{"indices not increasing", func() error {
			j := append([]int(nil), idx...)
			j[5] = j[4]
			_, err := RefineFrequency(j, x, 0.3, 1)
			return err
		}},
		{"too few sites", func() error { _, err := RefineFrequency(idx[:5], x[:5], 0.3, 1); return err }},
		{"four frequencies", func() error {
			_, err := RefineFrequencies(idx, x, []float64{0.1, 0.2, 0.3, 0.4}, FitOptions{Harmonics: 1})
			return err
		}},
		{"coinciding frequencies", func() error {
			_, err := RefineFrequencies(idx, x, []float64{0.3, 0.3}, FitOptions{Harmonics: 1})
			return err
		}},
	}
	for _, b := range bad {
		if b.run() == nil {
			t.Errorf("%s: accepted", b.name)
		}
	}
}

func BenchmarkRefineFrequency(b *testing.B) {
	idx := consecutive(0, 2000)
	x := loop(idx, 1-golden, []float64{0.2, 0.05, 0.02}, []float64{0.4, 1.1, -2}, 0.01, rand.New(rand.NewPCG(1, 0)))
	for b.Loop() {
		if _, err := RefineFrequency(idx, x, 1-golden, 3); err != nil {
			b.Fatal(err)
		}
	}
}
