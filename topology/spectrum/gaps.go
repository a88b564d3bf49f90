package spectrum

import (
	"context"
	"errors"
	"fmt"
	"math"
	"slices"

	"phasonhull/topology"
)

// Defaults of Options.
const (
	// DefaultMinGap is the smallest gap reported, relative to the width of
	// the whole spectrum.
	DefaultMinGap = 1e-3
	// DefaultMaxCoeff bounds the angle coefficients of the labels tried.
	DefaultMaxCoeff = 6
	// DefaultResolution is the finite-size resolution of an IDS, in units
	// of 1/N: a count of levels below a gap differs from N times the
	// infinite chain's IDS by the charge the two ends (or the seam) hold,
	// a few levels at most (see the package documentation).
	DefaultResolution = 3
)

// Options control Analyze and Measured. The zero value asks for the
// defaults and labels nothing.
type Options struct {
	// MinGap is the smallest gap reported, relative to the width of the
	// spectrum (lowest to highest level); 0 means DefaultMinGap.
	MinGap float64
	// Angles are the angles θ_i, in turns, whose gap-label group
	// Z + Zθ1 (+ Zθ2) labels the gaps; nil labels with Period, or not at
	// all.
	Angles []float64
	// Period, for a periodic pattern of p sites per cell (a finite hull),
	// labels the gaps k/p. It excludes Angles.
	Period int
	// Labels, when neither Angles nor Period is given, is the label set
	// itself (for a hull whose group is not Z + Zθ, e.g. the labels
	// topology/hull lists for a substitution tiling).
	Labels []topology.Label
	// MaxCoeff bounds the angle coefficients |m_i| of the labels tried;
	// 0 means DefaultMaxCoeff.
	MaxCoeff int
	// Resolution is the tolerance within which an IDS matches a label;
	// 0 means DefaultResolution/N.
	Resolution float64
	// Method chooses how the spectrum is computed; Auto picks by size.
	Method Method
	// Workers bounds the goroutines of the counting method; 0 means all
	// cores.
	Workers int
}

// Result is what Analyze found: the gaps of an operator's spectrum, their
// integrated density of states and labels.
type Result struct {
	// Sites is the number of sites, the normalization of every IDS.
	Sites int `json:"sites"`
	// Method is how the spectrum was computed.
	Method Method `json:"method"`
	// Lowest and Highest are the extreme levels.
	Lowest  float64 `json:"lowest"`
	Highest float64 `json:"highest"`
	// MinGap is the smallest width reported, in the levels' unit.
	MinGap float64 `json:"min_gap"`
	// Resolution is the tolerance of the label match.
	Resolution float64 `json:"resolution"`
	// Labels is the number of labels tried (0 when nothing was labelled).
	Labels int `json:"labels_tried"`
	// Gaps are the gaps wider than MinGap, in ascending energy.
	Gaps []Gap `json:"gaps"`
	// Warnings say what the reader should know before relying on the
	// gaps.
	Warnings []string `json:"warnings"`
	// Values holds every level when they were computed (Method Values
	// or Measured), ascending; nil otherwise.
	Values []float64 `json:"-"`
}

// spacingFloor is the smallest MinGap, in mean level spacings (the
// spectrum's width over N), below which Analyze warns: gaps that narrow
// cannot be told from the spacing of a finite chain's levels.
const spacingFloor = 4

// Gap is one spectral gap.
type Gap struct {
	// Lower and Upper are the bulk levels that bound the gap: the highest
	// below it and the lowest above it, boundary states inside the gap
	// excepted.
	Lower float64 `json:"lower"`
	Upper float64 `json:"upper"`
	// Width is Upper − Lower; RelWidth is Width over the spectrum's width.
	Width    float64 `json:"width"`
	RelWidth float64 `json:"relative_width"`
	// Below is the number of levels at or below Lower.
	Below int `json:"below"`
	// IDS is Below/Sites: the integrated density of states in the gap.
	IDS float64 `json:"ids"`
	// Label is the gap label the IDS matched within the resolution, nil
	// when it matched none (or Options gave no angles).
	Label *topology.Label `json:"label"`
	// Boundary are the levels inside the gap that sit on an end of an
	// open chain (or at the seam of a periodic one); they are not counted
	// in Below.
	Boundary []BoundaryState `json:"boundary_states"`
}

// BoundaryState is a level inside a bulk gap whose eigenvector lies at an
// end of the chain.
type BoundaryState struct {
	Energy float64 `json:"energy"`
	// First and Last are the weights |ψ|² on the first and last tenth of
	// the chain (at least 4 sites each).
	First float64 `json:"first"`
	Last  float64 `json:"last"`
}

// rawGap is an empty interval between two consecutive levels, its edges
// bracketed: the lower level lies in [lo0, lo1], the upper in [hi0, hi1].
type rawGap struct {
	below              int // levels below the interval
	lo0, lo1, hi0, hi1 float64
}

func (r rawGap) lower() float64 { return (r.lo0 + r.lo1) / 2 }
func (r rawGap) upper() float64 { return (r.hi0 + r.hi1) / 2 }

// Analyze finds the gaps of the operator's spectrum wider than MinGap,
// their IDS and, when Options give angles or a period, their labels.
//
// Boundary states: an open chain's ends (or the seam of a periodic chain)
// can hold levels inside a bulk gap, splitting it. Levels between two
// empty intervals of at least w/3 each are examined (w the smaller of
// MinGap and DefaultMinGap), up to
// 2·Bandwidth() of them in one gap (a nearest-neighbour chain's two ends
// hold at most one state each in a gap): when every such level has more
// than half its weight on the first and last tenth of the chain, they are
// boundary states, and the gap is reported whole, from the bulk level
// below to the bulk level above, with the boundary states listed and not
// counted. This is the bulk counting convention: IDS = (levels at or below
// the gap's lower edge)/N. A boundary state closer than w/3 to a bulk
// edge is taken as part of the band; the gap is then reported narrower by
// that much, and its IDS off by one level.
func Analyze(op *Operator, opt Options) (*Result, error) {
	return AnalyzeContext(context.Background(), op, opt)
}

// AnalyzeContext is Analyze under a context: it checks ctx before each
// stage (the levels, the search for empty intervals, the bracketing of
// their edges, the merge into gaps) and returns an error wrapping
// ctx.Err() once ctx is done. A stage already running (one dense solve,
// one pass of Sturm counts over the energy grid) is finished first.
func AnalyzeContext(ctx context.Context, op *Operator, opt Options) (*Result, error) {
	if op == nil {
		return nil, errors.New("spectrum: no operator")
	}
	if err := opt.check(); err != nil {
		return nil, fmt.Errorf("spectrum: %w", err)
	}
	if err := stopped(ctx, "before the levels"); err != nil {
		return nil, err
	}
	lv, err := newLevels(op, opt.Method, opt.Workers)
	if err != nil {
		return nil, fmt.Errorf("spectrum: %w", err)
	}
	res, raws, err := lv.rawGaps(ctx, opt)
	if err != nil {
		return nil, err
	}
	if err := stopped(ctx, "before the merge of the gaps"); err != nil {
		return nil, err
	}
	gaps := lv.merge(raws, res, opt)
	if err := finish(res, gaps, opt); err != nil {
		return nil, fmt.Errorf("spectrum: %w", err)
	}
	return res, nil
}

func (o Options) check() error {
	if math.IsNaN(o.MinGap) || o.MinGap < 0 || o.MinGap >= 1 {
		return fmt.Errorf("minimum gap %g: must lie in [0, 1) (relative to the spectrum's width; 0: %g)", o.MinGap, float64(DefaultMinGap))
	}
	if o.MaxCoeff < 0 {
		return fmt.Errorf("largest label coefficient %d: must not be negative", o.MaxCoeff)
	}
	if math.IsNaN(o.Resolution) || o.Resolution < 0 {
		return fmt.Errorf("resolution %g: must not be negative", o.Resolution)
	}
	if o.Period < 0 || (o.Period > 0 && len(o.Angles) > 0) {
		return fmt.Errorf("period %d with %d angle(s): label by a period or by angles, not both", o.Period, len(o.Angles))
	}
	if len(o.Labels) > 0 && (o.Period > 0 || len(o.Angles) > 0) {
		return errors.New("a label set with a period or angles: give one way to label")
	}
	for _, l := range o.Labels {
		if !(l.IDS > 0 && l.IDS < 1) {
			return fmt.Errorf("label %v: its IDS %g must lie strictly between 0 and 1", l.Coeffs, l.IDS)
		}
	}
	for _, a := range o.Angles {
		if !(a > 0 && a < 1) {
			return fmt.Errorf("angle %g: must lie strictly between 0 and 1 turn", a)
		}
	}
	if len(o.Angles) > 2 {
		return fmt.Errorf("%d angles: at most two", len(o.Angles))
	}
	return nil
}

func (o Options) minGap() float64 {
	if o.MinGap == 0 {
		return DefaultMinGap
	}
	return o.MinGap
}

// isolation is the width, relative to the spectrum's, of the empty
// intervals the gap search starts from: a third of the smaller of MinGap
// and DefaultMinGap, so that a boundary state splitting a wide gap is
// recognised however large MinGap is.
func (o Options) isolation() float64 { return min(o.minGap(), DefaultMinGap) / 3 }

// stopped returns an error wrapping ctx.Err(), saying where the analysis
// stopped, once ctx is done; nil before.
func stopped(ctx context.Context, where string) error {
	if err := ctx.Err(); err != nil {
		return fmt.Errorf("spectrum: stopped %s: %w", where, err)
	}
	return nil
}

// rawGaps finds every empty interval at least isolation() wide, checking
// ctx before the count over the energy grid and before the bracketing.
func (lv *levels) rawGaps(ctx context.Context, opt Options) (*Result, []rawGap, error) {
	res := &Result{Sites: lv.n, Method: Values}
	if lv.values != nil {
		v := lv.values
		res.Values = v
		res.Lowest, res.Highest = v[0], v[len(v)-1]
		res.MinGap = opt.minGap() * (res.Highest - res.Lowest)
		iso := opt.isolation() * (res.Highest - res.Lowest)
		var raws []rawGap
		for k := 0; k+1 < len(v); k++ {
			if v[k+1]-v[k] >= iso && v[k+1] > v[k] {
				raws = append(raws, rawGap{k + 1, v[k], v[k], v[k+1], v[k+1]})
			}
		}
		return res, raws, nil
	}
	res.Method = Counting
	blo, bhi := lv.op.Bounds()
	lo := lv.level(0, blo, bhi)
	hi := lv.level(lv.n-1, blo, bhi)
	res.Lowest, res.Highest = lo, hi
	w := hi - lo
	res.MinGap = opt.minGap() * w
	iso := opt.isolation() * w
	if w <= 0 {
		return res, nil, nil
	}
	// A grid of spacing iso/2 puts a whole grid interval inside every
	// empty interval of width iso or more.
	g := int(math.Ceil(2*w/iso)) + 1
	es := make([]float64, g+1)
	for i := range es {
		es[i] = lo + w*float64(i)/float64(g)
	}
	if err := stopped(ctx, "before counting levels on the energy grid"); err != nil {
		return nil, nil, err
	}
	c := make([]int, g+1)
	lv.countMany(es, c, opt.Workers)
	c[0], c[g] = 0, lv.n // the extreme levels themselves
	var raws []rawGap
	for i := 1; i < g; {
		if c[i+1] != c[i] || c[i] == 0 || c[i] == lv.n {
			i++
			continue
		}
		j := i // the run of grid intervals [es[i], es[j]] holds no level
		for j+1 < g && c[j+1] == c[i] {
			j++
		}
		raws = append(raws, rawGap{below: c[i], lo0: es[i-1], lo1: es[i], hi0: es[j], hi1: es[j+1]})
		i = j + 1
	}
	// Only raw gaps that could be part of a gap of MinGap matter: those
	// in a run, within the levels a merge may skip, whose grid span can
	// reach MinGap (merge applies the same reach).
	maxCluster := 2 * lv.op.Bandwidth()
	need := make([]bool, len(raws))
	for i := range raws {
		reach := i
		for reach+1 < len(raws) && raws[reach+1].below-raws[i].below <= maxCluster {
			reach++
		}
		if raws[reach].hi1-raws[i].lo0 >= res.MinGap {
			for j := i; j <= reach; j++ {
				need[j] = true
			}
		}
	}
	// Bracket both edges to a hundredth of iso, enough to tell whether
	// the empty interval reaches iso, in parallel.
	if err := stopped(ctx, "before bracketing the gaps' edges"); err != nil {
		return nil, nil, err
	}
	tol := iso / 100
	keep := make([]bool, len(raws))
	parallel(len(raws), 1, opt.Workers, func(a, b int) {
		for r := a; r < b; r++ {
			if !need[r] {
				continue
			}
			g := &raws[r]
			g.lo0, g.lo1 = lv.bracket(g.below-1, g.lo0, g.lo1, tol)
			g.hi0, g.hi1 = lv.bracket(g.below, g.hi0, g.hi1, tol)
			keep[r] = g.upper()-g.lower() >= iso
		}
	})
	out := raws[:0]
	for r, g := range raws {
		if keep[r] {
			out = append(out, g)
		}
	}
	return res, out, nil
}

// edgeTol is the accuracy to which the counting method locates gap edges
// and the levels inverse iteration starts from: 1e-10 of the operator's
// scale, far below any width reported and enough for inverse iteration to
// converge in its three steps.
func (lv *levels) edgeTol() float64 { return max(lv.tol, 1e-10*lv.op.scale) }

// bracket narrows [lo, hi], which holds level k, to width tol.
func (lv *levels) bracket(k int, lo, hi, tol float64) (float64, float64) {
	if lv.values != nil {
		return lv.values[k], lv.values[k]
	}
	// levelTo returns the middle of a bracket narrower than tol; rebuild
	// it.
	tol = max(tol, lv.tol)
	m := lv.levelTo(k, lo, hi, tol)
	return max(lo, m-tol/2), min(hi, m+tol/2)
}

// merge joins raw gaps separated only by boundary states into bulk gaps
// and keeps those at least MinGap wide, with their edges located to full
// accuracy. The levels between neighbouring raw gaps are examined, and the
// edges located, in parallel.
func (lv *levels) merge(raws []rawGap, res *Result, opt Options) []Gap {
	maxCluster := 2 * lv.op.Bandwidth()
	// reach[i] is the farthest raw gap a merge starting at i could take
	// in; a start whose reach spans less than MinGap needs nothing.
	reach := make([]int, len(raws))
	useful := make([]bool, len(raws))
	for i := range raws {
		r := i
		for r+1 < len(raws) && raws[r+1].below-raws[i].below <= maxCluster {
			r++
		}
		reach[i] = r
		useful[i] = raws[r].upper()-raws[i].lower() >= res.MinGap
	}
	// The levels between raw gaps j and j+1, where a useful start could
	// merge across them.
	examine := make([]bool, len(raws))
	for i := range raws {
		if useful[i] {
			for j := i; j < reach[i]; j++ {
				examine[j] = true
			}
		}
	}
	clusters := make([][]BoundaryState, len(raws))
	isBoundary := make([]bool, len(raws))
	parallel(len(raws), 1, opt.Workers, func(a, b int) {
		for j := a; j < b; j++ {
			if examine[j] {
				clusters[j], isBoundary[j] = lv.boundaryCluster(raws[j].below, raws[j+1].below, raws[j], raws[j+1])
			}
		}
	})
	type span struct{ first, last int }
	var spans []span
	var boundary [][]BoundaryState
	for i := 0; i < len(raws); {
		if !useful[i] {
			i++
			continue
		}
		var states []BoundaryState
		j := i
		for j < reach[i] && isBoundary[j] {
			states = append(states, clusters[j]...)
			j++
		}
		if raws[j].upper()-raws[i].lower() >= res.MinGap {
			spans = append(spans, span{i, j})
			boundary = append(boundary, states)
		}
		i = j + 1
	}
	gaps := make([]Gap, len(spans))
	parallel(len(spans), 1, opt.Workers, func(a, b int) {
		for s := a; s < b; s++ {
			first, last := raws[spans[s].first], raws[spans[s].last]
			lower := lv.levelTo(first.below-1, first.lo0, first.lo1, lv.edgeTol())
			upper := lv.levelTo(last.below, last.hi0, last.hi1, lv.edgeTol())
			gaps[s] = Gap{
				Lower: lower, Upper: upper, Width: upper - lower,
				RelWidth: (upper - lower) / (res.Highest - res.Lowest),
				Below:    first.below, IDS: float64(first.below) / float64(lv.n),
				Boundary: boundary[s],
			}
		}
	})
	out := gaps[:0]
	for _, g := range gaps {
		if g.Width >= res.MinGap {
			out = append(out, g)
		}
	}
	return out
}

// boundaryCluster examines the levels k0..k1−1 between raw gaps a and b;
// ok reports whether every one of them is a boundary state.
func (lv *levels) boundaryCluster(k0, k1 int, a, b rawGap) ([]BoundaryState, bool) {
	states := make([]BoundaryState, 0, k1-k0)
	for k := k0; k < k1; k++ {
		// The raw gaps' brackets hold the first and the last level.
		lo, hi := a.hi1, b.lo0
		switch k {
		case k0:
			lo, hi = a.hi0, a.hi1
		case k1 - 1:
			lo, hi = b.lo0, b.lo1
		}
		e := lv.levelTo(k, lo, hi, lv.edgeTol())
		x := lv.op.eigenvector(e, uint64(k))
		f, l := endWeights(x)
		if f+l <= 0.5 {
			return nil, false
		}
		states = append(states, BoundaryState{Energy: e, First: f, Last: l})
	}
	return states, true
}

// finish labels the gaps and stores them in res.
func finish(res *Result, gaps []Gap, opt Options) error {
	var labels []topology.Label
	switch {
	case opt.Period == 1:
		labels = nil // one site per cell: the group is Z, no gap inside
	case opt.Period > 1:
		labels = topology.PeriodicLabels(opt.Period)
	case len(opt.Angles) > 0:
		mc := opt.MaxCoeff
		if mc == 0 {
			mc = DefaultMaxCoeff
		}
		labels = topology.Labels(opt.Angles, mc)
	default:
		labels = opt.Labels
	}
	res.Resolution = opt.Resolution
	if res.Resolution == 0 {
		res.Resolution = DefaultResolution / float64(res.Sites)
	}
	res.Labels = len(labels)
	res.Warnings = []string{}
	if mg := opt.minGap(); mg*float64(res.Sites) < spacingFloor {
		res.Warnings = append(res.Warnings, fmt.Sprintf("the minimum gap (%.3g of the spectrum's width) is below %d mean level spacings of %d levels: "+
			"gaps that narrow may be the spacing of a finite chain's levels, not gaps of the pattern; unlabelled ones most likely are", mg, spacingFloor, res.Sites))
	}

	for i := range gaps {
		if l, ok := topology.MatchLabel(gaps[i].IDS, labels, res.Resolution); ok {
			l.Coeffs = slices.Clone(l.Coeffs) // the gap owns its label
			gaps[i].Label = &l
		}
		if gaps[i].Boundary == nil {
			gaps[i].Boundary = []BoundaryState{}
		}
	}
	if gaps == nil {
		gaps = []Gap{}
	}
	res.Gaps = gaps
	return nil
}
