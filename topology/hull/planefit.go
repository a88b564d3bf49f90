package hull

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"

	"gonum.org/v1/gonum/mat"
)

// The refinement of the rotation matrix. The displacement field is fitted
// by least squares with a harmonic series on the 2D index,
//
//	u_n = c + B·n + Σ_m (s_m sin 2π(m·A)·n + c_m cos 2π(m·A)·n),
//
// for both components at once (the coefficients c, B, s_m, c_m are
// 2-vectors), over the tones m ∈ Z^d, 1 ≤ |m|₁ ≤ h, one of ±m. The linear
// coefficients are re-solved at every trial A (variable projection, as
// topology.RefineFrequencies does on a chain) and A moves by Gauss–Newton
// steps on the full parameter vector with backtracking, both solved by
// normal equations accumulated one site at a time; the standard
// errors are the square roots of the diagonal of σ̂²(JᵀJ)⁻¹, σ̂² the
// residual variance. In white displacement noise this is the
// maximum-likelihood estimate of A.

// planeFit is a fit of the displacement field.
type planeFit struct {
	A [][]float64
	// cov is the covariance of the entries of A, indexed 2k+j for A_kj.
	cov   *mat.SymDense
	rss   float64
	terms int
	// params is the number of fitted parameters, h the harmonic order.
	params, h int
	resid     [][2]float64
}

// planeTerms lists m ∈ Z^d with 1 ≤ |m|₁ ≤ h whose first non-zero entry is
// positive.
func planeTerms(d, h int) [][]int {
	var out [][]int
	m := make([]int, d)
	var walk func(i, left int)
	walk = func(i, left int) {
		if i == d {
			for _, v := range m {
				if v != 0 {
					if v > 0 {
						out = append(out, append([]int(nil), m...))
					}
					return
				}
			}
			return
		}
		for v := -left; v <= left; v++ {
			m[i] = v
			walk(i+1, left-abs(v))
		}
	}
	walk(0, h)
	return out
}

// toneFreqs returns the frequencies m·A of the terms, and an error when two
// of them (or one and 0) cannot be told apart over the index box: closer
// than the Rayleigh resolution 1/size along both axes, modulo Z² and up to
// sign.
func toneFreqs(A [][]float64, terms [][]int, size [2]int) ([][2]float64, error) {
	g := make([][2]float64, len(terms))
	for t, m := range terms {
		for j := range 2 {
			for k, v := range m {
				g[t][j] += float64(v) * A[k][j]
			}
		}
		c := canonical(g[t])
		if math.Abs(c[0]) < 0.5/float64(size[0]) && math.Abs(c[1]) < 0.5/float64(size[1]) {
			return nil, fmt.Errorf("tone %v·A is within half a resolution of 0", m)
		}
		for s := range t {
			o := canonical(g[s])
			if math.Abs(wrap(o[0]-c[0])) < 1/float64(size[0]) && math.Abs(wrap(o[1]-c[1])) < 1/float64(size[1]) {
				return nil, fmt.Errorf("tones %v·A and %v·A are closer than the resolution", terms[s], m)
			}
		}
	}
	return g, nil
}

// maxFitSites caps the sites the fit of A runs on: a larger field is fitted
// on a seeded uniform subsample of this many sites (the same subsample at
// every trial A and harmonic order), which keeps the index box and so the
// frequency resolution; the residuals and their sum of squares are then
// taken over every site. The normal equations are accumulated one site at
// a time, so the memory does not grow with the field beyond the field
// itself.
const maxFitSites = 1 << 17

// fitSample returns f itself, or a seeded subsample of maxFitSites of its
// sites with the same index box.
func fitSample(f *field, seed uint64) *field {
	if len(f.n) <= maxFitSites {
		return f
	}
	rng := rand.New(rand.NewPCG(seed, 0x706c616e65666974))
	idx := rng.Perm(len(f.n))[:maxFitSites]
	slices.Sort(idx)
	s := &field{lo: f.lo, size: f.size, n: make([][2]int, len(idx)), u: make([][2]float64, len(idx)), site: make([]int, len(idx))}
	for k, i := range idx {
		s.n[k], s.u[k], s.site[k] = f.n[i], f.u[i], f.site[i]
	}
	return s
}

// designRow fills x with the linear columns of the model at one site: 1,
// n1, n2 (centred) and sin, cos of each tone; t is the centred index.
func designRow(x []float64, t [2]float64, g [][2]float64) {
	x[0], x[1], x[2] = 1, t[0], t[1]
	for k, q := range g {
		ph := q[0]*t[0] + q[1]*t[1]
		x[3+2*k], x[4+2*k] = math.Sincos(2 * math.Pi * (ph - math.Floor(ph)))
	}
}

// solveNormal solves the symmetric positive definite system G·x = b (G
// given by its upper triangle, row-major n×n; b with m columns) after
// scaling G to a unit diagonal, which keeps the normal equations as well
// conditioned as the columns' angles allow; it returns x (n×m) and, when
// inv is true, G⁻¹.
func solveNormal(G []float64, n int, b *mat.Dense, inv bool) (*mat.Dense, *mat.SymDense, error) {
	sc := make([]float64, n)
	for i := range n {
		if !(G[i*n+i] > 0) {
			return nil, nil, errors.New("a column of the model is zero")
		}
		sc[i] = 1 / math.Sqrt(G[i*n+i])
	}
	S := mat.NewSymDense(n, nil)
	for i := range n {
		for j := i; j < n; j++ {
			S.SetSym(i, j, G[i*n+j]*sc[i]*sc[j])
		}
	}
	var ch mat.Cholesky
	if !ch.Factorize(S) {
		return nil, nil, errors.New("the normal matrix is singular")
	}
	_, m := b.Dims()
	bs := mat.NewDense(n, m, nil)
	for i := range n {
		for c := range m {
			bs.Set(i, c, b.At(i, c)*sc[i])
		}
	}
	var x mat.Dense
	if err := ch.SolveTo(&x, bs); err != nil {
		return nil, nil, err
	}
	for i := range n {
		for c := range m {
			x.Set(i, c, x.At(i, c)*sc[i])
		}
	}
	if !inv {
		return &x, nil, nil
	}
	var iv mat.SymDense
	if err := ch.InverseTo(&iv); err != nil {
		return nil, nil, err
	}
	for i := range n {
		for j := i; j < n; j++ {
			iv.SetSym(i, j, iv.At(i, j)*sc[i]*sc[j])
		}
	}
	return &x, &iv, nil
}

// project solves the linear part at A by its normal equations and returns
// the coefficients (one column per component), the residuals and their
// sum of squares.
func project(f *field, mid [2]float64, g [][2]float64) (*mat.Dense, [][2]float64, float64, error) {
	K := 3 + 2*len(g)
	G := make([]float64, K*K)
	XtY := mat.NewDense(K, 2, nil)
	x := make([]float64, K)
	for i, n := range f.n {
		designRow(x, [2]float64{float64(n[0]) - mid[0], float64(n[1]) - mid[1]}, g)
		for a, xa := range x {
			row := G[a*K : a*K+K]
			for b := a; b < K; b++ {
				row[b] += xa * x[b]
			}
			XtY.Set(a, 0, XtY.At(a, 0)+xa*f.u[i][0])
			XtY.Set(a, 1, XtY.At(a, 1)+xa*f.u[i][1])
		}
	}
	beta, _, err := solveNormal(G, K, XtY, false)
	if err != nil {
		return nil, nil, 0, err
	}
	r, rss := residuals(f, mid, g, beta)
	return beta, r, rss, nil
}

// residuals returns the residuals of the field about the model at tones g
// with coefficients beta, and their sum of squares.
func residuals(f *field, mid [2]float64, g [][2]float64, beta *mat.Dense) ([][2]float64, float64) {
	K := 3 + 2*len(g)
	x := make([]float64, K)
	r := make([][2]float64, len(f.n))
	var rss float64
	for i, n := range f.n {
		designRow(x, [2]float64{float64(n[0]) - mid[0], float64(n[1]) - mid[1]}, g)
		for c := range 2 {
			v := f.u[i][c]
			for k, xk := range x {
				v -= xk * beta.At(k, c)
			}
			r[i][c] = v
			rss += v * v
		}
	}
	return r, rss
}

// gaussNewton accumulates the normal equations JᵀJ and Jᵀr of the model's
// Jacobian J with respect to every parameter — the linear coefficients of
// each component (K each), then the entries A_kj — one site at a time,
// both components stacked as rows; the blocks of the two components'
// coefficients do not meet. It returns JᵀJ's upper triangle (P×P,
// row-major) and Jᵀr.
func gaussNewton(f *field, mid [2]float64, g [][2]float64, beta *mat.Dense, r [][2]float64, terms [][]int, d int) ([]float64, *mat.Dense) {
	K := 3 + 2*len(g)
	P := 2*K + 2*d
	G := make([]float64, P*P)
	Jr := mat.NewDense(P, 1, nil)
	x := make([]float64, K)
	ja := make([]float64, 2*d)
	for i, n := range f.n {
		t := [2]float64{float64(n[0]) - mid[0], float64(n[1]) - mid[1]}
		designRow(x, t, g)
		for c := range 2 {
			clear(ja)
			for ti, m := range terms {
				s, co := x[3+2*ti], x[4+2*ti]
				dphi := 2 * math.Pi * (beta.At(3+2*ti, c)*co - beta.At(4+2*ti, c)*s)
				for k, v := range m {
					if v != 0 {
						ja[2*k] += dphi * float64(v) * t[0]
						ja[2*k+1] += dphi * float64(v) * t[1]
					}
				}
			}
			off := c * K
			rc := r[i][c]
			for a, xa := range x {
				row := G[(off+a)*P:]
				if c == 0 {
					// XᵀX is the same for both components: accumulate it once
					// and copy it to the second block below.
					for b := a; b < K; b++ {
						row[off+b] += xa * x[b]
					}
				}
				for b, jb := range ja {
					row[2*K+b] += xa * jb
				}
				Jr.Set(off+a, 0, Jr.At(off+a, 0)+xa*rc)
			}
			for a, jaa := range ja {
				row := G[(2*K+a)*P:]
				for b := a; b < 2*d; b++ {
					row[2*K+b] += jaa * ja[b]
				}
				Jr.Set(2*K+a, 0, Jr.At(2*K+a, 0)+jaa*rc)
			}
		}
	}
	for a := range K {
		for b := a; b < K; b++ {
			G[(K+a)*P+K+b] = G[a*P+b]
		}
	}
	return G, Jr
}

// fitRotation refines A from A0 with the tones of order up to h, on a
// seeded subsample of at most maxFitSites sites (fitSample).
func fitRotation(f *field, A0 [][]float64, h int, seed uint64) (planeFit, error) {
	d := len(A0)
	terms := planeTerms(d, h)
	mid := [2]float64{float64(f.lo[0]) + float64(f.size[0]-1)/2, float64(f.lo[1]) + float64(f.size[1]-1)/2}
	K := 3 + 2*len(terms)
	P := 2*K + 2*d
	if 2*len(f.n) <= P+2 {
		return planeFit{}, fmt.Errorf("%d sites for %d parameters", len(f.n), P)
	}
	fs := fitSample(f, seed)
	A := clone2(A0)
	g, err := toneFreqs(A, terms, f.size)
	if err != nil {
		return planeFit{}, err
	}
	beta, r, rss, err := project(fs, mid, g)
	if err != nil {
		return planeFit{}, err
	}
	for range 50 {
		G, Jr := gaussNewton(fs, mid, g, beta, r, terms, d)
		step, _, err := solveNormal(G, P, Jr, false)
		if err != nil {
			return planeFit{}, err
		}
		moved, small := false, true
		for lambda := 1.0; lambda > 1e-4 && !moved; lambda /= 2 {
			trial := clone2(A)
			for k := range d {
				for j := range 2 {
					dv := lambda * step.At(2*K+2*k+j, 0)
					trial[k][j] += dv
					small = small && math.Abs(dv)*float64(f.size[j]) < 1e-10
				}
			}
			tg, err := toneFreqs(trial, terms, f.size)
			if err != nil {
				continue
			}
			tb, tr, trss, err := project(fs, mid, tg)
			if err == nil && trss <= rss {
				A, g, beta, r, rss, moved = trial, tg, tb, tr, trss, true
			}
		}
		if !moved || small {
			break
		}
	}
	for k := range d {
		for j := range 2 {
			if math.Abs(A[k][j]-A0[k][j]) > 2/float64(f.size[j]) {
				return planeFit{}, errors.New("the fit left the main lobe of the starting matrix")
			}
		}
	}
	G, _ := gaussNewton(fs, mid, g, beta, r, terms, d)
	_, inv, err := solveNormal(G, P, mat.NewDense(P, 1, nil), true)
	if err != nil {
		return planeFit{}, fmt.Errorf("the fit's normal matrix: %w", err)
	}
	s2 := rss / float64(2*len(fs.n)-P)
	cov := mat.NewSymDense(2*d, nil)
	for a := range 2 * d {
		for b := a; b < 2*d; b++ {
			cov.SetSym(a, b, s2*inv.At(2*K+a, 2*K+b))
		}
	}
	if fs != f {
		r, rss = residuals(f, mid, g, beta)
	}
	return planeFit{A: A, cov: cov, rss: rss, terms: len(terms), params: P, h: h, resid: r}, nil
}

// bestPlaneFit fits with 1 … 3 harmonic orders and keeps the fit with the
// lowest Bayesian information criterion N log(RSS/N) + P log N (Schwarz
// 1978), N the number of displacement components fitted, stopping at the
// first order that does not lower it.
func bestPlaneFit(f *field, A0 [][]float64, seed uint64) (planeFit, error) {
	var best planeFit
	bestBIC := math.Inf(1)
	var firstErr error
	N := float64(2 * len(f.n))
	for h := 1; h <= 3; h++ {
		fit, err := fitRotation(f, A0, h, seed)
		if err != nil {
			if firstErr == nil {
				firstErr = err
			}
			continue
		}
		bic := N*math.Log(math.Max(fit.rss/N, 1e-300)) + float64(fit.params)*math.Log(N)
		if bic >= bestBIC {
			break // a higher order did not help: the criterion has turned
		}
		best, bestBIC = fit, bic
	}
	if best.A == nil {
		return best, firstErr
	}
	return best, nil
}

func clone2(A [][]float64) [][]float64 {
	out := make([][]float64, len(A))
	for i, r := range A {
		out[i] = append([]float64(nil), r...)
	}
	return out
}
