package budget

import (
	"math"
	"slices"

	"gonum.org/v1/gonum/stat"
	"gonum.org/v1/gonum/stat/distuv"
)

// IntervalLevel is the coverage of every binomial confidence interval the
// budget states.
const IntervalLevel = 0.95

// Proportion is a count of successes among trials with its Wilson score
// interval at IntervalLevel.
type Proportion struct {
	Count    int     `json:"count"`
	Trials   int     `json:"trials"`
	Estimate float64 `json:"estimate"`
	Low      float64 `json:"low"`
	High     float64 `json:"high"`
}

// NewProportion returns k successes out of n with the Wilson score
// interval at IntervalLevel (E. B. Wilson, "Probable inference, the law of
// succession, and statistical inference", J. Am. Stat. Assoc. 22, 209–212,
// 1927): the p whose normal test |p̂ − p| ≤ z·√(p(1−p)/n) passes,
//
//	(p̂ + z²/2n ± z·√(p̂(1−p̂)/n + z²/4n²)) / (1 + z²/n).
//
// Unlike p̂ ± z·√(p̂(1−p̂)/n) it stays inside [0, 1] and does not shrink to
// a point at p̂ = 0 or 1, the case a survival probability near 1 lives in.
func NewProportion(k, n int) Proportion {
	if n <= 0 {
		return Proportion{Count: k, Trials: n, Estimate: math.NaN(), Low: 0, High: 1}
	}
	z := distuv.UnitNormal.Quantile(1 - (1-IntervalLevel)/2)
	p, nf := float64(k)/float64(n), float64(n)
	d := 1 + z*z/nf
	c := (p + z*z/(2*nf)) / d
	h := z / d * math.Sqrt(p*(1-p)/nf+z*z/(4*nf*nf))
	return Proportion{Count: k, Trials: n, Estimate: p, Low: max(0, c-h), High: min(1, c+h)}
}

// Spread is the median and the 5% and 95% quantiles of a sample.
type Spread struct {
	Median float64 `json:"median"`
	P05    float64 `json:"p05"`
	P95    float64 `json:"p95"`
}

// spreadOf returns the spread of v (sorted in place), nil when v is
// empty. The quantiles are the empirical ones (gonum stat.Empirical).
func spreadOf(v []float64) *Spread {
	if len(v) == 0 {
		return nil
	}
	slices.Sort(v)
	q := func(p float64) float64 { return stat.Quantile(p, stat.Empirical, v, nil) }
	return &Spread{Median: q(0.5), P05: q(0.05), P95: q(0.95)}
}

// splitmix returns the SplitMix64 output of x: the seed of a trial is a
// function of the run's seed and the trial's index alone, so the results
// do not depend on the number of workers.
func splitmix(x uint64) uint64 {
	x += 0x9e3779b97f4a7c15
	x = (x ^ (x >> 30)) * 0xbf58476d1ce4e5b9
	x = (x ^ (x >> 27)) * 0x94d049bb133111eb
	return x ^ (x >> 31)
}

// TrialSeed is the seed of trial i of a run seeded with seed. Trial i
// draws the same random numbers at every error level (common random
// numbers), so a larger σ moves every site of trial i further the same
// way, and the survival curve is not roughened by fresh draws per level.
func TrialSeed(seed uint64, i int) uint64 {
	return splitmix(seed ^ splitmix(uint64(i)+1))
}
