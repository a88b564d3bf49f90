package hull

import (
	"fmt"
	"math"
	"slices"

	"phasonhull/embed"
	"phasonhull/topology/rips"
)

// The significance rule for bars. A bar of the landmark barcode is
// significant when its persistence exceeds
//
//	τ = max(2·max(δ, ε), 3·s)
//
// with δ the cover radius of the landmarks in the cloud, ε half the largest
// finite H0 death (half the largest gap of the sampled trace), and s the
// noise scale read off the short bars: the largest persistence among the
// bars of dimension ≥ 1 that no class of hull explains (all H1 bars but
// the two longest, all H2 bars but the longest).
//
// The sampling term follows the stability theorem for Vietoris–Rips
// barcodes (Chazal, de Silva & Oudot, Geom. Dedicata 173, 2014: the
// bottleneck distance between two barcodes is at most twice the
// Gromov–Hausdorff distance of the clouds): the landmarks lie within δ of
// the cloud and the cloud leaves gaps of at most 2ε in what it traces, so a
// bar that the landmarks have and the traced hull has not is at most about
// 4·max(δ, ε) long, and bars that short stem from sampling. It is used at
// half that worst case, since the worst case needs every landmark
// displaced the same way. The noise term asks a significant bar to be three
// times longer than anything that noise produced in the same barcode. The
// rule is checked on every class of generated hull from noise-free to 5%
// position noise (see the tests and the benchmark suite); its factors are
// named below.
const (
	samplingFactor = 2
	noiseFactor    = 3
	// torusLandmarks is the least number of landmarks H2 is computed on.
	torusLandmarks = 300
)

// classify decides the class of the hull.
func (a *analysis) classify() error {
	h := &a.res.Hull
	w := a.em.Whitened
	nu := a.res.Embedding.NoiseVariance

	// An exact period decides the point and finite classes outright.
	maxP := min(a.opt.MaxPeriod, len(a.u)/3)
	if pt := spacingPeriod(a.indexedSpacings(), nu, maxP); pt.Period > 0 && a.cellFits(pt.Period, nu) {
		a.res.Warnings = append(a.res.Warnings, a.siteWarnings...)
		h.Period = pt.Period
		h.Betti = []int{pt.Period, 0, 0}
		h.Confidence = 1
		if pt.Period == 1 {
			if classifyNoise(a.cleanSpacings()) == independentSpacings {
				a.setIndependent()
				return nil
			}
			h.Class = Point
			h.Reason = "all spacings are equal up to the measured noise: a periodic chain with one site per period"
		} else {
			h.Class = Finite
			h.Reason = fmt.Sprintf("the spacings repeat with period %d up to the measured noise (mean squared difference %.3g times its noise expectation)", pt.Period, pt.Ratio)
		}
		return nil
	}
	// A chain of a few tile lengths is read through its word, which
	// accounts for missing sites itself.
	if done, err := a.tiles(); err != nil || done {
		return err
	}
	a.res.Warnings = append(a.res.Warnings, a.siteWarnings...)
	if c := a.em.Choice; c != nil && !c.Settled {
		a.res.Warnings = append(a.res.Warnings, fmt.Sprintf("the delay window did not settle up to %d: the spacings keep filling new directions, as independent random spacings do", c.Cap))
	}
	if w.Kept == 0 {
		if classifyNoise(a.cleanSpacings()) == independentSpacings {
			a.setIndependent()
			return nil
		}
		h.Class, h.Betti, h.Period, h.Confidence = Point, []int{1, 0, 0}, 1, 1
		h.Reason = "the delay vectors show no direction above the noise floor: all windows of spacings agree up to noise"
		return nil
	}

	// A trace in four or more directions may be a torus, whose loops and
	// 2-cycle need a denser cover than a circle's loop.
	if w.Kept >= 4 && a.opt.Landmarks < torusLandmarks && len(a.em.Landmarks) < len(a.pool) {
		idx, c, err := embed.Landmarks(a.pool, torusLandmarks, a.opt.Seed)
		if err != nil {
			return err
		}
		a.em.Landmarks, a.em.LandmarkCloud, a.em.CoverRadius = idx, pick(a.pool, idx), c
		a.res.Embedding.Landmarks, a.res.Embedding.CoverRadius = len(idx), c
	}
	nLandmarks := max(a.opt.Landmarks, len(a.em.Landmarks))

	// Barcodes on Subsamples landmark sets; the first is the main one.
	var main bettiReading
	votes := map[[3]int]int{}
	for s := range a.opt.Subsamples {
		lm, cover := a.em.LandmarkCloud, a.em.CoverRadius
		if s > 0 {
			idx, c, err := embed.Landmarks(a.pool, nLandmarks, a.opt.Seed+uint64(s))
			if err != nil {
				return err
			}
			lm, cover = pick(a.pool, idx), c
		}
		br, err := a.barcodes(lm, cover, a.opt.Seed+uint64(s), s == 0)
		if err != nil {
			return err
		}
		if s == 0 {
			main = br
		}
		votes[br.betti]++
		a.res.Persistence.Subsamples = append(a.res.Persistence.Subsamples, br.betti[:])
	}
	b := main.betti
	h.Betti = b[:]
	h.Confidence = float64(votes[b]) / float64(a.opt.Subsamples)
	h.ScaleBand = main.band
	switch {
	case b == [3]int{1, 1, 0}:
		h.Class = Circle
		h.Reason = "one connected component and one persistent loop: the shift turns a circle"
		if second := kthLargest(h1Persistences(a.diagram.Bars), 2); second > a.res.Persistence.Threshold/2 {
			a.res.Warnings = append(a.res.Warnings, fmt.Sprintf("a second loop (persistence %.3g) stands above half the significance threshold %.3g: the hull may be a torus seen through noise; more sites or less noise would decide", second, a.res.Persistence.Threshold))
		}
	case b == [3]int{1, 2, 1}:
		h.Class = Torus
		h.Reason = "one component, two persistent loops and one persistent 2-cycle: the shift turns a two-torus"
	default:
		h.Class = Unresolved
		h.Reason = unresolvedReason(b, a.res)
	}
	if h.Confidence < 1 {
		a.res.Warnings = append(a.res.Warnings, fmt.Sprintf("the Betti numbers changed across landmark subsamples (%v): the class is uncertain; more sites or less noise would settle it", a.res.Persistence.Subsamples))
	}
	return nil
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

// cleanSpacings returns the dimensionless spacings with those across
// missing or spurious sites dropped.
func (a *analysis) cleanSpacings() []float64 {
	out := make([]float64, 0, len(a.u))
	for i, v := range a.u {
		if a.clean[i] {
			out = append(out, v)
		}
	}
	return out
}

// bettiReading is the outcome of the significance rule on one landmark set.
type bettiReading struct {
	betti [3]int
	band  []float64
}

// barcodes computes the barcode of one landmark set and reads its Betti
// numbers. H2 is computed only when H1 shows two loops or more: a circle
// needs no H2, a torus does.
func (a *analysis) barcodes(lm [][]float64, cover float64, seed uint64, main bool) (bettiReading, error) {
	opt := rips.Options{MaxDim: 1, Prime: cocyclePrime, Cocycles: main, MemoryBudget: a.opt.MemoryBudget, Workers: a.opt.Workers}
	dg, err := rips.VietorisRips(lm, opt)
	if err != nil {
		return bettiReading{}, err
	}
	tau, eps, noise := threshold(dg.Bars, cover)
	b := count(dg.Bars, tau)
	// Two loops that stand out above noise and sampling gap but not yet
	// above the cover radius ask for a denser cover too: a torus's loops
	// are longer than a sparse cover lets them show.
	loose := count(dg.Bars, math.Max(samplingFactor*eps, noiseFactor*noise))
	if b[1] >= 2 || loose[1] >= 2 {
		// A 2-cycle needs a denser cover than a loop: H2 is computed on at
		// least torusLandmarks landmarks.
		if want := max(a.opt.Landmarks, torusLandmarks); len(lm) < want && len(lm) < len(a.pool) {
			idx, c, err := embed.Landmarks(a.pool, want, seed)
			if err != nil {
				return bettiReading{}, err
			}
			lm, cover = pick(a.pool, idx), c
		}
		opt.MaxDim = 2
		if dg, err = rips.VietorisRips(lm, opt); err != nil {
			return bettiReading{}, err
		}
		tau, eps, noise = threshold(dg.Bars, cover)
		b = count(dg.Bars, tau)
	}
	br := bettiReading{betti: b, band: band(dg.Bars, tau)}
	if main {
		a.diagram, a.landmarks = dg, lm
		p := &a.res.Persistence
		p.Threshold, p.CoverRadius, p.SamplingGap, p.NoiseScale = tau, cover, eps, noise
		p.Bars = reportBars(dg.Bars, tau)
	}
	return br, nil
}

// threshold returns τ of the significance rule for a barcode, with its
// sampling gap ε and noise scale s.
func threshold(bars []rips.Bar, cover float64) (tau, eps, noise float64) {
	var p1, p2 []float64
	for _, b := range bars {
		switch {
		case b.Dim == 0 && !b.Essential():
			eps = math.Max(eps, b.Death/2)
		case b.Dim == 1 && !b.Essential():
			p1 = append(p1, b.Persistence())
		case b.Dim == 2 && !b.Essential():
			p2 = append(p2, b.Persistence())
		}
	}
	// The classes explain at most two loops and one 2-cycle.
	noise = math.Max(kthLargest(p1, 3), kthLargest(p2, 2))
	return math.Max(samplingFactor*math.Max(cover, eps), noiseFactor*noise), eps, noise
}

// kthLargest returns the k-th largest value of v (1-based), 0 when v has
// fewer than k values.
func kthLargest(v []float64, k int) float64 {
	if len(v) < k {
		return 0
	}
	s := slices.Clone(v)
	slices.Sort(s)
	return s[len(s)-k]
}

// count returns the Betti numbers b0..b2: the bars longer than tau (every
// essential bar counts).
func count(bars []rips.Bar, tau float64) [3]int {
	var b [3]int
	for _, x := range bars {
		if x.Dim <= 2 && x.Persistence() > tau {
			b[x.Dim]++
		}
	}
	return b
}

// band returns the scales at which every significant bar of dimension ≥ 1
// is alive: from the latest birth to the earliest death among them (nil
// when there is none or they never overlap).
func band(bars []rips.Bar, tau float64) []float64 {
	lo, hi := 0.0, math.Inf(1)
	any := false
	for _, b := range bars {
		if b.Dim >= 1 && b.Persistence() > tau {
			lo, hi, any = math.Max(lo, b.Birth), math.Min(hi, b.Death), true
		}
	}
	if !any || !(hi > lo) || math.IsInf(hi, 1) {
		return nil
	}
	return []float64{lo, hi}
}

// reportBars lists the bars worth showing: every bar of dimension ≥ 1 and
// the H0 bars above tau, sorted by dimension and then persistence.
func reportBars(bars []rips.Bar, tau float64) []Bar {
	var out []Bar
	var order []rips.Bar
	for _, b := range bars {
		if b.Dim >= 1 || b.Persistence() > tau {
			order = append(order, b)
		}
	}
	slices.SortStableFunc(order, rips.ComparePersistence)
	for _, b := range order {
		r := Bar{Dim: b.Dim, Birth: b.Birth, Significant: b.Persistence() > tau}
		if !b.Essential() {
			d := b.Death
			r.Death = &d
		}
		out = append(out, r)
	}
	if out == nil {
		out = []Bar{}
	}
	return out
}

// unresolvedReason says why Betti numbers b name no class, and what would
// decide.
func unresolvedReason(b [3]int, res *Result) string {
	switch {
	case b[0] > 1:
		return fmt.Sprintf("the trace falls apart into %d clusters without an exact period: a tiling of a few tile lengths, outliers, or too few sites; more sites (or the tile analysis) would decide", b[0])
	case b[1] == 0:
		return "no loop stands out above the noise and sampling scale: the chain is periodic with jitter above the noise tolerance, disordered, or too short; more sites or less noise would decide"
	default:
		return fmt.Sprintf("Betti numbers %v match no class of low-dimensional hull; more sites or less noise would decide", b)
	}
}

func pick(cloud [][]float64, idx []int) [][]float64 {
	out := make([][]float64, len(idx))
	for i, j := range idx {
		out[i] = cloud[j]
	}
	return out
}

// h1Persistences returns the persistences of the finite H1 bars.
func h1Persistences(bars []rips.Bar) []float64 {
	var p []float64
	for _, b := range bars {
		if b.Dim == 1 && !b.Essential() {
			p = append(p, b.Persistence())
		}
	}
	return p
}
