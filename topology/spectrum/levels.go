package spectrum

import (
	"errors"
	"fmt"
	"runtime"
	"slices"
	"sort"
	"sync"

	"gonum.org/v1/gonum/lapack/gonum"
	"gonum.org/v1/gonum/mat"
)

// DenseLimit is the largest chain whose every eigenvalue Eigenvalues
// computes, and the largest chain with next-nearest bonds any function
// here accepts: those are not counted in O(N) per energy. Nearest-neighbour
// chains of any length are analysed by counting.
const DenseLimit = 4000

// Method names how a spectrum was obtained.
type Method string

// The methods.
const (
	// Auto chooses Values for next-nearest bonds and for open chains of
	// up to DenseLimit sites, Counting otherwise.
	Auto Method = ""
	// Values computes every eigenvalue: the implicit QL algorithm on the
	// tridiagonal matrix (LAPACK's dsterf, O(N²)) for an open
	// nearest-neighbour chain, bisection on Sturm counts for a periodic
	// one; an open chain with next-nearest bonds is first reduced to
	// tridiagonal form by Givens rotations (O(N²)), a periodic one goes to
	// the dense symmetric eigensolver (O(N³)).
	Values Method = "values"
	// Counting finds gaps from Sturm counts on an energy grid, refined by
	// bisection, without computing every eigenvalue: O(N) per energy,
	// nearest-neighbour chains only. Gap edges are located to 1e-10 of
	// the operator's scale (its largest row sum).
	Counting Method = "counting"
)

// levels is the spectrum of an operator as the gap search sees it: either
// every eigenvalue, sorted, or a counting function.
type levels struct {
	op     *Operator
	n      int
	values []float64 // ascending; nil when counting
	tol    float64   // absolute accuracy of a located level
}

// newLevels prepares the spectrum of op by the given method.
func newLevels(op *Operator, method Method, workers int) (*levels, error) {
	n := op.Len()
	lv := &levels{op: op, n: n, tol: 1e-13 * op.scale}
	switch method {
	case Auto:
		// Every level of a ring costs a bisection each; its gaps are
		// cheaper to count.
		if op.Bandwidth() > 1 || (n <= DenseLimit && op.wrap == nil) {
			method = Values
		} else {
			method = Counting
		}
	case Values, Counting:
	default:
		return nil, fmt.Errorf("method %q: want %s or %s", method, Values, Counting)
	}
	if op.Bandwidth() > 1 && n > DenseLimit {
		return nil, fmt.Errorf("%d sites with next-nearest bonds: the dense eigensolver takes at most %d (nearest-neighbour chains of any length are counted)", n, DenseLimit)
	}
	if method == Counting && op.Bandwidth() > 1 {
		return nil, errors.New("counting needs a nearest-neighbour (tridiagonal) operator; next-nearest bonds need the dense method")
	}
	if method == Values {
		if n > DenseLimit {
			return nil, fmt.Errorf("%d sites: every eigenvalue is computed for at most %d; use the counting method", n, DenseLimit)
		}
		v, err := op.eigenvalues(workers)
		if err != nil {
			return nil, err
		}
		lv.values = v
	}
	return lv, nil
}

// Eigenvalues returns every eigenvalue of the operator in ascending order,
// for chains of at most DenseLimit sites (see Values for the algorithms).
func (op *Operator) Eigenvalues() ([]float64, error) {
	if op.Len() > DenseLimit {
		return nil, fmt.Errorf("spectrum: %d sites: every eigenvalue is computed for at most %d", op.Len(), DenseLimit)
	}
	v, err := op.eigenvalues(0)
	if err != nil {
		return nil, fmt.Errorf("spectrum: %w", err)
	}
	return v, nil
}

// Count returns the number of eigenvalues below e: the integrated density
// of states at e times Len(). It takes O(N) for a nearest-neighbour chain
// of any length; with next-nearest bonds it computes every eigenvalue
// (call Eigenvalues once instead for many energies).
func (op *Operator) Count(e float64) (int, error) {
	if op.Bandwidth() == 1 {
		c := []int{0}
		op.countMany([]float64{e}, c)
		return c[0], nil
	}
	v, err := op.Eigenvalues()
	if err != nil {
		return 0, err
	}
	return sort.SearchFloat64s(v, e), nil
}

func (op *Operator) eigenvalues(workers int) ([]float64, error) {
	n := op.Len()
	switch {
	case op.Bandwidth() == 1 && op.wrap == nil:
		d := op.Diagonal()
		e := append([]float64(nil), op.off[0]...)
		if !(gonum.Implementation{}).Dsterf(n, d, e) {
			return nil, errors.New("the tridiagonal QL iteration did not converge")
		}
		return d, nil
	case op.Bandwidth() == 1:
		lv := &levels{op: op, n: n, tol: 1e-13 * op.scale}
		return lv.bisectAll(workers), nil
	case op.wrap == nil:
		d, e := pentaToTridiagonal(op)
		if !(gonum.Implementation{}).Dsterf(n, d, e) {
			return nil, errors.New("the tridiagonal QL iteration did not converge")
		}
		return d, nil
	}
	var es mat.EigenSym
	if !es.Factorize(op.Dense(), false) {
		return nil, errors.New("the dense symmetric eigensolver did not converge")
	}
	v := es.Values(nil)
	slices.Sort(v)
	return v, nil
}

// count returns the number of levels below e.
func (lv *levels) count(e float64) int {
	if lv.values != nil {
		return sort.SearchFloat64s(lv.values, e)
	}
	c := []int{0}
	lv.op.countMany([]float64{e}, c)
	return c[0]
}

// countMany fills c[j] with count(es[j]), in parallel over workers.
func (lv *levels) countMany(es []float64, c []int, workers int) {
	if lv.values != nil {
		for j, e := range es {
			c[j] = sort.SearchFloat64s(lv.values, e)
		}
		return
	}
	parallel(len(es), 64, workers, func(lo, hi int) {
		lv.op.countMany(es[lo:hi], c[lo:hi])
	})
}

// level returns the k-th level (0-based, ascending) to the accuracy
// lv.tol, bracketed in [lo, hi] with count(lo) ≤ k < count(hi).
func (lv *levels) level(k int, lo, hi float64) float64 {
	return lv.levelTo(k, lo, hi, lv.tol)
}

// levelTo is level to the accuracy tol.
func (lv *levels) levelTo(k int, lo, hi, tol float64) float64 {
	if lv.values != nil {
		return lv.values[k]
	}
	// Multisection: batch energies split the bracket into batch+1 parts
	// per pass, at about the cost of one count.
	es := make([]float64, batch)
	c := make([]int, batch)
	for hi-lo > tol {
		for j := range es {
			es[j] = lo + (hi-lo)*float64(j+1)/(batch+1)
		}
		lv.op.countMany(es, c)
		nlo, nhi := lo, hi
		for j := range es {
			if c[j] <= k {
				nlo = es[j]
			} else {
				nhi = es[j]
				break
			}
		}
		if nlo == lo && nhi == hi {
			break // the bracket cannot shrink further in floating point
		}
		lo, hi = nlo, nhi
	}
	return lo + (hi-lo)/2
}

// bisectAll locates every level by multisection on counts: the energy
// range is cut into pieces, and each piece holding levels is cut into
// batch+1 parts (batch counts, evaluated together) until its levels are
// isolated to tol.
func (lv *levels) bisectAll(workers int) []float64 {
	lo, hi := lv.op.Bounds()
	out := make([]float64, lv.n)
	// A first grid splits the work into independent pieces.
	g := 8 * workerCount(workers)
	es := make([]float64, g+1)
	for i := range es {
		es[i] = lo + (hi-lo)*float64(i)/float64(g)
	}
	es[g] = hi
	c := make([]int, g+1)
	lv.op.countMany(es, c)
	c[0], c[g] = 0, lv.n
	var rec func(a, b float64, ca, cb int)
	rec = func(a, b float64, ca, cb int) {
		if ca == cb {
			return
		}
		if b-a <= lv.tol {
			for k := ca; k < cb; k++ {
				out[k] = a + (b-a)/2
			}
			return
		}
		var pts [batch + 2]float64
		var cnt [batch + 2]int
		pts[0], pts[batch+1] = a, b
		cnt[0], cnt[batch+1] = ca, cb
		for j := 1; j <= batch; j++ {
			pts[j] = a + (b-a)*float64(j)/(batch+1)
		}
		if pts[1] <= a || pts[batch] >= b {
			// No room left between a and b in floating point.
			for k := ca; k < cb; k++ {
				out[k] = a + (b-a)/2
			}
			return
		}
		lv.op.countMany(pts[1:batch+1], cnt[1:batch+1])
		for j := 1; j <= batch; j++ {
			// Counts are monotone in exact arithmetic; keep them so.
			cnt[j] = min(max(cnt[j], cnt[j-1]), cb)
		}
		for j := 0; j <= batch; j++ {
			rec(pts[j], pts[j+1], cnt[j], cnt[j+1])
		}
	}
	parallel(g, 1, workers, func(i0, i1 int) {
		for i := i0; i < i1; i++ {
			rec(es[i], es[i+1], c[i], c[i+1])
		}
	})
	return out
}

func workerCount(w int) int {
	if w <= 0 {
		return runtime.GOMAXPROCS(0)
	}
	return w
}

// parallel runs f on consecutive chunks of [0, n) of at least minChunk
// items, on up to workers goroutines (all cores when workers ≤ 0).
func parallel(n, minChunk, workers int, f func(lo, hi int)) {
	w := min(workerCount(workers), max(1, n/minChunk))
	if w <= 1 {
		f(0, n)
		return
	}
	var wg sync.WaitGroup
	for t := range w {
		lo, hi := t*n/w, (t+1)*n/w
		wg.Add(1)
		go func() {
			defer wg.Done()
			f(lo, hi)
		}()
	}
	wg.Wait()
}
