package pattern

import (
	"fmt"
	"math"
	"slices"
	"sort"

	"gonum.org/v1/gonum/mat"
)

// fromCentroids reduces n centroids of dim coordinates (row-major in vals,
// read on lines) to positions along their principal axis.
//
// The principal axis is the eigenvector of the largest eigenvalue of the
// centroids' covariance matrix (principal component analysis; common
// practice for removing the tilt of a scanned row). Each position is the
// projection of a centroid onto the axis, measured from the foot of the
// scan origin, so the positions keep the scan's offset along the axis. The
// axis is oriented so that its largest-magnitude component is positive
// (the lower index wins a tie), which makes the result independent of the
// row order and of the sign an eigen solver happens to return.
func (rd *reader) fromCentroids(vals []float64, dim int, lines []int, unit string, notes []string) (*Pattern, error) {
	n := len(vals) / dim
	if n < MinSites {
		return nil, rd.wrap(0, 0, fmt.Errorf("%w: %d, need at least %d", ErrTooFew, n, MinSites))
	}
	mean := make([]float64, dim)
	for i := 0; i < n; i++ {
		for k := 0; k < dim; k++ {
			mean[k] += vals[i*dim+k]
		}
	}
	for k := range mean {
		mean[k] /= float64(n)
	}
	// Covariance of the centred centroids (two-pass, for accuracy).
	cov := mat.NewSymDense(dim, nil)
	for i := 0; i < n; i++ {
		for a := 0; a < dim; a++ {
			da := vals[i*dim+a] - mean[a]
			for b := a; b < dim; b++ {
				cov.SetSym(a, b, cov.At(a, b)+da*(vals[i*dim+b]-mean[b]))
			}
		}
	}
	cov.ScaleSym(1/float64(n), cov)
	axis := leadingAxis(cov)
	if axis == nil {
		return nil, rd.errorf(0, 0, "the principal axis of the centroids could not be computed")
	}

	origin := 0.0 // projection of the mean onto the axis
	for k := range axis {
		origin += mean[k] * axis[k]
	}
	positions := make([]float64, n)
	dists := make([]float64, n)
	for i := 0; i < n; i++ {
		// t is the coordinate along the axis, r² the squared distance from it.
		var t, d2 float64
		for k := 0; k < dim; k++ {
			t += (vals[i*dim+k] - mean[k]) * axis[k]
		}
		for k := 0; k < dim; k++ {
			r := vals[i*dim+k] - mean[k] - t*axis[k]
			d2 += r * r
		}
		positions[i] = origin + t
		dists[i] = math.Sqrt(d2)
	}

	var sumSq float64
	for _, d := range dists {
		sumSq += d * d
	}
	maxDist := slices.Max(dists)

	// Rows may come in any order: sort them along the axis, lines with them.
	order := make([]int, n)
	for i := range order {
		order[i] = i
	}
	sort.SliceStable(order, func(a, b int) bool { return positions[order[a]] < positions[order[b]] })
	sorted := make([]float64, n)
	sortedLines := make([]int, n)
	for k, i := range order {
		sorted[k], sortedLines[k] = positions[i], lines[i]
	}

	scan := &Scan{
		Dim:           dim,
		Axis:          axis,
		TiltDeg:       math.Acos(math.Max(-1, math.Min(1, axis[0]))) * 180 / math.Pi,
		TransverseRMS: math.Sqrt(sumSq / float64(n)),
		TransverseMax: maxDist,
	}
	u := unit
	if rd.opt.Unit != "" {
		u = rd.opt.Unit
	}
	if u != "" {
		u = " " + u
	}
	note := fmt.Sprintf("%d centroids in %d dimensions were projected onto their principal axis: a tilt of %.4g° from the first scan axis was removed; transverse scatter %.3g%s RMS, %.3g%s at most",
		n, dim, scan.TiltDeg, scan.TransverseRMS, u, scan.TransverseMax, u)
	p, err := rd.finish(sorted, sortedLines, unit, append(notes, note))
	if err != nil {
		return nil, err
	}
	p.Scan = scan
	p.Rows = order
	return p, nil
}
