package tones

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"testing"
)

// TestOneSinusoid checks the frequency of one sinusoid in white Gaussian
// noise and its stated error against the Cramér–Rao bound
// σ_f = √(6/N³)·σ/(π·A) (Rife & Boorstyn, IEEE Trans. Inf. Theory 20,
// 1974; common practice): over 200 seeded draws the stated error is
// within 30% of the bound, the scatter of the estimates is within 30% of
// it, and the estimates lie within two stated errors of the truth about
// 95% of the time (at least 90% asserted).
func TestOneSinusoid(t *testing.T) {
	const (
		n     = 2000
		amp   = 0.05
		sigma = 0.02
		draws = 200
	)
	f := silver
	bound := math.Sqrt(6/math.Pow(n, 3)) * sigma / (math.Pi * amp)
	var ss float64
	within := 0
	for d := range draws {
		rng := rand.New(rand.NewPCG(uint64(d), 1))
		phi := 2 * math.Pi * rng.Float64()
		s := make([]float64, n)
		for i := range s {
			s[i] = 1 + amp*math.Cos(2*math.Pi*f*float64(i)+phi) + sigma*rng.NormFloat64()
		}
		r, err := Read(context.Background(), s, Options{})
		if err != nil {
			t.Fatal(err)
		}
		if len(r.Lines) != 1 {
			t.Fatalf("draw %d: %d lines, want 1: %s", d, len(r.Lines), r.Reason)
		}
		l := r.Lines[0]
		if math.Abs(l.FreqErr/bound-1) > 0.3 {
			t.Errorf("draw %d: stated error %.3g, bound %.3g", d, l.FreqErr, bound)
		}
		ss += (l.Freq - f) * (l.Freq - f)
		if math.Abs(l.Freq-f) <= 2*l.FreqErr {
			within++
		}
	}
	rms := math.Sqrt(ss / draws)
	t.Logf("scatter %.3g, bound %.3g (ratio %.2f); %d/%d within 2 stated errors", rms, bound, rms/bound, within, draws)
	if math.Abs(rms/bound-1) > 0.3 {
		t.Errorf("scatter of the frequency %.3g, bound %.3g", rms, bound)
	}
	if within < draws*9/10 {
		t.Errorf("%d/%d estimates within two stated errors, want ≥ 90%%", within, draws)
	}
}

// TestFalseAlarmRate reads white Gaussian spacings (5% spread), which have
// no line, and counts the spectra in which a line is reported: the count
// must not exceed what the stated probability allows, n·α plus three
// binomial standard deviations. Measured (seeded, so these are the
// figures the test sees): at 300 spacings over 1000 draws, 5 spectra
// with a false line at α = 0.1 (0.5%), 0 at α = 0.01 and 0 at α = 10⁻³;
// at 5000 spacings over 200 draws, 0, 0 and 0. The threshold is
// conservative (it counts two looks per natural bin), by about a factor
// 20 in rate at α = 0.1.
func TestFalseAlarmRate(t *testing.T) {
	for _, tc := range []struct{ n, draws int }{{300, 1000}, {5000, 200}} {
		for _, alpha := range []float64{0.1, 0.01, 1e-3} {
			false_ := 0
			for d := range tc.draws {
				r, err := Read(context.Background(), whiteSpacings(tc.n, 0.05, uint64(d)), Options{FalseAlarm: alpha})
				if err != nil {
					t.Fatal(err)
				}
				if len(r.Lines) > 0 {
					false_++
				}
			}
			limit := float64(tc.draws)*alpha + 3*math.Sqrt(float64(tc.draws)*alpha*(1-alpha))
			t.Logf("n=%d α=%g: %d/%d spectra with a false line", tc.n, alpha, false_, tc.draws)
			if float64(false_) > limit {
				t.Errorf("n=%d α=%g: %d/%d spectra with a false line, at most %.1f allowed", tc.n, alpha, false_, tc.draws, limit)
			}
		}
	}
}

// TestNoLines reads chains without a modulation: a lattice with position
// noise (its spacings are differenced white noise, whose spectrum
// 2σ²(1 − cos 2πf) vanishes at low frequency; common practice) and
// independent uniform spacings (±12%). No line may be reported.
func TestNoLines(t *testing.T) {
	for _, n := range []int{300, 2000, 5000} {
		for seed := range uint64(10) {
			for _, noise := range []float64{0.01, 0.03} {
				r, err := Read(context.Background(), chain{n: n, noise: noise, seed: seed}.spacings(), Options{})
				if err != nil {
					t.Fatal(err)
				}
				if len(r.Lines) > 0 {
					t.Errorf("lattice n=%d noise=%g seed=%d: %v", n, noise, seed, r.Lines)
				}
			}
			rng := rand.New(rand.NewPCG(seed, 7))
			s := make([]float64, n)
			for i := range s {
				s[i] = 1 + 0.12*(2*rng.Float64()-1)
			}
			r, err := Read(context.Background(), s, Options{})
			if err != nil {
				t.Fatal(err)
			}
			if len(r.Lines) > 0 || r.Rank != 0 || r.Period != 1 {
				t.Errorf("random spacings n=%d seed=%d: %v p=%d d=%d", n, seed, r.Lines, r.Period, r.Rank)
			}
			// The noise level: uniform on ±0.12 has standard deviation
			// 0.12/√3.
			if want := 0.12 / math.Sqrt(3); math.Abs(r.Noise/want-1) > 0.15 {
				t.Errorf("random spacings n=%d: noise %.4g, want %.4g", n, r.Noise, want)
			}
		}
	}
}

func TestBadInput(t *testing.T) {
	ctx := context.Background()
	if _, err := Read(ctx, make([]float64, MinSpacings-1), Options{}); err == nil {
		t.Error("too short: no error")
	}
	s := whiteSpacings(100, 0.05, 1)
	s[10] = math.NaN()
	if _, err := Read(ctx, s, Options{}); err == nil {
		t.Error("NaN: no error")
	}
	if _, err := Read(ctx, whiteSpacings(100, 0.05, 1), Options{FalseAlarm: 0.7}); err == nil {
		t.Error("false alarm 0.7: no error")
	}
	neg := whiteSpacings(100, 0.05, 1)
	for i := range neg {
		neg[i] = -neg[i]
	}
	if _, err := Read(ctx, neg, Options{}); err == nil {
		t.Error("negative mean spacing: no error")
	}
	cctx, cancel := context.WithCancel(ctx)
	cancel()
	if _, err := Read(cctx, chain{n: 2000, angles: []float64{golden}, amps: []float64{0.1}, seed: 1}.spacings(), Options{}); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled: %v", err)
	}
}

// BenchmarkRead1e6 reads 10⁶ spacings of a chain with two angles and a
// cell of two at 1% position noise.
func BenchmarkRead1e6(b *testing.B) {
	s := chain{n: 1_000_000, angles: []float64{golden, silver}, amps: []float64{0.1, 0.05}, cell: []float64{0.05, -0.05}, noise: 0.01, seed: 1}.spacings()
	b.ResetTimer()
	for b.Loop() {
		if _, err := Read(context.Background(), s, Options{}); err != nil {
			b.Fatal(err)
		}
	}
}
