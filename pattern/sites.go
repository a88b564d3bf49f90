package pattern

import (
	"cmp"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"slices"
)

// Sites is what ReadSites reads: a chain or a plane, exactly one of them
// non-nil.
type Sites struct {
	Chain *Pattern
	Plane *Plane
}

// ReadSitesFile reads the sites of the file at path, as ReadSites does;
// path "-" reads standard input.
func ReadSitesFile(path string, opt ReadOptions) (Sites, error) {
	if path == "-" {
		return ReadSites(os.Stdin, "-", opt)
	}
	f, err := os.Open(path)
	if err != nil {
		var pe *os.PathError
		if errors.As(err, &pe) {
			err = pe.Err
		}
		return Sites{}, &InputError{File: path, Err: err}
	}
	defer f.Close()
	return ReadSites(f, path, opt)
}

// ReadSites reads the sites of a chain or of a plate from r, in every
// format and dialect Read accepts. Positions, spacings and tile words give
// a chain. Centroids (two columns x,y, or JSON "sites" with "x" and "y")
// give a Plane when IsPlanar says their spread is not close to a line,
// and a chain projected onto its line (as Read does) otherwise; they may
// come in any order, tilted and offset on the stage, with sites missing
// and a few spurious ones. Three-coordinate centroids must lie along a
// line: a 3D set off its line is refused.
//
// A Plane keeps the sites in the input's order (Rows maps each to its
// data row) and the unit found in the input or given by opt.Unit; two
// sites closer than DuplicateTolerance times the typical spacing are
// refused with both lines named. Every refusal is an *InputError naming
// the file and, where it is known, the line and column; nothing is
// returned with an error.
func ReadSites(r io.Reader, name string, opt ReadOptions) (Sites, error) {
	return readSites(r, name, opt, defaultLimits(), true)
}

// chain wraps a reader's chain result as Sites.
func chain(p *Pattern, err error) (Sites, error) {
	if err != nil {
		return Sites{}, err
	}
	return Sites{Chain: p}, nil
}

// fromPoints reads n points of dim (2 or 3) coordinates, row-major in
// vals and read on lines: a chain when they lie along a line (IsPlanar's
// rule), else a Plane for ReadSites, refused for Read and in 3D.
func (rd *reader) fromPoints(vals []float64, dim int, lines []int, unit string, notes []string) (Sites, error) {
	n := len(vals) / dim
	if n < MinSites {
		return Sites{}, rd.wrap(0, 0, fmt.Errorf("%w: %d, need at least %d", ErrTooFew, n, MinSites))
	}
	planar, fig := offLine(vals, dim)
	switch {
	case !planar:
		return chain(rd.fromCentroids(vals, dim, lines, unit, notes))
	case dim != 2:
		return Sites{}, rd.errorf(0, 0, "the centroids do not lie along a line: half of them sit %.2g spacings or more off their best line (a chain stays within %g); phasonhull reads three coordinates only along a line, and a plate as two columns x,y",
			fig, MaxOffLine)
	case !rd.planes:
		return Sites{}, rd.errorf(0, 0, "the centroids do not lie along a line: half of them sit %.2g spacings or more off their best line (a chain stays within %g): this is a 2D point set, which analyze reads as a plate (pattern.ReadSites), not as a chain",
			fig, MaxOffLine)
	}
	points := make([][2]float64, n)
	for i := range points {
		points[i] = [2]float64{vals[2*i], vals[2*i+1]}
	}
	if i, j, ok := closePair(points); ok {
		a, b := min(lines[i], lines[j]), max(lines[i], lines[j])
		return Sites{}, rd.errorf(b, 0, "%w: (%v, %v), as on line %d", ErrDuplicate, points[j][0], points[j][1], a)
	}
	p, err := newPlane(points, unit, rd.name, false)
	if err != nil {
		return Sites{}, rd.wrap(0, 0, err)
	}
	p.Notes = append(notes, fmt.Sprintf("%d sites read as a plane: half of them sit %.3g spacings or more off their best line, a 2D set (a chain stays within %g)", n, fig, MaxOffLine))
	if rd.opt.Unit != "" {
		if unit != "" && unit != rd.opt.Unit {
			p.Notes = append(p.Notes, fmt.Sprintf("unit %q given by the caller overrides %q found in the input", rd.opt.Unit, unit))
		}
		p.Unit = rd.opt.Unit
	}
	return Sites{Plane: p}, nil
}

// typicalSpacing is the typical distance between neighbouring points of a
// planar set: sqrt(A/N), A the area of the box that holds the central 96%
// of the points in each coordinate and N the points in it (the step of a
// square lattice; 0.93 steps of a hexagonal one). For a set without area
// it is the span of the central points over their number of gaps.
func typicalSpacing(points [][2]float64) float64 {
	n := len(points)
	if n < 2 {
		return 0
	}
	k := n / 50
	xs, ys := make([]float64, n), make([]float64, n)
	for i, p := range points {
		xs[i], ys[i] = p[0], p[1]
	}
	slices.Sort(xs)
	slices.Sort(ys)
	w, h := xs[n-1-k]-xs[k], ys[n-1-k]-ys[k]
	inside := float64(n - 2*k)
	if w > 0 && h > 0 {
		return math.Sqrt(w * h / (inside * 0.96))
	}
	return math.Max(w, h) / math.Max(inside-1, 1)
}

// closePair finds two points closer than DuplicateTolerance times the
// typical spacing (the Plane invariant). The points are sorted into square
// cells one typical spacing wide, so that a close pair sits in the same
// or neighbouring cells, each holding a few points. It returns their
// indices, i < j, and whether there is one.
func closePair(points [][2]float64) (i, j int, ok bool) {
	h := typicalSpacing(points)
	tol := DuplicateTolerance * h
	if !(tol > 0) || math.IsInf(h, 0) {
		h, tol = 1, 0 // all points on one spot, or an infinite spread
	}
	const far = 1 << 62 // cells beyond are clamped (only the speed suffers)
	cell := func(v float64) int64 {
		c := math.Floor(v / h)
		return int64(math.Max(-far, math.Min(far, c)))
	}
	type key struct {
		cx, cy int64
		i      int
	}
	keys := make([]key, len(points))
	for i, p := range points {
		keys[i] = key{cell(p[0]), cell(p[1]), i}
	}
	less := func(a key, cx, cy int64) int {
		switch {
		case a.cx != cx:
			return cmp.Compare(a.cx, cx)
		default:
			return cmp.Compare(a.cy, cy)
		}
	}
	slices.SortFunc(keys, func(a, b key) int {
		if c := less(a, b.cx, b.cy); c != 0 {
			return c
		}
		return a.i - b.i
	})
	best := [2]int{-1, -1}
	for _, k := range keys {
		p := points[k.i]
		for dx := int64(-1); dx <= 1; dx++ {
			// The cells (cx, cy−1), (cx, cy), (cx, cy+1) are adjacent in
			// the sorted keys: one search finds the first.
			cx := k.cx + dx
			start, _ := slices.BinarySearchFunc(keys, [2]int64{cx, k.cy - 1}, func(a key, t [2]int64) int { return less(a, t[0], t[1]) })
			for _, o := range keys[start:] {
				if o.cx != cx || o.cy > k.cy+1 {
					break
				}
				if o.i >= k.i {
					continue
				}
				q := points[o.i]
				if math.Hypot(p[0]-q[0], p[1]-q[1]) <= tol && (best[0] < 0 || k.i < best[1] || k.i == best[1] && o.i < best[0]) {
					best = [2]int{o.i, k.i}
				}
			}
		}
	}
	if best[0] < 0 {
		return 0, 0, false
	}
	return best[0], best[1], true
}
