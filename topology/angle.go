package topology

import (
	"errors"
	"fmt"
	"math"
	"slices"
)

// The effective step angle of a chain is the rotation number of the map that
// carries each site's circle coordinate to the next one's. This file reads it
// off a sequence of circle coordinates (RotationNumber,
// WeightedRotationNumber) and refines it against the site positions
// themselves (RefineFrequency, RefineFrequencies).

// RotationNumber returns the mean step of a sequence of circle coordinates
// c_0, ..., c_{N−1} in turns: the lifted rotation number (c̃_{N−1} − c̃_0)/(N−1)
// of the lift c̃ built from the increments.
//
// Each increment c_{n+1} − c_n is known only modulo 1; it is unwrapped into
// the unit window centred on the circular mean of all increments (the
// argument of Σ exp(2πi Δc_n)), which is the right lift whenever every true
// step lies within ½ of that mean — a weaker demand than wrapping into
// (−½, ½], which fails for steps that straddle ½. The result is therefore a
// lift, in (−1, 1); reduce it with Fold. The error of this plain mean falls
// like 1/N. RotationNumber needs N ≥ 2 finite coordinates.
func RotationNumber(c []float64) (float64, error) {
	d, err := liftedIncrements(c)
	if err != nil {
		return 0, fmt.Errorf("rotation number: %w", err)
	}
	var s kahan
	for _, v := range d {
		s.add(v)
	}
	return s.sum() / float64(len(d)), nil
}

// WeightedRotationNumber returns the rotation number of a sequence of circle
// coordinates by the weighted Birkhoff average of its increments, unwrapped
// as in RotationNumber:
//
//	ρ ≈ Σ_n w(n/K) Δc_n / Σ_n w(n/K),  n = 0..K−1,  K = N − 1,
//
// with the bump weight w(t) = exp(−1/(t(1−t))) on (0, 1). For a
// quasiperiodic sequence — c_n = h(n·ρ + φ) with h a smooth circle
// diffeomorphism and ρ Diophantine — the error falls faster than any power
// of 1/N (Das & Yorke, "Super convergence of ergodic averages for
// quasiperiodic orbits", Nonlinearity 31, 2018), against 1/N for the plain
// mean; for rougher sequences it is no worse than the plain mean in
// practice. It needs N ≥ 3 finite coordinates.
func WeightedRotationNumber(c []float64) (float64, error) {
	d, err := liftedIncrements(c)
	if err != nil {
		return 0, fmt.Errorf("weighted rotation number: %w", err)
	}
	if len(d) < 2 {
		return 0, errors.New("weighted rotation number: need at least 3 coordinates")
	}
	K := float64(len(d))
	var num, den kahan
	for n, v := range d {
		w := bump(float64(n) / K)
		num.add(w * v)
		den.add(w)
	}
	return num.sum() / den.sum(), nil
}

// bump is the weight exp(−1/(t(1−t))) of Das & Yorke, zero outside (0, 1).
// All its derivatives vanish at both ends, which is what turns the 1/N end
// effect of a plain average into super-polynomial convergence.
func bump(t float64) float64 {
	if t <= 0 || t >= 1 {
		return 0
	}
	return math.Exp(-1 / (t * (1 - t)))
}

// liftedIncrements returns the increments c_{n+1} − c_n, each shifted by an
// integer into the unit window centred on their circular mean.
func liftedIncrements(c []float64) ([]float64, error) {
	if len(c) < 2 {
		return nil, errors.New("need at least 2 coordinates")
	}
	d := make([]float64, len(c)-1)
	var sx, sy float64
	for n := range d {
		if math.IsNaN(c[n+1]) || math.IsInf(c[n+1], 0) || math.IsNaN(c[n]) || math.IsInf(c[n], 0) {
			return nil, fmt.Errorf("coordinate %d is not finite", n)
		}
		d[n] = c[n+1] - c[n]
		s, co := math.Sincos(2 * math.Pi * d[n])
		sx += co
		sy += s
	}
	centre := 0.0
	if math.Hypot(sx, sy) > 1e-12*float64(len(d)) {
		centre = math.Atan2(sy, sx) / (2 * math.Pi)
	}
	for n, v := range d {
		// Shift into (centre − ½, centre + ½].
		d[n] = v - math.Ceil(v-centre-0.5)
	}
	return d, nil
}

// kahan is a compensated (Neumaier) sum, so that long averages lose no more
// than a few rounding errors.
type kahan struct{ s, comp float64 }

func (k *kahan) add(x float64) {
	t := k.s + x
	if math.Abs(k.s) >= math.Abs(x) {
		k.comp += (k.s - t) + x
	} else {
		k.comp += (x - t) + k.s
	}
	k.s = t
}

func (k *kahan) sum() float64 { return k.s + k.comp }

// FitOptions selects the harmonic model of RefineFrequencies.
type FitOptions struct {
	// Harmonics is the highest harmonic order H ≥ 1: the model holds the
	// tones k·f for k = 1..H (for each frequency f).
	Harmonics int
	// Combinations adds, for two or three frequencies, the combination
	// tones m·f with at least two m_i ≠ 0, the first nonzero one positive,
	// and |m|₁ ≤ Harmonics (for two: m1 ≥ 1, m2 ≠ 0, |m1| + |m2| ≤
	// Harmonics).
	Combinations bool
}

// FrequencyFit is the result of a frequency refinement.
type FrequencyFit struct {
	// Freq are the refined frequencies in cycles per site, in the order
	// of the starting values.
	Freq []float64
	// StdErr are their standard errors, from the Jacobian at the fit:
	// the square roots of the diagonal of σ̂²(JᵀJ)⁻¹ over the full
	// parameter vector, σ̂² = Σr²/(N − P).
	StdErr []float64
	// RMS is the root-mean-square residual sqrt(Σr²/N), in the unit of
	// the positions.
	RMS float64
	// Residuals are the residuals x_n − model, one per input position,
	// in the unit of the positions.
	Residuals []float64
}

// RefineFrequency refines the frequency f of a chain whose site positions
// follow a circle hull, fitting
//
//	x_n = c0 + c1·n + Σ_{k=1..H} (a_k sin 2πkfn + b_k cos 2πkfn)
//
// by least squares, and is RefineFrequencies with one frequency.
func RefineFrequency(n []int, x []float64, f0 float64, harmonics int) (FrequencyFit, error) {
	return RefineFrequencies(n, x, []float64{f0}, FitOptions{Harmonics: harmonics})
}

// RefineFrequencies refines one frequency (circle hull), two (torus hull)
// or three (three-torus hull) of the modulation of site positions x at integer site indices n, fitting
//
//	x_n = c0 + c1·n + Σ_terms (a_j sin 2π(m_j·f)n + b_j cos 2π(m_j·f)n)
//
// by nonlinear least squares, the terms m_j as FitOptions says. The indices
// must increase strictly but need not be consecutive: missing sites simply
// leave gaps in n. f0 are rough frequencies, each within about 1/L of the
// truth, L = n_last − n_first + 1.
//
// The linear coefficients are projected out (variable projection, Golub &
// Pereyra, SIAM J. Numer. Anal. 10, 1973): for each trial f they are
// solved by Householder QR, leaving the residual a function of f alone.
// A grid of step 1/(8L) over f0 ± 1/L, one frequency at a time, finds the
// main lobe of that residual; Gauss–Newton steps on the full parameter
// vector, with the linear part re-solved after each step, then converge to
// the least-squares frequency to rounding. In white Gaussian position noise
// this is the maximum-likelihood estimate, which attains the Cramér–Rao
// bound at useful signal-to-noise ratios (Rife & Boorstyn, IEEE Trans. Inf.
// Theory 20, 1974).
func RefineFrequencies(n []int, x []float64, f0 []float64, opt FitOptions) (FrequencyFit, error) {
	d := len(f0)
	switch {
	case d < 1 || d > 3:
		return FrequencyFit{}, fmt.Errorf("refining frequencies: need 1 to 3 starting frequencies, have %d", d)
	case opt.Harmonics < 1:
		return FrequencyFit{}, fmt.Errorf("refining frequencies: harmonics %d < 1", opt.Harmonics)
	case len(n) != len(x):
		return FrequencyFit{}, fmt.Errorf("refining frequencies: %d indices for %d positions", len(n), len(x))
	}
	for i, f := range f0 {
		if math.IsNaN(f) || math.IsInf(f, 0) {
			return FrequencyFit{}, fmt.Errorf("refining frequencies: starting frequency %d is not finite", i)
		}
	}
	for i := range x {
		if math.IsNaN(x[i]) || math.IsInf(x[i], 0) {
			return FrequencyFit{}, fmt.Errorf("refining frequencies: position %d is not finite", i)
		}
		if i > 0 && n[i] <= n[i-1] {
			return FrequencyFit{}, fmt.Errorf("refining frequencies: index %d (%d) does not exceed the one before (%d)", i, n[i], n[i-1])
		}
	}
	m := harmonicModel{terms: modelTerms(d, opt)}
	P := 2 + 2*len(m.terms) + d
	if len(x) <= P {
		return FrequencyFit{}, fmt.Errorf("refining frequencies: %d sites for %d parameters", len(x), P)
	}
	// Centre the indices: the model space for each f is unchanged, and the
	// frequency columns of the Jacobian become nearly orthogonal to the rest.
	mid := 0.5 * float64(n[0]+n[len(n)-1])
	m.t = make([]float64, len(n))
	for i, v := range n {
		m.t[i] = float64(v) - mid
	}
	m.x = x
	L := float64(n[len(n)-1] - n[0] + 1)
	if err := m.resolved(f0, L); err != nil {
		return FrequencyFit{}, fmt.Errorf("refining frequencies: at f0: %w", err)
	}

	// Coarse search, one frequency at a time.
	f := append([]float64(nil), f0...)
	step := 1 / (8 * L)
	for i := range f {
		best, bestS := f[i], math.Inf(1)
		for k := -8; k <= 8; k++ {
			trial := append([]float64(nil), f...)
			trial[i] = f0[i] + float64(k)*step
			if p, err := m.project(trial); err == nil && p.ss < bestS {
				best, bestS = trial[i], p.ss
			}
		}
		if math.IsInf(bestS, 1) {
			return FrequencyFit{}, fmt.Errorf("refining frequencies: model degenerate everywhere near f0 = %v", f0)
		}
		f[i] = best
	}

	// Gauss–Newton with backtracking: never accept a step that raises the
	// residual; stop when a step moves the phase across the chain by less
	// than 1e-12 turns (exact data) or moves each frequency by less than
	// 1e-6 of its standard error (noisy data), or when no step helps.
	cur, err := m.project(f)
	if err != nil {
		return FrequencyFit{}, fmt.Errorf("refining frequencies: %w", err)
	}
	for range 100 {
		delta, cov, err := m.gaussNewton(f, cur)
		if err != nil {
			return FrequencyFit{}, fmt.Errorf("refining frequencies: %w", err)
		}
		small := true
		for i, v := range delta {
			se := math.Sqrt(cur.ss / float64(len(x)-P) * cov[i])
			small = small && (math.Abs(v)*L < 1e-12 || math.Abs(v) < 1e-6*se)
		}
		if small {
			break
		}
		moved := false
		for lambda := 1.0; lambda > 1e-6; lambda /= 2 {
			trial := make([]float64, d)
			changed := false
			for i := range f {
				trial[i] = f[i] + lambda*delta[i]
				changed = changed || trial[i] != f[i]
			}
			if !changed {
				break // the step is below the resolution of float64
			}
			p, err := m.project(trial)
			if err == nil && p.ss <= cur.ss {
				f, cur, moved = trial, p, true
				break
			}
		}
		if !moved {
			break
		}
	}
	for i := range f {
		if math.Abs(f[i]-f0[i]) > 2/L {
			return FrequencyFit{}, fmt.Errorf("refining frequencies: frequency %d left the search window: %g from f0 = %g", i, f[i], f0[i])
		}
	}
	if err := m.resolved(f, L); err != nil {
		return FrequencyFit{}, fmt.Errorf("refining frequencies: at the fit: %w", err)
	}
	_, cov, err := m.gaussNewton(f, cur)
	if err != nil {
		return FrequencyFit{}, fmt.Errorf("refining frequencies: %w", err)
	}
	sigma2 := cur.ss / float64(len(x)-P)
	fit := FrequencyFit{Freq: f, StdErr: make([]float64, d), RMS: math.Sqrt(cur.ss / float64(len(x))), Residuals: cur.resid}
	for i := range d {
		fit.StdErr[i] = math.Sqrt(sigma2 * cov[i])
	}
	return fit, nil
}

// modelTerms lists the integer vectors m of the tones m·f in the model.
func modelTerms(d int, opt FitOptions) [][]int {
	var terms [][]int
	for i := range d {
		for k := 1; k <= opt.Harmonics; k++ {
			m := make([]int, d)
			m[i] = k
			terms = append(terms, m)
		}
	}
	if d >= 2 && opt.Combinations {
		// One of ±m: the pair spans the same sine and cosine. The walk is
		// lexicographic, m1 first.
		m := make([]int, d)
		var walk func(i, left int)
		walk = func(i, left int) {
			if i == d {
				nonzero, first := 0, 0
				for _, v := range m {
					if v != 0 {
						if nonzero == 0 {
							first = v
						}
						nonzero++
					}
				}
				if nonzero >= 2 && first > 0 {
					terms = append(terms, slices.Clone(m))
				}
				return
			}
			for v := -left; v <= left; v++ {
				m[i] = v
				walk(i+1, left-max(v, -v))
			}
		}
		walk(0, opt.Harmonics)
	}
	return terms
}

// resolved checks that the tones at f can be told apart over a chain of
// length L: folded into [0, ½] (a tone and its alias or mirror image span
// the same columns), each lies at least 1/(2L) from 0 and ½ and at least
// 1/L — the Rayleigh resolution — from every other.
func (m *harmonicModel) resolved(f []float64, L float64) error {
	folded := make([]float64, len(m.terms))
	for j, mj := range m.terms {
		folded[j] = Fold(dotInt(mj, f))
		if folded[j] < 0.5/L || folded[j] > 0.5-0.5/L {
			return fmt.Errorf("tone %v·f = %g is within 1/(2L) of 0 or ½ (L = %g)", mj, folded[j], L)
		}
		for k := range j {
			if math.Abs(folded[j]-folded[k]) < 1/L {
				return fmt.Errorf("tones %v·f and %v·f are closer than the resolution 1/L = %g", mj, m.terms[k], 1/L)
			}
		}
	}
	return nil
}

// harmonicModel is the design of RefineFrequencies: centred indices t,
// positions x and the tones.
type harmonicModel struct {
	t, x  []float64
	terms [][]int
}

// projection is the linear least-squares fit at fixed frequencies.
type projection struct {
	cols  [][]float64 // design columns: 1, t, then sin, cos per term
	beta  []float64
	resid []float64
	ss    float64
}

// columns builds the design matrix at frequencies f, by columns.
func (m *harmonicModel) columns(f []float64) [][]float64 {
	N := len(m.t)
	cols := make([][]float64, 2+2*len(m.terms))
	for j := range cols {
		cols[j] = make([]float64, N)
	}
	for i, t := range m.t {
		cols[0][i], cols[1][i] = 1, t
	}
	for j, mj := range m.terms {
		w := 2 * math.Pi * dotInt(mj, f)
		for i, t := range m.t {
			cols[2+2*j][i], cols[3+2*j][i] = math.Sincos(w * t)
		}
	}
	return cols
}

// project solves the linear part at frequencies f.
func (m *harmonicModel) project(f []float64) (projection, error) {
	cols := m.columns(f)
	q, err := factorQR(cols)
	if err != nil {
		return projection{}, fmt.Errorf("at f = %v: %w", f, err)
	}
	// One step of iterative refinement: solve again for the residual of the
	// first solution, which removes most of the rounding the large trend
	// term c0 + c1·n leaves in the small modulation.
	beta := q.solve(m.x)
	resid := residual(cols, beta, m.x)
	for j, v := range q.solve(resid) {
		beta[j] += v
	}
	resid = residual(cols, beta, m.x)
	var ss kahan
	for _, r := range resid {
		ss.add(r * r)
	}
	return projection{cols: cols, beta: beta, resid: resid, ss: ss.sum()}, nil
}

// residual returns y − Σ_j beta_j cols_j.
func residual(cols [][]float64, beta, y []float64) []float64 {
	r := append([]float64(nil), y...)
	for j, c := range cols {
		for i, v := range c {
			r[i] -= beta[j] * v
		}
	}
	return r
}

// gaussNewton returns the frequency part of the Gauss–Newton step from the
// fit p at f, and the frequency diagonal of (JᵀJ)⁻¹ for the full Jacobian
// J = [design | ∂model/∂f].
func (m *harmonicModel) gaussNewton(f []float64, p projection) (step, covDiag []float64, err error) {
	d := len(f)
	J := append([][]float64(nil), p.cols...)
	for k := range d {
		// ∂/∂f_k of a sin(ωt) + b cos(ωt), ω = 2π m·f, is
		// 2π m_k t (a cos(ωt) − b sin(ωt)).
		col := make([]float64, len(m.t))
		for j, mj := range m.terms {
			if mj[k] == 0 {
				continue
			}
			a, b := p.beta[2+2*j], p.beta[3+2*j]
			s, c := p.cols[2+2*j], p.cols[3+2*j]
			g := 2 * math.Pi * float64(mj[k])
			for i, t := range m.t {
				col[i] += g * t * (a*c[i] - b*s[i])
			}
		}
		J = append(J, col)
	}
	q, err := factorQR(J)
	if err != nil {
		return nil, nil, fmt.Errorf("Jacobian at f = %v: %w", f, err)
	}
	full := q.solve(p.resid)
	inv := q.inverseDiag()
	off := len(J) - d
	return full[off:], inv[off:], nil
}

// qrFactor is a Householder QR factorisation of an N×P matrix whose columns
// were scaled to unit norm first (the scales are kept and undone), so that
// the rank test and the conditioning do not depend on the units of the
// columns.
type qrFactor struct {
	a     [][]float64 // columns: R on and above the diagonal, reflectors below
	rdiag []float64   // diagonal of R
	scale []float64   // column norms removed before factoring
}

// factorQR factors the matrix with the given columns; it refuses a matrix
// whose scaled R has a diagonal entry below 1e-10 (numerically rank
// deficient: tones that coincide, or sit at frequency 0 or ½).
func factorQR(cols [][]float64) (*qrFactor, error) {
	P := len(cols)
	q := &qrFactor{a: make([][]float64, P), rdiag: make([]float64, P), scale: make([]float64, P)}
	for j, c := range cols {
		s := norm(c)
		if s == 0 {
			return nil, fmt.Errorf("design column %d is zero", j)
		}
		q.scale[j] = s
		q.a[j] = make([]float64, len(c))
		for i, v := range c {
			q.a[j][i] = v / s
		}
	}
	for k := range P {
		v := q.a[k][k:]
		nv := norm(v)
		if nv < 1e-10 {
			return nil, fmt.Errorf("design is rank deficient at column %d", k)
		}
		// Reflect v onto α·e1, α = −sign(v0)|v| (no cancellation in v0 − α);
		// the reflector u = v − α·e1 overwrites v.
		alpha := -math.Copysign(nv, v[0])
		v[0] -= alpha
		uu := norm2(v)
		for j := k + 1; j < P; j++ {
			w := q.a[j][k:]
			h := 2 * dot(v, w) / uu
			for i := range w {
				w[i] -= h * v[i]
			}
		}
		q.rdiag[k] = alpha
	}
	return q, nil
}

// solve returns the least-squares solution of A β = y.
func (q *qrFactor) solve(y []float64) []float64 {
	P := len(q.a)
	z := append([]float64(nil), y...)
	for k := range P {
		v := q.a[k][k:]
		w := z[k:]
		h := 2 * dot(v, w) / norm2(v)
		for i := range w {
			w[i] -= h * v[i]
		}
	}
	beta := make([]float64, P)
	for k := P - 1; k >= 0; k-- {
		s := z[k]
		for j := k + 1; j < P; j++ {
			s -= q.a[j][k] * beta[j]
		}
		beta[k] = s / q.rdiag[k]
	}
	for k := range beta {
		beta[k] /= q.scale[k]
	}
	return beta
}

// inverseDiag returns the diagonal of (AᵀA)⁻¹ = diag(1/s) R⁻¹R⁻ᵀ diag(1/s).
func (q *qrFactor) inverseDiag() []float64 {
	P := len(q.a)
	r := func(i, j int) float64 { // R_ij, i ≤ j
		if i == j {
			return q.rdiag[i]
		}
		return q.a[j][i]
	}
	// Rinv is upper triangular; column j solves R x = e_j.
	rinv := make([][]float64, P) // rinv[i][j], j ≥ i
	for i := range rinv {
		rinv[i] = make([]float64, P)
	}
	for j := range P {
		for i := j; i >= 0; i-- {
			s := 0.0
			if i == j {
				s = 1
			}
			for k := i + 1; k <= j; k++ {
				s -= r(i, k) * rinv[k][j]
			}
			rinv[i][j] = s / r(i, i)
		}
	}
	out := make([]float64, P)
	for i := range P {
		s := 0.0
		for j := i; j < P; j++ {
			s += rinv[i][j] * rinv[i][j]
		}
		out[i] = s / (q.scale[i] * q.scale[i])
	}
	return out
}

func dot(a, b []float64) float64 {
	var s float64
	for i := range a {
		s += a[i] * b[i]
	}
	return s
}

func norm2(a []float64) float64 { return dot(a, a) }

func norm(a []float64) float64 { return math.Sqrt(dot(a, a)) }
