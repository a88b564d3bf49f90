package tones

import (
	"cmp"
	"context"
	"fmt"
	"math"
	"slices"
	"strings"
)

// Defaults of Options.
const (
	// DefaultFalseAlarm is the probability that one look at the spectrum
	// of pure noise finds a line.
	DefaultFalseAlarm = 1e-3
	// DefaultMaxLines bounds the number of lines: enough for three angles
	// with a few harmonics or combination tones, or a cell with an angle.
	DefaultMaxLines = 8
	// MinSpacings is the shortest sequence Read accepts.
	MinSpacings = 16
)

// Line is one significant spectral line of the spacing sequence.
type Line struct {
	// Freq is the frequency in turns per site, in (0, ½].
	Freq float64
	// FreqErr is its standard error, from the fit (see Read).
	FreqErr float64
	// Amp is the amplitude of the sinusoid, in mean spacings.
	Amp float64
}

// Options tunes Read. Zero values select the documented defaults.
type Options struct {
	// FalseAlarm is the probability, in (0, ½), that one look at the
	// spectrum of noise alone reports a line (default DefaultFalseAlarm).
	FalseAlarm float64
	// MaxLines bounds the number of lines (default DefaultMaxLines).
	MaxLines int
	// Seed is not used: Read makes no random choice, and the same
	// spacings always give the same reading.
	Seed uint64
}

// Reading is the algebraic reading of a chain.
type Reading struct {
	// Lines are the significant lines, strongest first.
	Lines []Line
	// Period is p: the rational part of the module is (1/p)Z (1 when none).
	Period int
	// Rank is d, the rank of the irrational part over Z + (1/p)Z.
	Rank int
	// Basis holds d angles in (0, ½], a basis of the module over
	// (1/p)Z with small coefficients: line frequencies themselves when
	// some d lines form a basis, each value refitted on all lines.
	Basis []float64
	// BasisErr are the standard errors of Basis.
	BasisErr []float64
	// Coeffs holds each line's integer coordinates (c0, c1, …, cd):
	// Freq ≡ c0/p + Σ c_i·Basis[i−1] (mod 1). Nil for a line too
	// imprecise to take part in the relation search.
	Coeffs [][]int
	// Residual is the RMS of the spacings minus the fitted line model,
	// in mean spacings.
	Residual float64
	// Noise is the noise level of the spacings estimated off the lines:
	// the square root of the mean of the noise floor over (0, ½], in
	// mean spacings.
	Noise float64
	// Reason is one sentence: what was found, or why nothing can be said.
	Reason string
}

// Read reads the frequency content of a spacing sequence.
//
// The spacings are divided by their mean and a straight line in the
// site index (the mean and a drift of the spacing, such as a calibration
// gradient) is removed. Then, up to MaxLines lines:
//
//  1. the periodogram of the residual, Hann-tapered and zero-padded
//     (spectrum.go), is divided by a noise floor fitted off the lines, and
//     every peak above the threshold of the stated false-alarm
//     probability that the taper's leakage from a stronger peak cannot
//     explain is a candidate;
//  2. each candidate is fitted to the residual by Gauss–Newton on its
//     frequency, amplitude and phase, together with the straight line
//     (fit.go), and kept and subtracted when the fitted sinusoid alone
//     would pass the threshold (a peak of leakage fits to almost
//     nothing).
//
// Lines within one resolution cell of ½ are tested against the pure
// alternation (−1)^n and set to ½ exactly when they cannot be told from it.
// After each look every line is refitted in turn on the residual without
// it (a line fitted before a neighbour was subtracted carries that
// neighbour's leakage). When no new line is found, the frequency errors
// come from the joint Jacobian of all lines with the local noise floor at each line: the
// Cramér–Rao bound of a sinusoid in locally white Gaussian noise, which
// the least-squares fit attains (Rife & Boorstyn, IEEE Trans. Inf. Theory
// 20, 1974).
//
// Finally the relations among the frequencies and 1 give the period,
// rank and basis (module.go). Read checks the context between lines. It
// returns an error only for bad input: fewer than MinSpacings spacings, a
// non-finite spacing, or a mean spacing that is not positive.
func Read(ctx context.Context, spacings []float64, opt Options) (*Reading, error) {
	n := len(spacings)
	if n < MinSpacings {
		return nil, fmt.Errorf("reading tones: %d spacings, need at least %d", n, MinSpacings)
	}
	var mean float64
	for i, s := range spacings {
		if math.IsNaN(s) || math.IsInf(s, 0) {
			return nil, fmt.Errorf("reading tones: spacing %d is %v", i, s)
		}
		mean += s
	}
	mean /= float64(n)
	if !(mean > 0) {
		return nil, fmt.Errorf("reading tones: mean spacing %g is not positive", mean)
	}
	if opt.FalseAlarm == 0 {
		opt.FalseAlarm = DefaultFalseAlarm
	}
	if !(opt.FalseAlarm > 0 && opt.FalseAlarm < 0.5) {
		return nil, fmt.Errorf("reading tones: false-alarm probability %v outside (0, 0.5)", opt.FalseAlarm)
	}
	if opt.MaxLines == 0 {
		opt.MaxLines = DefaultMaxLines
	}
	if opt.MaxLines < 0 {
		return nil, fmt.Errorf("reading tones: at most %d lines", opt.MaxLines)
	}

	m := newModel(spacings, mean)
	sp := newSpectrum(n, opt.FalseAlarm)
	var (
		floor   *noiseFloor
		limited bool
	)
	for {
		if err := ctx.Err(); err != nil {
			return nil, fmt.Errorf("reading tones: %w", err)
		}
		pow := sp.periodogram(m.resid)
		floor = sp.fitFloor(pow, m.freqs())
		if len(m.lines) >= opt.MaxLines {
			limited = len(sp.candidates(pow, floor, m.freqs(), 1)) > 0
			break
		}
		cands := sp.candidates(pow, floor, m.freqs(), opt.MaxLines-len(m.lines))
		if len(cands) == 0 {
			break
		}
		kept := 0
		for i, f0 := range cands {
			if err := ctx.Err(); err != nil {
				return nil, fmt.Errorf("reading tones: %w", err)
			}
			if i > 0 && !sp.stillThere(m.resid, f0, floor) {
				continue
			}
			keep := func(l sinusoid) bool { return sp.significant(l.f, l.amp(), floor) }
			if m.add(f0, floor.at(f0), opt.FalseAlarm, keep) {
				kept++
			}
		}
		if kept == 0 {
			break
		}
		if err := m.sweep(ctx, floor, opt.FalseAlarm); err != nil {
			return nil, err
		}
	}
	// A line taken on a peak that its stronger neighbours' first,
	// biased fits made may shrink once they are refitted: keep only the
	// lines whose final amplitude passes the threshold.
	for {
		weakest := -1
		for i, l := range m.lines {
			if !sp.significant(l.f, l.amp(), floor) && (weakest < 0 || l.amp() < m.lines[weakest].amp()) {
				weakest = i
			}
		}
		if weakest < 0 {
			break
		}
		m.remove(weakest)
		if err := m.sweep(ctx, floor, opt.FalseAlarm); err != nil {
			return nil, err
		}
	}
	r := &Reading{Period: 1, Noise: floor.noise(), Residual: m.rms()}
	r.Lines = m.result(floor)
	order := make([]int, len(r.Lines))
	for i := range order {
		order[i] = i
	}
	slices.SortStableFunc(order, func(a, b int) int {
		return -cmp.Compare(r.Lines[a].Amp, r.Lines[b].Amp)
	})
	sorted := make([]Line, len(order))
	for i, j := range order {
		sorted[i] = r.Lines[j]
	}
	r.Lines = sorted
	note := relate(r, opt.FalseAlarm)
	r.Reason = reason(r, limited, note)
	return r, nil
}

// reason writes the one-sentence summary of a reading.
func reason(r *Reading, limited bool, note string) string {
	var b strings.Builder
	switch len(r.Lines) {
	case 0:
		fmt.Fprintf(&b, "no spectral line above the noise (%.3g of the mean spacing)", r.Noise)
	case 1:
		fmt.Fprintf(&b, "1 line")
	default:
		fmt.Fprintf(&b, "%d lines", len(r.Lines))
	}
	placed := false
	for _, c := range r.Coeffs {
		placed = placed || c != nil
	}
	if len(r.Lines) > 0 {
		fmt.Fprintf(&b, " above the noise (%.3g of the mean spacing)", r.Noise)
	}
	if placed {
		switch {
		case r.Rank == 0:
			fmt.Fprintf(&b, ", all at multiples of 1/%d", r.Period)
		case r.Period == 1:
			fmt.Fprintf(&b, " generating a module of rank %d over Z", r.Rank)
		default:
			fmt.Fprintf(&b, " generating a module of rank %d over (1/%d)Z", r.Rank, r.Period)
		}
	}
	if limited {
		b.WriteString("; more lines lie above the noise than the limit allows")
	}
	if note != "" {
		b.WriteString("; " + note)
	}
	return b.String()
}
