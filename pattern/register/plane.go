package register

import (
	"cmp"
	"context"
	"errors"
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/mat"

	"phasonhull/pattern"
	"phasonhull/pattern/lattice"
)

// Defaults of the registration of planes.
const (
	// DefaultPlaneReach is the default of PlaneOptions.Reach: the offsets
	// tried are the one that puts the two sets' medians together and
	// those up to two lattice steps from it along each basis vector.
	DefaultPlaneReach = 2
)

// PlaneOptions control RegisterPlane. The zero value asks for the
// defaults.
type PlaneOptions struct {
	// Gate is the match gate as a fraction of the distance from a design
	// site to its nearest design neighbour (at most the shortest lattice
	// vector), in (0, ½); 0 means DefaultGate. Below ½ the gates of two
	// design sites never overlap.
	Gate float64
	// MaxIter bounds the alternations of matching and fitting; 0 means
	// DefaultMaxIter.
	MaxIter int
	// Reach is how many lattice steps along each basis vector the offset
	// search goes from the offset that puts the medians of the two sets
	// together; 0 means DefaultPlaneReach. A sample that covers only part
	// of its design needs a larger one.
	Reach int
}

// PlaneResult is a registration of measured sites in the plane onto
// design sites.
//
// The calibration maps a design point d to the measured point
//
//	x(d) = Offset + Scale·R(Rotation)·d
//
// with R the counter-clockwise rotation by Rotation degrees, or, for a
// sample that is the design's mirror image, a reflection first (see
// Mirrored). Indices
// are 0-based positions in the slices given to RegisterPlane.
type PlaneResult struct {
	Offset, OffsetErr     [2]float64
	Scale, ScaleErr       float64
	Rotation, RotationErr float64 // degrees, counter-clockwise
	// Mirrored says the sample is the design's mirror image: the
	// calibration is x(d) = Offset + Scale·R(Rotation)·F·d with F the
	// reflection (x, y) → (x, −y) (an image whose y axis points down,
	// say).
	Mirrored bool

	// Matches are the matched pairs in design order. Residual is the
	// measured point minus the calibrated design point.
	Matches []PlaneMatch
	// Missing lists the design sites no measured site matched, Extra the
	// measured sites that matched no design site; both ascending.
	Missing, Extra []int
	// Outliers lists the design indices of matched sites whose residual
	// is longer than OutlierFactor·Sigma, ascending.
	Outliers []int

	// Sigma is the robust standard deviation of the residuals per
	// coordinate (1.4826 times the median absolute deviation of both
	// coordinates of every residual), floored at 10⁻⁹ of the measured
	// lattice spacing. Under isotropic Gaussian noise a residual is longer
	// than OutlierFactor·Sigma with probability e^{−OutlierFactor²/2} =
	// 3.4·10⁻⁴ (the Rayleigh tail; common practice).
	Sigma float64
	// RMS and Max are the root mean square and the largest length of the
	// residuals of all matched sites.
	RMS, Max float64

	// Cost is the alignment objective (one per unmatched site of either
	// set plus (|residual|/gate)² per matched pair), CostErr its standard
	// uncertainty from Sigma, as for a chain (Result.Cost).
	Cost, CostErr float64
	// Ties lists the other alignments — the whole matching moved by a
	// symmetry of the design lattice: a lattice vector and a rotation
	// that maps the lattice onto itself — that leave as many sites
	// unmatched at a cost within TieFactor combined uncertainties of
	// Cost: the modulation cannot tell them from this one. Empty when the
	// registration is unambiguous.
	Ties []PlaneTie
	// Basis is the design's average lattice (lattice.Recover), in whose
	// steps a tie's Shift counts.
	Basis [2][2]float64

	// Iterations counts the alternations of matching and fitting of the
	// alignment kept; Converged says whether it settled before MaxIter.
	Iterations int
	Converged  bool

	m planeModel
}

// PlaneMatch is one matched pair of sites in the plane.
type PlaneMatch struct {
	Design, Measured int
	// Residual is the measured point minus the calibrated design point.
	Residual [2]float64
	// Weight is the smaller of the pair's two biweight weights (one per
	// coordinate) in the final fit, in [0, 1].
	Weight float64
}

// PlaneTie is another alignment of a plane that the data cannot tell from
// the reported one.
type PlaneTie struct {
	// Shift is the lattice vector, in steps of the design basis
	// (PlaneResult.Basis), and Turn the rotation, in degrees, by which
	// the tie moves the design before the reported calibration maps it:
	// the tie matches design site d where the reported alignment matches
	// R(Turn)·d + Shift·Basis (about the design's centre).
	Shift [2]int
	Turn  float64
	// Mirrored says the tie is the mirror image of the reported
	// alignment; Turn and Shift then describe its rotation and offset
	// after the reflection (x, y) → (x, −y).
	Mirrored bool
	// Cost and CostErr are the tie's alignment cost and its uncertainty.
	Cost, CostErr float64
	// Missing and Extra count the sites the tie leaves unmatched.
	Missing, Extra int
}

// Predict returns where the calibration puts the design point d.
func (r *PlaneResult) Predict(d [2]float64) [2]float64 { return r.m.predict(r.m.g.in(d)) }

// flip mirrors a point or vector: (x, y) → (x, −y).
func flip(p [2]float64) [2]float64 { return [2]float64{p[0], -p[1]} }

// in maps a design point into the geometry's coordinates: mirrored or
// not.
func (g *planeGeometry) in(d [2]float64) [2]float64 {
	if g.mirror {
		return flip(d)
	}
	return d
}

// RegisterPlane matches measured sites in the plane to design sites and
// fits the similarity between them.
//
// Both sets are reduced to their average lattices (lattice.Recover); the
// rotations the two bases allow — the measured basis against the design
// basis under every integer change of basis with entries in {−1, 0, 1}
// and determinant 1 that makes the map a similarity within 5% — are the
// candidate rotations and scales: one for an oblique lattice, two for a
// rectangular, four for a square, six for a hexagonal one, up to the
// half-turn every lattice has. Each is tried with the offset that puts the
// design site nearest the design's coordinatewise median on the measured
// site nearest where the medians put it, and with that offset moved by up
// to Reach lattice steps along each basis vector; the design mirrored,
// (x, y) → (x, −y), is tried the same way. From each start whose own
// matching could lead to a tie with the best alignment found (starts in
// order of their matching's size), matching and fitting alternate until
// the matching repeats:
//
//  1. Matching: each design site, mapped through the current
//     calibration, takes the nearest measured site inside its gate; the
//     gates of two design sites never overlap, so the matching is one to
//     one.
//  2. Calibration: the matched pairs are fitted by iteratively
//     reweighted least squares with Tukey's biweight, each coordinate of
//     each pair one row (the fit shared with chains; see Register).
//
// Among the settled alignments the cheapest is kept, or, among those that
// tie with it, the one that leaves the fewest sites unmatched; the others
// that tie with the one kept are its Ties. The modulation of the design
// is what tells the alignments of a lattice apart: a pure lattice ties
// with each of its symmetries that keeps the patch.
func RegisterPlane(ctx context.Context, design, measured [][2]float64, opt PlaneOptions) (*PlaneResult, error) {
	if opt.Gate == 0 {
		opt.Gate = DefaultGate
	}
	if !(opt.Gate > 0 && opt.Gate < 0.5) {
		return nil, fmt.Errorf("registering: gate %v: must lie in (0, 0.5) for a plane", opt.Gate)
	}
	if opt.MaxIter == 0 {
		opt.MaxIter = DefaultMaxIter
	}
	if opt.Reach == 0 {
		opt.Reach = DefaultPlaneReach
	}
	if opt.MaxIter < 0 || opt.Reach < 0 {
		return nil, errors.New("registering: max iterations and reach must not be negative")
	}
	ld, err := planeLattice(ctx, design, "design")
	if err != nil {
		return nil, err
	}
	lm, err := planeLattice(ctx, measured, "measured")
	if err != nil {
		return nil, err
	}
	ms := newGrid(measured, math.Sqrt(norm2(lm.Basis[0])))
	var starts []planeStart
	for _, mirror := range []bool{false, true} {
		g := newPlaneGeometry(design, ld.Basis, opt.Gate, mirror)
		starts = append(starts, g.starts(measured, ms, lm.Basis, opt.Reach)...)
	}
	// The starts whose own matching is largest first; a start whose own
	// matching leaves more sites unmatched than the cheapest settled
	// alignment costs, plus the tie margin and 1% of the sites, is not
	// settled: it cannot tie, as a settled alignment gains few pairs over
	// its start's (the starts are placed to within the lattice's own
	// precision, far inside the gates).
	slices.SortStableFunc(starts, func(a, b planeStart) int { return b.pairs - a.pairs })
	var cands []planeCand
	slack := 0.01*float64(len(design)) + 2
	for _, st := range starts {
		if err := ctx.Err(); err != nil {
			return nil, fmt.Errorf("registering: %w", err)
		}
		if len(cands) > 0 {
			best := slices.MinFunc(cands, func(a, b planeCand) int { return cmp.Compare(a.cost, b.cost) })
			if float64(len(design)+len(measured)-2*st.pairs) > best.cost+TieFactor*math.Sqrt2*best.costErr+slack {
				continue
			}
		}
		g := st.m.g
		r, err := g.solve(st.m, ms, opt.MaxIter)
		if err != nil {
			continue
		}
		if slices.ContainsFunc(cands, func(c planeCand) bool {
			return c.r.m.g == g && slices.Equal(c.r.pairs, r.pairs)
		}) {
			continue
		}
		cands = append(cands, g.cost(r, ms))
	}
	if len(cands) == 0 {
		return nil, errors.New("registering: no rotation and offset of the design, as it is or mirrored, puts enough of its sites on measured sites to fit the calibration")
	}
	win, tied := settlePlane(cands)
	g := win.r.m.g
	res := &PlaneResult{m: win.r.m, Basis: ld.Basis, Mirrored: g.mirror, Cost: win.cost, CostErr: win.costErr,
		Iterations: win.r.iterations, Converged: win.r.converged, Ties: []PlaneTie{}}
	for _, c := range tied {
		res.Ties = append(res.Ties, g.tie(win.r.m, c))
	}
	res.fill(g, ms, win.r)
	return res, nil
}

// planeStart is a first calibration and the number of pairs its own
// matching makes.
type planeStart struct {
	m     planeModel
	pairs int
}

// starts returns the first calibrations of the design (mirrored or not, as
// g says): every rotation the two lattices allow, with every offset
// within reach lattice steps of the first.
func (g *planeGeometry) starts(measured [][2]float64, ms *grid, mbasis [2][2]float64, reach int) []planeStart {
	var out []planeStart
	cd, cm := medianPoint(g.d), medianPoint(measured)
	for _, L := range similarities(g.basis, mbasis) {
		// The medians may fall between sites (an even number of rows):
		// put the design site nearest its median on the measured site
		// nearest where L puts it, so that the lattice vectors from
		// there reach the true offset.
		t0 := sub(cm, apply(L, cd))
		dc := apply(L, nearestPoint(g.d, cd))
		t0 = sub(nearestPoint(measured, add(dc, t0)), dc)
		for n1 := -reach; n1 <= reach; n1++ {
			for n2 := -reach; n2 <= reach; n2++ {
				t := t0
				for c := range 2 {
					t[c] += float64(n1)*mbasis[0][c] + float64(n2)*mbasis[1][c]
				}
				m := g.similarity(L, t)
				out = append(out, planeStart{m: m, pairs: len(g.match(m, ms))})
			}
		}
	}
	return out
}

// planeLattice recovers the average lattice of a set of sites.
func planeLattice(ctx context.Context, pts [][2]float64, what string) (*lattice.Lattice, error) {
	p, err := pattern.NewPlane(pts, "", what)
	if err != nil {
		return nil, fmt.Errorf("registering: %s: %w", what, err)
	}
	l, err := lattice.Recover(ctx, p, lattice.Options{})
	if err != nil {
		return nil, fmt.Errorf("registering: %s: %w", what, err)
	}
	return l, nil
}

// similarities returns the linear maps L (row-major 2×2) with
// L·Σ_j V_ij·d_j = m_i for the design basis d and the measured basis m,
// over the integer matrices V with entries in {−1, 0, 1} and determinant
// 1, that are similarities within 5%: the part of L that is not a
// rotation times a scale is below 5% of the part that is. Each is
// returned as its similarity part.
func similarities(d, m [2][2]float64) [][2][2]float64 {
	var out [][2][2]float64
	dinv, ok := inverse(columns(d))
	if !ok {
		return nil
	}
	mc := columns(m)
	for code := range 81 {
		v := [2][2]float64{{float64(code%3 - 1), float64(code/3%3 - 1)}, {float64(code/9%3 - 1), float64(code/27 - 1)}}
		if v[0][0]*v[1][1]-v[0][1]*v[1][0] != 1 {
			continue
		}
		// L·D·V = M with D, M the bases as columns: L = M·V⁻¹·D⁻¹.
		vinv, _ := inverse(v)
		L := mul(mul(mc, vinv), dinv)
		p, q := (L[0][0]+L[1][1])/2, (L[1][0]-L[0][1])/2
		e, f := (L[0][0]-L[1][1])/2, (L[0][1]+L[1][0])/2
		if math.Hypot(e, f) <= 0.05*math.Hypot(p, q) {
			out = append(out, [2][2]float64{{p, -q}, {q, p}})
		}
	}
	return out
}

// planeGeometry holds the design, possibly mirrored, and the normalised
// coordinates of the fit: (d − centre)/radius, inside the unit disc.
type planeGeometry struct {
	d      [][2]float64
	gate   []float64     // gate of each design site, in design units
	basis  [2][2]float64 // the design's lattice basis, mirrored with it
	basis0 [2][2]float64 // the design's lattice basis as given
	mirror bool          // d holds the design mirrored: (x, y) → (x, −y)
	centre [2]float64
	radius float64
}

func newPlaneGeometry(design [][2]float64, basis [2][2]float64, gate float64, mirror bool) *planeGeometry {
	d := design
	g := &planeGeometry{gate: make([]float64, len(d)), basis: basis, basis0: basis, mirror: mirror}
	if mirror {
		d = make([][2]float64, len(design))
		for i, p := range design {
			d[i] = flip(p)
		}
		// The mirrored basis, reordered to stay right-handed.
		g.basis = [2][2]float64{flip(basis[1]), flip(basis[0])}
	}
	g.d = d
	for _, p := range d {
		g.centre[0] += p[0] / float64(len(d))
		g.centre[1] += p[1] / float64(len(d))
	}
	for _, p := range d {
		g.radius = math.Max(g.radius, math.Sqrt(norm2(sub(p, g.centre))))
	}
	h := math.Sqrt(norm2(basis[0]))
	dg := newGrid(d, h)
	for j, p := range d {
		nn := h
		dg.near(p, h, func(k int, r float64) {
			if k != j {
				nn = math.Min(nn, r)
			}
		})
		g.gate[j] = gate * nn
	}
	return g
}

// planeModel is x = (b₀ + p·u − q·v, b₁ + q·u + p·v) for (u, v) the
// normalised design coordinates, with the covariance of b = (b₀, b₁, p, q).
type planeModel struct {
	g   *planeGeometry
	b   []float64
	cov [][]float64
}

func (m planeModel) predict(d [2]float64) [2]float64 {
	u, v := (d[0]-m.g.centre[0])/m.g.radius, (d[1]-m.g.centre[1])/m.g.radius
	return [2]float64{m.b[0] + m.b[2]*u - m.b[3]*v, m.b[1] + m.b[3]*u + m.b[2]*v}
}

// scale returns the magnitude of the linear part, measured over design
// units.
func (m planeModel) scale() float64 { return math.Hypot(m.b[2], m.b[3]) / m.g.radius }

// similarity returns the model x = L·d + t.
func (g *planeGeometry) similarity(L [2][2]float64, t [2]float64) planeModel {
	c := add(apply(L, g.centre), t)
	return planeModel{g: g, b: []float64{c[0], c[1], L[0][0] * g.radius, L[1][0] * g.radius}}
}

// planePair is a matched design site d and measured site k.
type planePair struct{ d, k int }

// planeRun is one alternation of matching and fitting to convergence.
type planeRun struct {
	m          planeModel
	pairs      []planePair
	w          []float64 // per row of the fit: two per pair
	sigma      float64
	iterations int
	converged  bool
}

// match gives each design site, mapped through m, the nearest measured
// site inside its gate.
func (g *planeGeometry) match(m planeModel, ms *grid) []planePair {
	s := m.scale()
	var out []planePair
	for j, d := range g.d {
		y, gate := m.predict(d), s*g.gate[j]
		best, bestR := -1, gate
		ms.near(y, gate, func(k int, r float64) {
			if r <= bestR {
				best, bestR = k, r
			}
		})
		if best >= 0 {
			out = append(out, planePair{j, best})
		}
	}
	return out
}

// solve alternates matching and fitting from start until the matching
// repeats itself or maxIter alternations have run.
func (g *planeGeometry) solve(start planeModel, ms *grid, maxIter int) (*planeRun, error) {
	r := &planeRun{m: start}
	for it := 1; it <= maxIter; it++ {
		next := g.match(r.m, ms)
		r.iterations = it
		if it > 1 && slices.Equal(next, r.pairs) {
			r.converged = true
			break
		}
		r.pairs = next
		if len(r.pairs) < 4 {
			return nil, fmt.Errorf("only %d measured sites lie near a design site; the calibration needs 4", len(r.pairs))
		}
		var err error
		if r.m, r.w, err = g.fit(r.pairs, ms.pts, r.m); err != nil {
			return nil, err
		}
	}
	r.sigma = robustSigma(g.residualComponents(r.m, r.pairs, ms.pts))
	return r, nil
}

// residualComponents returns both coordinates of every pair's residual.
func (g *planeGeometry) residualComponents(m planeModel, pairs []planePair, x [][2]float64) []float64 {
	out := make([]float64, 0, 2*len(pairs))
	for _, p := range pairs {
		r := sub(x[p.k], m.predict(g.d[p.d]))
		out = append(out, r[0], r[1])
	}
	return out
}

// fit fits the similarity to the matched pairs with the robust fit chains
// use (robustFit), each coordinate of each pair one row.
func (g *planeGeometry) fit(pairs []planePair, x [][2]float64, start planeModel) (planeModel, []float64, error) {
	a := mat.NewDense(2*len(pairs), 4, nil)
	y := make([]float64, 2*len(pairs))
	for i, p := range pairs {
		u, v := (g.d[p.d][0]-g.centre[0])/g.radius, (g.d[p.d][1]-g.centre[1])/g.radius
		copy(a.RawRowView(2*i), []float64{1, 0, u, -v})
		copy(a.RawRowView(2*i+1), []float64{0, 1, v, u})
		y[2*i], y[2*i+1] = x[p.k][0], x[p.k][1]
	}
	// One plain least-squares step first: a start that is off in one
	// coordinate more than in the other (an offset from the medians)
	// would otherwise leave the rows of that coordinate without weight.
	r, ones := make([]float64, len(y)), make([]float64, len(y))
	for i := range y {
		row := a.RawRowView(i)
		r[i], ones[i] = y[i], 1
		for j, v := range row {
			r[i] -= v * start.b[j]
		}
	}
	step, err := weightedSolve(a, r, ones)
	if err != nil {
		return planeModel{}, nil, fmt.Errorf("fitting the calibration: %w", err)
	}
	b0 := slices.Clone(start.b)
	for j := range b0 {
		b0[j] += step[j]
	}
	floor := 1e-9 * start.scale() * math.Sqrt(norm2(sub(g.d[0], g.d[len(g.d)-1]))) / float64(len(g.d))
	b, cov, w, err := robustFit(a, y, b0, floor)
	if err != nil {
		return planeModel{}, nil, err
	}
	return planeModel{g: g, b: b, cov: cov}, w, nil
}

// planeCand is a settled alignment with its cost.
type planeCand struct {
	r              *planeRun
	cost, costErr  float64
	missing, extra int
}

// cost returns the alignment objective of r, as cost does for a chain.
func (g *planeGeometry) cost(r *planeRun, ms *grid) planeCand {
	c := planeCand{r: r, missing: len(g.d), extra: len(ms.pts)}
	sigma := math.Max(r.sigma, 1e-12)
	s := r.m.scale()
	var v float64
	for _, p := range r.pairs {
		gate := s * g.gate[p.d]
		res := math.Sqrt(norm2(sub(ms.pts[p.k], r.m.predict(g.d[p.d]))))
		c.missing--
		c.extra--
		pc, pv := pairCost(res, gate, sigma)
		c.cost += pc
		v += pv
	}
	c.cost += float64(c.missing + c.extra)
	c.costErr = math.Sqrt(v)
	return c
}

// settlePlane keeps, among the alignments that tie with the cheapest, the
// cheapest of those that leave the fewest sites unmatched — one of the
// design as it is when one of those ties with a mirrored one — and
// returns the others that leave as many unmatched and tie with it.
func settlePlane(cands []planeCand) (planeCand, []planeCand) {
	best := slices.MinFunc(cands, func(a, b planeCand) int { return cmp.Compare(a.cost, b.cost) })
	var near []planeCand
	for _, c := range cands {
		if c.cost <= best.cost || costsTie(c.cost, c.costErr, best.cost, best.costErr) {
			near = append(near, c)
		}
	}
	unmatched := func(c planeCand) int { return c.missing + c.extra }
	win := slices.MinFunc(near, func(a, b planeCand) int {
		return cmp.Or(unmatched(a)-unmatched(b), cmp.Compare(a.cost, b.cost))
	})
	// A mirror image is kept only when it is clearly better: the design
	// as it is wins a tie (a design that is nearly its own mirror image).
	if win.r.m.g.mirror {
		for _, c := range near {
			if !c.r.m.g.mirror && unmatched(c) == unmatched(win) && costsTie(c.cost, c.costErr, win.cost, win.costErr) &&
				(win.r.m.g.mirror || c.cost < win.cost) {
				win = c
			}
		}
	}
	var tied []planeCand
	for _, c := range near {
		if c.r != win.r && unmatched(c) == unmatched(win) && costsTie(c.cost, c.costErr, win.cost, win.costErr) {
			tied = append(tied, c)
		}
	}
	return win, tied
}

// tie describes alignment c against the kept model m: the design motion
// m⁻¹∘c, a rotation and a lattice vector.
func (g *planeGeometry) tie(m planeModel, c planeCand) PlaneTie {
	cm := c.r.m
	turn := math.Atan2(cm.b[3], cm.b[2]) - math.Atan2(m.b[3], m.b[2])
	turn = math.Remainder(turn, 2*math.Pi)
	// Where m puts the point c puts the design centre: the design point
	// m⁻¹(c(centre)), minus the centre, is the shift.
	centre := g.in(g.centre) // the design's own coordinates
	y := sub(cm.predict(cm.g.in(centre)), m.predict(g.centre))
	p, q := m.b[2]/g.radius, m.b[3]/g.radius
	det := p*p + q*q
	shift := g.in([2]float64{(p*y[0] + q*y[1]) / det, (-q*y[0] + p*y[1]) / det})
	return PlaneTie{Turn: turn * 180 / math.Pi, Shift: g.steps(shift), Mirrored: cm.g.mirror != g.mirror,
		Cost: c.cost, CostErr: c.costErr, Missing: c.missing, Extra: c.extra}
}

// steps returns the design-lattice vector nearest v, in steps of the
// design basis as given.
func (g *planeGeometry) steps(v [2]float64) [2]int {
	inv, _ := inverse(columns(g.basis0))
	n := apply(inv, v)
	return [2]int{int(math.Round(n[0])), int(math.Round(n[1]))}
}

// fill computes everything reported from the final matching and fit.
func (r *PlaneResult) fill(g *planeGeometry, ms *grid, run *planeRun) {
	m := run.m
	P, Q := m.b[2]/g.radius, m.b[3]/g.radius
	s := math.Hypot(P, Q)
	r.Scale = s
	r.Rotation = math.Atan2(Q, P) * 180 / math.Pi
	r.Offset = sub(m.predict(g.centre), apply([2][2]float64{{P, -Q}, {Q, P}}, g.centre))
	if m.cov != nil {
		h, cx, cy := g.radius, g.centre[0], g.centre[1]
		jac := [][4]float64{
			{1, 0, -cx / h, cy / h},
			{0, 1, -cy / h, -cx / h},
			{0, 0, P / (s * h), Q / (s * h)},
			{0, 0, -Q / (s * s * h), P / (s * s * h)},
		}
		e := make([]float64, len(jac))
		for i, row := range jac {
			var v float64
			for a := range 4 {
				for b := range 4 {
					v += row[a] * m.cov[a][b] * row[b]
				}
			}
			e[i] = math.Sqrt(math.Max(v, 0))
		}
		r.OffsetErr = [2]float64{e[0], e[1]}
		r.ScaleErr, r.RotationErr = e[2], e[3]*180/math.Pi
	}
	r.Sigma = math.Max(run.sigma, 1e-9*s*math.Sqrt(norm2(g.basis[0])))
	matchedD := make([]bool, len(g.d))
	matchedM := make([]bool, len(ms.pts))
	var ss float64
	r.Matches = make([]PlaneMatch, len(run.pairs))
	r.Outliers = []int{}
	for i, p := range run.pairs {
		matchedD[p.d], matchedM[p.k] = true, true
		res := sub(ms.pts[p.k], m.predict(g.d[p.d]))
		n := math.Sqrt(norm2(res))
		ss += n * n
		r.Max = math.Max(r.Max, n)
		r.Matches[i] = PlaneMatch{Design: p.d, Measured: p.k, Residual: res, Weight: math.Min(run.w[2*i], run.w[2*i+1])}
		if n > OutlierFactor*r.Sigma {
			r.Outliers = append(r.Outliers, p.d)
		}
	}
	r.RMS = math.Sqrt(ss / float64(len(run.pairs)))
	r.Missing, r.Extra = []int{}, []int{}
	for j, ok := range matchedD {
		if !ok {
			r.Missing = append(r.Missing, j)
		}
	}
	for k, ok := range matchedM {
		if !ok {
			r.Extra = append(r.Extra, k)
		}
	}
}

// medianPoint returns the coordinatewise median of the points.
func medianPoint(pts [][2]float64) [2]float64 {
	v := make([]float64, len(pts))
	var out [2]float64
	for c := range 2 {
		for i, p := range pts {
			v[i] = p[c]
		}
		out[c] = median(v)
	}
	return out
}

// nearestPoint returns the point of pts nearest p.
func nearestPoint(pts [][2]float64, p [2]float64) [2]float64 {
	best := pts[0]
	for _, q := range pts[1:] {
		if norm2(sub(q, p)) < norm2(sub(best, p)) {
			best = q
		}
	}
	return best
}
