package hull

import "math"

// periodTest is the outcome of the test for an exactly periodic chain.
type periodTest struct {
	Period int     // smallest period that passed, 0 when none did
	Ratio  float64 // mean squared p-difference over its noise expectation, at Period
}

// spacingPeriod looks for the smallest p ≤ maxP for which the dimensionless
// spacings u_n repeat, u_{n+p} = u_n, up to measurement noise.
//
// Under position noise of variance σ² (in mean spacings) a spacing carries
// noise e_{n+1} − e_n of variance ν = 2σ². For p ≥ 2 the difference
// u_{n+p} − u_n = e_{n+p+1} − e_{n+p} − e_{n+1} + e_n then has variance 2ν,
// for p = 1 (a second difference) 3ν. A period passes when the mean
// squared difference, over the M pairs, stays within that expectation times
// 1 + 5√(2/M) (five standard errors of a χ² mean) plus a rounding floor;
// nu is the noise variance estimated from the delay spectrum, independent
// of the periodic hypothesis, allowed noiseSlack for its own error. Exact data (ν ≈ 0) must repeat to rounding.
// An irrational modulation fails every p unless ‖pθ‖ is so small that the
// data cannot tell it from a period.
//
// For p ≥ 2 the period must also be resolved: the p windows of the mean
// cell (its cyclic shifts, the p points of the hull) must lie apart by at
// least sepFactor times the scatter of a window about them. A chain whose
// p-step return is merely close (a smooth hull turned by an angle near a
// fraction, or an estimate of ν inflated by a rough hull) has its p
// "points" strung along a curve, closer together than that.
//
// u is indexed by site index: u[k] is the spacing from the site of index k
// to the next, NaN where that spacing is unknown (across a missing or
// spurious site), so that a cell keeps its phase across gaps; pairs with
// an unknown member are skipped.
func spacingPeriod(u []float64, nu float64, maxP int) periodTest {
	const rounding = 1e-20 // squared dimensionless rounding of spacings
	for p := 1; p <= maxP && 3*p <= len(u); p++ {
		m := 0
		var s float64
		for n := 0; n+p < len(u); n++ {
			e := u[n+p] - u[n]
			if math.IsNaN(e) {
				continue
			}
			s += e * e
			m++
		}
		if m < 2*p {
			continue
		}
		s /= float64(m)
		want := 2 * nu
		if p == 1 {
			want = 3 * nu
		}
		limit := noiseSlack*want*(1+5*math.Sqrt(2/float64(m))) + rounding
		if s <= limit && (p == 1 || resolvedCell(u, p)) {
			return periodTest{Period: p, Ratio: s / math.Max(want, rounding)}
		}
	}
	return periodTest{}
}

// noiseSlack allows for the error of the noise estimate itself: ν comes
// from the median eigenvalue of the delay covariance, and for position
// noise (spacing noise a moving average) the eigenvalues spread over
// (0, 2ν), so their median lands between about 0.8ν and 1.4ν depending on
// the window (see package embed's tests).
const noiseSlack = 1.5

// sepFactor is how many window scatters apart the points of a finite hull
// must lie.
const sepFactor = 4

// resolvedCell reports whether the p cyclic shifts of the mean cell of u
// are separated by at least sepFactor times the scatter of a window of p
// spacings about its cell.
func resolvedCell(u []float64, p int) bool {
	cell := make([]float64, p)
	count := make([]int, p)
	for n, v := range u {
		if !math.IsNaN(v) {
			cell[n%p] += v
			count[n%p]++
		}
	}
	for j := range cell {
		if count[j] == 0 {
			return false
		}
		cell[j] /= float64(count[j])
	}
	var ss float64
	var m int
	for n, v := range u {
		if !math.IsNaN(v) {
			d := v - cell[n%p]
			ss += d * d
			m++
		}
	}
	scatter := math.Sqrt(ss / float64(m) * float64(p)) // RMS norm of a window's deviation
	sep := math.Inf(1)
	for j := 0; j < p; j++ {
		for k := j + 1; k < p; k++ {
			var d2 float64
			for i := range p {
				d := cell[(j+i)%p] - cell[(k+i)%p]
				d2 += d * d
			}
			sep = math.Min(sep, math.Sqrt(d2))
		}
	}
	return sep >= sepFactor*scatter
}

// indexedSpacings returns the dimensionless spacings by site index (see
// spacingPeriod): u[k] is the clean spacing from the site of index k, NaN
// where none is known.
func (a *analysis) indexedSpacings() []float64 {
	last := a.index[len(a.index)-1]
	u := make([]float64, last)
	for k := range u {
		u[k] = math.NaN()
	}
	for i, c := range a.clean {
		if c {
			u[a.index[i]] = a.u[i]
		}
	}
	return u
}

// cellFitFactor bounds the scatter of the sites about a fitted periodic
// cell, in units of the position noise the embedding measured.
const cellFitFactor = 2

// cellFits checks a period found on the spacings against the positions:
// the sites must lie on the lattice with a periodic cell of p sites within
// cellFitFactor times the position noise σ = √(ν/2) mean spacings (plus a
// rounding floor). Differences of spacings damp a slow modulation, by
// (2 sin πθ)² for the first; the positions do not, and a modulation, or
// independent spacings wandering like a random walk, shows there as a
// scatter far above the noise.
func (a *analysis) cellFits(p int, nu float64) bool {
	n, x := a.fitSites()
	r, ok := cellResiduals(n, x, p)
	if !ok {
		return true
	}
	var ss float64
	for _, v := range r {
		ss += v * v
	}
	rms := math.Sqrt(ss/float64(len(r))) / a.res.MeanSpacing
	return rms <= cellFitFactor*math.Sqrt(nu/2)+1e-9
}
