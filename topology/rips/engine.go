package rips

import (
	"cmp"
	"context"
	"fmt"
	"math"
	"slices"
	"sync"
)

// simplex is a simplex by combinatorial index and diameter rank.
type simplex struct {
	idx  uint64
	rank uint32
}

// engine holds one computation.
type engine struct {
	m        *metric
	nb       neighbours
	n        int
	maxDim   int
	f        field
	b        binomials
	workers  int
	cocycles bool
	budget   int64
	prog     *progress
	ctx      context.Context // checked with the memory (see checkpoint)

	bars  []Bar
	cocs  []Cocycle
	stats Stats
}

// value is the edge length of a rank.
func (e *engine) value(r uint32) float64 { return e.m.vals[r] }

// unionFind is a disjoint-set forest with path halving and union by size.
type unionFind struct {
	parent []int32
	size   []int32
}

func newUnionFind(n int) *unionFind {
	u := &unionFind{parent: make([]int32, n), size: make([]int32, n)}
	for i := range u.parent {
		u.parent[i] = int32(i)
		u.size[i] = 1
	}
	return u
}

func (u *unionFind) find(x int32) int32 {
	for u.parent[x] != x {
		u.parent[x] = u.parent[u.parent[x]]
		x = u.parent[x]
	}
	return x
}

// union merges the sets of a and b and reports whether they were apart.
func (u *unionFind) union(a, b int32) bool {
	a, b = u.find(a), u.find(b)
	if a == b {
		return false
	}
	if u.size[a] < u.size[b] {
		a, b = b, a
	}
	u.parent[b] = a
	u.size[a] += u.size[b]
	return true
}

// dim0 computes the H0 bars by Kruskal's algorithm on the edges in
// filtration order (every merge kills the younger component at the edge's
// length; Zomorodian & Carlsson 2005) and returns the edges that merge
// nothing, minus those in apparent pairs: the columns of the H1 reduction,
// in reduction order (reverse filtration order). Merging edges are the H0
// pivots and are cleared from H1.
func (e *engine) dim0() []simplex {
	n := e.n
	uf := newUnionFind(n)
	var cands []simplex
	for _, id := range e.m.order {
		i, j := edgeVertices(int(id))
		r := e.m.rank[i*n+j]
		if uf.union(int32(i), int32(j)) {
			if d := e.value(r); d > 0 {
				e.bars = append(e.bars, Bar{Dim: 0, Birth: 0, Death: d})
			}
		} else if e.maxDim >= 1 {
			cands = append(cands, simplex{idx: uint64(id), rank: r})
		}
	}
	for i := 0; i < n; i++ {
		if uf.find(int32(i)) == int32(i) {
			e.bars = append(e.bars, Bar{Dim: 0, Birth: 0, Death: math.Inf(1)})
		}
	}
	e.stats.Simplices[0] = int64(n)
	if len(e.stats.Simplices) > 1 {
		e.stats.Simplices[1] = int64(len(e.m.order))
	}
	if e.maxDim < 1 {
		return nil
	}
	// Drop edges in apparent pairs, in parallel, keeping the order.
	keep := make([]bool, len(cands))
	e.parallel(len(cands), func(lo, hi int) {
		var vs [2]int
		buf := make([]int, 0, 8)
		for c := lo; c < hi; c++ {
			i, j := edgeVertices(int(cands[c].idx))
			vs[0], vs[1] = j, i
			keep[c] = !e.inApparentPair(vs[:], cands[c].rank, buf)
		}
	})
	cols := cands[:0]
	for c, s := range cands {
		if keep[c] {
			cols = append(cols, s)
		}
	}
	slices.Reverse(cols)
	e.stats.Cleared[1] = int64(len(e.m.order) - len(cands))
	e.stats.Apparent[1] = int64(len(cands) - len(cols))
	return slices.Clip(cols)
}

// parallel runs work over [0, total) split into contiguous chunks, one
// goroutine per worker.
func (e *engine) parallel(total int, work func(lo, hi int)) {
	w := e.workers
	if total < 1024 || w <= 1 {
		work(0, total)
		return
	}
	var wg sync.WaitGroup
	for k := 0; k < w; k++ {
		lo, hi := total*k/w, total*(k+1)/w
		wg.Add(1)
		go func() {
			defer wg.Done()
			work(lo, hi)
		}()
	}
	wg.Wait()
}

// reduce reduces the coboundary columns of dimension dim in order and
// records the bars they give. It returns the pivots, for clearing the next
// dimension.
//
// Each column δσ is reduced left to right (Zomorodian & Carlsson 2005,
// applied to the coboundary matrix: de Silva, Morozov & Vejdemo-Johansson
// 2011): while its pivot τ is the pivot of an earlier column, that column
// is added to cancel it. Earlier columns are not stored reduced: only the
// combination V of simplices whose coboundaries sum to them is kept, and
// their coboundaries are enumerated again when needed (Bauer 2021). A pivot
// that belongs to an apparent pair (ρ, τ) is cancelled with δρ, which is
// reduced as it stands. A column whose first cofacet is nobody's pivot is
// reduced as it stands too (an emergent pair) and needs no heap.
func (e *engine) reduce(dim int, cols []simplex) (*pivotTable, error) {
	f := &e.f
	p := f.p
	k := dim + 1
	pivots := newPivotTable(len(cols))
	// V of each column that became a pivot, except the column's own
	// simplex (coefficient 1): entries vals[vOff[c]:vOff[c+1]].
	vOff := make([]uint32, len(cols)+1)
	var vEntries []entry
	w := newWorking(e)
	var chain []entry
	vs := make([]int, k)
	us := make([]int, k)
	tv := make([]int, k+1)
	buf := make([]int, 0, k+1)
	fb := make([]int, 0, k+1)
	var emergent, reduced, additions int64

	for ci, sigma := range cols {
		vOff[ci] = uint32(len(vEntries))
		if ci&1023 == 0 {
			e.prog.report("dimension %d: %d of %d columns", dim, ci, len(cols))
			if err := e.checkpoint(dim, int64(len(cols))*16+int64(len(vOff))*4+pivots.bytes()+int64(cap(vEntries))*16+w.bytes()); err != nil {
				return nil, err
			}
		}
		e.b.vertices(sigma.idx, vs)
		birth := e.value(sigma.rank)

		// Emergent pair: the first cofacet is nobody's pivot.
		x, d, ok := e.minCofacet(vs, sigma.rank)
		if !ok {
			e.essential(dim, birth, sigma, nil)
			continue
		}
		t, pos := cofacetOf(vs, x, buf)
		tidx := e.b.index(t)
		if !pivots.has(tidx) {
			if _, app := e.apparentFacet(t, d, fb); !app {
				emergent++
				c := uint32(1)
				if (k-pos)&1 == 1 {
					c = p - 1
				}
				pivots.put(tidx, uint64(ci)<<16|uint64(c))
				e.pair(dim, birth, e.value(d), sigma, nil)
				continue
			}
		}

		// Full reduction.
		reduced++
		w.reset(k, sigma.rank)
		w.add(vs, sigma.rank, 1, nil)
		for steps := 1; ; steps++ {
			if steps%4096 == 0 {
				// A single column can run long and grow large.
				e.prog.report("dimension %d: column %d of %d, its chain holds %d simplices", dim, ci, len(cols), len(w.streams))
				if err := e.checkpoint(dim, int64(len(cols))*16+int64(len(vOff))*4+pivots.bytes()+int64(cap(vEntries))*16+w.bytes()); err != nil {
					return nil, err
				}
			}
			piv, ok := w.pivot()
			if !ok {
				chain = w.chain(chain)
				e.essential(dim, birth, sigma, e.mergeChain(chain))
				break
			}
			if v, found := pivots.get(piv.idx); found {
				// Add λ·(column j), λ = −a/b for the pivot coefficients a
				// here and b there.
				j := int(v >> 16)
				lam := f.neg(f.mul(piv.coef, f.inv[v&0xffff]))
				additions++
				other := cols[j]
				e.b.vertices(other.idx, us)
				w.add(us, other.rank, lam, &piv)
				for _, ve := range vEntries[vOff[j]:vOff[j+1]] {
					e.b.vertices(ve.idx, us)
					w.add(us, ve.rank, f.mul(lam, ve.coef), &piv)
				}
				continue
			}
			e.b.vertices(piv.idx, tv)
			if i, app := e.apparentFacet(tv, piv.rank, fb); app {
				// Cancel with δρ, ρ = τ minus its i-th vertex: the
				// coefficient of τ in δρ is s = ±1, and λ = −a/s = −a·s.
				rho := facetOf(tv, i, us[:0])
				lam := f.neg(piv.coef)
				if (k-i)&1 == 1 {
					lam = f.neg(lam)
				}
				additions++
				w.add(rho, piv.rank, lam, &piv)
				continue
			}
			// τ is nobody's pivot: (σ, τ) is a persistence pair.
			pivots.put(piv.idx, uint64(ci)<<16|uint64(piv.coef))
			chain = w.chain(chain)
			merged := e.mergeChain(chain)
			vEntries = append(vEntries, merged...)
			if len(vEntries) > math.MaxUint32 {
				return nil, fmt.Errorf("dimension %d: the reduction holds more than 2^32 entries", dim)
			}
			e.pair(dim, birth, e.value(piv.rank), sigma, merged)
			break
		}
	}
	vOff[len(cols)] = uint32(len(vEntries))
	e.stats.Columns[dim] = int64(len(cols))
	e.stats.Emergent[dim] = emergent
	e.stats.Reduced[dim] = reduced
	e.stats.Additions[dim] = additions
	return pivots, nil
}

// mergeChain sorts a chain by index and sums repeated simplices, dropping
// those that cancel.
func (e *engine) mergeChain(chain []entry) []entry {
	if len(chain) == 0 {
		return nil
	}
	slices.SortFunc(chain, func(a, b entry) int { return cmp.Compare(a.idx, b.idx) })
	out := chain[:0]
	for _, c := range chain {
		if len(out) > 0 && out[len(out)-1].idx == c.idx {
			out[len(out)-1].coef = e.f.add(out[len(out)-1].coef, c.coef)
			continue
		}
		if len(out) > 0 && out[len(out)-1].coef == 0 {
			out = out[:len(out)-1]
		}
		out = append(out, c)
	}
	if len(out) > 0 && out[len(out)-1].coef == 0 {
		out = out[:len(out)-1]
	}
	return out
}

// pair records the bar of a persistence pair when its persistence is
// positive, with its cocycle in dimension 1 when asked for.
func (e *engine) pair(dim int, birth, death float64, sigma simplex, chain []entry) {
	if death > birth {
		e.bars = append(e.bars, Bar{Dim: dim, Birth: birth, Death: death})
		if dim == 1 && e.cocycles {
			e.cocycle(sigma, chain)
		}
	}
}

// essential records a class that lives past the threshold.
func (e *engine) essential(dim int, birth float64, sigma simplex, chain []entry) {
	e.bars = append(e.bars, Bar{Dim: dim, Birth: birth, Death: math.Inf(1)})
	if dim == 1 && e.cocycles {
		e.cocycle(sigma, chain)
	}
}

// cocycle records the cocycle σ + V of the last bar: the combination of
// edges whose coboundary is the reduced column, which vanishes on every
// triangle before the death simplex.
func (e *engine) cocycle(sigma simplex, chain []entry) {
	c := Cocycle{Bar: len(e.bars) - 1}
	add := func(idx uint64, coef uint32) {
		i, j := edgeVertices(int(idx))
		c.Edges = append(c.Edges, CocycleEdge{I: i, J: j, Value: e.f.lift(coef)})
	}
	add(sigma.idx, 1)
	for _, ce := range chain {
		add(ce.idx, ce.coef)
	}
	e.cocs = append(e.cocs, c)
}

// checkpoint refuses to go on when the computation's context is done or
// the reduction holds more than the budget.
func (e *engine) checkpoint(dim int, held int64) error {
	if err := e.ctx.Err(); err != nil {
		return fmt.Errorf("dimension %d: %w", dim, err)
	}
	if held+e.metricBytes() > e.budget {
		return fmt.Errorf("dimension %d: the reduction needs more than the memory budget of %s: %w", dim, formatBytes(e.budget), ErrBudget)
	}
	return nil
}

// metricBytes is the memory held by the rank matrix and edge lists.
func (e *engine) metricBytes() int64 {
	return int64(len(e.m.rank))*4 + int64(len(e.m.vals))*8 + int64(len(e.m.order))*4 +
		int64(len(e.nb.keys))*8 + int64(len(e.nb.off))*4
}
