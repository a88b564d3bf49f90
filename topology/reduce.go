package topology

import (
	"cmp"
	"errors"
	"fmt"
	"math"
	"slices"
)

// ReducedBasis is the basis of a frequency module Z + Zθ1 + … + Zθd that
// ReduceBasis chooses, with what it was chosen from.
type ReducedBasis struct {
	// Angles are the basis elements, each folded into [0, ½] (see Fold),
	// ascending.
	Angles []float64
	// Uncertainty holds one standard uncertainty per angle, propagated
	// through the change of basis from the input uncertainties taken as
	// independent: σ'_i² = Σ_j Change[i][j]² σ_j².
	Uncertainty []float64
	// Change[i] holds the integer coefficients of Angles[i] in the input
	// basis: Angles[i] = Change[i]·θ mod 1, the sign of the row chosen so
	// that this lies in [0, ½]. Change is unimodular (det ±1), so the
	// module is unchanged.
	Change [][]int
	// Coords[l] are the integer coordinates of line l in the new basis
	// (line l = Coords[l]·Angles mod 1).
	Coords [][]int
}

// ErrLineRank is wrapped by ReduceBasis's error when the lines do not
// span every direction of the module.
var ErrLineRank = errors.New("the lines do not span the module")

// tieTol is the relative difference under which two weighted norms count
// as equal in ReduceBasis.
const tieTol = 1e-9

// ReduceBasis returns the basis of the module Z + Zθ1 + … + Zθd in which
// given lines of the module — elements named by their integer coordinates
// lines[l] in the basis theta, each with a positive weight (its power,
// say) — have the smallest coordinates.
//
// The norm. A change of basis θ' = V·θ (V unimodular) writes line l as
// c'_l = c_l·U, U = V⁻¹; column j of the new coordinate matrix is C·u_j,
// u_j the j-th column of U, and its size is the weighted norm
// q(u) = Σ_l w_l (c_l·u)². The basis chosen has the columns u_1, u_2, …
// chosen one after another as the shortest vectors (in q) that keep
// {u_1, …, u_j} a part of a basis of Z^d (their j×j minors coprime): the
// successive minima of the line lattice, found by enumeration from its LLL
// reduction (Lenstra, Lenstra & Lovász, Math. Ann. 261, 515, 1982). Equal
// norms (within a relative 10⁻⁹) are broken by the smaller folded angles,
// compared in ascending order, so the choice depends on the module and the
// lines alone: any basis of the same module, with the lines written in it,
// gives the same ReducedBasis. When the strongest lines are the
// generators of the modulation, those are the basis.
//
// ReduceBasis returns an error wrapping ErrLineRank when the lines do not
// span Z^d, and one for inputs of mismatched lengths or non-positive
// weights. d is at most 3 (the enumeration is exhaustive over a box).
func ReduceBasis(theta, thetaErr []float64, lines [][]int, weights []float64) (ReducedBasis, error) {
	d := len(theta)
	if d == 0 || d > 3 || len(thetaErr) != d || len(lines) != len(weights) {
		return ReducedBasis{}, fmt.Errorf("reducing a basis: %d angles, %d uncertainties, %d lines, %d weights: need 1 to 3 angles, one uncertainty each, one weight per line", d, len(thetaErr), len(lines), len(weights))
	}
	wmax := 0.0
	for l, w := range weights {
		if len(lines[l]) != d {
			return ReducedBasis{}, fmt.Errorf("reducing a basis: line %d has %d coordinates, want %d", l, len(lines[l]), d)
		}
		if !(w > 0) || math.IsInf(w, 0) {
			return ReducedBasis{}, fmt.Errorf("reducing a basis: line %d has weight %g, want a positive finite number", l, w)
		}
		wmax = math.Max(wmax, w)
	}
	if IntRank(lines, d) < d {
		return ReducedBasis{}, fmt.Errorf("reducing a basis: %w (rank %d of %d)", ErrLineRank, IntRank(lines, d), d)
	}
	// q(u) = Σ_l w_l (c_l·u)², with the weights scaled to at most 1.
	q := func(u []int) float64 {
		var s float64
		for l, c := range lines {
			var v float64
			for i, ci := range c {
				v += float64(ci * u[i])
			}
			s += weights[l] / wmax * v * v
		}
		return s
	}

	// LLL: a reduced basis of Z^d for q, the columns of U.
	U := make([][]int, d) // U[j] is column j
	for j := range U {
		U[j] = make([]int, d)
		U[j][j] = 1
	}
	lll(d, func(j int) []float64 {
		f := make([]float64, len(lines))
		for l, c := range lines {
			var v float64
			for i, ci := range c {
				v += float64(ci * U[j][i])
			}
			f[l] = math.Sqrt(weights[l]/wmax) * v
		}
		return f
	}, func(k, j int, t int64) {
		for i := range U[k] {
			U[k][i] -= int(t) * U[j][i]
		}
	}, func(i, j int) { U[i], U[j] = U[j], U[i] })

	// Candidates: small combinations of the reduced columns, one of ±u.
	const box = 3
	type cand struct {
		u []int
		q float64
	}
	var cands []cand
	a := make([]int, d)
	var walk func(i int)
	walk = func(i int) {
		if i == d {
			u := make([]int, d)
			for j, aj := range a {
				for r := range u {
					u[r] += aj * U[j][r]
				}
			}
			if first := firstNonzero(u); first > 0 {
				cands = append(cands, cand{u, q(u)})
			}
			return
		}
		for v := -box; v <= box; v++ {
			a[i] = v
			walk(i + 1)
		}
	}
	walk(0)
	slices.SortStableFunc(cands, func(x, y cand) int { return cmp.Compare(x.q, y.q) })

	// Greedy successive minima, every tie explored; the best outcome by
	// (norms, folded angles) stands.
	var best ReducedBasis
	var bestNorms []float64
	found := false
	var pick func(chosen [][]int, norms []float64)
	pick = func(chosen [][]int, norms []float64) {
		if len(chosen) == d {
			r := finishBasis(theta, thetaErr, lines, chosen)
			if !found || betterBasis(norms, r.Angles, bestNorms, best.Angles) {
				best, bestNorms, found = r, slices.Clone(norms), true
			}
			return
		}
		lo := math.NaN()
		for _, c := range cands {
			if !math.IsNaN(lo) && c.q > lo*(1+tieTol)+1e-300 {
				break
			}
			next := append(slices.Clone(chosen), c.u)
			if !primitive(next, d) {
				continue
			}
			lo = c.q
			pick(next, append(slices.Clone(norms), c.q))
		}
	}
	pick(nil, nil)
	if !found {
		return ReducedBasis{}, fmt.Errorf("reducing a basis: no unimodular basis among the candidates (an LLL reduction failed)")
	}
	return best, nil
}

// betterBasis orders two outcomes of the greedy choice: the smaller norms
// first (within tieTol), then the smaller folded angles.
func betterBasis(n1, a1, n2, a2 []float64) bool {
	for i := range n1 {
		if math.Abs(n1[i]-n2[i]) > tieTol*math.Max(n1[i], n2[i]) {
			return n1[i] < n2[i]
		}
	}
	for i := range a1 {
		if a1[i] != a2[i] {
			return a1[i] < a2[i]
		}
	}
	return false
}

// finishBasis turns the chosen columns U into the basis V = U⁻¹·θ, folded,
// signed and sorted, with uncertainties and the lines' new coordinates.
func finishBasis(theta, thetaErr []float64, lines [][]int, cols [][]int) ReducedBasis {
	d := len(theta)
	V := inverseUnimodular(cols, d)
	type row struct {
		v     []int
		angle float64
		err   float64
		col   []int
	}
	rows := make([]row, d)
	for i := range d {
		g := dotInt(V[i], theta)
		v := V[i]
		col := slices.Clone(cols[i])
		if t := g - math.Floor(g); t > 0.5 {
			// The sign that folds: −g mod 1 lies in [0, ½]; the line
			// coordinates on this element change sign with it.
			v = negInts(v)
			col = negInts(col)
		}
		var e float64
		for j, c := range v {
			e += float64(c*c) * thetaErr[j] * thetaErr[j]
		}
		rows[i] = row{v, Fold(g), math.Sqrt(e), col}
	}
	slices.SortStableFunc(rows, func(x, y row) int { return cmp.Compare(x.angle, y.angle) })
	r := ReducedBasis{}
	for _, w := range rows {
		r.Angles = append(r.Angles, w.angle)
		r.Uncertainty = append(r.Uncertainty, w.err)
		r.Change = append(r.Change, w.v)
	}
	for _, c := range lines {
		nc := make([]int, d)
		for j, w := range rows {
			for i := range c {
				nc[j] += c[i] * w.col[i]
			}
		}
		r.Coords = append(r.Coords, nc)
	}
	return r
}

// primitive tells whether the integer vectors us (k ≤ d of length d) are
// part of a basis of Z^d: their k×k minors are coprime.
func primitive(us [][]int, d int) bool {
	k := len(us)
	var g int64
	rowsIdx := make([]int, k)
	var walk func(i, start int)
	walk = func(i, start int) {
		if i == k {
			m := make([][]int, k)
			for a, u := range us {
				m[a] = make([]int, k)
				for b, r := range rowsIdx {
					m[a][b] = u[r]
				}
			}
			g = gcdInt64(g, absInt64(intDet(m)))
			return
		}
		for r := start; r < d; r++ {
			rowsIdx[i] = r
			walk(i+1, r+1)
		}
	}
	walk(0, 0)
	return g == 1
}

// inverseUnimodular returns V = U⁻¹ for the unimodular matrix whose
// columns are cols, by the adjugate: V[i][j] = (−1)^(i+j) M_ji / det.
func inverseUnimodular(cols [][]int, d int) [][]int {
	U := make([][]int, d) // U[r][c] = cols[c][r]
	for r := range U {
		U[r] = make([]int, d)
		for c := range d {
			U[r][c] = cols[c][r]
		}
	}
	det := intDet(U)
	V := make([][]int, d)
	for i := range V {
		V[i] = make([]int, d)
		for j := range d {
			if d == 1 {
				V[i][j] = int(det)
				continue
			}
			minor := make([][]int, 0, d-1)
			for r := range d {
				if r == j {
					continue
				}
				var row []int
				for c := range d {
					if c != i {
						row = append(row, U[r][c])
					}
				}
				minor = append(minor, row)
			}
			s := int64(1)
			if (i+j)%2 == 1 {
				s = -1
			}
			V[i][j] = int(s * intDet(minor) * det) // det = ±1: dividing is multiplying
		}
	}
	return V
}

// IntRank returns the rank of integer vectors of length d (Gaussian
// elimination over the rationals, in floating point on small integers).
func IntRank(rows [][]int, d int) int {
	a := make([][]float64, len(rows))
	for i, r := range rows {
		a[i] = make([]float64, d)
		for j, v := range r {
			a[i][j] = float64(v)
		}
	}
	rank := 0
	for col := 0; col < d && rank < len(a); col++ {
		piv := -1
		for i := rank; i < len(a); i++ {
			if math.Abs(a[i][col]) > 1e-9 {
				piv = i
				break
			}
		}
		if piv < 0 {
			continue
		}
		a[rank], a[piv] = a[piv], a[rank]
		for i := range a {
			if i != rank && a[i][col] != 0 {
				f := a[i][col] / a[rank][col]
				for j := range d {
					a[i][j] -= f * a[rank][j]
				}
			}
		}
		rank++
	}
	return rank
}

func firstNonzero(u []int) int {
	for _, v := range u {
		if v != 0 {
			return v
		}
	}
	return 0
}

func negInts(v []int) []int {
	out := make([]int, len(v))
	for i, x := range v {
		out[i] = -x
	}
	return out
}
