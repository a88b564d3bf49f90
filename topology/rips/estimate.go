package rips

import (
	"math/bits"
	"math/rand/v2"
	"slices"
	"time"
)

// Cost is the resource guard's estimate of a computation.
type Cost struct {
	// Points is the number of points.
	Points int
	// Threshold is the largest edge length in the complex.
	Threshold float64
	// Simplices estimates the number of simplices of each dimension 0 to
	// MaxDim+1 below the threshold. Vertices and edges are counted
	// exactly; higher simplices are sampled.
	Simplices []float64
	// Work estimates the cofacet visits of the reduction: every simplex of
	// dimension 1 to MaxDim looks at every vertex once.
	Work float64
	// Bytes estimates the memory the computation holds: the distances,
	// and the columns of the reduction, counted as twice the share of the
	// sampled simplices outside apparent pairs. The working column is not
	// counted; it is watched while it grows.
	Bytes int64
}

func (c Cost) total() float64 {
	s := 0.0
	for _, x := range c.Simplices {
		s += x
	}
	return s
}

// estimateSamples is the number of random cliques drawn per estimate.
const estimateSamples = 4096

// Estimate computes the distances of the cloud and estimates the size of
// the computation VietorisRips(points, opt) would run, without running it.
// The estimate is deterministic.
func Estimate(points [][]float64, opt Options) (Cost, error) {
	opt.Progress = nil
	opt.MemoryBudget = 1 << 62 // estimate, do not refuse
	e, err := newEngine(points, opt, time.Now())
	if err != nil {
		return Cost{}, err
	}
	return e.estimate(), nil
}

// metricPeak is the most memory the distances of n points hold while they
// are computed and ranked (with every pair below the threshold).
func metricPeak(n int) int64 {
	m := int64(n) * int64(n-1) / 2
	return 36*m + 4*int64(n)*int64(n)
}

// estimate counts edges exactly and estimates the number of k-simplices
// with Knuth's estimator for the size of a search tree (Knuth, "Estimating
// the efficiency of backtrack programs", Math. Comp. 29, 1975): a random
// walk v0, v1, … picks each next vertex uniformly among the c_i common
// neighbours of the vertices so far, and n·c_1⋯c_k is an unbiased
// estimate of the number of ordered (k+1)-cliques, (k+1)!·S_k. The same
// walks, weighted by those products, estimate the share of k-simplices
// outside apparent pairs: the columns the reduction will hold.
func (e *engine) estimate() Cost {
	n := e.n
	top := e.maxDim + 1
	s := make([]float64, top+1)
	share := make([]float64, top+1) // of simplices that become columns
	for k := range share {
		share[k] = 1
	}
	s[0] = float64(n)
	if top >= 1 {
		s[1] = float64(len(e.m.order))
	}
	if top >= 2 && len(e.m.order) > 0 {
		words := (n + 63) / 64
		adj := make([]uint64, n*words)
		for i := 0; i < n; i++ {
			row := e.m.rank[i*n : (i+1)*n]
			for j, r := range row {
				if r != noEdge {
					adj[i*words+j/64] |= 1 << (j % 64)
				}
			}
		}
		rng := rand.New(rand.NewPCG(0x9e3779b97f4a7c15, uint64(n)))
		sums := make([]float64, top+1)
		cols := make([]float64, top+1)
		cand := make([]uint64, words)
		walk := make([]int, 0, top+1)
		vs := make([]int, top+1)
		buf := make([]int, 0, top+2)
		for range estimateSamples {
			v := rng.IntN(n)
			w := float64(n)
			walk = append(walk[:0], v)
			copy(cand, adj[v*words:(v+1)*words])
			for k := 1; k <= top; k++ {
				c := 0
				for _, x := range cand {
					c += bits.OnesCount64(x)
				}
				if c == 0 {
					break
				}
				w *= float64(c)
				// Pick the pick-th set bit of cand.
				pick := rng.IntN(c)
				u := -1
				for wi, x := range cand {
					if oc := bits.OnesCount64(x); pick >= oc {
						pick -= oc
						continue
					}
					for ; pick > 0; pick-- {
						x &= x - 1
					}
					u = wi*64 + bits.TrailingZeros64(x)
					break
				}
				walk = append(walk, u)
				sums[k] += w
				if k <= e.maxDim {
					// Is the simplex of the walk a column?
					copy(vs, walk)
					simplex := vs[:k+1]
					slices.SortFunc(simplex, func(a, b int) int { return b - a })
					var r uint32
					for i, a := range simplex {
						for _, b := range simplex[i+1:] {
							r = max(r, e.m.rank[a*n+b])
						}
					}
					if !e.inApparentPair(simplex, r, buf) {
						cols[k] += w
					}
				}
				if k == top {
					break
				}
				for wi := range cand {
					cand[wi] &= adj[u*words+wi]
				}
			}
		}
		fact := 2.0
		for k := 2; k <= top; k++ {
			fact *= float64(k + 1)
			s[k] = sums[k] / estimateSamples / fact
		}
		for k := 1; k <= e.maxDim; k++ {
			if sums[k] > 0 {
				// Twice the estimate, and at least a share that the
				// samples could miss.
				share[k] = min(1, 2*cols[k]/sums[k]+8.0/estimateSamples)
			}
		}
	}
	c := Cost{Points: n, Threshold: e.m.threshold, Simplices: s}
	var peak int64
	for d := 1; d <= e.maxDim; d++ {
		c.Work += s[d] * float64(n)
		cols := s[d] * share[d]
		// Reduction: columns (16 bytes), offsets (4), pivot table (32),
		// reduction matrix (16).
		red := int64(cols * (16 + 4 + 32 + 16))
		// Assembly of the next dimension: the pivots, and its columns
		// twice while they are gathered.
		var asm int64
		if d < e.maxDim {
			asm = int64(cols*32 + s[d+1]*share[d+1]*32)
		}
		peak = max(peak, red, asm)
	}
	// The neighbour lists (two keys per edge) and the working column's
	// buckets (one per edge length).
	c.Bytes = e.metricBytes() + 16*int64(len(e.m.order)) + 4*int64(len(e.m.vals)) + peak
	return c
}
