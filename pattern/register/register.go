package register

import (
	"cmp"
	"errors"
	"fmt"
	"math"
	"slices"
	"sort"
)

// Defaults and fixed factors of the registration.
const (
	// DefaultGate is the default match gate: a measured site may match a
	// design site only within this fraction of the smaller design spacing
	// next to it. Below ½ the gates of neighbouring design sites never
	// overlap, and a measured site midway between two design sites
	// matches neither (see Merge).
	DefaultGate = 0.4
	// DefaultMaxIter bounds the alternations of matching and fitting.
	DefaultMaxIter = 50
	// OutlierFactor: a matched site is a robust outlier when its residual
	// exceeds OutlierFactor robust sigmas. Under Gaussian noise a site
	// passes it with probability 1 − 6·10⁻⁵ (common practice: a 4σ cut).
	OutlierFactor = 4
	// BiweightTuning is the tuning constant c of Tukey's biweight, in
	// robust sigmas: 95% efficiency under Gaussian noise (Beaton & Tukey,
	// Technometrics 16, 1974; common practice).
	BiweightTuning = 4.685
	// MADFactor turns a median absolute deviation into a standard
	// deviation for Gaussian data: 1/Φ⁻¹(¾) (common practice).
	MADFactor = 1.482602218505602
	// endSkips is how many sites at each end of each chain the first
	// calibration may take as missing or extra.
	endSkips = 2
	// scoreSample bounds the measured sites used to score a candidate
	// first calibration.
	scoreSample = 512
)

// Options control Register. The zero value asks for the defaults.
type Options struct {
	// Drift fits a linear drift of the scale along the chain (see
	// Result.Drift).
	Drift bool
	// Gate is the match gate as a fraction of the smaller neighbouring
	// design spacing, in (0, 1); 0 means DefaultGate.
	Gate float64
	// MaxIter bounds the alternations of matching and fitting; 0 means
	// DefaultMaxIter.
	MaxIter int
	// Direction says which way the measured chain may run relative to
	// the design; the zero value, Auto, tries both.
	Direction Direction
}

// Direction is the orientation of the measured chain relative to the
// design.
type Direction int

// The directions. Auto fits both and keeps the forward one unless the
// reversed one is clearly better (see Register).
const (
	Auto     Direction = iota
	Forward            // the measured coordinate grows with the design's
	Reversed           // the measured chain runs from the design's last site
)

// Result is a registration of measured sites onto design sites.
//
// The calibration maps a design coordinate d to the measured coordinate
//
//	x(d) = Offset + Scale·d + Scale·Drift·(d − d₀)²/S
//
// with d₀ the first (lowest) design site and S the design's span, so that
// the local scale dx/dd is Scale at the first design site and grows
// linearly to Scale·(1 + 2·Drift) at the last. Drift is zero unless
// Options.Drift asked for it. A negative Scale means the measured chain
// runs opposite to the design.
//
// Indices are 0-based positions in the slices given to Register: design
// indices into the design, measured indices into the measured sites in the
// order they were given.
type Result struct {
	Offset, OffsetErr float64
	Scale, ScaleErr   float64
	Drift, DriftErr   float64
	// DriftFitted says whether the drift was fitted.
	DriftFitted bool

	// Matches are the matched pairs in design order. Residual is the
	// measured position minus the calibrated design position, in the
	// measured unit.
	Matches []Match
	// Missing lists the design sites no measured site matched, ascending.
	Missing []int
	// Extra lists the measured sites that matched no design site,
	// ascending.
	Extra []int
	// Merged lists extra measured sites that sit midway between two
	// consecutive missing design sites: two sites fabricated, or
	// detected, as one.
	Merged []Merge
	// Swapped lists consecutive measured entries (in the given order)
	// that match consecutive design sites in the order opposite to the
	// entries around them: two neighbours exchanged in a scan listing.
	// Only input in scan order can show it; sorted input never does.
	Swapped []Swap
	// Outliers lists the design indices of matched sites whose residual
	// exceeds OutlierFactor·Sigma, ascending.
	Outliers []int

	// Sigma is the robust standard deviation of the residuals (1.4826
	// times their median absolute deviation), floored at 10⁻⁹ of the mean
	// measured spacing so that exact data does not flag rounding.
	Sigma float64
	// RMS and Max are the root mean square and the largest magnitude of
	// the residuals of all matched sites.
	RMS, Max float64

	// Cost is the alignment objective of the matching under the final
	// calibration: one per unmatched site of either chain plus
	// (residual/gate)² per matched pair. CostErr is its standard
	// uncertainty from the scatter of the residuals (Sigma).
	Cost, CostErr float64
	// Ties lists the other alignments — the whole matching shifted along
	// the measured chain — that leave as many sites unmatched and whose
	// cost is within TieFactor combined uncertainties of Cost: the data
	// cannot tell them from this one. Empty when the registration is
	// unambiguous.
	Ties []Tie

	// Iterations counts the alternations of matching and fitting;
	// Converged says whether the matching settled before MaxIter.
	Iterations int
	Converged  bool

	// fitted model in the normalised coordinates of the fit.
	m model
}

// Match is one matched pair.
type Match struct {
	Design, Measured int
	// Residual is the measured position minus the calibrated design
	// position.
	Residual float64
	// Weight is the pair's final biweight weight in the fit, in [0, 1];
	// 0 means the pair did not pull the calibration.
	Weight float64
}

// Merge is one measured site standing for two consecutive design sites.
type Merge struct {
	Design   [2]int
	Measured int
}

// Swap is a pair of consecutive measured entries listed in the order
// opposite to their neighbours'.
type Swap struct {
	Measured [2]int // consecutive entries k, k+1 of the given order
	Design   [2]int // the design sites they match
}

// Predict returns the measured coordinate the calibration gives the design
// coordinate d.
func (r *Result) Predict(d float64) float64 { return r.m.predict(d) }

// Register matches measured sites to design sites and fits the
// calibration between them; see the package documentation for the method.
// Under Direction Auto both directions are fitted, and the reversed one is
// kept only when it matches more than 5% more design sites, or at least as
// many with less than half the robust sigma: a design that is nearly its
// own mirror image fits both ways, and the forward direction is then the
// answer unless Direction says otherwise.
// Both slices may be in any order; neither is modified. The design needs
// at least two distinct sites, and enough sites must match to fit the
// calibration (two more than its parameters).
func Register(design, measured []float64, opt Options) (*Result, error) {
	if opt.Gate == 0 {
		opt.Gate = DefaultGate
	}
	if !(opt.Gate > 0 && opt.Gate < 1) {
		return nil, fmt.Errorf("registering: gate %v: must lie in (0, 1)", opt.Gate)
	}
	if opt.MaxIter == 0 {
		opt.MaxIter = DefaultMaxIter
	}
	if opt.MaxIter < 0 {
		return nil, fmt.Errorf("registering: max iterations %d: must not be negative", opt.MaxIter)
	}
	if opt.Direction < Auto || opt.Direction > Reversed {
		return nil, fmt.Errorf("registering: unknown direction %d", opt.Direction)
	}
	ds, err := newChain(design, "design")
	if err != nil {
		return nil, fmt.Errorf("registering: %w", err)
	}
	ms, err := newChain(measured, "measured")
	if err != nil {
		return nil, fmt.Errorf("registering: %w", err)
	}
	for i := 1; i < len(ds.x); i++ {
		if ds.x[i] == ds.x[i-1] {
			return nil, fmt.Errorf("registering: design sites %d and %d are both at %v", ds.order[i-1], ds.order[i], ds.x[i])
		}
	}
	g := newGeometry(ds.x, opt.Drift)
	gates := g.gateWidths(opt.Gate)

	var runs []*run
	var firstErr error
	for _, rev := range []bool{false, true} {
		if (rev && opt.Direction == Forward) || (!rev && opt.Direction == Reversed) {
			continue
		}
		r, err := g.solve(g.firstGuess(ms.x, gates, rev), ms.x, gates, opt.MaxIter)
		if err != nil {
			firstErr = cmp.Or(firstErr, err)
			continue
		}
		runs = append(runs, r)
	}
	if len(runs) == 0 {
		return nil, fmt.Errorf("registering: %w", firstErr)
	}
	best := runs[0]
	if len(runs) == 2 && runs[1].clearlyBetter(runs[0], len(ds.x)) {
		best = runs[1]
	}
	best, c, tied := g.settle(best, ms.x, gates, opt.MaxIter)
	res := &Result{m: best.m, Iterations: best.iterations, Converged: best.converged, Cost: c.cost, CostErr: c.costErr, Ties: []Tie{}}
	for _, t := range tied {
		res.Ties = append(res.Ties, Tie{Shift: t.shift, Cost: t.cost, CostErr: t.costErr, Missing: t.missing, Extra: t.extra})
	}
	res.fill(g, ds, ms, best.pairs, best.w)
	return res, nil
}

// run is one alternation of matching and fitting to convergence.
type run struct {
	m          model
	pairs      []pair
	w          []float64
	sigma      float64 // robust sigma of the residuals
	iterations int
	converged  bool
}

// solve alternates matching and fitting from the calibration start until
// the matching repeats itself or maxIter alternations have run.
func (g *geometry) solve(start model, x []float64, gates []float64, maxIter int) (*run, error) {
	r := &run{m: start}
	for it := 1; it <= maxIter; it++ {
		next := align(r.m, g, x, gates)
		r.iterations = it
		if it > 1 && slices.Equal(next, r.pairs) {
			r.converged = true
			break
		}
		r.pairs = next
		if len(r.pairs) < g.params()+2 {
			return nil, fmt.Errorf("only %d measured sites lie near a design site; the calibration needs %d", len(r.pairs), g.params()+2)
		}
		var err error
		if r.m, r.w, err = g.fit(r.pairs, x, r.m); err != nil {
			return nil, err
		}
	}
	res := make([]float64, len(r.pairs))
	for i, p := range r.pairs {
		res[i] = x[p.k] - r.m.predict(g.d[p.d])
	}
	r.sigma = robustSigma(res)
	return r, nil
}

// clearlyBetter reports whether run r (the reversed direction) beats the
// forward run f by a margin that noise does not produce: more than 5% of
// the n design sites more matched, or as many matched (at least) with less
// than half the robust sigma. Designs that are nearly mirror images of
// themselves — a lattice, or a modulated chain whose length times its
// angle is close to an integer — fit both ways about equally well; the
// forward direction wins those, and Options.Direction decides them.
func (r *run) clearlyBetter(f *run, n int) bool {
	switch more := len(r.pairs) - len(f.pairs); {
	case float64(more) > 0.05*float64(n):
		return true
	case more >= 0:
		return r.sigma < f.sigma/2
	}
	return false
}

// chain is a list of sites sorted ascending, with the original index of
// each.
type chain struct {
	x     []float64 // ascending
	order []int     // order[i]: index in the caller's slice of x[i]
}

func newChain(v []float64, what string) (chain, error) {
	if len(v) < 2 {
		return chain{}, fmt.Errorf("%s: %d site(s), need at least 2", what, len(v))
	}
	c := chain{x: make([]float64, len(v)), order: make([]int, len(v))}
	for i, x := range v {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return chain{}, fmt.Errorf("%s site %d: %v is not a finite number", what, i, x)
		}
		c.order[i] = i
	}
	sort.SliceStable(c.order, func(a, b int) bool { return v[c.order[a]] < v[c.order[b]] })
	for i, j := range c.order {
		c.x[i] = v[j]
	}
	return c, nil
}

// fill computes everything reported from the final matching and fit.
func (r *Result) fill(g *geometry, ds, ms chain, pairs []pair, w []float64) {
	cal := r.m.calibration(g)
	r.Offset, r.Scale, r.Drift = cal.offset, cal.scale, cal.drift
	r.OffsetErr, r.ScaleErr, r.DriftErr = cal.offsetErr, cal.scaleErr, cal.driftErr
	r.DriftFitted = g.drift

	matchedD := make([]bool, len(ds.x))
	matchedM := make([]int, len(ms.x)) // design index (sorted) + 1, 0 when unmatched
	resid := make([]float64, len(pairs))
	var ss float64
	for i, p := range pairs {
		matchedD[p.d] = true
		matchedM[p.k] = p.d + 1
		resid[i] = ms.x[p.k] - r.m.predict(ds.x[p.d])
		ss += resid[i] * resid[i]
		r.Max = math.Max(r.Max, math.Abs(resid[i]))
	}
	r.RMS = math.Sqrt(ss / float64(len(pairs)))
	r.Sigma = math.Max(robustSigma(resid), 1e-9*(ms.x[len(ms.x)-1]-ms.x[0])/float64(len(ms.x)-1))

	r.Matches = make([]Match, len(pairs))
	for i, p := range pairs {
		r.Matches[i] = Match{Design: ds.order[p.d], Measured: ms.order[p.k], Residual: resid[i], Weight: w[i]}
	}
	slices.SortFunc(r.Matches, func(a, b Match) int { return a.Design - b.Design })
	r.Outliers = []int{}
	for _, mt := range r.Matches {
		if math.Abs(mt.Residual) > OutlierFactor*r.Sigma {
			r.Outliers = append(r.Outliers, mt.Design)
		}
	}
	r.Missing, r.Extra = []int{}, []int{}
	for j, ok := range matchedD {
		if !ok {
			r.Missing = append(r.Missing, ds.order[j])
		}
	}
	for k, j := range matchedM {
		if j == 0 {
			r.Extra = append(r.Extra, ms.order[k])
		}
	}
	slices.Sort(r.Missing)
	slices.Sort(r.Extra)
	r.Merged = merges(r.m, ds, ms, matchedD, matchedM)
	r.Swapped = swaps(ds, ms, matchedM)
}

// merges finds extra measured sites within a quarter of the spacing of the
// midpoint between two consecutive design sites that are both missing.
// Each design site takes part in one merge at most.
func merges(m model, ds, ms chain, matchedD []bool, matchedM []int) []Merge {
	out := []Merge{}
	used := make([]bool, len(ds.x))
	for k, j := range matchedM {
		if j != 0 {
			continue
		}
		x := ms.x[k]
		// The design site just below x in calibrated coordinates; the
		// prediction is monotone, increasing or decreasing with the scale.
		lo := sort.Search(len(ds.x), func(i int) bool { return (m.predict(ds.x[i]) > x) == (m.b[1] > 0) }) - 1
		if lo < 0 || lo+1 >= len(ds.x) {
			continue
		}
		a, b := lo, lo+1
		if matchedD[a] || matchedD[b] || used[a] || used[b] {
			continue
		}
		ya, yb := m.predict(ds.x[a]), m.predict(ds.x[b])
		if math.Abs(x-(ya+yb)/2) <= 0.25*math.Abs(yb-ya) {
			used[a], used[b] = true, true
			out = append(out, Merge{Design: [2]int{ds.order[a], ds.order[b]}, Measured: ms.order[k]})
		}
	}
	slices.SortFunc(out, func(x, y Merge) int { return x.Design[0] - y.Design[0] })
	return out
}

// swaps finds consecutive entries k, k+1 of the measured sites in the
// given order that match design sites j and j∓1 while the steps into k
// and out of k+1 both go the other way (j−1, j+1, j, j+2 in an ascending
// listing). Entries around the pair must be matched for their steps to
// count; at least one must be.
func swaps(ds, ms chain, matchedM []int) []Swap {
	n := len(ms.x)
	// design[g]: sorted design index matched by given entry g, −1 if none.
	design := make([]int, n)
	for k, j := range matchedM {
		design[ms.order[k]] = j - 1
	}
	out := []Swap{}
	for k := 0; k+1 < n; k++ {
		a, b := design[k], design[k+1]
		if a < 0 || b < 0 || (b-a != 1 && b-a != -1) {
			continue
		}
		step := b - a
		agree, against := 0, 0
		if k > 0 && design[k-1] >= 0 {
			if s := a - design[k-1]; s*step < 0 {
				against++
			} else {
				agree++
			}
		}
		if k+2 < n && design[k+2] >= 0 {
			if s := design[k+2] - b; s*step < 0 {
				against++
			} else {
				agree++
			}
		}
		if against > 0 && agree == 0 {
			out = append(out, Swap{Measured: [2]int{k, k + 1}, Design: [2]int{ds.order[a], ds.order[b]}})
		}
	}
	return out
}

// ErrNoResiduals is returned by Screen when no residual is a number.
var ErrNoResiduals = errors.New("no finite residuals")

// Screening flags sites far from a model fitted to the sites themselves.
type Screening struct {
	// Sigma is the robust standard deviation of the finite residuals,
	// floored as Result.Sigma is; Threshold is OutlierFactor·Sigma.
	Sigma, Threshold float64
	// Flagged lists the sites whose residual exceeds Threshold; NotFitted
	// those whose residual is NaN (left out of the model). Both ascending.
	Flagged, NotFitted []int
	// RMS and Max are the root mean square and the largest magnitude of
	// the finite residuals.
	RMS, Max float64
}

// Screen flags, among per-site residuals from a model of the sites (NaN
// for sites the model left out), those beyond OutlierFactor robust sigmas.
// floor is the smallest sigma that is taken seriously (rounding).
func Screen(residuals []float64, floor float64) (Screening, error) {
	s := Screening{Flagged: []int{}, NotFitted: []int{}}
	var fin []float64
	var ss float64
	for i, r := range residuals {
		if math.IsNaN(r) {
			s.NotFitted = append(s.NotFitted, i)
			continue
		}
		fin = append(fin, r)
		ss += r * r
		s.Max = math.Max(s.Max, math.Abs(r))
	}
	if len(fin) == 0 {
		return s, ErrNoResiduals
	}
	s.RMS = math.Sqrt(ss / float64(len(fin)))
	s.Sigma = math.Max(robustSigma(fin), floor)
	s.Threshold = OutlierFactor * s.Sigma
	for i, r := range residuals {
		if math.Abs(r) > s.Threshold {
			s.Flagged = append(s.Flagged, i)
		}
	}
	return s, nil
}

// robustSigma returns 1.4826 times the median absolute deviation of r from
// its median.
func robustSigma(r []float64) float64 {
	return robustSigmaInto(r, make([]float64, len(r)))
}

// robustSigmaInto is robustSigma using scratch (of len(r)) for its work.
func robustSigmaInto(r, scratch []float64) float64 {
	if len(r) == 0 {
		return 0
	}
	copy(scratch, r)
	med := median(scratch)
	for i, v := range r {
		scratch[i] = math.Abs(v - med)
	}
	return MADFactor * median(scratch)
}

// median returns the median of v, reordering v. It selects in linear
// expected time (Hoare's FIND, Commun. ACM 4, 1961) rather than sorting.
func median(v []float64) float64 {
	n := len(v)
	hi := selectKth(v, n/2)
	if n%2 == 1 {
		return hi
	}
	// The lower middle value is the largest of the lower half, which
	// selectKth left below position n/2.
	lo := v[0]
	for _, x := range v[1 : n/2] {
		lo = math.Max(lo, x)
	}
	return (lo + hi) / 2
}

// selectKth reorders v so that v[k] is the value a sort would put there,
// with no larger value before it and no smaller one after it, and returns
// it.
func selectKth(v []float64, k int) float64 {
	lo, hi := 0, len(v)-1
	for lo < hi {
		// Median of three as the pivot, then a Hoare partition.
		mid := lo + (hi-lo)/2
		a, b, c := v[lo], v[mid], v[hi]
		pivot := math.Max(math.Min(a, b), math.Min(math.Max(a, b), c))
		i, j := lo, hi
		for i <= j {
			for v[i] < pivot {
				i++
			}
			for v[j] > pivot {
				j--
			}
			if i <= j {
				v[i], v[j] = v[j], v[i]
				i++
				j--
			}
		}
		switch {
		case k <= j:
			hi = j
		case k >= i:
			lo = i
		default:
			return v[k]
		}
	}
	return v[k]
}
