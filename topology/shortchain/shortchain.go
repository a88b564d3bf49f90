package shortchain

import (
	"context"
	"errors"
	"fmt"
	"math"
)

//go:generate go run ./internal/calibrate -o table.go

// Kind is the class a short chain is called.
type Kind string

// The classes.
const (
	Lattice     Kind = "lattice"     // equal spacings, position noise only
	Cell        Kind = "cell"        // a periodic cell of 2 to 6 spacings, position noise
	Harmonic    Kind = "harmonic"    // one angle with up to three harmonics, position noise
	Independent Kind = "independent" // spacings that vary independently
	Undecided   Kind = "undecided"   // none of them established at this size and noise
)

// Kinds lists the classes a chain can be called, in the order of the
// calibration table.
func Kinds() []Kind { return []Kind{Lattice, Cell, Harmonic, Independent} }

// Size limits of the decision: below Smallest sites nothing can be
// calibrated; above Largest the thresholds of the largest calibrated size
// would be extrapolated.
const (
	Smallest = 16
	Largest  = 256
)

// Options tunes Decide. The zero value is ready to use.
type Options struct {
	// Resolution is the smallest position difference the data resolves,
	// in the unit of the positions; spacings that agree to within ten
	// resolutions are equal. Zero means 1e-9 of the mean spacing.
	Resolution float64
}

// Comparison is the model comparison before the calibrated thresholds.
type Comparison struct {
	Best   Kind    // the class with the highest penalised log-likelihood
	Margin float64 // its lead over the next class, in log-likelihood units (+Inf for exactly equal spacings)
	// Scores are the penalised log-likelihoods of the classes in the
	// order of Kinds (−Inf for a model the chain is too short to fit).
	Scores    [4]float64
	Period    int     // the best cell's period
	Angle     float64 // the best harmonic model's angle, turns per site in (0, ½]
	AngleErr  float64 // its standard error
	Harmonics int     // its number of harmonics
	// Noise is the position noise in mean spacings: the residual scatter
	// of the best position-noise model, or, when independent spacings win,
	// √(−γ₁) from the spacings' lag-1 autocovariance γ₁ (position noise on
	// independent spacings gives γ₁ = −σ²).
	Noise float64
	// Lag1 is the lag-1 autocorrelation of the residual spacings of the
	// best position-noise model (the plain spacings for lattice and
	// independent), and Lag1Err its sampling error: −½ for position noise,
	// 0 for independent spacings (common practice).
	Lag1, Lag1Err float64
}

// Decision is the class of a short chain.
type Decision struct {
	Kind     Kind
	Period   int     // for Cell
	Angle    float64 // for Harmonic, turns per site in (0, ½]
	AngleErr float64 // its standard error
	// FalseCallRate is the fraction of simulated chains of another class
	// that the rule called Kind, in the calibration cell nearest this
	// chain's size and noise (the largest over the other classes).
	FalseCallRate float64
	// MinSites is, for Undecided, the smallest calibrated size at or
	// above this chain's at which the rule calls the leading class in at
	// least 90% of simulated chains at the measured noise (0 if none).
	MinSites int
	Noise    float64 // measured position noise, in mean spacings
	Lag1     float64 // lag-1 autocorrelation of the residual spacings
	Lag1Err  float64 // its sampling error
	Reason   string
}

// Compare fits the four models to the positions (sorted ascending, at
// least Smallest and at most Largest of them) and ranks them.
func Compare(ctx context.Context, positions []float64, opt Options) (Comparison, error) {
	N := len(positions)
	if N < Smallest || N > Largest {
		return Comparison{}, fmt.Errorf("short chain: %d sites, need %d to %d", N, Smallest, Largest)
	}
	for i, x := range positions {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return Comparison{}, fmt.Errorf("short chain: position %d is not finite", i)
		}
		if i > 0 && x <= positions[i-1] {
			return Comparison{}, fmt.Errorf("short chain: position %d (%g) does not exceed the one before (%g)", i, x, positions[i-1])
		}
	}
	if opt.Resolution < 0 || math.IsNaN(opt.Resolution) || math.IsInf(opt.Resolution, 0) {
		return Comparison{}, fmt.Errorf("short chain: resolution %g is not a finite non-negative length", opt.Resolution)
	}
	L := (positions[N-1] - positions[0]) / float64(N-1)
	res := opt.Resolution / L
	if res == 0 {
		res = 1e-9
	}
	c := &chain{y: make([]float64, N), n: make([]int, N), floor: res * res}
	for i, x := range positions {
		c.y[i] = (x - positions[0]) / L
		c.n[i] = i
	}
	c.s = diff(c.y)

	fits := [4]fit{c.lattice(), c.cell(), {}, c.independent()}
	h, err := c.harmonic(ctx)
	if err != nil {
		return Comparison{}, fmt.Errorf("short chain: %w", err)
	}
	fits[2] = h

	var out Comparison
	best := 0
	for i, f := range fits {
		out.Scores[i] = f.score
		if f.score > fits[best].score {
			best = i
		}
	}
	out.Best = fits[best].kind
	out.Margin = math.Inf(1)
	for i, f := range fits {
		if i != best {
			out.Margin = math.Min(out.Margin, fits[best].score-f.score)
		}
	}
	out.Period = fits[1].period
	out.Angle, out.AngleErr, out.Harmonics = h.angle, h.angleErr, h.harmonics

	// The best position-noise model gives the residual spacings.
	pos := 0
	for i := 1; i < 3; i++ {
		if fits[i].score > fits[pos].score {
			pos = i
		}
	}
	out.Lag1, out.Lag1Err = lag1(diff(fits[pos].resid))
	if out.Best == Independent {
		out.Lag1, out.Lag1Err = lag1(c.s)
		g1 := -out.Lag1 * fits[3].rss / c.m()
		out.Noise = math.Sqrt(math.Max(g1, 0))
	} else {
		f := fits[pos]
		out.Noise = math.Sqrt(f.rss / float64(N-f.posCols))
	}

	// Spacings equal to the resolution: a lattice without statistics.
	lo, hi := c.s[0], c.s[0]
	for _, v := range c.s {
		lo, hi = math.Min(lo, v), math.Max(hi, v)
	}
	if hi-lo <= 10*res {
		out.Best, out.Margin, out.Noise = Lattice, math.Inf(1), 0
	}
	return out, nil
}

// Call is the class the rule calls when the leading class needs a margin
// above threshold: Best, or Undecided when the margin falls short or the
// noise of a position-noise model lies beyond the calibrated range. Decide
// applies it with the calibrated threshold; the calibration with trial ones.
func (c Comparison) Call(threshold float64) Kind {
	if c.noisy() || !(c.Margin > threshold) {
		return Undecided
	}
	return c.Best
}

// noisy reports position noise beyond half a step past the largest
// calibrated noise, where no false-call rate was measured.
func (c Comparison) noisy() bool {
	return c.Best != Independent && c.Noise > 1.5*noises[len(noises)-1]
}

// errNoise marks a chain noisier than the calibration.
var errNoise = errors.New("noise beyond the calibrated range")

// Decide calls the class of a short chain: the model comparison of
// Compare, accepted only when the leading class's margin exceeds the
// threshold calibrated for the chain's size so that, on simulated chains
// of every other class at every calibrated noise, the rule calls it
// falsely at most 1% of the time (table.go). Otherwise the answer is
// Undecided, with the smallest calibrated size that would decide.
func Decide(ctx context.Context, positions []float64, opt Options) (Decision, error) {
	cmp, err := Compare(ctx, positions, opt)
	if err != nil {
		return Decision{}, err
	}
	N := len(positions)
	d := Decision{Noise: cmp.Noise, Lag1: cmp.Lag1, Lag1Err: cmp.Lag1Err}
	si, ni := nearestCell(N, cmp.Noise)
	lag := fmt.Sprintf("lag-1 autocorrelation of the residual spacings %.2f ± %.2f (−½ for position noise, 0 for independent spacings)", cmp.Lag1, cmp.Lag1Err)
	if cmp.noisy() {
		d.Kind = Undecided
		d.Reason = fmt.Sprintf("position noise %.1f%% of the spacing is %v (up to %.0f%%); %s",
			100*cmp.Noise, errNoise, 100*noises[len(noises)-1], lag)
		return d, nil
	}
	t := threshold(N, cmp.Best)
	if cmp.Call(t) == Undecided {
		d.Kind = Undecided
		d.MinSites = minSites(N, ni, cmp.Best)
		d.Reason = fmt.Sprintf("%s leads by %.1f in log-likelihood, short of the %.1f that %d sites need for a false-call rate of 1%%; %s",
			cmp.Best, cmp.Margin, t, N, lag)
		if d.MinSites > 0 {
			d.Reason += fmt.Sprintf("; %d sites would decide at this noise", d.MinSites)
		}
		return d, nil
	}
	d.Kind = cmp.Best
	d.FalseCallRate = falseCallRate(si, ni, cmp.Best)
	what := ""
	switch cmp.Best {
	case Lattice:
		what = "equal spacings with position noise"
		if math.IsInf(cmp.Margin, 1) {
			what = "spacings equal to the resolution"
		}
	case Cell:
		d.Period = cmp.Period
		what = fmt.Sprintf("a periodic cell of %d spacings with position noise", cmp.Period)
	case Harmonic:
		d.Angle, d.AngleErr = cmp.Angle, cmp.AngleErr
		what = fmt.Sprintf("one angle %.5f ± %.5f turns per site with %d harmonic(s) and position noise", cmp.Angle, cmp.AngleErr, cmp.Harmonics)
	case Independent:
		what = "spacings that vary independently"
	}
	d.Reason = fmt.Sprintf("%s, ahead of the next model by %.1f in log-likelihood (threshold %.1f at %d sites); %s; position noise %.2f%% of the spacing; false-call rate %.1f%% measured on %d simulated chains per class",
		what, cmp.Margin, t, N, lag, 100*cmp.Noise, 100*d.FalseCallRate, tableDraws)
	return d, nil
}
