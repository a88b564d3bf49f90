package topology

import (
	"cmp"
	"errors"
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/mat"
)

// Parameters of the integer-relation search.
const (
	// falseRelations is α, the expected number of chance relations per
	// search among generic numbers that CoefficientBound allows.
	falseRelations = 0.01
	// lllDelta is the Lovász constant of the reduction.
	lllDelta = 0.75
	// maxCoefficient bounds every integer the bookkeeping holds, far
	// inside int64, so that products never overflow.
	maxCoefficient = 1 << 40
)

// Relation is an integer relation Σ_i Coeffs[i]·x_i ≈ 0 among real
// numbers x_i.
type Relation struct {
	// Coeffs are the integer coefficients, without a common factor.
	Coeffs []int
	// Residual is |Σ_i Coeffs[i]·x_i|.
	Residual float64
}

// CoefficientBound returns B, the largest coefficient magnitude worth
// searching for a relation among m numbers each known to within eps.
//
// Among generic numbers, the (2B+1)^m coefficient vectors of magnitude at
// most B give sums Σ c_i x_i spread over a range of order B·m, of which a
// relation's error window ε‖c‖₁ is a fraction of about ε; so about
// (2B+1)^m·ε of them fall within it by chance. B is the largest value with
// (2B+1)^m·ε ≤ α = 0.01: a chance relation in about one search of a hundred
// (B^m·ε ≪ 1). Coarser precision or more numbers leave smaller
// coefficients resolvable; CoefficientBound returns 0 when not even B = 1
// is.
func CoefficientBound(m int, eps float64) int {
	if m < 1 || !(eps > 0) {
		return 0
	}
	b := (math.Pow(falseRelations/eps, 1/float64(m)) - 1) / 2
	return int(math.Min(math.Floor(b), 1<<20))
}

// FindRelation looks for an integer relation Σ c_i x_i ≈ 0 with |c_i| ≤
// bound, among numbers each known to within eps: a relation the true
// numbers satisfy exactly then has residual at most eps·Σ|c_i|, and that is
// what is accepted. It returns the relation with the smallest coefficients
// found, its sign chosen so that the last non-zero coefficient is positive.
//
// The search is LLL reduction (Lenstra, Lenstra & Lovász, Math. Ann. 261,
// 515, 1982) of the lattice spanned by the rows of [I | C·x], C = 1/eps: a
// vector (c, C·Σ c_i x_i) of it is short exactly when c is small and the
// residual within about eps·|c|, so the reduced basis holds the small
// relations when there are any. Pass bound = CoefficientBound(len(x), eps)
// to keep chance relations rare.
func FindRelation(x []float64, eps float64, bound int) (Relation, bool) {
	errs := make([]float64, len(x))
	for i := range errs {
		errs[i] = eps
	}
	c, res, ok := findRelation(x, errs, bound, -1)
	if !ok {
		return Relation{}, false
	}
	return Relation{Coeffs: toInts(c), Residual: res}, true
}

// findRelation is FindRelation with an error bound per number; when need
// ≥ 0 only relations with a non-zero coefficient at index need count.
func findRelation(x, errs []float64, bound, need int) ([]int64, float64, bool) {
	m := len(x)
	if m < 2 || bound < 1 {
		return nil, 0, false
	}
	scale := 0.0
	for _, e := range errs {
		scale = math.Max(scale, e)
	}
	if !(scale > 0) {
		scale = 1e-15
	}
	scale = 1 / scale
	b := make([][]int64, m)
	for i := range b {
		b[i] = make([]int64, m)
		b[i][i] = 1
	}
	lllReduce(b, x, scale)
	var best []int64
	bestRes := 0.0
	for _, c := range b {
		if need >= 0 && c[need] == 0 {
			continue
		}
		top, tol := int64(0), 0.0
		var s, mag float64
		for i, ci := range c {
			top = max(top, absInt64(ci))
			s += float64(ci) * x[i]
			mag += math.Abs(float64(ci) * x[i])
			tol += math.Abs(float64(ci)) * errs[i]
		}
		// Rounding of the sum itself is allowed on top of the errors.
		tol += 4e-16 * mag
		if top == 0 || top > int64(bound) || math.Abs(s) > tol {
			continue
		}
		if best == nil || maxAbs(c) < maxAbs(best) || (maxAbs(c) == maxAbs(best) && math.Abs(s) < bestRes) {
			best, bestRes = slices.Clone(c), math.Abs(s)
		}
	}
	if best == nil {
		return nil, 0, false
	}
	for i := len(best) - 1; i >= 0; i-- {
		if best[i] != 0 {
			if best[i] < 0 {
				for j := range best {
					best[j] = -best[j]
				}
			}
			break
		}
	}
	return best, bestRes, true
}

// lllReduce LLL-reduces, in place, the lattice basis whose rows are the
// integer vectors b_i extended by the real coordinate scale·(b_i·x).
func lllReduce(b [][]int64, x []float64, scale float64) {
	m := len(b)
	lll(m, func(i int) []float64 {
		f := make([]float64, m+1)
		var s float64
		for l, v := range b[i] {
			f[l] = float64(v)
			s += float64(v) * x[l]
		}
		f[m] = scale * s
		return f
	}, func(k, j int, q int64) {
		for l := range b[k] {
			b[k][l] -= q * b[j][l]
		}
	}, func(i, j int) { b[i], b[j] = b[j], b[i] })
}

// lll runs the LLL reduction (Lenstra, Lenstra & Lovász, Math. Ann. 261,
// 515, 1982) of n vectors given by vec, through the two steps it needs:
// sub(k, j, q) replaces vector k by vector k − q·vector j, and swap
// exchanges two vectors.
//
// The Gram–Schmidt data are recomputed in floating point from the vectors
// at every step, so rounding does not accumulate; the dimension here is a
// handful.
func lll(n int, vec func(i int) []float64, sub func(k, j int, q int64), swap func(i, j int)) {
	k := 1
	for iter := 0; k < n && iter < 1000*n*n; iter++ {
		f := make([][]float64, n)
		for i := range f {
			f[i] = vec(i)
		}
		mu, bs := gramSchmidt(f)
		// Size reduction: |μ_kj| ≤ ½ for j < k.
		for j := k - 1; j >= 0; j-- {
			q := math.Round(mu[k][j])
			if q == 0 || math.Abs(q) > maxCoefficient {
				continue
			}
			sub(k, j, int64(q))
			for l := 0; l < j; l++ {
				mu[k][l] -= q * mu[j][l]
			}
			mu[k][j] -= q
		}
		// Lovász condition: |b*_k|² ≥ (δ − μ²_k,k−1)|b*_k−1|², else swap.
		if bs[k] < (lllDelta-mu[k][k-1]*mu[k][k-1])*bs[k-1] {
			swap(k, k-1)
			k = max(k-1, 1)
		} else {
			k++
		}
	}
}

// reduceBasis changes the module basis so that the coordinates of the
// numbers seen so far are small: an LLL reduction of the columns of the
// coordinate matrix (one column per basis element, independent because the
// numbers generate the module). The relations of later numbers are then
// written with small coefficients too, whatever combinations of the first
// numbers the basis came from. coords is changed in place and e returned
// changed.
func reduceBasis(e, coords [][]int64) [][]int64 {
	m := len(e)
	if m < 2 {
		return e
	}
	u := newUnimodular(m)
	lll(m, func(j int) []float64 {
		f := make([]float64, len(coords))
		for l, c := range coords {
			f[l] = float64(c[j])
		}
		return f
	}, func(k, j int, q int64) {
		// Column k −= q·column j: the basis element j becomes
		// h_j + q·h_k.
		for _, c := range coords {
			c[k] -= q * c[j]
		}
		u.addRow(j, k, q)
	}, func(i, j int) {
		for _, c := range coords {
			c[i], c[j] = c[j], c[i]
		}
		u.swap(i, j)
	})
	return u.apply(e)
}

// gramSchmidt returns the Gram–Schmidt coefficients μ_ij (j < i) of the
// rows of f and the squared norms of the orthogonalised rows.
func gramSchmidt(f [][]float64) (mu [][]float64, bs []float64) {
	m := len(f)
	star := make([][]float64, m)
	mu = make([][]float64, m)
	bs = make([]float64, m)
	for i := range f {
		mu[i] = make([]float64, m)
		star[i] = slices.Clone(f[i])
		for j := 0; j < i; j++ {
			if bs[j] == 0 {
				continue
			}
			var d float64
			for l := range f[i] {
				d += f[i][l] * star[j][l]
			}
			mu[i][j] = d / bs[j]
			for l := range star[i] {
				star[i][l] -= mu[i][j] * star[j][l]
			}
		}
		for _, v := range star[i] {
			bs[i] += v * v
		}
	}
	return mu, bs
}

// Module describes the Z-module generated by 1 and a list of measured
// numbers (factor frequencies, integrated densities of states).
type Module struct {
	// Rank is the rank of the module: 1 when every number is rational, 2
	// for Z + Zθ, and so on.
	Rank int
	// Denominator is q, with Q ∩ module = (1/q)Z: the least common
	// denominator of the rational numbers in the module.
	Denominator int
	// Basis is a basis of the module: Basis[0] = 1/q exactly, and
	// Basis[1:] the other generators, estimated by least squares from the
	// numbers, reduced modulo 1/q and folded to [0, 1/(2q)] (θ → −θ),
	// ascending. For Z + Zθ it is {1, θ} with θ in [0, ½], the
	// folded angle of Fold. For rank 3 and more the form is not unique;
	// compare modules with SameModule.
	Basis []float64
	// Coords[i] holds the integer coordinates of the i-th number in
	// Basis, and Residuals[i] = |x_i − Coords[i]·Basis|.
	Coords    [][]int
	Residuals []float64
	// Relations lists the integer relations found, one per number that
	// did not raise the rank, in the order found, over (1, x_1, …, x_k):
	// Coeffs[0] multiplies 1.
	Relations []Relation
	// Bounds[i] is the coefficient bound the i-th number was tested with:
	// CoefficientBound for the current rank plus one.
	Bounds []int
}

// ErrPrecision is wrapped by FrequencyModule's error when the precision is
// too coarse to test any relation.
var ErrPrecision = errors.New("the precision is too coarse to resolve any integer relation")

// FrequencyModule finds the rank and a basis of the Z-module generated by 1
// and the numbers x, each measured to within eps (an error bound: for
// frequencies counted over N sites of a linearly recurrent word, a few
// times 1/N).
//
// The numbers are taken one at a time, in the order given. Each is tested
// against the basis found so far, h_1 … h_m, for an integer relation
// c_1 h_1 + … + c_m h_m + c x ≈ 0 (FindRelation, with |c| at most
// CoefficientBound(m+1, ε_max), ε_max the largest error bound among the
// m+1 numbers). Without one, x joins the basis and the rank grows. With
// one, x lies in the rational span of the basis and the module generated
// by the h_j and x has the same rank: a basis of it comes from a
// unimodular change of coordinates that takes c to (0, …, 0, ±1) (Euclid's
// algorithm on the columns), after which the last new generator is
// ±c·(h, x) = 0. After each step the basis is changed (unimodularly) to
// make the integer coordinates of the numbers seen so far small, an LLL
// reduction of the columns of their coordinate matrix, so that later
// relations have small coefficients too; and the values of the basis
// elements are the least-squares fit of all those numbers, with error
// bounds carried from theirs. Finally the basis is put in the form
// described at Module.
//
// Testing one number at a time keeps the lattices small (rank + 1
// vectors), and with them the coefficients that can be resolved large: a
// rank-2 module tests relations among three numbers, which at eps = 10⁻⁶
// resolves coefficients up to 10, a rank-3 module among four, up to 4.
//
// A relation missed because its coefficients exceed the bound raises the
// rank spuriously; Bounds records what was tested. This happens when the
// first numbers that raise the rank span only a sublattice of large index
// d of the module: a later number then needs coefficients about d times
// its own. Give the simplest numbers first — letter frequencies before
// those of longer factors. FrequencyModule returns
// an error for a non-finite number or eps, and one wrapping ErrPrecision
// when eps is so coarse that not even a rational x = a/b with |a|, |b| = 1
// could be tested.
func FrequencyModule(x []float64, eps float64) (*Module, error) {
	if !(eps > 0) || math.IsInf(eps, 0) {
		return nil, fmt.Errorf("frequency module: precision %v must be a positive number", eps)
	}
	for i, v := range x {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("frequency module: number %d is %v", i+1, v)
		}
	}
	if CoefficientBound(2, eps) < 1 {
		return nil, fmt.Errorf("frequency module: precision %g: %w", eps, ErrPrecision)
	}
	k := len(x)
	g := append([]float64{1}, x...) // the generators
	gErr := make([]float64, k+1)    // their error bounds (1 is exact)
	for i := 1; i <= k; i++ {
		gErr[i] = eps
	}
	// The basis is h_j = Σ_l e[j][l]·g_l, and generator l is
	// Σ_j coords[l][j]·h_j.
	e := [][]int64{unit(k+1, 0)}
	coords := [][]int64{{1}}
	mod := &Module{}
	values := func() ([]float64, []float64, error) {
		return estimate(coords, g[:len(coords)], gErr[:len(coords)])
	}
	for i := 1; i <= k; i++ {
		m := len(e)
		h, he, err := values()
		if err != nil {
			return nil, err
		}
		bound := CoefficientBound(m+1, slices.Max(append(he, eps)))
		mod.Bounds = append(mod.Bounds, bound)
		c, _, ok := findRelation(append(h, g[i]), append(he, eps), bound, m)
		if !ok {
			for l := range coords {
				coords[l] = append(coords[l], 0)
			}
			e = append(e, unit(k+1, i))
			coords = append(coords, unit(m+1, m))
			e = reduceBasis(e, coords)
			continue
		}
		// The relation over the generators: Σ_j c_j e_j + c_m·(unit i).
		r := make([]int64, k+1)
		for j := 0; j < m; j++ {
			for l := range r {
				r[l] += c[j] * e[j][l]
			}
		}
		r[i] += c[m]
		var res float64
		for l, v := range r {
			res += float64(v) * g[l]
		}
		mod.Relations = append(mod.Relations, Relation{Coeffs: toInts(r), Residual: math.Abs(res)})

		u := newUnimodular(m + 1)
		u.clearRow(c, m)
		ext := append(slices.Clone(e), unit(k+1, i))
		e = u.apply(ext)[:m]
		for l := range coords {
			coords[l] = u.coords(append(coords[l], 0))[:m]
		}
		coords = append(coords, u.coords(unit(m+1, m))[:m])
		e = reduceBasis(e, coords)
		if err := checkSize(e, coords); err != nil {
			return nil, err
		}
	}

	// Canonical form: 1 = q·(a'·h) with a' primitive; make a'·h a basis
	// element, then reduce and fold the others modulo it.
	m := len(e)
	a := coords[0]
	q := int64(0)
	for _, v := range a {
		q = gcdInt64(q, absInt64(v))
	}
	u := newUnimodular(m)
	prim := make([]int64, m)
	for j, v := range a {
		prim[j] = v / q
	}
	// Generator 0 is 1 = q·Σ prim_j h_j. clearRow takes the coefficient
	// row prim to (0, …, 0, ±1) by column operations; in the new basis 1
	// then reads q·(±h'_m−1), so h'_m−1 = ±1/q.
	u.clearRow(prim, m-1)
	e = u.apply(e)
	for l := range coords {
		coords[l] = u.coords(coords[l])
	}
	u = newUnimodular(m)
	if coords[0][m-1] < 0 {
		u.negate(m - 1)
	}
	u.swap(0, m-1)
	e, coords = u.apply(e), u.applyCoords(coords)
	h, _, err := values()
	if err != nil {
		return nil, err
	}
	h[0] = 1 / float64(q)
	// Reduce modulo 1/q and fold to [0, 1/(2q)].
	u = newUnimodular(m)
	for j := 1; j < m; j++ {
		t := int64(math.Floor(h[j] * float64(q)))
		u.addRow(j, 0, -t)
		h[j] -= float64(t) / float64(q)
		if h[j] > 1/(2*float64(q)) {
			u.negate(j)
			u.addRow(j, 0, 1)
			h[j] = 1/float64(q) - h[j]
		}
	}
	e, coords = u.apply(e), u.applyCoords(coords)
	order := make([]int, m-1)
	for j := range order {
		order[j] = j + 1
	}
	slices.SortStableFunc(order, func(p, r int) int { return cmp.Compare(h[p], h[r]) })
	perm := append([]int{0}, order...)
	if err := checkSize(e, coords); err != nil {
		return nil, err
	}
	mod.Rank, mod.Denominator = m, int(q)
	// Basis[0] is 1/q exactly; the others are the least-squares values in
	// the final basis.
	hv, _, err := values()
	if err != nil {
		return nil, err
	}
	mod.Basis = make([]float64, m)
	mod.Basis[0] = 1 / float64(q)
	for j := 1; j < m; j++ {
		mod.Basis[j] = hv[perm[j]]
	}
	for l := 1; l <= k; l++ {
		cs := make([]int, m)
		var s float64
		for j, p := range perm {
			cs[j] = int(coords[l][p])
			s += float64(cs[j]) * mod.Basis[j]
		}
		mod.Coords = append(mod.Coords, cs)
		mod.Residuals = append(mod.Residuals, math.Abs(x[l-1]-s))
	}
	return mod, nil
}

// estimate returns the values of the basis elements that best reproduce
// the numbers seen so far, g_l ≈ Σ_j coords[l][j]·h_j, by least squares
// weighted by the numbers' error bounds, and a bound on each value's
// error: h = P·g with P the weighted pseudo-inverse, so
// |δh_j| ≤ Σ_l |P_jl|·gErr_l. The exact number 1 (error 0) gets an error
// a thousand times below the smallest other one.
func estimate(coords [][]int64, g, gErr []float64) (h, he []float64, err error) {
	L, m := len(coords), len(coords[0])
	floor := math.Inf(1)
	for _, e := range gErr {
		if e > 0 {
			floor = math.Min(floor, e)
		}
	}
	if math.IsInf(floor, 1) {
		floor = 1
	}
	floor *= 1e-3
	w := make([]float64, L)
	a := mat.NewDense(L, m, nil)
	for l, c := range coords {
		w[l] = 1 / math.Max(gErr[l], floor)
		for j, v := range c {
			a.Set(l, j, w[l]*float64(v))
		}
	}
	eye := mat.NewDiagDense(L, nil)
	for l := range L {
		eye.SetDiag(l, 1)
	}
	var qr mat.QR
	qr.Factorize(a)
	var pinv mat.Dense // m×L: the least-squares solution for each unit right-hand side
	if err := qr.SolveTo(&pinv, false, eye); err != nil {
		// The coordinates have full column rank by construction: this
		// is a numerically degenerate coordinate matrix.
		return nil, nil, fmt.Errorf("frequency module: estimating the basis: %w", err)
	}
	h, he = make([]float64, m), make([]float64, m)
	for j := range m {
		for l := range L {
			p := pinv.At(j, l) * w[l]
			h[j] += p * g[l]
			he[j] += math.Abs(p) * gErr[l]
		}
	}
	return h, he, nil
}

// unimodular is an integer change of basis h' = W·h with V = W⁻¹, built
// from elementary steps: W·V = I is kept exactly.
type unimodular struct{ w, v [][]int64 }

func newUnimodular(m int) *unimodular {
	u := &unimodular{w: make([][]int64, m), v: make([][]int64, m)}
	for i := range m {
		u.w[i], u.v[i] = unit(m, i), unit(m, i)
	}
	return u
}

// addRow makes new element dst = dst + t·src. A relation's coefficients
// c (c·h = 0) become c·V: c_src −= t·c_dst.
func (u *unimodular) addRow(dst, src int, t int64) {
	if t == 0 {
		return
	}
	for l := range u.w[dst] {
		u.w[dst][l] += t * u.w[src][l]
	}
	for l := range u.v {
		u.v[l][src] -= t * u.v[l][dst]
	}
}

// negate makes new element j = −j.
func (u *unimodular) negate(j int) {
	for l := range u.w[j] {
		u.w[j][l] = -u.w[j][l]
	}
	for l := range u.v {
		u.v[l][j] = -u.v[l][j]
	}
}

// swap exchanges new elements a and b.
func (u *unimodular) swap(a, b int) {
	u.w[a], u.w[b] = u.w[b], u.w[a]
	for l := range u.v {
		u.v[l][a], u.v[l][b] = u.v[l][b], u.v[l][a]
	}
}

// clearRow applies column steps (Euclid's algorithm) that take the
// coefficient row c, which must have no common factor, to ±1 at index
// last and 0 elsewhere. c is modified.
func (u *unimodular) clearRow(c []int64, last int) {
	for {
		p := -1
		for j, v := range c {
			if v != 0 && (p < 0 || absInt64(v) < absInt64(c[p])) {
				p = j
			}
		}
		done := true
		for j, v := range c {
			if j != p && v != 0 {
				done = false
				t := v / c[p]
				u.addRow(p, j, t) // c_j −= t·c_p
				c[j] -= t * c[p]
			}
		}
		if done {
			if p != last {
				u.swap(p, last)
				c[p], c[last] = c[last], c[p]
			}
			return
		}
	}
}

// apply returns W·rows: the new basis elements as combinations of
// whatever the old ones were combinations of.
func (u *unimodular) apply(rows [][]int64) [][]int64 {
	out := make([][]int64, len(u.w))
	for i, wr := range u.w {
		out[i] = make([]int64, len(rows[0]))
		for j, wij := range wr {
			if wij == 0 {
				continue
			}
			for l, v := range rows[j] {
				out[i][l] += wij * v
			}
		}
	}
	return out
}

// coords returns the coordinates in the new basis of the element with
// coordinates c in the old one: c·V.
func (u *unimodular) coords(c []int64) []int64 {
	out := make([]int64, len(u.v))
	for j, cj := range c {
		if cj == 0 {
			continue
		}
		for l, v := range u.v[j] {
			out[l] += cj * v
		}
	}
	return out
}

func (u *unimodular) applyCoords(cs [][]int64) [][]int64 {
	out := make([][]int64, len(cs))
	for i, c := range cs {
		out[i] = u.coords(c)
	}
	return out
}

// checkSize refuses coefficients too large for exact bookkeeping.
func checkSize(rows ...[][]int64) error {
	for _, r := range rows {
		for _, row := range r {
			for _, v := range row {
				if absInt64(v) > maxCoefficient {
					return fmt.Errorf("frequency module: coefficients grew beyond %d; the numbers are too many or too precise for this search", int64(maxCoefficient))
				}
			}
		}
	}
	return nil
}

func unit(n, i int) []int64 {
	r := make([]int64, n)
	r[i] = 1
	return r
}

func absInt64(v int64) int64 {
	if v < 0 {
		return -v
	}
	return v
}

func maxAbs(c []int64) int64 {
	var m int64
	for _, v := range c {
		m = max(m, absInt64(v))
	}
	return m
}

func gcdInt64(a, b int64) int64 {
	for b != 0 {
		a, b = b, a%b
	}
	return a
}

func toInts(c []int64) []int {
	out := make([]int, len(c))
	for i, v := range c {
		out[i] = int(v)
	}
	return out
}
