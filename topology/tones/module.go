package tones

import (
	"cmp"
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat/distuv"

	"phasonhull/topology"
)

// maxCell is the largest cell, in sites, whose lines at k/p every placed
// line can be tested for: the cells the decorated chains of practice have.
const maxCell = 4

// relate fills Period, Rank, Basis, BasisErr and Coeffs of r from its
// lines and returns a note for the reason ("" when there is nothing to
// add).
//
// The relations are searched by topology.FrequencyModule (LLL reduction,
// one number at a time: the lines that are rational on their own first,
// then the most precise), with the error bound
// eps = z·max σ_f over the lines searched, z the normal quantile of
// 1 − α/(2L): every one of L lines is then inside its bound with
// probability at least 1 − α, the false-alarm probability of the line
// search. The search itself keeps chance relations to one in a hundred
// by its coefficient bound. When even coefficient 1 cannot be resolved at
// that precision, or the search can no longer resolve coefficient 2, the
// least precise lines are left out; a line left out gets no coordinates,
// and Rank counts only the lines placed.
//
// The basis is then changed, unimodularly, to d lines whose coordinates
// form a unimodular matrix when there are such lines (the most precise
// ones first), so that the basis angles are frequencies one sees; their
// values are refitted by weighted least squares on every line's
// coordinates, which gives BasisErr, and folded into (0, ½].
func relate(r *Reading, alpha float64) string {
	r.Period, r.Rank = 1, 0
	L := len(r.Lines)
	if L == 0 {
		return ""
	}
	z := distuv.UnitNormal.Quantile(1 - alpha/(2*float64(L)))
	use := make([]int, L)
	for i := range use {
		use[i] = i
	}
	slices.SortStableFunc(use, func(a, b int) int { return cmp.Compare(r.Lines[a].FreqErr, r.Lines[b].FreqErr) })
	// Rational lines first: a line at c/p, tested alone against 1, needs
	// coefficient p, which the search resolves among two numbers far
	// more easily than among the rank + 1 it would meet later.
	rational := make([]bool, L)
	for i, l := range r.Lines {
		eps := z * l.FreqErr
		_, rational[i] = topology.FindRelation([]float64{1, l.Freq}, eps, topology.CoefficientBound(2, eps))
	}
	slices.SortStableFunc(use, func(a, b int) int {
		if rational[a] != rational[b] {
			if rational[a] {
				return -1
			}
			return 1
		}
		return 0
	})
	// Keep lines while the search at their precision can still resolve
	// coefficient 2 (a second harmonic, a cell of two) among 1 and up to
	// three other numbers, and coefficient maxCell for the line alone
	// against 1 (a cell of up to maxCell sites): a line coarser than that
	// would raise the rank by a relation it cannot see.
	for k := 1; k <= len(use); k++ {
		eps := z * r.Lines[use[k-1]].FreqErr
		if topology.CoefficientBound(min(k+1, 4), eps) < 2 || topology.CoefficientBound(2, eps) < maxCell {
			use = use[:k-1]
			break
		}
	}
	var mod *topology.Module
	for len(use) > 0 {
		x := make([]float64, len(use))
		var eps float64
		for i, j := range use {
			x[i] = r.Lines[j].Freq
			eps = math.Max(eps, z*r.Lines[j].FreqErr)
		}
		var err error
		if mod, err = topology.FrequencyModule(x, eps); err == nil {
			break
		}
		mod = nil
		use = use[:len(use)-1]
	}
	r.Coeffs = make([][]int, L)
	if mod == nil {
		return "no line is precise enough to test integer relations, so the period and rank are unknown"
	}
	q, d := mod.Denominator, mod.Rank-1
	r.Period, r.Rank = q, d
	// coords[i] = (c0, c_1 … c_d) of line use[i] in the module's basis.
	coords := make([][]int, len(use))
	for i := range use {
		coords[i] = slices.Clone(mod.Coords[i])
	}
	var note string
	if dropped := L - len(use); dropped > 0 {
		note = fmt.Sprintf("%d weak line(s) too imprecise to place in the module, which may raise the rank", dropped)
	}
	if d > 0 {
		coords = lineBasis(coords, d)
		basis, basisErr, ok := fitBasis(r, use, coords, q, d)
		if !ok {
			basis, basisErr = slices.Clone(mod.Basis[1:]), make([]float64, d)
			for j := range basisErr {
				basisErr[j] = math.NaN()
			}
		}
		fold(basis, coords, q)
		r.Basis, r.BasisErr = basis, basisErr
	}
	bad := 0
	for i, j := range use {
		c := coords[i]
		c[0] = centred(c[0], q)
		r.Coeffs[j] = c
		if !consistent(r, j, c, z) {
			bad++
		}
	}
	if bad > 0 {
		if note != "" {
			note += "; "
		}
		note += fmt.Sprintf("%d line(s) off their module coordinates by more than their errors", bad)
	}
	return note
}

// centred returns v modulo q in (−q/2, q/2].
func centred(v, q int) int {
	v = ((v % q) + q) % q
	if 2*v > q {
		v -= q
	}
	return v
}

// lineBasis changes the basis to d of the lines when some d of them, the
// most precise first, have a unimodular matrix of angle coordinates, and
// returns the coordinates in the new basis (coords unchanged otherwise).
// With g_k = c0_k/q + M_k·h for the chosen lines, h = M⁻¹(g − c0_M/q), so
// line i has angle coordinates C_i·M⁻¹ and rational part
// c0_i − C_i·M⁻¹·c0_M, all integers since M⁻¹ is.
func lineBasis(coords [][]int, d int) [][]int {
	pick := make([]int, d)
	var try func(start, depth int) bool
	try = func(start, depth int) bool {
		if depth == d {
			m := make([][]int, d)
			for a, i := range pick {
				m[a] = coords[i][1:]
			}
			return abs(det(m)) == 1
		}
		for i := start; i < len(coords); i++ {
			pick[depth] = i
			if try(i+1, depth+1) {
				return true
			}
		}
		return false
	}
	if !try(0, 0) {
		return coords
	}
	m := make([][]int, d)
	c0m := make([]int, d)
	for a, i := range pick {
		m[a], c0m[a] = coords[i][1:], coords[i][0]
	}
	minv := adjugate(m) // det = ±1: the inverse is ± the adjugate
	if det(m) < 0 {
		for _, row := range minv {
			for j := range row {
				row[j] = -row[j]
			}
		}
	}
	out := make([][]int, len(coords))
	for i, c := range coords {
		nc := make([]int, d+1)
		nc[0] = c[0]
		for k := range d { // (C_i·M⁻¹)_k
			var s int
			for j := range d {
				s += c[1+j] * minv[j][k]
			}
			nc[1+k] = s
			nc[0] -= s * c0m[k]
		}
		out[i] = nc
	}
	return out
}

// fitBasis returns the basis values that best reproduce the lines,
// f_i − c0_i/q = Σ_j c_ij·b_j, weighted by 1/σ_i², and their standard
// errors from (XᵀWX)⁻¹.
func fitBasis(r *Reading, use []int, coords [][]int, q, d int) ([]float64, []float64, bool) {
	xtx := mat.NewSymDense(d, nil)
	xty := mat.NewVecDense(d, nil)
	for i, j := range use {
		w := 1 / (r.Lines[j].FreqErr * r.Lines[j].FreqErr)
		y := r.Lines[j].Freq - float64(coords[i][0])/float64(q)
		for a := range d {
			ca := float64(coords[i][1+a])
			xty.SetVec(a, xty.AtVec(a)+w*ca*y)
			for b := a; b < d; b++ {
				xtx.SetSym(a, b, xtx.At(a, b)+w*ca*float64(coords[i][1+b]))
			}
		}
	}
	var chol mat.Cholesky
	if !chol.Factorize(xtx) {
		return nil, nil, false
	}
	var b mat.VecDense
	if err := chol.SolveVecTo(&b, xty); err != nil {
		return nil, nil, false
	}
	var cov mat.SymDense
	if err := chol.InverseTo(&cov); err != nil {
		return nil, nil, false
	}
	basis, errs := make([]float64, d), make([]float64, d)
	for a := range d {
		basis[a] = b.AtVec(a)
		errs[a] = math.Sqrt(cov.At(a, a))
	}
	return basis, errs, true
}

// fold reduces each basis angle into (0, ½] and rewrites the coordinates
// to match: b = b' + k adds q·k·c_ij to c0_i, and b' = 1 − b” adds
// q·c_ij to c0_i and negates c_ij.
func fold(basis []float64, coords [][]int, q int) {
	for j, b := range basis {
		k := math.Floor(b)
		b -= k
		for _, c := range coords {
			c[0] += q * int(k) * c[1+j]
		}
		if b > 0.5 {
			b = 1 - b
			for _, c := range coords {
				c[0] += q * c[1+j]
				c[1+j] = -c[1+j]
			}
		}
		basis[j] = b
	}
}

// consistent reports whether line j sits at its coordinates c within z
// standard errors, the error of the line and of the basis combined (the
// basis errors taken as independent, a slight overstatement).
func consistent(r *Reading, j int, c []int, z float64) bool {
	v := float64(c[0]) / float64(r.Period)
	vr := r.Lines[j].FreqErr * r.Lines[j].FreqErr
	for a, b := range r.Basis {
		v += float64(c[1+a]) * b
		e := float64(c[1+a]) * r.BasisErr[a]
		vr += e * e
	}
	dv := r.Lines[j].Freq - v
	dv -= math.Round(dv)
	return !(math.Abs(dv) > z*math.Sqrt(vr))
}

func abs(v int) int {
	if v < 0 {
		return -v
	}
	return v
}

// det returns the determinant of a small integer matrix, by cofactors.
func det(m [][]int) int {
	switch len(m) {
	case 0:
		return 1
	case 1:
		return m[0][0]
	}
	var s int
	for j := range m {
		s += (1 - 2*(j%2)) * m[0][j] * det(minor(m, 0, j))
	}
	return s
}

func minor(m [][]int, r, c int) [][]int {
	out := make([][]int, 0, len(m)-1)
	for i, row := range m {
		if i == r {
			continue
		}
		nr := make([]int, 0, len(m)-1)
		nr = append(nr, row[:c]...)
		nr = append(nr, row[c+1:]...)
		out = append(out, nr)
	}
	return out
}

// adjugate returns the transpose of the cofactor matrix: m·adj(m) =
// det(m)·I.
func adjugate(m [][]int) [][]int {
	n := len(m)
	out := make([][]int, n)
	for i := range out {
		out[i] = make([]int, n)
	}
	if n == 1 {
		out[0][0] = 1
		return out
	}
	for i := range n {
		for j := range n {
			out[j][i] = (1 - 2*((i+j)%2)) * det(minor(m, i, j))
		}
	}
	return out
}
