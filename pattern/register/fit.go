package register

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// maxIRLS bounds the reweighting steps of one fit.
const maxIRLS = 100

// fit fits the calibration to the matched pairs by iteratively reweighted
// least squares, starting from start, and returns the model with the
// covariance of its coefficients and the final weight of each pair.
//
// Each step scales the residuals by the robust sigma σ (1.4826·MAD),
// weights them with Tukey's biweight w(u) = (1 − (u/c)²)² for |u| < c and 0
// beyond, c = BiweightTuning, and solves the weighted least-squares
// problem (Holland & Welsch, Commun. Stat. A 6, 1977). It stops when the
// coefficients no longer move.
//
// The covariance is Huber's for an M-estimate (Huber, Robust Statistics,
// 1981, §7.6):
//
//	Cov = K² · [Σψ(u)²/(N−P)] / [Σψ′(u)/N]² · σ² · (AᵀA)⁻¹,
//	K = 1 + (P/N)·Var ψ′ / (mean ψ′)²,
//
// with ψ(u) = u·w(u) the biweight's influence function, A the design
// matrix, N pairs and P coefficients. Under Gaussian noise without
// outliers it is the least-squares covariance divided by the biweight's
// efficiency.
func (g *geometry) fit(pairs []pair, x []float64, start model) (model, []float64, error) {
	n, p := len(pairs), g.params()
	a := mat.NewDense(n, p, nil)
	y := make([]float64, n)
	for i, pr := range pairs {
		g.columns(g.d[pr.d], a.RawRowView(i))
		y[i] = x[pr.k]
	}
	// The floor keeps exact data (zero residuals) from dividing by zero:
	// 10⁻⁹ of the mean spacing in measured units.
	floor := 1e-9 * math.Abs(start.b[1]) * 2 / float64(len(g.d)-1)
	b, cov, w, err := robustFit(a, y, start.b, floor)
	if err != nil {
		return model{}, nil, err
	}
	return model{g: g, b: b, cov: cov}, w, nil
}

// robustFit fits y ≈ A·b by iteratively reweighted least squares with
// Tukey's biweight from the coefficients start, as fit describes, and
// returns the coefficients, Huber's covariance of them and the final
// weight of each row. floor is the smallest robust sigma taken seriously.
// The first two coefficients carry the magnitude of the positions (the
// offset), which bounds the rounding of every step. Registration of
// chains (fit) and of planes (planeFit) share it: each row is one
// coordinate of one matched pair.
func robustFit(a *mat.Dense, y, start []float64, floor float64) (b []float64, cov [][]float64, w []float64, err error) {
	n, p := a.Dims()
	b = append([]float64(nil), start...)
	r := make([]float64, n)
	w = make([]float64, n)
	scratch := make([]float64, n)
	var sigma float64
	residuals := func() {
		for i := range r {
			row := a.RawRowView(i)
			r[i] = y[i]
			for j, v := range row {
				r[i] -= v * b[j]
			}
		}
		sigma = math.Max(robustSigmaInto(r, scratch), floor)
	}
	for it := 0; it < maxIRLS; it++ {
		residuals()
		used := 0
		for i := range w {
			w[i] = biweight(r[i] / sigma)
			if w[i] > 0 {
				used++
			}
		}
		if used < p+1 {
			return nil, nil, nil, fmt.Errorf("fitting the calibration: only %d matched site(s) carry weight", used)
		}
		// Solve for the change of b from the current residuals rather
		// than for b from the positions: the residuals are small, so the
		// sums of the normal equations lose nothing to rounding.
		step, err := weightedSolve(a, r, w)
		if err != nil {
			return nil, nil, nil, fmt.Errorf("fitting the calibration: %w", err)
		}
		moved := 0.0
		for i := range b {
			b[i] += step[i]
			moved = math.Max(moved, math.Abs(step[i]))
		}
		// The coefficients are in measured units (the columns are
		// dimensionless) and their standard errors about σ/√N: stop when
		// they move by less than 10⁻⁴ of that, or by the rounding of b.
		if moved <= max(1e-4*sigma/math.Sqrt(float64(n)), 4e-16*(math.Abs(b[0])+math.Abs(b[1]))) {
			break
		}
	}
	residuals()

	// Huber's covariance.
	var sumPsi2, sumDpsi, sumDpsi2 float64
	for i := range r {
		u := r[i] / sigma
		w[i] = biweight(u)
		psi, dpsi := u*w[i], biweightSlope(u)
		sumPsi2 += psi * psi
		sumDpsi += dpsi
		sumDpsi2 += dpsi * dpsi
	}
	N, P := float64(n), float64(p)
	meanD := sumDpsi / N
	if !(meanD > 0) || n <= p {
		return nil, nil, nil, errors.New("fitting the calibration: too few matched sites near the fit for an uncertainty")
	}
	varD := sumDpsi2/N - meanD*meanD
	k := 1 + P/N*varD/(meanD*meanD)
	factor := k * k * (sumPsi2 / (N - P)) / (meanD * meanD) * sigma * sigma
	var ata mat.SymDense
	ata.SymOuterK(1, a.T())
	var chol mat.Cholesky
	if !chol.Factorize(&ata) {
		return nil, nil, nil, errors.New("fitting the calibration: the matched design sites do not determine it")
	}
	var inv mat.SymDense
	if err := chol.InverseTo(&inv); err != nil {
		return nil, nil, nil, fmt.Errorf("fitting the calibration: %w", err)
	}
	cov = make([][]float64, p)
	for i := range cov {
		cov[i] = make([]float64, p)
		for j := range cov[i] {
			cov[i][j] = factor * inv.At(i, j)
		}
	}
	return b, cov, w, nil
}

// weightedSolve returns the b minimising Σ w_i (y_i − A_i b)² from the
// normal equations AᵀWA b = AᵀWy, by Cholesky factorisation. The columns
// (1, t, u²) are bounded by 1 and far from collinear, so the P×P system is
// well conditioned and one pass over the rows suffices.
func weightedSolve(a *mat.Dense, y, w []float64) ([]float64, error) {
	n, p := a.Dims()
	ata := mat.NewSymDense(p, nil)
	aty := mat.NewVecDense(p, nil)
	for i := 0; i < n; i++ {
		if w[i] == 0 {
			continue
		}
		row := a.RawRowView(i)
		for j := 0; j < p; j++ {
			aty.SetVec(j, aty.AtVec(j)+w[i]*row[j]*y[i])
			for k := j; k < p; k++ {
				ata.SetSym(j, k, ata.At(j, k)+w[i]*row[j]*row[k])
			}
		}
	}
	var chol mat.Cholesky
	if !chol.Factorize(ata) {
		return nil, errors.New("the weighted matched sites do not determine the calibration")
	}
	var b mat.VecDense
	if err := chol.SolveVecTo(&b, aty); err != nil {
		return nil, errors.New("the weighted matched sites do not determine the calibration")
	}
	return mat.Col(nil, 0, &b), nil
}

// biweight is Tukey's weight (1 − (u/c)²)² inside |u| < c, 0 outside.
func biweight(u float64) float64 {
	v := u / BiweightTuning
	if math.Abs(v) >= 1 {
		return 0
	}
	return (1 - v*v) * (1 - v*v)
}

// biweightSlope is ψ′(u) for ψ(u) = u·biweight(u): (1 − v²)(1 − 5v²),
// v = u/c, inside |u| < c, 0 outside.
func biweightSlope(u float64) float64 {
	v := u / BiweightTuning
	if math.Abs(v) >= 1 {
		return 0
	}
	return (1 - v*v) * (1 - 5*v*v)
}
