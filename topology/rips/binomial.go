package rips

import (
	"fmt"
	"math"
	"math/bits"
)

// binomials is the table of binomial coefficients C(v, k) for 0 ≤ v ≤ n and
// 0 ≤ k ≤ maxK. It indexes simplices through the combinatorial number
// system: the simplex with vertices v_k > … > v_1 > v_0 has index
// Σ_i C(v_i, i+1), a bijection between k-simplices on n vertices and
// [0, C(n, k+1)) that orders simplices colexicographically (by their
// largest vertex first).
type binomials struct {
	n    int
	maxK int
	tab  []uint64 // tab[k*(n+1)+v] = C(v, k)
}

// newBinomials builds the table, or fails when C(n, maxK) overflows 63 bits
// (the simplex indices would not fit).
func newBinomials(n, maxK int) (binomials, error) {
	b := binomials{n: n, maxK: maxK, tab: make([]uint64, (maxK+1)*(n+1))}
	for v := 0; v <= n; v++ {
		b.tab[v] = 1 // C(v, 0)
		for k := 1; k <= maxK; k++ {
			if v == 0 {
				continue
			}
			// Pascal's rule C(v, k) = C(v−1, k−1) + C(v−1, k).
			s, carry := bits.Add64(b.tab[(k-1)*(n+1)+v-1], b.tab[k*(n+1)+v-1], 0)
			if carry != 0 || s > math.MaxInt64 {
				return binomials{}, fmt.Errorf("%d points are too many for simplices of %d vertices: their indices overflow 63 bits", n, maxK)
			}
			b.tab[k*(n+1)+v] = s
		}
	}
	return b, nil
}

// row returns C(·, k) as a slice indexed by v.
func (b *binomials) row(k int) []uint64 { return b.tab[k*(b.n+1) : (k+1)*(b.n+1)] }

// c returns C(v, k).
func (b *binomials) c(v, k int) uint64 { return b.tab[k*(b.n+1)+v] }

// index returns the combinatorial index of the simplex whose vertices vs are
// listed in decreasing order.
func (b *binomials) index(vs []int) uint64 {
	k := len(vs)
	var idx uint64
	for i, v := range vs {
		idx += b.c(v, k-i)
	}
	return idx
}

// vertices writes into vs (len(vs) = number of vertices) the vertices of the
// simplex with index idx, in decreasing order. Each vertex is the largest v
// with C(v, k) ≤ the remaining index, found by binary search.
func (b *binomials) vertices(idx uint64, vs []int) {
	top := b.n // every vertex is below top
	k := len(vs)
	for i := range vs {
		row := b.row(k - i)
		// Largest v in [k−i−1, top) with C(v, k−i) ≤ idx; C(k−i−1, k−i) = 0.
		lo, hi := k-i-1, top-1
		for lo < hi {
			mid := int(uint(lo+hi+1) >> 1)
			if row[mid] <= idx {
				lo = mid
			} else {
				hi = mid - 1
			}
		}
		vs[i] = lo
		idx -= row[lo]
		top = lo
	}
}
