package lattice

import (
	"context"
	"errors"
	"fmt"
	"math"
	"slices"

	"phasonhull/pattern"
)

// ErrNoLattice is wrapped, with the reason, by Recover's error for a set
// of sites that has no average lattice: a Poisson set, a glass, sites
// along a line. The analysis reads such a set as disordered; it is not a
// failure of the input.
var ErrNoLattice = errors.New("the sites have no average lattice")

// Defaults of Options.
const (
	// DefaultTolerance is the default off-lattice tolerance, as a fraction
	// of the shortest basis vector: a displacement field of up to 0.21 of
	// the spacing (two waves of amplitude 0.15 at right angles) plus
	// Gaussian position noise of 5% of the spacing in each coordinate
	// stays within it but for a share e^{−0.19²/(2·0.05²)} < 10⁻³ of the
	// sites at the field's peaks; it is below ½ so that no site is near
	// two lattice points.
	DefaultTolerance = 0.4
	// DefaultMinShare is the default share of the sites that must have a
	// neighbour at each basis vector (see Options.MinShare).
	DefaultMinShare = 0.5
	// DefaultMinOnLattice is the default share of the sites that must sit
	// on a lattice point (see Options.MinOnLattice).
	DefaultMinOnLattice = 0.6
	// DefaultMinBragg is the default weight of the two basis Bragg peaks
	// (see Options.MinBragg).
	DefaultMinBragg = 0.1
)

// Options control Recover. The zero value asks for the defaults.
type Options struct {
	// Tolerance is the largest displacement of a site from its lattice
	// point, as a fraction of the shortest basis vector, for the site to
	// sit on the lattice; 0 means DefaultTolerance. It must be below ½.
	Tolerance float64
	// MinShare: a lattice vector must be the difference between an anchor
	// site and one of its nearest neighbours for at least this share of
	// the anchors; 0 means DefaultMinShare.
	MinShare float64
	// MinOnLattice: at least this share of the sites must sit on the
	// fitted lattice; 0 means DefaultMinOnLattice.
	MinOnLattice float64
	// MinBragg: each basis Bragg peak S(b_i)/N must reach at least this
	// share of a perfect lattice's, N; 0 means DefaultMinBragg.
	MinBragg float64
}

func (o Options) withDefaults() (Options, error) {
	if o.Tolerance == 0 {
		o.Tolerance = DefaultTolerance
	}
	if o.MinShare == 0 {
		o.MinShare = DefaultMinShare
	}
	if o.MinOnLattice == 0 {
		o.MinOnLattice = DefaultMinOnLattice
	}
	if o.MinBragg == 0 {
		o.MinBragg = DefaultMinBragg
	}
	if !(o.Tolerance > 0 && o.Tolerance < 0.5) {
		return o, fmt.Errorf("lattice: tolerance %v is not in (0, 0.5)", o.Tolerance)
	}
	for _, v := range []float64{o.MinShare, o.MinOnLattice, o.MinBragg} {
		if !(v > 0 && v <= 1) {
			return o, fmt.Errorf("lattice: share %v is not in (0, 1]", v)
		}
	}
	return o, nil
}

// Sizes of the growing fit.
const (
	firstRegion = 24   // sites in the first region of the growing fit
	growth      = 2.25 // factor on the number of sites (1.5 on the radius) per stage
	passes      = 2    // index-and-fit passes per stage
)

// Recover finds the average lattice of the plane's sites and where each
// site sits on it. See the package documentation for the method, the
// tolerances and the rule that refuses a set with no average lattice
// (ErrNoLattice, wrapped with the reason).
func Recover(ctx context.Context, p *pattern.Plane, opt Options) (*Lattice, error) {
	if p == nil || p.Len() < pattern.MinSites {
		n := 0
		if p != nil {
			n = p.Len()
		}
		return nil, fmt.Errorf("lattice: %w: %d sites, need at least %d", pattern.ErrTooFew, n, pattern.MinSites)
	}
	opt, err := opt.withDefaults()
	if err != nil {
		return nil, err
	}
	pts := p.Points
	n := len(pts)
	s, err := neighbourSeed(pts, opt.MinShare)
	if err != nil {
		return nil, fmt.Errorf("lattice: %w", err)
	}
	// The sites in the order of the growing regions, so that a region is
	// a prefix of q; the results are put back in input order at the end.
	q := make([][2]float64, n)
	for j, i := range s.order {
		q[j] = pts[i]
	}
	idx := make([][2]int, n)
	disp := make([][2]float64, n)
	on := make([]bool, n)
	g := grower{q: q, idx: idx, disp: disp, on: on, tol: opt.Tolerance}
	fit, err := g.grow(ctx, model{origin: pts[s.centre], basis: s.basis})
	if err != nil {
		return nil, err
	}
	// A seed basis that spans a sublattice of index 2 (a basis vector
	// whose neighbour vectors a displacement wave near the zone boundary
	// split in two) leaves about half the sites off the lattice; the three
	// lattices that hold it with index 2 are tried, and the one with the
	// most sites on it kept.
	if g.last < n*9/10 {
		b, best, seedFit := fit.basis, g.last, fit
		for _, c := range [][2][2]float64{
			{{b[0][0] / 2, b[0][1] / 2}, b[1]},
			{b[0], {b[1][0] / 2, b[1][1] / 2}},
			{b[0], {(b[0][0] + b[1][0]) / 2, (b[0][1] + b[1][1]) / 2}},
		} {
			if f, err := g.grow(ctx, model{origin: seedFit.origin, basis: c}); err == nil && g.last > best*5/4 {
				fit, best = f, g.last
				s.note = "the neighbour vectors spanned a sublattice of index 2; the lattice that doubles it holds more sites"
			}
			if err := ctx.Err(); err != nil {
				return nil, fmt.Errorf("lattice: %w", err)
			}
		}
	}
	// The final indexing, in the reduced basis, with one site per lattice
	// point.
	fit.basis = reduce(fit.basis)
	recip := reciprocal(fit.basis)
	tol2 := opt.Tolerance * opt.Tolerance * norm2(fit.basis[0])
	for j := range n {
		idx[j], disp[j] = fit.index(recip, q[j])
		on[j] = norm2(disp[j]) <= tol2
	}
	second, lone := settle(idx, disp, on)
	var total sums
	var use []int32
	for j := range n {
		if on[j] {
			total.add(idx[j], q[j])
			use = append(use, int32(j))
		}
	}
	f, inv, ok := total.solve()
	if !ok {
		return nil, fmt.Errorf("lattice: %w: the sites on the lattice span no patch", ErrNoLattice)
	}
	fit = f
	// The refit may have moved the basis across a tie of the reduced
	// basis (equally long vectors of a square or hexagonal lattice): the
	// indices follow the reduced basis and the fit is repeated in it.
	if m := change(reduce(fit.basis), fit.basis); m != [2][2]int{{1, 0}, {0, 1}} {
		// n·B = n'·(M·B), so n' = n·M⁻¹, with M⁻¹ = (d −b; −c a) for det 1.
		mi := [2][2]int{{m[1][1], -m[0][1]}, {-m[1][0], m[0][0]}}
		total = sums{}
		for _, j := range use {
			n := idx[j]
			idx[j] = [2]int{n[0]*mi[0][0] + n[1]*mi[1][0], n[0]*mi[0][1] + n[1]*mi[1][1]}
			total.add(idx[j], q[j])
		}
		if f, inv, ok = total.solve(); !ok {
			return nil, fmt.Errorf("lattice: %w: the sites on the lattice span no patch", ErrNoLattice)
		}
		fit = f
	}
	unc, correlated := uncertainty(total, inv, fit, idx, q, use)

	var onCount int
	var spread []float64
	for j := range n {
		if on[j] {
			onCount++
			pt := fit.at(idx[j])
			disp[j] = [2]float64{q[j][0] - pt[0], q[j][1] - pt[1]}
			spread = append(spread, math.Sqrt(norm2(disp[j])))
		} else {
			idx[j] = [2]int{}
			disp[j] = [2]float64{math.NaN(), math.NaN()}
		}
	}
	missing := latticePointsInHull(idx, on) - onCount
	l := &Lattice{
		Basis: fit.basis, BasisUncertainty: unc, Origin: fit.origin, Missing: missing, Unit: p.Unit,
		Index: make([][2]int, n), OnLattice: make([]bool, n), Displacement: make([][2]float64, n),
	}
	for j, i := range s.order {
		l.Index[i], l.OnLattice[i], l.Displacement[i] = idx[j], on[j], disp[j]
	}

	// The refusal rule: enough sites on the lattice, and a coherent Bragg
	// peak at each reciprocal basis vector.
	share := float64(onCount) / float64(n)
	rb := reciprocal(fit.basis)
	bragg := StructureFactor(pts, rb[:])
	for k := range bragg {
		bragg[k] /= float64(n)
	}
	if share < opt.MinOnLattice {
		return nil, fmt.Errorf("lattice: %w: only %.0f%% of the sites sit within %.2f of the spacing of a lattice point (need %.0f%%)",
			ErrNoLattice, 100*share, opt.Tolerance, 100*opt.MinOnLattice)
	}
	if b := min(bragg[0], bragg[1]); b < opt.MinBragg {
		return nil, fmt.Errorf("lattice: %w: the Bragg peaks of the basis carry %.2f and %.2f of a perfect lattice's weight (need %.2f)",
			ErrNoLattice, bragg[0], bragg[1], opt.MinBragg)
	}

	l.Notes = append(l.Notes,
		fmt.Sprintf("basis from the neighbour vectors of %d sites (shared by %.0f%% and %.0f%% of them), refined by least squares on %d sites on the lattice",
			s.anchors, 100*s.share[0], 100*s.share[1], onCount),
		fmt.Sprintf("Bragg peaks of the basis carry %.2f and %.2f of a perfect lattice's weight", bragg[0], bragg[1]))
	if s.note != "" {
		l.Notes = append(l.Notes, s.note)
	}
	if correlated {
		l.Notes = append(l.Notes, "the residuals are correlated across the patch (a displacement wave or a drift): the basis uncertainty is the block jackknife's, not the least-squares one")
	}
	if off := n - onCount; off > 0 {
		l.Notes = append(l.Notes, fmt.Sprintf("%d %s on no lattice point (%d beyond the tolerance of %.2f of the spacing, %d second on a lattice point, %d alone outside the patch)",
			off, plural(off, "site sits", "sites sit"), off-second-lone, opt.Tolerance, second, lone))
		if float64(off) > 0.05*float64(n) {
			l.Warnings = append(l.Warnings, fmt.Sprintf("%.0f%% of the sites sit on no lattice point", 100*float64(off)/float64(n)))
		}
	}
	if l.Missing > 0 {
		l.Notes = append(l.Notes, fmt.Sprintf("%d lattice %s inside the patch carry no site", l.Missing, plural(l.Missing, "point", "points")))
	}
	if len(spread) > 0 {
		slices.Sort(spread)
		a := math.Sqrt(norm2(fit.basis[0]))
		if q := spread[len(spread)*99/100] / a; q > 0.8*opt.Tolerance {
			l.Warnings = append(l.Warnings, fmt.Sprintf("1%% of the sites are displaced by more than %.2f of the spacing, near the off-lattice tolerance %.2f: a larger displacement field would be cut", q, opt.Tolerance))
		}
	}
	return l, nil
}

// centreOrigin places the origin so that the sites of the region sit, on
// average, on lattice points: the circular mean of their fractional
// coordinates, so that a spurious centre site does not shift the lattice
// by half a cell.
func centreOrigin(m model, region [][2]float64) [2]float64 {
	recip := reciprocal(m.basis)
	var off [2]float64
	for k := range 2 {
		var c, s float64
		for _, x := range region {
			d := [2]float64{x[0] - m.origin[0], x[1] - m.origin[1]}
			sn, cs := math.Sincos(2 * math.Pi * dot(recip[k], d))
			c += cs
			s += sn
		}
		off[k] = math.Atan2(s, c) / (2 * math.Pi)
	}
	return [2]float64{
		m.origin[0] + off[0]*m.basis[0][0] + off[1]*m.basis[1][0],
		m.origin[1] + off[0]*m.basis[0][1] + off[1]*m.basis[1][1],
	}
}

func plural(n int, one, many string) string {
	if n == 1 {
		return one
	}
	return many
}

// grower fits a lattice to regions of growing size around the centre
// site: each region is indexed by rounding in the current fit, the sites
// within the tolerance refitted by least squares, twice, and the region
// grown by growth in sites (1.5 in radius), so that the extrapolation
// from one region to the next stays well inside half a lattice step.
type grower struct {
	q         [][2]float64 // the sites, nearer the centre first
	idx       [][2]int
	disp      [][2]float64
	on        []bool
	tol       float64
	last      int // the number of sites within the tolerance in the last step
	firstLen  float64
	firstArea float64
}

// grow runs the growing fit from the seed model over all sites.
func (g *grower) grow(ctx context.Context, seed model) (model, error) {
	n := len(g.q)
	fit := model{origin: seed.origin, basis: reduce(seed.basis)}
	fit.origin = centreOrigin(fit, g.q[:min(n, firstRegion)])
	g.firstLen = math.Sqrt(norm2(fit.basis[0]))
	g.firstArea = cross(fit.basis[0], fit.basis[1])
	for count := min(n, firstRegion); ; count = min(n, int(math.Ceil(float64(count)*growth))) {
		if err := ctx.Err(); err != nil {
			return fit, fmt.Errorf("lattice: %w", err)
		}
		for range passes {
			f, err := g.step(fit, count)
			if err != nil {
				return fit, err
			}
			fit = f
		}
		if count == n {
			return fit, nil
		}
	}
}

// step indexes the sites of the region q[:count] by rounding in the fit,
// keeps those within the tolerance and refits.
func (g *grower) step(fit model, count int) (model, error) {
	recip := reciprocal(fit.basis)
	tol2 := g.tol * g.tol * norm2(fit.basis[0])
	var total sums
	for j := range count {
		g.idx[j], g.disp[j] = fit.index(recip, g.q[j])
		if g.on[j] = norm2(g.disp[j]) <= tol2; g.on[j] {
			total.add(g.idx[j], g.q[j])
		}
	}
	g.last = total.m
	f, _, ok := total.solve()
	if !ok {
		return fit, fmt.Errorf("lattice: %w: the sites near a lattice point span no patch", ErrNoLattice)
	}
	area := cross(f.basis[0], f.basis[1])
	if !(area > g.firstArea/2 && area < 2*g.firstArea) || math.Abs(math.Sqrt(norm2(f.basis[0]))/g.firstLen-1) > 0.5 {
		return fit, fmt.Errorf("lattice: %w: the least-squares lattice drifts away from the neighbour vectors", ErrNoLattice)
	}
	return f, nil
}
