package plate

import (
	"context"
	"errors"
	"fmt"
	"math"
	"slices"

	"phasonhull/topology"
	"phasonhull/topology/spectrum"
)

// Method names how a spectrum was obtained.
type Method string

// The methods.
const (
	// Auto chooses Values up to AutoDense sites (a real operator) or
	// AutoDense/2 (a complex one, whose embedding is twice the size), KPM
	// above.
	Auto Method = ""
	// Values computes every eigenvalue (Operator.Eigenvalues).
	Values Method = "values"
	// KPM estimates the IDS by the kernel polynomial method (KPM).
	KPM Method = "kpm"
)

// Defaults of Options.
const (
	// AutoDense is the largest real operator (half that for a complex
	// one) whose levels Auto computes densely: a 2000×2000 dense
	// symmetric eigenproblem takes seconds, one of 4000 minutes.
	AutoDense = 2000
	// DefaultFloor is the density of states, relative to the mean over the
	// spectrum's bounds, below which the KPM curve counts as empty.
	DefaultFloor = 0.02
	// DefaultMaxOrder bounds the order Σ|m_i| of the labels tried.
	DefaultMaxOrder = 8
)

// Options control Analyze.
type Options struct {
	// Method: Auto, Values or KPM.
	Method Method
	// KPM are the options of the kernel polynomial method.
	KPM KPMOptions
	// MinGap is the smallest gap reported, relative to the spectrum's
	// width; 0 means spectrum.DefaultMinGap. A KPM gap must also be wider
	// than the energy resolution.
	MinGap float64
	// Floor is the density of states, relative to the mean density over
	// the bounds of the spectrum, below which a KPM gap is empty; 0 means
	// DefaultFloor.
	Floor float64
	// Generators g_i label the gaps in the group Z + Σ Z·g_i: the entries
	// of A, det A and, with a field, the flux α. nil labels nothing.
	Generators []float64
	// MaxOrder bounds the order Σ|m_i| of the labels tried; 0 means
	// DefaultMaxOrder.
	MaxOrder int
}

// Result is what Analyze found. Its JSON form is the gaps of a plate.
type Result struct {
	// Sites is the number of rows of the operator, the normalization of
	// every IDS.
	Sites  int    `json:"sites"`
	Method Method `json:"method"`
	// Moments and Vectors are the KPM's M and R (0 for Values).
	Moments int `json:"moments"`
	Vectors int `json:"vectors"`
	// Resolution is the energy resolution, π·a/M (0 for Values, whose
	// levels are exact).
	Resolution float64 `json:"resolution"`
	// Lowest and Highest bound the spectrum (the extreme levels, or where
	// the KPM density first and last exceeds the floor).
	Lowest  float64 `json:"lowest"`
	Highest float64 `json:"highest"`
	// Boundary is Operator.Boundary: the sites whose count of levels may
	// depart from the infinite pattern's.
	Boundary int `json:"boundary_sites"`
	// Generators of the label group, and the number of labels tried.
	Generators []float64 `json:"generators"`
	Gaps       []Gap     `json:"gaps"`
	Warnings   []string  `json:"warnings"`
	// Values holds every level for Method Values; Density the KPM
	// moments.
	Values  []float64 `json:"-"`
	Density *Density  `json:"-"`
}

// Gap is one spectral gap.
type Gap struct {
	// IDS is the integrated density of states in the gap and IDSError its
	// standard error: 0 for counted levels; for KPM the spread over the
	// vectors combined with half the rise of the IDS across the gap.
	IDS      float64 `json:"ids"`
	IDSError float64 `json:"ids_error"`
	// Lower and Upper are the gap's edges; for KPM each is located to
	// about the resolution (where the density falls to half its peak
	// within three resolutions outside the empty interval).
	Lower float64 `json:"lower"`
	Upper float64 `json:"upper"`
	Width float64 `json:"width"`
	// Tolerance is the distance within which a label matches:
	// 3·IDSError + Boundary/Sites + 0.5/Sites.
	Tolerance float64 `json:"label_tolerance"`
	// Label is the label of least order within Tolerance, nil when none
	// or when two labels of that order are within it.
	Label *topology.Label `json:"label"`
	// Chance is the expected number of distinct label values of order up
	// to the label's that a window of ±Tolerance at a random IDS holds:
	// 2·Tolerance times their number in (0, 1), at most 1. Near 1 the
	// match may be a coincidence of a dense group; a sweep decides. 0
	// without a label.
	Chance float64 `json:"chance"`
	// Confirmed is set when a sweep of a parameter confirms the label.
	Confirmed bool `json:"confirmed"`
}

// Analyze computes the spectrum of op (its levels, or its KPM density),
// finds the gaps, and labels them in the group of opt.Generators.
func Analyze(ctx context.Context, op *Operator, opt Options) (*Result, error) {
	if op == nil {
		return nil, errors.New("plate: no operator")
	}
	if math.IsNaN(opt.MinGap) || opt.MinGap < 0 || opt.MinGap >= 1 || math.IsNaN(opt.Floor) || opt.Floor < 0 || opt.MaxOrder < 0 {
		return nil, fmt.Errorf("plate: minimum gap %g, floor %g, largest order %d: want 0 ≤ min gap < 1, floor ≥ 0, order ≥ 0", opt.MinGap, opt.Floor, opt.MaxOrder)
	}
	for _, g := range opt.Generators {
		if math.IsNaN(g) || math.IsInf(g, 0) {
			return nil, fmt.Errorf("plate: generator %v: not a finite number", g)
		}
	}
	method := opt.Method
	if method == Auto {
		method = KPM
		if op.Len() <= AutoDense && (op.Real() || 2*op.Len() <= AutoDense) {
			method = Values
		}
	}
	minGap := opt.MinGap
	if minGap == 0 {
		minGap = spectrum.DefaultMinGap
	}
	res := &Result{Sites: op.Len(), Method: method, Boundary: op.Boundary(), Generators: opt.Generators, Warnings: []string{}}
	var err error
	switch method {
	case Values:
		err = res.fromValues(op, minGap)
	case KPM:
		err = res.fromKPM(ctx, op, opt, minGap)
	default:
		err = fmt.Errorf("method %q: want %s or %s", method, Values, KPM)
	}
	if err != nil {
		return nil, fmt.Errorf("plate: %w", err)
	}
	order := opt.MaxOrder
	if order == 0 {
		order = DefaultMaxOrder
	}
	N := float64(res.Sites)
	for i := range res.Gaps {
		g := &res.Gaps[i]
		g.Tolerance = 3*g.IDSError + float64(res.Boundary)/N + 0.5/N
		if l, ok := MatchLabel(g.IDS, opt.Generators, order, g.Tolerance); ok {
			g.Label = &l
			g.Chance = min(1, 2*g.Tolerance*float64(labelValues(opt.Generators, l.Order())))
		}
	}
	if res.Boundary > 0 {
		res.Warnings = append(res.Warnings, fmt.Sprintf("%d of %d sites lie on an edge or seam: a gap's count of levels may differ from the infinite pattern's by up to that many, "+
			"and states on an open edge can fill a gap", res.Boundary, res.Sites))
	}
	if res.Gaps == nil {
		res.Gaps = []Gap{}
	}
	return res, nil
}

func (res *Result) fromValues(op *Operator, minGap float64) error {
	v, err := op.Eigenvalues()
	if err != nil {
		return err
	}
	res.Values = v
	res.Lowest, res.Highest = v[0], v[len(v)-1]
	w := minGap * (res.Highest - res.Lowest)
	for k := 0; k+1 < len(v); k++ {
		if d := v[k+1] - v[k]; d >= w && d > 0 {
			res.Gaps = append(res.Gaps, Gap{IDS: float64(k+1) / float64(len(v)), Lower: v[k], Upper: v[k+1], Width: d})
		}
	}
	if minGap*float64(len(v)) < 4 {
		res.Warnings = append(res.Warnings, fmt.Sprintf("the minimum gap (%.3g of the spectrum's width) is below 4 mean level spacings of %d levels: "+
			"gaps that narrow may be the spacing of a finite sample's levels", minGap, len(v)))
	}
	return nil
}

// fromKPM finds the gaps on the KPM density: the runs of a grid of spacing
// resolution/8 where the density stays below the floor, joined across
// levels the boundary could hold, wider than the resolution.
func (res *Result) fromKPM(ctx context.Context, op *Operator, opt Options, minGap float64) error {
	d, err := NewDensity(ctx, op, opt.KPM)
	if err != nil {
		return err
	}
	res.Density = d
	res.Moments, res.Vectors, res.Resolution = d.Moments, d.Vectors, d.Resolution()
	floor := opt.Floor
	if floor == 0 {
		floor = DefaultFloor
	}
	lo, hi := d.Center-d.HalfWidth*(1-margin), d.Center+d.HalfWidth*(1-margin)
	floor /= hi - lo
	h := res.Resolution / 8
	n := int(math.Ceil((hi-lo)/h)) + 1
	e := make([]float64, n)
	rho := make([]float64, n)
	for i := range e {
		e[i] = lo + (hi-lo)*float64(i)/float64(n-1)
		rho[i] = d.DOS(e[i])
	}
	first := slices.IndexFunc(rho, func(r float64) bool { return r >= floor })
	if first < 0 {
		return errors.New("the density of states stays below the floor everywhere")
	}
	last := len(rho) - 1
	for rho[last] < floor {
		last--
	}
	res.Lowest, res.Highest = e[first], e[last]
	width := res.Highest - res.Lowest
	win := int(math.Ceil(3 * res.Resolution / h))
	// The runs of the grid where the density stays below the floor.
	type run struct{ i, j int }
	var runs []run
	for i := first; i <= last; {
		if rho[i] >= floor {
			i++
			continue
		}
		j := i
		for j+1 <= last && rho[j+1] < floor {
			j++
		}
		runs = append(runs, run{i, j})
		i = j + 1
	}
	// Runs split only by levels that the sample's boundary could hold (the
	// IDS rises between them by less than Boundary/N: edge states that fill
	// a bulk gap of an open sample, at a density near the floor) are one
	// gap. A band that narrow cannot be told from boundary states.
	ids := func(e float64) float64 { v, _ := d.IDS(e); return v }
	share := float64(op.Boundary()) / float64(op.Len())
	var merged []run
	for _, r := range runs {
		if k := len(merged) - 1; k >= 0 && share > 0 && ids(e[r.i])-ids(e[merged[k].j]) < share {
			merged[k].j = r.j
			continue
		}
		merged = append(merged, r)
	}
	for _, r := range merged {
		i, j := r.i, r.j
		if e[j]-e[i] < res.Resolution {
			continue
		}
		lower := halfPeak(e, rho, i-1, -1, win)
		upper := halfPeak(e, rho, j+1, +1, win)
		if upper-lower < minGap*width {
			continue
		}
		mid, se := d.IDS((e[i] + e[j]) / 2)
		rise := ids(e[j]) - ids(e[i])
		res.Gaps = append(res.Gaps, Gap{IDS: mid, IDSError: math.Hypot(se, rise/2), Lower: lower, Upper: upper, Width: upper - lower})
	}
	return nil
}

// halfPeak walks from grid point k in direction dir over win points, finds
// the peak of the density there, and returns where the density first
// reaches half of it (linearly interpolated between grid points).
func halfPeak(e, rho []float64, k, dir, win int) float64 {
	peak := 0.0
	for s, i := 0, k; s <= win && i >= 0 && i < len(rho); s, i = s+1, i+dir {
		peak = max(peak, rho[i])
	}
	prev := k - dir
	for s, i := 0, k; s <= win && i >= 0 && i < len(rho); s, i = s+1, i+dir {
		if rho[i] >= peak/2 {
			if rho[i] <= rho[prev] {
				return e[i]
			}
			f := min(max((peak/2-rho[prev])/(rho[i]-rho[prev]), 0), 1)
			return e[prev] + f*(e[i]-e[prev])
		}
		prev = i
	}
	return e[k]
}

// labelTol is the distance below which two label values count as equal.
const labelTol = 1e-12

// MatchLabel returns the label of least order Σ|m_i| ≤ maxOrder in the group
// Z + Σ Z·g_i whose IDS n + Σ m_i·g_i lies within tol of ids, strictly
// inside (0, 1). It refuses (ok false) when none does, and when two
// labels of that least order with different values do: the measurement
// cannot tell them apart. Labels of equal value (rational generators) are
// one label, written with its smallest representation (least |n|, then
// the lexicographically first coefficients). Coeffs are [n, m_1, …].
func MatchLabel(ids float64, g []float64, maxOrder int, tol float64) (topology.Label, bool) {
	if math.IsNaN(ids) || !(tol >= 0) || len(g) == 0 {
		return topology.Label{}, false
	}
	m := make([]int, len(g))
	for order := 1; order <= maxOrder; order++ {
		var found []topology.Label
		forOrder(m, 0, order, func(m []int) {
			s := 0.0
			for i, c := range m {
				s += float64(c) * g[i]
			}
			n := math.Round(ids - s)
			v := n + s
			if math.Abs(v-ids) > tol || v <= labelTol || v >= 1-labelTol {
				return
			}
			found = append(found, topology.Label{IDS: v, Coeffs: append([]int{int(n)}, m...)})
		})
		if len(found) == 0 {
			continue
		}
		best := found[0]
		for _, l := range found[1:] {
			if math.Abs(l.IDS-best.IDS) > labelTol {
				return topology.Label{}, false
			}
			if smaller(l.Coeffs, best.Coeffs) {
				best = l
			}
		}
		return best, true
	}
	return topology.Label{}, false
}

// labelValues returns the number of distinct values n + Σ m_i·g_i strictly
// inside (0, 1) with 1 ≤ Σ|m_i| ≤ order.
func labelValues(g []float64, order int) int {
	var v []float64
	m := make([]int, len(g))
	for k := 1; k <= order; k++ {
		forOrder(m, 0, k, func(m []int) {
			s := 0.0
			for i, c := range m {
				s += float64(c) * g[i]
			}
			if f := s - math.Floor(s); f > labelTol && f < 1-labelTol {
				v = append(v, f)
			}
		})
	}
	slices.Sort(v)
	n := 0
	for i, x := range v {
		if i == 0 || x-v[i-1] > labelTol {
			n++
		}
	}
	return n
}

// forOrder calls f with every m whose entries from i on have Σ|m_j| = left
// (the entries before i as set).
func forOrder(m []int, i, left int, f func([]int)) {
	if i == len(m)-1 {
		for _, v := range []int{left, -left} {
			m[i] = v
			f(m)
			if left == 0 {
				break
			}
		}
		m[i] = 0
		return
	}
	for a := 0; a <= left; a++ {
		for _, v := range []int{a, -a} {
			m[i] = v
			forOrder(m, i+1, left-a, f)
			if a == 0 {
				break
			}
		}
	}
	m[i] = 0
}

// smaller reports whether coefficients a write a label more simply than b
// (same order): least |n|, then lexicographic.
func smaller(a, b []int) bool {
	if abs(a[0]) != abs(b[0]) {
		return abs(a[0]) < abs(b[0])
	}
	return slices.Compare(a, b) < 0
}
