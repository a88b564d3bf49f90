package topology

import (
	"math"
	"slices"
)

// Fold reduces an angle, in turns, to its representative in [0, ½] under
// the symmetries θ → θ + 1 and θ → −θ. Both leave the frequency module
// Z + Zθ unchanged, and a chain read backwards or shifted by a whole turn
// per site is the same chain, so the folded angle is what a hull
// determines. Fold returns NaN for non-finite input.
func Fold(theta float64) float64 {
	if math.IsNaN(theta) || math.IsInf(theta, 0) {
		return math.NaN()
	}
	t := theta - math.Floor(theta)
	if t >= 1 { // theta a tiny negative number: t rounds up to 1
		t = 0
	}
	if t > 0.5 {
		t = 1 - t
	}
	return t
}

// CanonicalBasis returns a basis of the frequency module Z + Zθ1 + ... +
// Zθd with every angle folded into [0, ½] (see Fold) and sorted ascending.
//
// Folding each generator separately is a unimodular change of basis, so the
// result generates the same module as angles. It is a convenient normal form,
// not a unique one: for two or more angles the same module has other bases
// (θ1, θ1 + θ2 for θ1, θ2, say) that are equally correct. Compare modules
// with SameModule, never by comparing bases entry by entry.
func CanonicalBasis(angles []float64) []float64 {
	out := make([]float64, len(angles))
	for i, a := range angles {
		out[i] = Fold(a)
	}
	slices.Sort(out)
	return out
}

// SameModule reports whether {1, a...} and {1, b...} generate the same
// subgroup of the reals, searching integer coefficients up to maxCoeff in
// magnitude and accepting a value within tol of an integer combination.
//
// The two lists are taken as bases of their modules (their entries and 1
// rationally independent), so they must have the same length. Each b_i is
// written b_i ≈ n_i + Σ_j M_ij a_j with integers |M_ij| ≤ maxCoeff and
// |b_i − n_i − Σ_j M_ij a_j| ≤ tol; the modules agree when some choice of
// these representations gives a unimodular matrix M (det M = ±1), because
// the full change of basis [[1, 0], [n, M]] then has an integer inverse.
func SameModule(a, b []float64, maxCoeff int, tol float64) bool {
	d := len(a)
	if len(b) != d || tol < 0 || math.IsNaN(tol) {
		return false
	}
	if d == 0 {
		return true
	}
	if maxCoeff < 1 {
		return false
	}
	// cands[i] holds every row M_i that represents b_i within tol.
	cands := make([][][]int, d)
	for i, bi := range b {
		forEachCoeff(d, maxCoeff, func(m []int) {
			s := bi - dotInt(m, a)
			if math.Abs(s-math.Round(s)) <= tol {
				cands[i] = append(cands[i], slices.Clone(m))
			}
		})
		if len(cands[i]) == 0 {
			return false
		}
	}
	// Try every combination of candidate rows (normally one each).
	found := false
	rows := make([][]int, d)
	forEachPick(d, func(i int) int { return len(cands[i]) }, func(pick []int) bool {
		for i := range rows {
			rows[i] = cands[i][pick[i]]
		}
		if det := intDet(rows); det == 1 || det == -1 {
			found = true
		}
		return !found
	})
	return found
}

// forEachPick calls fn with every choice pick of one index per slot
// i < d, pick[i] < size(i) (the first slot varying fastest), until fn
// returns false. Every size must be positive.
func forEachPick(d int, size func(i int) int, fn func(pick []int) bool) {
	pick := make([]int, d)
	for {
		if !fn(pick) {
			return
		}
		i := 0
		for ; i < d; i++ {
			pick[i]++
			if pick[i] < size(i) {
				break
			}
			pick[i] = 0
		}
		if i == d {
			return
		}
	}
}

// forEachCoeff calls fn with every integer vector in {−max, ..., max}^d, in
// lexicographic order. fn must not keep m: it is reused.
func forEachCoeff(d, max int, fn func(m []int)) {
	m := make([]int, d)
	for i := range m {
		m[i] = -max
	}
	for {
		fn(m)
		i := d - 1
		for ; i >= 0; i-- {
			if m[i] < max {
				m[i]++
				break
			}
			m[i] = -max
		}
		if i < 0 {
			return
		}
	}
}

// dotInt returns Σ m_i x_i.
func dotInt(m []int, x []float64) float64 {
	var s float64
	for i, mi := range m {
		s += float64(mi) * x[i]
	}
	return s
}

// intDet returns the determinant of a square integer matrix by Bareiss'
// fraction-free elimination (every intermediate is itself a minor, so the
// divisions are exact).
func intDet(rows [][]int) int64 {
	n := len(rows)
	a := make([][]int64, n)
	for i, r := range rows {
		a[i] = make([]int64, n)
		for j, v := range r {
			a[i][j] = int64(v)
		}
	}
	sign, prev := int64(1), int64(1)
	for k := 0; k < n-1; k++ {
		if a[k][k] == 0 {
			p := k + 1
			for p < n && a[p][k] == 0 {
				p++
			}
			if p == n {
				return 0
			}
			a[k], a[p] = a[p], a[k]
			sign = -sign
		}
		for i := k + 1; i < n; i++ {
			for j := k + 1; j < n; j++ {
				a[i][j] = (a[i][j]*a[k][k] - a[i][k]*a[k][j]) / prev
			}
		}
		prev = a[k][k]
	}
	return sign * a[n-1][n-1]
}
