package register

import (
	"math"
	"slices"
	"sort"
)

// pair is a matched design site d and measured site k, both indices into
// the sorted chains.
type pair struct{ d, k int }

// align returns the best order-preserving one-to-one alignment of the
// design (mapped through m) with the measured sites x (ascending), as
// pairs in ascending design order.
//
// Objective (a global alignment with gap penalties; Needleman & Wunsch,
// J. Mol. Biol. 48, 1970): matching design j with measured k costs
// (r/g_j)², r the residual and g_j the gate of j in measured units, and is
// allowed only for |r| ≤ g_j; leaving a site of either chain unmatched
// costs 1. With n + m sites the total cost is n + m − Σ (2 − (r/g)²) over
// the matched pairs, so the best alignment is the chain of candidate pairs,
// increasing in both indices, of largest total weight 2 − (r/g)² ≥ 1.
//
// Only pairs inside a gate are candidates, so the dynamic programme runs
// over them alone: taking the design sites in the order of their
// calibrated positions, the best chain ending at a pair (j, k) is its
// weight plus the best chain ending at any pair (j′, k′) with j′ before j
// and k′ < k, a prefix maximum over k kept in a Fenwick tree (Fenwick,
// Softw. Pract. Exper. 24, 1994). Cost O(P log m) for P candidate pairs.
func align(m model, g *geometry, x []float64, gates []float64) []pair {
	n := len(g.d)
	// Design sites in ascending calibrated position: the design order, or
	// its reverse for a negative scale.
	seq := make([]int, n)
	for i := range seq {
		seq[i] = i
		if m.b[1] < 0 {
			seq[i] = n - 1 - i
		}
	}
	type cand struct {
		p      pair
		weight float64
		total  float64 // best chain ending here
		prev   int     // previous candidate of that chain, −1 if none
	}
	var cands []cand
	tree := newMaxTree(len(x))
	for _, j := range seq {
		y := m.predict(g.d[j])
		gate := math.Abs(m.slope(g.d[j])) * gates[j]
		lo := sort.SearchFloat64s(x, y-gate)
		first := len(cands)
		for k := lo; k < len(x) && x[k] <= y+gate; k++ {
			r := (x[k] - y) / gate
			c := cand{p: pair{j, k}, weight: 2 - r*r}
			best, at := tree.prefix(k) // chains over measured sites < k
			c.total, c.prev = c.weight+best, at
			cands = append(cands, c)
		}
		// Update after querying, so that pairs of the same design site
		// never chain with each other.
		for i := first; i < len(cands); i++ {
			tree.update(cands[i].p.k, cands[i].total, i)
		}
	}
	end, bestTotal := -1, 0.0
	for i, c := range cands {
		if c.total > bestTotal {
			end, bestTotal = i, c.total
		}
	}
	var out []pair
	for i := end; i >= 0; i = cands[i].prev {
		out = append(out, cands[i].p)
	}
	slices.SortFunc(out, func(a, b pair) int { return a.d - b.d })
	return out
}

// maxTree is a Fenwick tree of prefix maxima with the index of the
// candidate attaining each.
type maxTree struct {
	val []float64
	at  []int
}

func newMaxTree(n int) *maxTree {
	t := &maxTree{val: make([]float64, n+1), at: make([]int, n+1)}
	for i := range t.at {
		t.at[i] = -1
	}
	return t
}

// update raises position k (0-based) to v, attained by candidate c.
func (t *maxTree) update(k int, v float64, c int) {
	for i := k + 1; i < len(t.val); i += i & -i {
		if v > t.val[i] {
			t.val[i], t.at[i] = v, c
		}
	}
}

// prefix returns the maximum over positions < k and its candidate (0 and
// −1 when there is none).
func (t *maxTree) prefix(k int) (float64, int) {
	best, at := 0.0, -1
	for i := k; i > 0; i -= i & -i {
		if t.val[i] > best {
			best, at = t.val[i], t.at[i]
		}
	}
	return best, at
}
