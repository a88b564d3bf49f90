package hull

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"
)

// whiteField returns a side×side field of independent Gaussian
// displacements of standard deviation sd, detrended.
func whiteField(side int, sd float64, seed uint64) *field {
	rng := rand.New(rand.NewPCG(seed, 11))
	f := &field{size: [2]int{side, side}}
	for n1 := range side {
		for n2 := range side {
			f.n = append(f.n, [2]int{n1, n2})
			f.u = append(f.u, [2]float64{sd * rng.NormFloat64(), sd * rng.NormFloat64()})
			f.site = append(f.site, len(f.site))
		}
	}
	if err := f.detrend(); err != nil {
		panic(err)
	}
	return f
}

// The false-alarm rate of the line detector: on fields of white noise no
// line should be read in more than a few per cent of them (design value
// lineFalseAlarm = 1% per field; the count is binomial, so 300 fields at
// 1% give more than 9 with probability below 1%). The noise variance read
// off the floor must match the one simulated within 35%: the median of
// the tapered periodogram of 24×24 sites averages about 170 independent
// values per component, a relative standard deviation near 8%, so 35% is
// beyond four of them (common practice); the model check's slack of 2 in
// variance covers it.
func TestLineFalseAlarmRate(t *testing.T) {
	const fields = 300
	alarms := 0
	for s := range uint64(fields) {
		f := whiteField(24, 0.01, s+1)
		lines, noise, err := readLines(context.Background(), f)
		if err != nil {
			t.Fatal(err)
		}
		if len(lines) > 0 {
			alarms++
		}
		if math.Abs(noise/1e-4-1) > 0.35 {
			t.Errorf("seed %d: noise variance %.3g, simulated 1e-4", s+1, noise)
		}
	}
	t.Logf("%d of %d white fields showed a line (design rate %g)", alarms, fields, lineFalseAlarm)
	if alarms > 9 {
		t.Errorf("%d of %d white fields showed a line, want at most 9 (design rate %g)", alarms, fields, lineFalseAlarm)
	}
}

// A line is read at its frequency within five of its stated standard
// errors (Cramér–Rao bound; Rife & Boorstyn 1974), and a weak wave below
// the threshold is not (the threshold is a false-alarm bound, common
// practice).
func TestLineFrequency(t *testing.T) {
	q := [2]float64{0.2137, -0.0871}
	misses := 0
	for s := range uint64(20) {
		f := whiteField(32, 0.01, 100+s)
		for i, n := range f.n {
			v := 0.02 * math.Sin(2*math.Pi*(0.3+q[0]*float64(n[0])+q[1]*float64(n[1])))
			f.u[i][0] += v * 0.6
			f.u[i][1] += v * 0.8
		}
		lines, _, err := readLines(context.Background(), f)
		if err != nil {
			t.Fatal(err)
		}
		if len(lines) != 1 {
			t.Fatalf("seed %d: %d lines, want 1", s, len(lines))
		}
		l := lines[0]
		want := canonical(q)
		for j := range 2 {
			if math.Abs(wrap(l.q[j]-want[j])) > 5*l.se[j] {
				misses++
			}
		}
	}
	if misses > 1 {
		t.Errorf("%d of 40 frequency components off by more than 5 standard errors", misses)
	}
}

// A frequency is a supercell's k/Q only when its window is narrower than
// 1/(2Q²): two fractions of denominator ≤ Q differ by at least 1/Q²
// (neighbours in the Farey sequence; common practice, checked here by
// enumeration for Q ≤ 12). A line 1/7 measured to ±0.0004 per axis is
// rational with Q = 7; the same line measured to ±0.0185 (five standard
// errors of 0.0037, a 10×10 plate at 5% noise) is ambiguous, and so is an
// irrational line near 1/7.
func TestRationalNeedsPrecision(t *testing.T) {
	for Q := 1; Q <= 12; Q++ {
		gap := math.Inf(1)
		var fr []float64
		for q := 1; q <= Q; q++ {
			for k := 0; k <= q; k++ {
				fr = append(fr, float64(k)/float64(q))
			}
		}
		for i, a := range fr {
			for _, b := range fr[i+1:] {
				if d := math.Abs(a - b); d > 1e-12 {
					gap = math.Min(gap, d)
				}
			}
		}
		if gap < 1/float64(Q*Q)-1e-12 {
			t.Fatalf("Q = %d: fractions %g apart, below 1/Q²", Q, gap)
		}
	}
	line := func(q [2]float64, se float64) []fieldLine {
		return []fieldLine{{q: q, amp: 0.05, se: [2]float64{se / lineSigmas, se / lineSigmas}}}
	}
	if m := moduleOf(line([2]float64{1.0 / 7, 2.0 / 7}, 0.0004), [2]int{40, 40}, 32); m.denominators[0] != 7 {
		t.Errorf("1/7 to ±0.0004: denominator %d, want 7", m.denominators[0])
	}
	if m := moduleOf(line([2]float64{1.0 / 7, 2.0 / 7}, 0.0185), [2]int{10, 10}, 32); m.denominators[0] != ambiguous {
		t.Errorf("1/7 to ±0.0185: denominator %d, want ambiguous", m.denominators[0])
	}
	if m := moduleOf(line([2]float64{0.1445, 0.2873}, 0.0185), [2]int{10, 10}, 32); m.denominators[0] > 0 {
		t.Errorf("an irrational line to ±0.0185 called rational with denominator %d", m.denominators[0])
	}
}
