package pattern

import (
	"math"
	"math/rand/v2"
	"slices"

	"gonum.org/v1/gonum/mat"
)

// MaxOffLine is the rule that tells a chain from a planar point set (see
// IsPlanar): the line figure, the median distance of the sites from their
// best line in typical spacings along it, above which a set is planar.
//
// Why this figure. A chain's sites lie within a fraction of a spacing of
// its line; a W-row patch of a lattice of step a has half of its sites
// about W·a/4 off the line through its middle, while its projections on
// that line are only a/W apart, so its figure grows as W²/4 however
// elongated the patch is: about 1 for two rows (a/2 off, a/2 apart; √3/2
// for two rows of a hexagonal lattice), 3 for three. The median, not the
// mean square, keeps a few stray sites (debris, a mis-detected centroid)
// from making a chain planar; the best line is found from the directions
// between sites, not from their covariance, and the spacing from the
// central 90% of the projections, so a far outlier moves neither.
//
// Calibration (TestPlanarRuleCalibration, on generated sets in any order,
// tilted and offset): chains of 50 to 2000 sites with Gaussian scatter
// across the line of 0 to 0.5 spacing, longitudinal jitter of 0.1 spacing
// and up to 2% outliers within 10 spacings of the line reach a figure of
// at most 0.46; patches of 2 to 40 rows of square and hexagonal lattices,
// 25 to 400 sites a row, with isotropic noise up to 0.1 step, up to 15%
// of their sites missing and 2% extra sites reach at least 0.69. The
// threshold 0.55 sits between: 0.09 above the worst chain, 0.14 below the
// narrowest patch. Below about 50 sites the two overlap: chains of 16
// sites scattered by 0.5 spacing reach 0.68, two rows of 8 hexagonal
// sites with noise 0.1 and missing sites go down to 0.45. A chain
// scattered across its line by more than about 0.7 spacing is no longer
// one site wide and is read as planar.
const MaxOffLine = 0.55

// IsPlanar reports whether a point set is two-dimensional rather than a
// chain: its line figure (see MaxOffLine, lineFigure) is above MaxOffLine.
// It is the one place the choice is made; ReadSites uses it to return a
// Plane or a chain, Read to refuse a planar set. A set of fewer than two
// distinct points is not planar.
func IsPlanar(points [][2]float64) bool {
	vals := make([]float64, 0, 2*len(points))
	for _, p := range points {
		vals = append(vals, p[0], p[1])
	}
	return lineFigure(vals, 2) > MaxOffLine
}

// offLine reports whether n points of dim coordinates (row-major in vals)
// are off a line by IsPlanar's rule, and the figure.
func offLine(vals []float64, dim int) (bool, float64) {
	f := lineFigure(vals, dim)
	return f > MaxOffLine, f
}

// figurePairs is how many pairs of sites give the direction of the best
// line; the pairs are drawn from a fixed seed, so the figure is a function
// of the set alone (and of the order of its rows only through which pairs
// are drawn, when there are more pairs than this).
const figurePairs = 1 << 14

// lineFigure is the median distance of the points from their best line
// divided by their typical spacing along it (see MaxOffLine): the line's
// direction is the principal axis of the orientation tensor Σ u uᵀ of the
// unit vectors u between pairs of points (each pair one vote, however far
// apart, so that a few outliers cast few votes), refined twice as the
// least-squares line of the points within three median distances of it;
// the line passes through the middle of the central 90% of the points'
// offsets across it (at least one point left out at each end), and the
// spacing is the span of the central 90% of the points' projections on
// it divided by the number of gaps it holds. It returns 0 for fewer than
// two distinct points, +Inf when the central projections all coincide.
func lineFigure(vals []float64, dim int) float64 {
	n := len(vals) / dim
	if n < 2 {
		return 0
	}
	axis := pairAxis(vals, dim)
	if axis == nil {
		return 0
	}
	// Two refinements: the principal axis of the sites within three
	// median distances of the line (a least-squares line through them),
	// so that the outliers' few votes do not tilt it either.
	var f float64
	for round := 0; ; round++ {
		var dist []float64
		f, dist = figureAbout(vals, dim, axis)
		if round == 2 || math.IsInf(f, 0) {
			return f
		}
		cut := 3 * median(slices.Clone(dist))
		var in []float64
		for i, d := range dist {
			if d <= cut {
				in = append(in, vals[i*dim:(i+1)*dim]...)
			}
		}
		if a := principalAxis(in, dim); a != nil {
			axis = a
		}
	}
}

// figureAbout returns the line figure of the points about a line of the
// given direction, and each point's distance from that line.
func figureAbout(vals []float64, dim int, axis []float64) (float64, []float64) {
	n := len(vals) / dim
	// An orthonormal basis of the space across the axis: Gram–Schmidt on
	// the coordinate axes, keeping the dim−1 longest remainders.
	var across [][]float64
	for k := 0; k < dim && len(across) < dim-1; k++ {
		v := make([]float64, dim)
		v[k] = 1
		for _, b := range append([][]float64{axis}, across...) {
			c := dot(v, b)
			for i := range v {
				v[i] -= c * b[i]
			}
		}
		if norm := math.Sqrt(dot(v, v)); norm > 0.5 {
			for i := range v {
				v[i] /= norm
			}
			across = append(across, v)
		}
	}
	along := make([]float64, n)
	off := make([][]float64, len(across))
	for j := range off {
		off[j] = make([]float64, n)
	}
	for i := range n {
		p := vals[i*dim : (i+1)*dim]
		along[i] = dot(p, axis)
		for j, b := range across {
			off[j][i] = dot(p, b)
		}
	}
	// The centre across is the middle of the central 90% of the offsets
	// (at least one trimmed at each end): the middle of a chain, and the
	// line between the two rows of a two-row patch (a median would sit on
	// the fuller row).
	k := max(1, n/20)
	if n-1-k <= k {
		k = 0
	}
	centre := make([]float64, len(across))
	for j := range off {
		o := slices.Clone(off[j])
		slices.Sort(o)
		centre[j] = (o[k] + o[n-1-k]) / 2
	}
	dist := make([]float64, n)
	for i := range n {
		var d2 float64
		for j := range off {
			d := off[j][i] - centre[j]
			d2 += d * d
		}
		dist[i] = math.Sqrt(d2)
	}
	slices.Sort(along)
	span := along[n-1-k] - along[k]
	if !(span > 0) {
		return math.Inf(1), dist
	}
	return median(slices.Clone(dist)) / (span / float64(n-1-2*k)), dist
}

// principalAxis returns the principal axis of the covariance of the
// points, oriented as pairAxis orients it; nil for fewer than two points.
func principalAxis(vals []float64, dim int) []float64 {
	n := len(vals) / dim
	if n < 2 {
		return nil
	}
	mean := make([]float64, dim)
	for i := range n {
		for k := range dim {
			mean[k] += vals[i*dim+k] / float64(n)
		}
	}
	cov := mat.NewSymDense(dim, nil)
	for i := range n {
		for a := range dim {
			for b := a; b < dim; b++ {
				cov.SetSym(a, b, cov.At(a, b)+(vals[i*dim+a]-mean[a])*(vals[i*dim+b]-mean[b]))
			}
		}
	}
	return leadingAxis(cov)
}

// pairAxis returns the unit principal axis of the orientation tensor of
// the directions between pairs of points (all pairs for a small set, else
// figurePairs pairs drawn from a fixed seed), oriented so that its largest
// component is positive; nil when all points coincide.
func pairAxis(vals []float64, dim int) []float64 {
	n := len(vals) / dim
	sum := make([]float64, dim*dim) // the upper triangle of Σ u uᵀ
	u := make([]float64, dim)
	votes := 0
	add := func(a, b int) {
		var l2 float64
		for k := range dim {
			u[k] = vals[b*dim+k] - vals[a*dim+k]
			l2 += u[k] * u[k]
		}
		if !(l2 > 0) || math.IsInf(l2, 0) {
			return
		}
		for p := range dim {
			for q := p; q < dim; q++ {
				sum[p*dim+q] += u[p] * u[q] / l2
			}
		}
		votes++
	}
	if n*(n-1)/2 <= figurePairs {
		for a := range n {
			for b := a + 1; b < n; b++ {
				add(a, b)
			}
		}
	} else {
		rng := rand.New(rand.NewPCG(1, 2))
		for range figurePairs {
			a, b := rng.IntN(n), rng.IntN(n)
			if a != b {
				add(a, b)
			}
		}
	}
	if votes == 0 {
		return nil
	}
	t := mat.NewSymDense(dim, nil)
	for p := range dim {
		for q := p; q < dim; q++ {
			t.SetSym(p, q, sum[p*dim+q])
		}
	}
	return leadingAxis(t)
}

// leadingAxis returns the unit eigenvector of the largest eigenvalue of a
// symmetric matrix, oriented so that its largest-magnitude component is
// positive (the lower index wins a tie); nil when it cannot be computed.
func leadingAxis(t *mat.SymDense) []float64 {
	dim, _ := t.Dims()
	var eig mat.EigenSym
	if !eig.Factorize(t, true) {
		return nil
	}
	var vecs mat.Dense
	eig.VectorsTo(&vecs)
	axis := mat.Col(nil, dim-1, &vecs)
	lead := 0
	for k := range axis {
		if math.Abs(axis[k]) > math.Abs(axis[lead]) {
			lead = k
		}
	}
	if axis[lead] < 0 {
		for k := range axis {
			axis[k] = -axis[k]
		}
	}
	return axis
}

func dot(a, b []float64) float64 {
	var s float64
	for i := range a {
		s += a[i] * b[i]
	}
	return s
}

// median returns the median of v, reordering v; NaN for an empty slice.
func median(v []float64) float64 {
	n := len(v)
	if n == 0 {
		return math.NaN()
	}
	slices.Sort(v)
	if n%2 == 1 {
		return v[n/2]
	}
	return (v[n/2-1] + v[n/2]) / 2
}
