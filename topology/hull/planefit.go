package hull

import (
	"errors"
	"fmt"
	"math"

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
// steps on the full parameter vector with backtracking; the standard
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

// designMatrix builds the linear design matrix of the model at A: columns 1, n1,
// n2 (centred) and sin, cos of each tone.
func designMatrix(f *field, mid [2]float64, g [][2]float64) *mat.Dense {
	X := mat.NewDense(len(f.n), 3+2*len(g), nil)
	for i, n := range f.n {
		t := [2]float64{float64(n[0]) - mid[0], float64(n[1]) - mid[1]}
		X.Set(i, 0, 1)
		X.Set(i, 1, t[0])
		X.Set(i, 2, t[1])
		for k, q := range g {
			s, c := math.Sincos(2 * math.Pi * math.Mod(q[0]*t[0]+q[1]*t[1], 1))
			X.Set(i, 3+2*k, s)
			X.Set(i, 4+2*k, c)
		}
	}
	return X
}

// project solves the linear part at A and returns the coefficients (one
// column per component), the residuals and their sum of squares.
func project(f *field, mid [2]float64, g [][2]float64) (*mat.Dense, *mat.Dense, [][2]float64, float64, error) {
	X := designMatrix(f, mid, g)
	Y := mat.NewDense(len(f.n), 2, nil)
	for i, u := range f.u {
		Y.Set(i, 0, u[0])
		Y.Set(i, 1, u[1])
	}
	var qr mat.QR
	qr.Factorize(X)
	var beta mat.Dense
	if err := qr.SolveTo(&beta, false, Y); err != nil {
		return nil, nil, nil, 0, err
	}
	var fit mat.Dense
	fit.Mul(X, &beta)
	r := make([][2]float64, len(f.n))
	var rss float64
	for i := range r {
		for c := range 2 {
			r[i][c] = f.u[i][c] - fit.At(i, c)
			rss += r[i][c] * r[i][c]
		}
	}
	return X, &beta, r, rss, nil
}

// jacobian returns the Jacobian of the residuals (both components
// stacked) with respect to every parameter: the linear coefficients of
// each component, then the entries A_kj.
func jacobian(f *field, mid [2]float64, X, beta *mat.Dense, terms [][]int, d int) *mat.Dense {
	N, K := X.Dims()
	J := mat.NewDense(2*N, 2*K+2*d, nil)
	for i, n := range f.n {
		t := [2]float64{float64(n[0]) - mid[0], float64(n[1]) - mid[1]}
		for c := range 2 {
			row := c*N + i
			for k := range K {
				J.Set(row, c*K+k, X.At(i, k))
			}
			for ti, m := range terms {
				s, co := X.At(i, 3+2*ti), X.At(i, 4+2*ti)
				a, b := beta.At(3+2*ti, c), beta.At(4+2*ti, c)
				dphi := 2 * math.Pi * (a*co - b*s)
				for k, v := range m {
					if v == 0 {
						continue
					}
					for j := range 2 {
						col := 2*K + 2*k + j
						J.Set(row, col, J.At(row, col)+dphi*float64(v)*t[j])
					}
				}
			}
		}
	}
	return J
}

// fitRotation refines A from A0 with the tones of order up to h.
func fitRotation(f *field, A0 [][]float64, h int) (planeFit, error) {
	d := len(A0)
	terms := planeTerms(d, h)
	mid := [2]float64{float64(f.lo[0]) + float64(f.size[0]-1)/2, float64(f.lo[1]) + float64(f.size[1]-1)/2}
	K := 3 + 2*len(terms)
	P := 2*K + 2*d
	if 2*len(f.n) <= P+2 {
		return planeFit{}, fmt.Errorf("%d sites for %d parameters", len(f.n), P)
	}
	A := clone2(A0)
	g, err := toneFreqs(A, terms, f.size)
	if err != nil {
		return planeFit{}, err
	}
	X, beta, r, rss, err := project(f, mid, g)
	if err != nil {
		return planeFit{}, err
	}
	var J *mat.Dense
	for range 50 {
		J = jacobian(f, mid, X, beta, terms, d)
		rv := mat.NewVecDense(2*len(r), nil)
		for i := range r {
			rv.SetVec(i, r[i][0])
			rv.SetVec(len(r)+i, r[i][1])
		}
		var step mat.VecDense
		var qr mat.QR
		qr.Factorize(J)
		if err := qr.SolveVecTo(&step, false, rv); err != nil {
			return planeFit{}, err
		}
		moved, small := false, true
		for lambda := 1.0; lambda > 1e-4 && !moved; lambda /= 2 {
			trial := clone2(A)
			for k := range d {
				for j := range 2 {
					dv := lambda * step.AtVec(2*K+2*k+j)
					trial[k][j] += dv
					small = small && math.Abs(dv)*float64(f.size[j]) < 1e-10
				}
			}
			tg, err := toneFreqs(trial, terms, f.size)
			if err != nil {
				continue
			}
			tX, tb, tr, trss, err := project(f, mid, tg)
			if err == nil && trss <= rss {
				A, g, X, beta, r, rss, moved = trial, tg, tX, tb, tr, trss, true
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
	J = jacobian(f, mid, X, beta, terms, d)
	var jtj mat.SymDense
	jtj.SymOuterK(1, J.T())
	var ch mat.Cholesky
	if !ch.Factorize(&jtj) {
		return planeFit{}, errors.New("the fit's normal matrix is singular")
	}
	var inv mat.SymDense
	if err := ch.InverseTo(&inv); err != nil {
		return planeFit{}, err
	}
	s2 := rss / float64(2*len(f.n)-P)
	cov := mat.NewSymDense(2*d, nil)
	for a := range 2 * d {
		for b := a; b < 2*d; b++ {
			cov.SetSym(a, b, s2*inv.At(2*K+a, 2*K+b))
		}
	}
	return planeFit{A: A, cov: cov, rss: rss, terms: len(terms), params: P, h: h, resid: r}, nil
}

// bestPlaneFit fits with 1 … 3 harmonic orders and keeps the fit with the
// lowest Bayesian information criterion N log(RSS/N) + P log N (Schwarz
// 1978), N the number of displacement components fitted, stopping at the
// first order that does not lower it.
func bestPlaneFit(f *field, A0 [][]float64) (planeFit, error) {
	var best planeFit
	bestBIC := math.Inf(1)
	var firstErr error
	N := float64(2 * len(f.n))
	for h := 1; h <= 3; h++ {
		fit, err := fitRotation(f, A0, h)
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
