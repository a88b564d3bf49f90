package whiteness_test

import (
	"math"
	"math/rand/v2"
	"testing"

	"phasonhull/topology/whiteness"
	"phasonhull/topology/whiteness/internal/hulls"
)

// testSeed differs from the calibration's, so the tests re-measure the
// rates on fresh draws.
const testSeed = 0x7e57

func decide(t *testing.T, x []float64, nu float64) whiteness.Decision {
	t.Helper()
	d, err := whiteness.Decide(t.Context(), x, whiteness.Options{NoiseVariance: nu})
	if err != nil {
		t.Fatal(err)
	}
	return d
}

func spacings(x []float64) []float64 {
	d := make([]float64, len(x)-1)
	for i := range d {
		d[i] = x[i+1] - x[i]
	}
	return d
}

// TestFalseCallRate re-measures the calibrated false-call rate on fresh
// draws, a small fast slice of the calibration: every family with a hull
// at 1% and 5% position noise, at 64 and 1000 sites. At most 1% of them
// may be called independent.
func TestFalseCallRate(t *testing.T) {
	const draws = 300
	for _, N := range []int{64, 1000} {
		for ni, sigma := range []float64{0.01, 0.05} {
			for fi, f := range hulls.Families {
				n := 0
				for i := range draws {
					x := hulls.Draw(f, N, sigma, hulls.Rand(testSeed, N, ni, fi, i))
					if decide(t, x, 0).Kind == whiteness.Independent {
						n++
					}
				}
				if 100*n > draws {
					t.Errorf("%d sites, noise %g, %s: %d of %d called independent, above 1%%", N, sigma, f, n, draws)
				}
			}
		}
	}
}

// TestPower: independent spacings of spread ±12% are called independent
// at 64 and 3000 sites most of the time (the calibration measures 87% and
// 100%; 80% is asked here).
func TestPower(t *testing.T) {
	const draws = 200
	for _, N := range []int{64, 3000} {
		n := 0
		for i := range draws {
			x := hulls.Independent(hulls.Uniform, 0.12, N, 0, hulls.Rand(testSeed, N, 9, 0, i))
			if decide(t, x, 2*0.03*0.03).Kind == whiteness.Independent {
				n++
			}
		}
		if 10*n < 8*draws {
			t.Errorf("%d sites: %d of %d independent chains called independent, below 80%%", N, n, draws)
		}
	}
}

// TestLjungBoxLevel: on white Gaussian noise the portmanteau statistic
// follows χ²_L, so it rejects at its level about that often (Ljung & Box,
// Biometrika 65, 297, 1978): 1% of 4000 sequences of 500, within four
// binomial standard errors.
func TestLjungBoxLevel(t *testing.T) {
	r := rand.New(rand.NewPCG(testSeed, 1))
	const runs = 4000
	rejected := 0
	for range runs {
		u := make([]float64, 500)
		for i := range u {
			u[i] = 1 + 0.05*r.NormFloat64()
		}
		s, err := whiteness.Measure(t.Context(), u, whiteness.Options{})
		if err != nil {
			t.Fatal(err)
		}
		if s.Lags != 20 {
			t.Fatalf("%d lags on 500 spacings, want min(500/5, 20) = 20", s.Lags)
		}
		if !s.White {
			rejected++
		}
	}
	want := whiteness.Level * runs
	if sd := math.Sqrt(want * (1 - whiteness.Level)); math.Abs(float64(rejected)-want) > 4*sd {
		t.Errorf("rejected %d of %d white sequences, want %.0f ± %.0f", rejected, runs, want, 4*sd)
	}
}

// TestPositionNoise: a lattice with position noise has spacings whose
// lag-1 autocorrelation is −½ (a moving average of order one; common
// practice), so the rule never calls it independent and measures r_1
// near −½.
func TestPositionNoise(t *testing.T) {
	x := hulls.Draw(hulls.Point, 3000, 0.05, hulls.Rand(testSeed, 3000, 0, 0, 0))
	d := decide(t, x, 0)
	if d.Kind == whiteness.Independent {
		t.Fatalf("a shaken lattice called independent: %s", d.Reason)
	}
	if math.Abs(d.Lag1+0.5) > 4*math.Sqrt(0.5/3000) {
		t.Errorf("r_1 = %.3f, want −½ within four standard errors", d.Lag1)
	}
}

// TestWanderMean: for independent spacings W tends to E∫₀¹ V(r)² dr, V a
// Brownian motion less its least-squares line. That mean is 1/15 (from
// memory); it is computed here as ∫∫ min(s,t) less its projection on
// span{1, √3(2r−1)} by quadrature, and the mean W of 2000 walks of 3000
// sites must match it within four standard errors.
func TestWanderMean(t *testing.T) {
	const m = 400
	var k, p1, p2 float64
	for i := range m {
		s := (float64(i) + 0.5) / m
		k += s / m // ∫ min(s, s) ds
		for j := range m {
			u := (float64(j) + 0.5) / m
			c := math.Min(s, u) / (m * m)
			p1 += c
			p2 += 3 * (2*s - 1) * (2*u - 1) * c
		}
	}
	want := k - p1 - p2
	if math.Abs(want-1.0/15) > 1e-4 {
		t.Errorf("quadrature gives %.5f, recalled 1/15 = %.5f", want, 1.0/15)
	}
	r := rand.New(rand.NewPCG(testSeed, 2))
	const runs = 2000
	var sum, sum2 float64
	for range runs {
		x := hulls.Independent(hulls.Gaussian, 0.05, 3000, 0, r)
		s, err := whiteness.Measure(t.Context(), spacings(x), whiteness.Options{})
		if err != nil {
			t.Fatal(err)
		}
		sum += s.Wander
		sum2 += s.Wander * s.Wander
	}
	mean := sum / runs
	se := math.Sqrt((sum2/runs - mean*mean) / runs)
	if math.Abs(mean-want) > 4*se {
		t.Errorf("mean W over %d walks %.4f ± %.4f, want %.4f", runs, mean, se, want)
	}
}

// TestShortChains: below the sizes that can tell, the rule answers
// undecided and names the smallest size that would.
func TestShortChains(t *testing.T) {
	x := hulls.Independent(hulls.Uniform, 0.12, 16, 0, hulls.Rand(testSeed, 16, 0, 0, 0))
	d := decide(t, x, 0)
	if d.Kind == whiteness.Independent {
		t.Fatalf("16 sites called independent: %s", d.Reason)
	}
	if d.Kind == whiteness.Undecided && d.MinSites <= 16 {
		t.Errorf("undecided at 16 sites with smallest deciding size %d: %s", d.MinSites, d.Reason)
	}
}
