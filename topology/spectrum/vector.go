package spectrum

import (
	"math"
	"math/rand/v2"
)

// bandLU is the LU factorization with partial pivoting of the banded part
// of H − σI (the seam's corner terms left out): kl sub-diagonals and, after
// pivoting, up to kl+ku super-diagonals. Row i is stored over the columns
// i−kl .. i+kl+ku (LAPACK's dgbtrf layout, by rows).
type bandLU struct {
	n, kl, w int
	a        []float64 // a[i*w + (j−i+kl)] = entry (i, j)
	piv      []int     // piv[k]: the row swapped with row k at step k
}

func (f *bandLU) at(i, j int) *float64 { return &f.a[i*f.w+j-i+f.kl] }

// factorBand factors H − σI without the seam terms. A pivot that is zero
// (σ an exact eigenvalue of the banded part) is replaced by tiny, as
// inverse iteration allows.
func (op *Operator) factorBand(sigma float64) *bandLU {
	n, b := op.Len(), op.Bandwidth()
	f := &bandLU{n: n, kl: b, w: 3*b + 1, a: make([]float64, n*(3*b+1)), piv: make([]int, n)}
	for i := range n {
		*f.at(i, i) = op.diag[i] - sigma
		for k := 1; k <= b; k++ {
			if i+k < n {
				*f.at(i, i+k) = op.off[k-1][i]
				*f.at(i+k, i) = op.off[k-1][i]
			}
		}
	}
	tiny := 1e-300 * op.scale
	for k := range n {
		// Partial pivoting among the rows that reach column k.
		p := k
		for i := k + 1; i <= min(n-1, k+b); i++ {
			if math.Abs(*f.at(i, k)) > math.Abs(*f.at(p, k)) {
				p = i
			}
		}
		f.piv[k] = p
		last := min(n-1, k+2*b) // rightmost column of a row after fill
		if p != k {
			for j := k; j <= last; j++ {
				x, y := f.at(k, j), f.at(p, j)
				*x, *y = *y, *x
			}
		}
		if *f.at(k, k) == 0 {
			*f.at(k, k) = tiny
		}
		for i := k + 1; i <= min(n-1, k+b); i++ {
			l := *f.at(i, k) / *f.at(k, k)
			*f.at(i, k) = l // the multiplier, kept for the solve
			if l == 0 {
				continue
			}
			for j := k + 1; j <= last; j++ {
				*f.at(i, j) -= l * *f.at(k, j)
			}
		}
	}
	return f
}

// solve overwrites x with the solution of (banded part) · y = x.
func (f *bandLU) solve(x []float64) {
	n, b := f.n, f.kl
	for k := range n {
		if p := f.piv[k]; p != k {
			x[k], x[p] = x[p], x[k]
		}
		for i := k + 1; i <= min(n-1, k+b); i++ {
			x[i] -= *f.at(i, k) * x[k]
		}
	}
	for k := n - 1; k >= 0; k-- {
		s := x[k]
		for j := k + 1; j <= min(n-1, k+2*b); j++ {
			s -= *f.at(k, j) * x[j]
		}
		x[k] = s / *f.at(k, k)
	}
}

// eigenvector returns a unit eigenvector for the eigenvalue lambda by
// inverse iteration (Wilkinson, The Algebraic Eigenvalue Problem, 1965,
// §9.47): three solves with H − λI from a seeded random start. A periodic
// chain's seam terms, a symmetric matrix M on the few sites next to the
// seam, are brought in by the Sherman–Morrison–Woodbury identity: with
// B the banded part and P the seam sites, (B + P M Pᵀ)x = r has
// Pᵀx = y solving (I + PᵀB⁻¹P·M) y = PᵀB⁻¹r and x = B⁻¹r − B⁻¹P·M y.
func (op *Operator) eigenvector(lambda float64, seed uint64) []float64 {
	n := op.Len()
	f := op.factorBand(lambda)
	// The seam sites and their coupling matrix.
	var sites []int
	index := map[int]int{}
	type entry struct {
		i, j int
		v    float64
	}
	var ents []entry
	for k, w := range op.wrap {
		for j, v := range w {
			i := n - (k + 1) + j
			for _, s := range []int{i, j} {
				if _, ok := index[s]; !ok {
					index[s] = len(sites)
					sites = append(sites, s)
				}
			}
			ents = append(ents, entry{index[i], index[j], v})
		}
	}
	q := len(sites)
	m := make([]float64, q*q)
	for _, e := range ents {
		m[e.i*q+e.j] += e.v
		m[e.j*q+e.i] += e.v
	}
	// Y = B⁻¹P, column by column.
	y := make([][]float64, q)
	for c, s := range sites {
		y[c] = make([]float64, n)
		y[c][s] = 1
		f.solve(y[c])
	}
	// K = I + PᵀY·M, factored once.
	kmat := make([]float64, q*q)
	for r := range q {
		for c := range q {
			s := 0.0
			for l := range q {
				s += y[l][sites[r]] * m[l*q+c]
			}
			if r == c {
				s++
			}
			kmat[r*q+c] = s
		}
	}
	rng := rand.New(rand.NewPCG(seed, 0x5eed))
	x := make([]float64, n)
	for i := range x {
		x[i] = rng.Float64() - 0.5
	}
	rhs := make([]float64, q)
	for range 3 {
		f.solve(x)
		if q > 0 {
			for r, s := range sites {
				rhs[r] = x[s]
			}
			yv := solveSmall(kmat, rhs, q)
			for l := range q {
				c := 0.0
				for r := range q {
					c += m[l*q+r] * yv[r]
				}
				if c == 0 {
					continue
				}
				for i := range x {
					x[i] -= y[l][i] * c
				}
			}
		}
		normalize(x)
	}
	return x
}

// solveSmall solves the q×q system K·y = r by Gaussian elimination with
// partial pivoting, on copies.
func solveSmall(kmat, r []float64, q int) []float64 {
	a := append([]float64(nil), kmat...)
	y := append([]float64(nil), r...)
	for k := range q {
		p := k
		for i := k + 1; i < q; i++ {
			if math.Abs(a[i*q+k]) > math.Abs(a[p*q+k]) {
				p = i
			}
		}
		if p != k {
			for j := range q {
				a[k*q+j], a[p*q+j] = a[p*q+j], a[k*q+j]
			}
			y[k], y[p] = y[p], y[k]
		}
		if a[k*q+k] == 0 {
			a[k*q+k] = 1e-300
		}
		for i := k + 1; i < q; i++ {
			l := a[i*q+k] / a[k*q+k]
			for j := k; j < q; j++ {
				a[i*q+j] -= l * a[k*q+j]
			}
			y[i] -= l * y[k]
		}
	}
	for k := q - 1; k >= 0; k-- {
		s := y[k]
		for j := k + 1; j < q; j++ {
			s -= a[k*q+j] * y[j]
		}
		y[k] = s / a[k*q+k]
	}
	return y
}

// normalize scales x to unit length (leaving a zero vector alone).
func normalize(x []float64) {
	s := 0.0
	for _, v := range x {
		s += v * v
	}
	if s == 0 || math.IsInf(s, 0) {
		// Rescale by the largest entry first when the sum overflowed.
		m := 0.0
		for _, v := range x {
			m = max(m, math.Abs(v))
		}
		if m == 0 || math.IsInf(m, 0) {
			return
		}
		for i := range x {
			x[i] /= m
		}
		s = 0
		for _, v := range x {
			s += v * v
		}
	}
	s = 1 / math.Sqrt(s)
	for i := range x {
		x[i] *= s
	}
}

// boundaryReach is the number of sites next to an end (or to the seam of
// a periodic chain) within which a boundary state holds most of its weight:
// a tenth of the chain, at least 4 sites.
func boundaryReach(n int) int { return max(4, n/10) }

// endWeights returns the weight |x|² of a unit vector on the first and on
// the last boundaryReach sites.
func endWeights(x []float64) (first, last float64) {
	n := len(x)
	r := boundaryReach(n)
	for i := range r {
		first += x[i] * x[i]
		last += x[n-1-i] * x[n-1-i]
	}
	return first, last
}
