package rips

import (
	"slices"
	"sync"
	"sync/atomic"
)

// assemble lists the columns of the reduction in dimension dim: the
// dim-simplices up to the threshold that are neither pivots of the
// reduction in dimension dim−1 (clearing: such a simplex kills a class, so
// its column reduces to zero; de Silva, Morozov & Vejdemo-Johansson 2011)
// nor members of apparent pairs. They come sorted in reduction order:
// decreasing diameter, then increasing index.
func (e *engine) assemble(dim int, cleared *pivotTable) []simplex {
	n := e.n
	k := dim + 1
	var next atomic.Int64
	next.Store(int64(n - 1))
	parts := make([][]simplex, e.workers)
	counts := make([][3]int64, e.workers) // simplices, cleared, apparent
	var wg sync.WaitGroup
	for w := range e.workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			var out []simplex
			var cnt [3]int64
			vs := make([]int, k)
			buf := make([]int, 0, k+2)
			visit := func(idx uint64, r uint32) {
				cnt[0]++
				if cleared.has(idx) {
					cnt[1]++
					return
				}
				if e.inApparentPair(vs, r, buf) {
					cnt[2]++
					return
				}
				out = append(out, simplex{idx: idx, rank: r})
			}
			for {
				top := int(next.Add(-1) + 1)
				if top < k-1 {
					break
				}
				if w == 0 {
					// Only one goroutine writes progress.
					e.prog.report("dimension %d: listing simplices, %d of %d top vertices left", dim, top, n)
				}
				if k == 3 {
					out = e.triangles(top, cleared, out, &cnt)
					continue
				}
				vs[0] = top
				e.cliques(vs, 1, 0, e.b.c(top, k), visit)
			}
			parts[w] = out
			counts[w] = cnt
		}()
	}
	wg.Wait()
	total := 0
	var cnt [3]int64
	for w := range parts {
		total += len(parts[w])
		for i := range cnt {
			cnt[i] += counts[w][i]
		}
	}
	cols := make([]simplex, 0, total)
	for _, p := range parts {
		cols = append(cols, p...)
	}
	parts = nil
	slices.SortFunc(cols, func(a, b simplex) int {
		if a.rank != b.rank {
			if a.rank > b.rank {
				return -1
			}
			return 1
		}
		if a.idx < b.idx {
			return -1
		}
		if a.idx > b.idx {
			return 1
		}
		return 0
	})
	e.stats.Simplices[dim] = cnt[0]
	e.stats.Cleared[dim] = cnt[1]
	e.stats.Apparent[dim] = cnt[2]
	return cols
}

// cliques enumerates the simplices whose vertices begin with vs[:depth]
// (decreasing), extending them by smaller vertices adjacent to all of them
// within the threshold. r is the diameter rank so far and idx the sum of
// the binomial terms so far.
func (e *engine) cliques(vs []int, depth int, r uint32, idx uint64, visit func(uint64, uint32)) {
	n := e.n
	k := len(vs)
	rank := e.m.rank
	bin := e.b.row(k - depth)
	last := depth == k-1
	hi := vs[depth-1] - 1
	for x := hi; x >= k-1-depth; x-- {
		d := r
		for i := 0; i < depth; i++ {
			d = max(d, rank[vs[i]*n+x])
		}
		if d == noEdge {
			continue
		}
		vs[depth] = x
		if last {
			visit(idx+bin[x], d)
		} else {
			e.cliques(vs, depth+1, d, idx+bin[x], visit)
		}
	}
}

// triangles appends the columns of the H2 reduction among the triangles
// with top vertex c: assemble's enumeration and tests, written out for
// three vertices with the edge ranks at hand.
func (e *engine) triangles(c int, cleared *pivotTable, out []simplex, cnt *[3]int64) []simplex {
	n := e.n
	rank := e.m.rank
	rowC := rank[c*n : c*n+n : c*n+n]
	binC := e.b.c(c, 3)
	bin2 := e.b.row(2)
	var vs [3]int
	buf := make([]int, 0, 5)
	for b := c - 1; b >= 1; b-- {
		rcb := rowC[b]
		if rcb == noEdge {
			continue
		}
		rowB := rank[b*n : b*n+b : b*n+b]
		base := binC + bin2[b]
		for a := b - 1; a >= 0; a-- {
			rca, rab := rowC[a], rowB[a]
			r := max(rcb, rca, rab)
			if r == noEdge {
				continue
			}
			cnt[0]++
			vs = [3]int{c, b, a}
			if e.triangleApparent(&vs, r, rcb, rca, rab, buf) {
				cnt[2]++
				continue
			}
			idx := base + uint64(a)
			if cleared.has(idx) {
				cnt[1]++
				continue
			}
			out = append(out, simplex{idx: idx, rank: r})
		}
	}
	return out
}

// triangleApparent is inApparentPair for the triangle c > b > a of rank r
// with edge ranks rcb, rca, rab. When the triangle has a single longest
// edge and z is the vertex opposite it, its first cofacet t = σ ∪ {x} of
// the same diameter pairs with it exactly when x > z and no edge from x
// ties with r: the last facet of t of diameter r removes the largest
// vertex not on the longest edge. So only vertices above z need a look.
func (e *engine) triangleApparent(vs *[3]int, r, rcb, rca, rab uint32, buf []int) bool {
	c, b, a := vs[0], vs[1], vs[2]
	z := -1
	switch {
	case rcb == r && rca != r && rab != r:
		z = a
	case rca == r && rcb != r && rab != r:
		z = b
	case rab == r && rcb != r && rca != r:
		z = c
	}
	if z < 0 {
		return e.inApparentPair(vs[:], r, buf) // ties: the general test
	}
	n := e.n
	rank := e.m.rank
	r0 := rank[c*n : c*n+n : c*n+n]
	r1 := rank[b*n : b*n+n : b*n+n]
	r2 := rank[a*n : a*n+n : a*n+n]
	for x := n - 1; x > z; x-- {
		d0, d1, d2 := r0[x], r1[x], r2[x]
		if d0 <= r && d1 <= r && d2 <= r {
			if d0 != r && d1 != r && d2 != r {
				return true
			}
			return e.inApparentPair(vs[:], r, buf) // an edge from x ties
		}
	}
	// No cofacet of the same diameter above z: only the facet side is
	// left.
	_, ok := e.apparentFacet(vs[:], r, buf)
	return ok
}
