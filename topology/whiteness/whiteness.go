package whiteness

import (
	"context"
	"fmt"
	"math"

	"gonum.org/v1/gonum/stat/distuv"

	"phasonhull/topology/shortchain"
	"phasonhull/topology/tones"
)

//go:generate go run ./internal/calibrate -o table.go

// Kind is what Decide calls a spacing sequence.
type Kind string

// The calls.
const (
	// Independent: all four readings agree that the spacings vary
	// independently, at a size whose false-call rate is at most 1%.
	Independent Kind = "independent"
	// Correlated: the spacings are not those of a walk — the portmanteau
	// test rejects, a spectral line stands out, the positions stay near a
	// lattice, or r_1 lies three standard errors from 0 and not three
	// above position noise's −½.
	Correlated Kind = "correlated"
	// Undecided: the readings cannot tell at this size or spread.
	Undecided Kind = "undecided"
)

// Thresholds of the readings (see the package documentation).
const (
	// Level and ShortLevel are the levels at which the portmanteau test
	// rejects whiteness above and up to ShortSites sites.
	Level, ShortLevel = 0.01, 0.05
	// NoiseZ is how many standard errors r_1 must stand above −½.
	NoiseZ = 3
	// MinWander and ShortMinWander are the least W a walk may show above
	// and up to ShortSites sites: the 1% and 5% points of the law of
	// ∫₀¹ V(r)² dr, V a Brownian motion less its least-squares line (the
	// limit of W by Donsker's theorem; the points measured by simulation
	// on 20000 walks: 0.0171 and 0.0234 at 3000 sites, 0.019 and 0.025 at
	// 64). A hull keeps Var(r_n) bounded, so its W falls as 1/n.
	MinWander, ShortMinWander = 0.017, 0.025
	// FalseAlarm is the false-alarm probability of the spectral reading:
	// ten times tones.DefaultFalseAlarm, since here a line found in error
	// only withholds a call.
	FalseAlarm = 10 * tones.DefaultFalseAlarm
	// MaxFalseCall is the largest calibrated false-call rate at which the
	// rule calls the spacings independent.
	MaxFalseCall = 0.01
	// ShortSites is the size up to which the calibrated short-chain
	// decision (package shortchain) must call the chain independent too:
	// there the four readings of the spacings alone are fooled by weak
	// modulations drowned in position noise more often than 1%.
	ShortSites = 200
)

// Options tunes Measure and Decide. The zero value is ready to use.
type Options struct {
	// NoiseVariance is the variance, in mean spacings², that the position
	// noise the analysis tolerates gives one spacing; the independent part
	// of the spacing variance must exceed it. Zero sets no bound.
	NoiseVariance float64
}

// Statistics are the four readings of a spacing sequence.
type Statistics struct {
	Spacings int // n
	Lags     int // L
	// Q is the Ljung–Box statistic over lags 1..L, PValue its upper tail
	// under χ²_L.
	Q, PValue float64
	// Lag1 is r_1, and NoiseZ its distance above −½ in standard errors
	// of position noise.
	Lag1, NoiseZ float64
	// Spread is the standard deviation of the spacings, and Walk the
	// independent part √(γ_0 + 2γ_1) (0 when negative), both in mean
	// spacings.
	Spread, Walk float64
	// Lines is the number of spectral lines the algebraic reading found;
	// -1 when it was not run (an earlier reading had failed).
	Lines int
	// Wander is W = Var(r_n)/(n·γ_0), r_n the positions less their
	// least-squares line: about 1/15 for a walk of independent spacings,
	// O(1/n) for a hull, whose positions stay within a bounded distance
	// of a lattice.
	Wander float64
	// White, NotNoise, AboveNoise and Walks say whether readings 1, 2, 3
	// and 5 pass.
	White, NotNoise, AboveNoise, Walks bool
}

// Passes reports whether all four readings agree on independent spacings.
func (s Statistics) Passes() bool {
	return s.White && s.NotNoise && s.AboveNoise && s.Walks && s.Lines == 0
}

// wander returns W = Var(r_n)/(n·γ_0): the variance of the residuals r_n
// of the positions x_n = Σ_{i<n} u_i about their least-squares line,
// over n times the spacing variance γ_0 (u centred, n = len(u)).
func wander(u []float64, g0 float64) float64 {
	N := len(u) + 1
	x := make([]float64, N)
	for i, v := range u {
		x[i+1] = x[i] + v
	}
	mi := float64(N-1) / 2
	var mx, sxx, sxy float64
	for _, v := range x {
		mx += v
	}
	mx /= float64(N)
	for i, v := range x {
		d := float64(i) - mi
		sxx += d * d
		sxy += d * (v - mx)
	}
	b := sxy / sxx
	var rv float64
	for i, v := range x {
		r := v - mx - b*(float64(i)-mi)
		rv += r * r
	}
	return rv / float64(N) / (float64(len(u)) * g0)
}

// Lags returns the number of lags of the portmanteau test on n spacings:
// n/5, at least 3 and at most 20.
func Lags(n int) int { return min(max(n/5, 3), 20) }

// MinSpacings is the shortest sequence Measure accepts. Below
// tones.MinSpacings the spectral reading cannot run, and the rule never
// calls the spacings independent.
const MinSpacings = 8

// Measure computes the readings of a spacing sequence (at least
// MinSpacings of them, positive mean). The spectral reading runs only when
// the other three pass and there are at least tones.MinSpacings spacings.
func Measure(ctx context.Context, spacings []float64, opt Options) (Statistics, error) {
	n := len(spacings)
	if n < MinSpacings {
		return Statistics{}, fmt.Errorf("whiteness: %d spacings, need at least %d", n, MinSpacings)
	}
	var mean float64
	for i, v := range spacings {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return Statistics{}, fmt.Errorf("whiteness: spacing %d is %v", i, v)
		}
		mean += v
	}
	mean /= float64(n)
	if !(mean > 0) {
		return Statistics{}, fmt.Errorf("whiteness: mean spacing %g is not positive", mean)
	}
	u := make([]float64, n)
	for i, v := range spacings {
		u[i] = v/mean - 1
	}
	L := Lags(n)
	g := make([]float64, L+1) // biased autocovariances γ_k
	for k := range g {
		for i := k; i < n; i++ {
			g[k] += u[i] * u[i-k]
		}
		g[k] /= float64(n)
	}
	s := Statistics{Spacings: n, Lags: L, Lines: -1, Spread: math.Sqrt(g[0])}
	if g[0] == 0 {
		return s, nil // equal spacings: nothing varies
	}
	nf := float64(n)
	for k := 1; k <= L; k++ {
		r := g[k] / g[0]
		s.Q += r * r / (nf - float64(k))
	}
	s.Q *= nf * (nf + 2)
	s.PValue = distuv.ChiSquared{K: float64(L)}.Survival(s.Q)
	s.Lag1 = g[1] / g[0]
	s.NoiseZ = (s.Lag1 + 0.5) / math.Sqrt(0.5/nf)
	s.Walk = math.Sqrt(math.Max(g[0]+2*g[1], 0))
	level, minWander := Level, MinWander
	if n+1 <= ShortSites {
		level, minWander = ShortLevel, ShortMinWander
	}
	s.White = s.PValue >= level
	s.NotNoise = s.NoiseZ >= NoiseZ
	s.AboveNoise = s.Walk*s.Walk > opt.NoiseVariance
	s.Wander = wander(u, g[0])
	s.Walks = s.Wander >= minWander
	if !s.White || !s.NotNoise || !s.AboveNoise || !s.Walks || n < tones.MinSpacings {
		return s, nil
	}
	r, err := tones.Read(ctx, spacings, tones.Options{FalseAlarm: FalseAlarm})
	if err != nil {
		return s, fmt.Errorf("whiteness: %w", err)
	}
	s.Lines = len(r.Lines)
	return s, nil
}

// Decision is what Decide calls a spacing sequence.
type Decision struct {
	Kind Kind
	Statistics
	// FalseCallRate is, for Independent, the calibrated rate at which the
	// four readings agree on a chain with a hull at this size (the worst
	// family and noise of the two calibrated sizes around it).
	FalseCallRate float64
	// Short is the short-chain decision's call, for chains of at most
	// ShortSites sites whose four readings agree ("" otherwise).
	Short shortchain.Kind
	// MinSites is, for Undecided, the smallest calibrated size above this
	// chain's at which the rule called at least MinPower of the simulated
	// independent chains of the nearest spread so (0 if none).
	MinSites int
	// Reason says what the readings found, in one sentence.
	Reason string
}

// Decide measures the readings of the spacings of the positions (sorted
// ascending, consecutive sites) and calls them Independent when all four
// agree — and, up to ShortSites sites, the short-chain decision calls the
// chain independent too — at a size whose calibrated false-call rate is at
// most MaxFalseCall; Correlated when the portmanteau test or the spectral
// reading finds structure; otherwise Undecided, with the smallest size
// that would decide.
func Decide(ctx context.Context, positions []float64, opt Options) (Decision, error) {
	spacings := make([]float64, 0, max(len(positions)-1, 0))
	for i := 1; i < len(positions); i++ {
		spacings = append(spacings, positions[i]-positions[i-1])
	}
	s, err := Measure(ctx, spacings, opt)
	if err != nil {
		return Decision{}, err
	}
	d := Decision{Statistics: s}
	n := s.Spacings
	N := n + 1
	said := fmt.Sprintf("Ljung–Box Q = %.1f on %d lags (p = %.2g), lag-1 autocorrelation %.2f (%.1f standard errors above position noise's −½), spread %.3g of the spacing of which %.3g independent, wander of the positions W = %.3f (about 1/15 for a walk, falling as 1/n for a hull)",
		s.Q, s.Lags, s.PValue, s.Lag1, s.NoiseZ, s.Spread, s.Walk, s.Wander)
	switch {
	case s.Spread == 0:
		d.Kind, d.Reason = Correlated, "the spacings are all equal"
		return d, nil
	case !s.White:
		d.Kind, d.Reason = Correlated, "the spacings are correlated: "+said
		return d, nil
	case s.Lines > 0:
		d.Kind, d.Reason = Correlated, fmt.Sprintf("the spacings carry %d spectral line(s): %s", s.Lines, said)
		return d, nil
	}
	d.MinSites = minSites(N, s.Walk)
	need := "more sites"
	if d.MinSites > 0 {
		need = fmt.Sprintf("about %d sites", d.MinSites)
	}
	switch {
	case !s.Walks:
		d.Kind, d.MinSites = Correlated, 0
		d.Reason = fmt.Sprintf("the positions stay too close to a lattice for a walk: %s", said)
		return d, nil
	case !s.NotNoise && math.Abs(s.Lag1)*math.Sqrt(float64(n)) > NoiseZ:
		d.Kind, d.MinSites = Correlated, 0
		d.Reason = fmt.Sprintf("the spacings are those of position noise: %s", said)
		return d, nil
	case !s.AboveNoise:
		d.Kind = Undecided
		d.Reason = fmt.Sprintf("the independent part of the spread (%.3g) does not exceed the tolerated noise (%.3g): %s; less noise would decide", s.Walk, math.Sqrt(opt.NoiseVariance), said)
		return d, nil
	case !s.NotNoise:
		d.Kind = Undecided
		d.Reason = fmt.Sprintf("independent spacings and position noise cannot be told apart: %s; %s would decide", said, need)
		return d, nil
	case n < tones.MinSpacings:
		d.Kind = Undecided
		d.Reason = fmt.Sprintf("%d spacings are too few for the spectral reading (it needs %d): %s; %s would decide", n, tones.MinSpacings, said, need)
		return d, nil
	}
	if N <= ShortSites && N >= shortchain.Smallest {
		sc, err := shortchain.Decide(ctx, positions, shortchain.Options{})
		if err != nil {
			return Decision{}, fmt.Errorf("whiteness: %w", err)
		}
		d.Short = sc.Kind
		if sc.Kind != shortchain.Independent {
			d.Kind = Undecided
			d.Reason = fmt.Sprintf("the spacings look independent (%s, no spectral line), but the short-chain test reads %s (%s); %s would decide", said, sc.Kind, sc.Reason, need)
			return d, nil
		}
	}
	rate := falseCallRate(N)
	if rate > MaxFalseCall {
		d.Kind = Undecided
		d.Reason = fmt.Sprintf("the spacings look independent (%s, no spectral line), but at %d sites chains with a hull look so %.1f%% of the time; %s would decide", said, N, 100*rate, need)
		return d, nil
	}
	d.Kind, d.FalseCallRate, d.MinSites = Independent, rate, 0
	d.Reason = fmt.Sprintf("the spacings are white (%s) and carry no spectral line; calibrated false-call rate %.2g%% on %d simulated chains with a hull per family and noise",
		said, 100*rate, tableDraws[sizeIndex(N)])
	return d, nil
}
