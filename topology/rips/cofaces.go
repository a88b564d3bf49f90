package rips

// Cofaces are never stored: they are enumerated on the fly from a simplex's
// vertices and the rank matrix. For a simplex s with vertices
// vs[0] > vs[1] > … > vs[k−1] and any vertex x ∉ s, the cofacet s ∪ {x}
// has diameter max(rank(s), max_i rank(vs[i], x)), and its index is
// obtained from the index of s by shifting the binomial terms of the
// vertices above x one place up and adding the term of x. Cofacets are
// visited by decreasing x, hence by decreasing index.
//
// Orientation: a simplex with vertices w_0 < w_1 < … < w_k has boundary
// Σ_i (−1)^i [w_0 … ŵ_i … w_k], so the coefficient of s ∪ {x} in the
// coboundary of s is (−1)^(number of vertices of s below x).

// rows returns the rank-matrix rows of the vertices vs.
func (e *engine) rows(vs []int, dst *[5][]uint32) {
	n := e.n
	for i, v := range vs {
		dst[i] = e.m.rank[v*n : v*n+n : v*n+n]
	}
}

// minCofacet returns the cofacet of s that comes first in the filtration
// (smallest diameter, then largest index, hence largest x): the pivot of
// the unreduced column δs. ok is false when s has no cofacet below the
// threshold.
func (e *engine) minCofacet(vs []int, r uint32) (x int, d uint32, ok bool) {
	var rw [5][]uint32
	e.rows(vs, &rw)
	best, bestX := uint32(noEdge), -1
	n := e.n
	switch len(vs) {
	case 2:
		r0, r1 := rw[0][:n], rw[1][:n]
		for x := n - 1; x >= 0; x-- {
			if d := max(r0[x], r1[x]); d < best {
				best, bestX = d, x
				if d <= r {
					break
				}
			}
		}
	case 3:
		r0, r1, r2 := rw[0][:n], rw[1][:n], rw[2][:n]
		for x := n - 1; x >= 0; x-- {
			if d := max(r0[x], r1[x], r2[x]); d < best {
				best, bestX = d, x
				if d <= r {
					break
				}
			}
		}
	default:
		for x := n - 1; x >= 0; x-- {
			d := uint32(0)
			for i := range vs {
				d = max(d, rw[i][x])
			}
			if d < best {
				best, bestX = d, x
				if d <= r {
					break
				}
			}
		}
	}
	if bestX < 0 {
		return 0, 0, false
	}
	return bestX, max(best, r), true
}

// zeroCofacet returns the largest vertex x ≥ lo, x ∉ s, such that s ∪ {x}
// keeps the diameter rank r of s: the cofacet of s that comes first in the
// filtration when it has the same diameter.
func (e *engine) zeroCofacet(vs []int, r uint32, lo int) (int, bool) {
	var rw [5][]uint32
	e.rows(vs, &rw)
	n := e.n
	switch len(vs) {
	case 2:
		r0, r1 := rw[0][:n], rw[1][:n]
		for x := n - 1; x >= lo; x-- {
			if r0[x] <= r && r1[x] <= r {
				return x, true
			}
		}
	case 3:
		r0, r1, r2 := rw[0][:n], rw[1][:n], rw[2][:n]
		for x := n - 1; x >= lo; x-- {
			if r0[x] <= r && r1[x] <= r && r2[x] <= r {
				return x, true
			}
		}
	default:
	scan:
		for x := n - 1; x >= lo; x-- {
			for i := range vs {
				if rw[i][x] > r {
					continue scan
				}
			}
			return x, true
		}
	}
	return 0, false
}

// zeroFacet returns the position i in ws (decreasing vertices of a simplex
// t of diameter rank r) of the vertex whose removal gives the facet of t
// that comes last in the filtration among those of the same diameter: the
// one of smallest index, i.e. the one removing the largest possible vertex.
// Every simplex of two or more edges has such a facet.
func (e *engine) zeroFacet(ws []int, r uint32) int {
	n := e.n
	rank := e.m.rank
	k := len(ws)
	// Removing ws[i] keeps rank r unless every edge of rank r touches ws[i].
	for i := 0; i < k; i++ {
		for a := 0; a < k; a++ {
			if a == i {
				continue
			}
			for b := a + 1; b < k; b++ {
				if b != i && rank[ws[a]*n+ws[b]] == r {
					return i
				}
			}
		}
	}
	return -1
}

// cofacetOf writes s ∪ {x} into dst in decreasing order and returns it with
// the position of x and the coefficient sign exponent (the number of
// vertices of s below x).
func cofacetOf(vs []int, x int, dst []int) ([]int, int) {
	dst = dst[:0]
	pos := len(vs)
	for i, v := range vs {
		if pos == len(vs) && x > v {
			dst = append(dst, x)
			pos = i
		}
		dst = append(dst, v)
	}
	if pos == len(vs) {
		dst = append(dst, x)
	}
	return dst, pos
}

// facetOf writes ws without its i-th vertex into dst.
func facetOf(ws []int, i int, dst []int) []int {
	dst = append(dst[:0], ws[:i]...)
	return append(dst, ws[i+1:]...)
}

// inApparentPair reports whether the simplex s (vertices vs, rank r) forms
// a zero-persistence apparent pair with a cofacet or a facet: a pair
// (σ, τ) of a simplex and a cofacet of the same diameter where τ is the
// first cofacet of σ in the filtration and σ the last facet of τ.
// Apparent pairs are persistence pairs of every reduction, so their columns
// need no work (Bauer 2021, section 3.5).
func (e *engine) inApparentPair(vs []int, r uint32, buf []int) bool {
	if x, ok := e.zeroCofacet(vs, r, 0); ok {
		t, pos := cofacetOf(vs, x, buf)
		if e.zeroFacet(t, r) == pos {
			return true
		}
	}
	if len(vs) >= 3 {
		if _, ok := e.apparentFacet(vs, r, buf); ok {
			return true
		}
	}
	return false
}

// apparentFacet returns the position in ws of the vertex y such that
// (t \ {y}, t) is a zero-persistence apparent pair, if there is one: the
// last facet of t of the same diameter, when t is its first cofacet (no
// vertex above y gives that facet a cofacet of the same diameter).
func (e *engine) apparentFacet(ws []int, r uint32, buf []int) (int, bool) {
	i := e.zeroFacet(ws, r)
	if i < 0 {
		return 0, false
	}
	rho := facetOf(ws, i, buf)
	if _, found := e.zeroCofacet(rho, r, ws[i]+1); found {
		return 0, false
	}
	return i, true
}
