package topology

import (
	"cmp"
	"math"
	"slices"
)

// PlaneModuleDistance returns how far the rotation matrices A and B (d rows
// of 2 numbers each, in turns per lattice step) are from describing the
// same hull: the smallest tolerance ε such that
//
//	B = V·A·U + N + E,  max |E_ij| ≤ ε,
//
// for some V ∈ GL(d, Z) with entries up to maxCoeff in magnitude (another
// choice of torus coordinates), U ∈ GL(2, Z) with entries in {−1, 0, 1}
// (another reduced basis of the same lattice: its symmetries and
// orderings) and N integer. Every such change of basis leaves the Fourier
// module Z² + Aᵀ·Z^d of the displacement field, and so the hull, as it is;
// it is the planar SameModule. It returns +Inf when A and B have
// different numbers of rows or no such representation exists.
func PlaneModuleDistance(A, B [][]float64, maxCoeff int) float64 {
	d := len(A)
	if len(B) != d || maxCoeff < 1 {
		return math.Inf(1)
	}
	if d == 0 {
		return 0
	}
	best := math.Inf(1)
	for code := range 81 {
		u := [2][2]int{{code%3 - 1, code/3%3 - 1}, {code/9%3 - 1, code/27 - 1}}
		if det := u[0][0]*u[1][1] - u[0][1]*u[1][0]; det != 1 && det != -1 {
			continue
		}
		// The rows of A·U, as two lists of d numbers (one per column).
		au := make([][2]float64, d)
		for i, row := range A {
			for j := range 2 {
				au[i][j] = row[0]*float64(u[0][j]) + row[1]*float64(u[1][j])
			}
		}
		best = math.Min(best, rowsDistance(au, B, maxCoeff))
	}
	return best
}

// rowsDistance is PlaneModuleDistance for a fixed U: each row of B is
// written as an integer combination of the rows of a plus an integer
// vector, keeping for each row its few closest combinations, and the
// unimodular choice with the smallest largest error wins.
func rowsDistance(a [][2]float64, B [][]float64, maxCoeff int) float64 {
	d := len(a)
	const keep = 4
	type cand struct {
		m   []int
		err float64
	}
	cands := make([][]cand, d)
	for i, b := range B {
		forEachCoeff(d, maxCoeff, func(m []int) {
			var e float64
			for j := range 2 {
				s := b[j]
				for k, c := range m {
					s -= float64(c) * a[k][j]
				}
				e = math.Max(e, math.Abs(s-math.Round(s)))
			}
			cands[i] = append(cands[i], cand{slices.Clone(m), e})
		})
		slices.SortStableFunc(cands[i], func(x, y cand) int { return cmp.Compare(x.err, y.err) })
		cands[i] = cands[i][:min(keep, len(cands[i]))]
	}
	best := math.Inf(1)
	rows := make([][]int, d)
	forEachPick(d, func(i int) int { return len(cands[i]) }, func(pick []int) bool {
		e := 0.0
		for i := range rows {
			rows[i] = cands[i][pick[i]].m
			e = math.Max(e, cands[i][pick[i]].err)
		}
		if det := intDet(rows); (det == 1 || det == -1) && e < best {
			best = e
		}
		return true
	})
	return best
}
