package budget

import (
	"cmp"
	"context"
	"fmt"
	"math"
	"slices"
)

// Budget is the largest position error that keeps a gap open with the
// probability asked for, found by bisection on σ.
type Budget struct {
	Gap        DesignGap `json:"gap"`
	Confidence float64   `json:"confidence"`
	// Sigma is the largest σ tried whose estimated survival is at least
	// Confidence, with the next σ tried above it falling short; Bracketed
	// is false when no σ tried fell short (Sigma is then only a lower
	// bound) or when already σ = 0 falls short.
	Sigma     float64 `json:"sigma"`
	Bracketed bool    `json:"bracketed"`
	// Low and High state the Monte Carlo error of Sigma: at Low the
	// Wilson interval of the survival lies at or above Confidence, at High
	// below it, and between them it straddles Confidence, so the trials
	// cannot tell where in [Low, High] the answer is. High is 0 when no σ
	// tried had its interval wholly below Confidence.
	Low  float64 `json:"low"`
	High float64 `json:"high"`
	// Probes are every σ whose survival was estimated, ascending.
	Probes []Probe `json:"probes"`
}

// Probe is the survival of the target gap at one σ.
type Probe struct {
	Sigma float64    `json:"sigma"`
	Open  Proportion `json:"open"`
}

// Limits of the search.
const (
	// bisections is the number of halvings of the bracket at most;
	// relTol stops them once the bracket is that narrow relative to its
	// upper end (they stop sooner once the Wilson intervals at its two
	// ends overlap).
	bisections = 12
	relTol     = 0.01
	// expansions bounds the doublings of σ looking for a level where the
	// gap closes, and the steps of the search for Low and High.
	expansions = 12
	// stepFrac is the step, relative to Sigma, of the search for Low and
	// High.
	stepFrac = 0.1
)

// budget finds the largest σ keeping g open with probability
// r.opt.Confidence. Levels already run seed the bracket; every probe runs
// the same trials (seeds), measuring the gaps only.
func (r runner) budget(ctx context.Context, g DesignGap, levels []LevelResult) (*Budget, error) {
	c := r.opt.Confidence
	b := &Budget{Gap: g, Confidence: c}
	seen := map[float64]Proportion{}
	for _, l := range levels {
		for _, s := range l.Gaps {
			if slices.Equal(s.Label.Coeffs, g.Label.Coeffs) {
				seen[l.Sigma] = s.Open
			}
		}
	}
	probe := func(sigma float64) (Proportion, error) {
		if p, ok := seen[sigma]; ok {
			return p, nil
		}
		l := Level{Sigma: sigma, Missing: r.opt.Missing, Drift: r.opt.Drift}
		// Without position error or missing sites every trial is the
		// same sample: one stands for all.
		n, each := r.opt.Trials, 1
		if sigma == 0 && r.opt.Missing == 0 {
			n, each = 1, r.opt.Trials
		}
		ts, err := r.trials(ctx, l, n, func(int) Measure { return Measure{} },
			fmt.Sprintf("bisection at σ = %.4g: trials", sigma))
		if err != nil {
			return Proportion{}, err
		}
		open := 0
		for _, t := range ts {
			if widest(t, g.Label.Coeffs).Width > r.opt.MinWidth {
				open += each
			}
		}
		p := NewProportion(open, r.opt.Trials)
		seen[sigma] = p
		return p, nil
	}
	ok := func(p Proportion) bool { return p.Estimate >= c }

	// The bracket [lo, hi]: survival ≥ c at lo, < c at hi.
	p0, err := probe(0)
	if err != nil {
		return nil, err
	}
	if !ok(p0) {
		b.Probes = probes(seen)
		return b, nil
	}
	// hi is the smallest σ falling short; levels above it that pass by
	// chance are ignored, lo being the largest passing σ below hi.
	lo, hi := 0.0, math.Inf(1)
	for s, p := range seen {
		if !ok(p) && s < hi {
			hi = s
		}
	}
	for s, p := range seen {
		if ok(p) && s > lo && s < hi {
			lo = s
		}
	}
	if math.IsInf(hi, 1) {
		step := lo
		if step == 0 {
			// No level gives a scale: start from 1% of the mean spacing.
			step = 0.01 * r.spacing
			if !(step > 0) {
				step = 1e-3
			}
		}
		for range expansions {
			s := lo + step
			p, err := probe(s)
			if err != nil {
				return nil, err
			}
			if !ok(p) {
				hi = s
				break
			}
			lo, step = s, 2*step
		}
		if math.IsInf(hi, 1) {
			b.Sigma, b.Low = lo, lo
			b.Probes = probes(seen)
			return b, nil
		}
	}
	for range bisections {
		// Stop once the bracket is narrow, or once the trials cannot tell
		// its ends apart (their Wilson intervals overlap): halving further
		// would only move the answer within its Monte Carlo error.
		if hi-lo <= relTol*hi || seen[lo].Low <= seen[hi].High {
			break
		}
		mid := (lo + hi) / 2
		p, err := probe(mid)
		if err != nil {
			return nil, err
		}
		if ok(p) {
			lo = mid
		} else {
			hi = mid
		}
	}
	b.Sigma, b.Bracketed = lo, true

	// The Monte Carlo error: walk down from lo until the Wilson interval
	// lies at or above c, up from hi until it lies below.
	b.Low, b.High = -1, -1
	for k := 0; k <= expansions && b.Low < 0; k++ {
		s := max(0, lo*(1-stepFrac*float64(k)))
		p, err := probe(s)
		if err != nil {
			return nil, err
		}
		if p.Low >= c || s == 0 {
			b.Low = s
		}
	}
	for k := 0; k <= expansions && b.High < 0; k++ {
		s := hi * (1 + stepFrac*float64(k))
		p, err := probe(s)
		if err != nil {
			return nil, err
		}
		if p.High < c {
			b.High = s
		}
	}
	b.Low, b.High = max(b.Low, 0), max(b.High, 0)
	b.Probes = probes(seen)
	return b, nil
}

func probes(seen map[float64]Proportion) []Probe {
	out := make([]Probe, 0, len(seen))
	for s, p := range seen {
		out = append(out, Probe{Sigma: s, Open: p})
	}
	slices.SortFunc(out, func(a, b Probe) int { return cmp.Compare(a.Sigma, b.Sigma) })
	return out
}
