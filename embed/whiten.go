package embed

import (
	"fmt"
	"math"
	"sort"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat"
)

// The significance rule for principal components. An eigenvalue λ of the
// cloud's covariance is significant when it exceeds
//
//	max(RelativeCut·λ_max, AbsoluteCut, floor)
//
// where floor is the noise floor passed to Whiten. RelativeCut discards
// directions that exist only through floating-point rounding (a cloud on a
// plane has its other eigenvalues near 1e−16 λ_max); AbsoluteCut discards
// spreads below a millionth of the mean spacing, which no measurement
// resolves; the noise floor discards directions that measurement noise
// alone fills. Whitening an insignificant direction would blow its rounding
// or noise up to the scale of the signal.
const (
	RelativeCut = 1e-9
	AbsoluteCut = 1e-12
)

// Whitened is a cloud centred, projected on its significant principal
// components and scaled to unit variance along each.
type Whitened struct {
	// Cloud holds one row per input vector with Kept coordinates. The rows
	// share one backing array. With Kept = 0 every row is empty: the cloud
	// is a single point.
	Cloud [][]float64
	// Mean is the centre that was removed.
	Mean []float64
	// Spectrum holds all eigenvalues of the covariance, in decreasing
	// order (rounding below zero is clamped to zero).
	Spectrum []float64
	// Axes holds the unit principal directions of the kept components as
	// its columns (nil when Kept = 0).
	Axes *mat.Dense
	// Kept is the number of significant components.
	Kept int
	// Threshold is the eigenvalue the significant ones exceed.
	Threshold float64
}

// Threshold returns the significance threshold for a spectrum in
// decreasing order and a noise floor (see RelativeCut).
func Threshold(spectrum []float64, floor float64) float64 {
	t := math.Max(AbsoluteCut, floor)
	if len(spectrum) > 0 {
		t = math.Max(t, RelativeCut*spectrum[0])
	}
	return t
}

// pca holds a cloud's principal components: the mean, the eigenvalues in
// decreasing order and the matching unit eigenvectors as columns.
type pca struct {
	mean    []float64
	values  []float64
	vectors *mat.Dense
}

// principal computes the covariance of the rows of x (normalised by n−1)
// and its eigen-decomposition.
func principal(x mat.Matrix) (*pca, error) {
	n, k := x.Dims()
	if n < 2 {
		return nil, fmt.Errorf("principal components of %d vectors: need at least 2", n)
	}
	mean := make([]float64, k)
	for j := range k {
		mean[j] = stat.Mean(mat.Col(nil, j, x), nil)
	}
	var cov mat.SymDense
	stat.CovarianceMatrix(&cov, x, nil)
	var es mat.EigenSym
	if !es.Factorize(&cov, true) {
		return nil, fmt.Errorf("principal components: the eigen-decomposition of the %d×%d covariance did not converge", k, k)
	}
	asc := es.Values(nil)
	var vec mat.Dense
	es.VectorsTo(&vec)
	// EigenSym returns ascending values; reorder to decreasing.
	order := make([]int, k)
	for i := range order {
		order[i] = k - 1 - i
	}
	sort.SliceStable(order, func(a, b int) bool { return asc[order[a]] > asc[order[b]] })
	p := &pca{mean: mean, values: make([]float64, k), vectors: mat.NewDense(k, k, nil)}
	for i, o := range order {
		p.values[i] = math.Max(asc[o], 0)
		for r := range k {
			p.vectors.Set(r, i, vec.At(r, o))
		}
	}
	return p, nil
}

// rank returns how many eigenvalues exceed the significance threshold.
func (p *pca) rank(floor float64) (int, float64) {
	t := Threshold(p.values, floor)
	r := 0
	for r < len(p.values) && p.values[r] > t {
		r++
	}
	return r, t
}

// Whiten centres the rows of x, keeps the principal components whose
// eigenvalues pass the significance rule (see RelativeCut) for the noise
// floor floor (an eigenvalue; 0 for exact data), projects the rows on them
// and scales each to unit variance. The full spectrum, the number kept and
// the threshold are reported with the cloud.
func Whiten(x mat.Matrix, floor float64) (*Whitened, error) {
	p, err := principal(x)
	if err != nil {
		return nil, fmt.Errorf("whitening: %w", err)
	}
	n, k := x.Dims()
	kept, t := p.rank(floor)
	w := &Whitened{Mean: p.mean, Spectrum: p.values, Kept: kept, Threshold: t}
	w.Cloud = make([][]float64, n)
	flat := make([]float64, n*kept)
	if kept > 0 {
		// Scale each axis by 1/√λ, so that the projections (x−μ)·v/√λ have
		// unit variance.
		w.Axes = mat.NewDense(k, kept, nil)
		w.Axes.Copy(p.vectors.Slice(0, k, 0, kept))
		scaled := mat.NewDense(k, kept, nil)
		for c := range kept {
			s := 1 / math.Sqrt(p.values[c])
			for r := range k {
				scaled.Set(r, c, w.Axes.At(r, c)*s)
			}
		}
		centred := mat.NewDense(n, k, nil)
		centred.Apply(func(_, j int, v float64) float64 { return v - p.mean[j] }, x)
		out := mat.NewDense(n, kept, flat)
		out.Mul(centred, scaled)
	}
	for i := range w.Cloud {
		w.Cloud[i] = flat[i*kept : (i+1)*kept : (i+1)*kept]
	}
	return w, nil
}
