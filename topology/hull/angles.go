package hull

import (
	"cmp"
	"context"
	"errors"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat/distuv"

	"phasonhull/topology"
)

// measureAngles measures the effective step angle(s) of a hull of p
// components × a k-torus (circle, torus), and checks them (see
// checkModel): it returns a reason for refusing them, empty when they
// reproduce the positions.
//
// Rough value: the most persistent H1 cocycle(s) of the landmark barcode
// give circular coordinates (de Silva, Morozov & Vejdemo-Johansson 2011),
// extended to every delay vector; the rotation number of the shift is the
// mean lifted increment of the coordinate from one vector to the next,
// weighted as Das & Yorke (2018) prescribe when the chain has no gaps.
// This is the rotation number on the hull, not any generating parameter:
// it is what a deformed loop or a nonlinear circle map still has. With p
// components each gets its own coordinates (componentCoordinates) and the
// p-th power of the shift, which maps each component to itself, turns it
// by p·θ: θ is known up to a multiple of 1/p, and the fit below tells
// which.
//
// Refinement: the site positions (less the periodic cell of p sites) are
// fitted by least squares with a harmonic series in the rotation
// number(s) plus a linear trend (variable projection;
// topology.RefineFrequencies), the number of harmonics chosen by the
// Bayesian information criterion. In white position noise this is the
// maximum-likelihood estimate; its standard error is the reported
// uncertainty.
func (a *analysis) measureAngles(ctx context.Context, k, p int) (string, error) {
	var rough []float64
	if p <= 1 {
		coords, err := a.reading.coordinates(ctx, a.cloud, k, a.opt)
		if errors.Is(err, topology.ErrDisconnected) {
			// The loops stand out, but at their scale the landmarks fall
			// apart into pieces the H0 bars did not count as components
			// (a hull of several components blurred by noise, say): no
			// coordinate, no angle.
			return fmt.Sprintf("the circular coordinate of the loop is not defined (%v): the hull may have more components than the barcodes resolved; less noise or more sites would decide", err), nil
		}
		if err != nil {
			return "", err
		}
		a.res.Trace.Coordinates = append(a.res.Trace.Coordinates, coords...)
		rough = make([]float64, k)
		for i, c := range coords {
			if rough[i], _, err = a.roughAngle(c, a.em.Rows, 1); err != nil {
				return "", err
			}
		}
	} else {
		var err error
		if rough, err = a.componentAngles(ctx, k, p); err != nil {
			return "", err
		}
	}
	if err := ctx.Err(); err != nil {
		return "", err
	}
	n, x := a.fitSites()
	if p > 1 {
		r, ok := cellResiduals(n, x, p)
		if !ok {
			return fmt.Sprintf("%d sites are too few to fit a cell of %d sites and the angle(s)", len(x), p), nil
		}
		x = r
	}
	// With p components the rough angles are known up to multiples of 1/p:
	// every candidate is fitted and the best fit stands.
	var fit topology.FrequencyFit
	h, err := 0, errors.New("no candidate angle")
	bestRMS := math.Inf(1)
	for _, cand := range shifts(rough, p) {
		f, hh, e := a.refine(n, x, cand)
		if e == nil && f.RMS < bestRMS {
			fit, h, err, bestRMS = f, hh, nil, f.RMS
		}
		if err != nil && e != nil {
			err = e
		}
	}
	if err != nil {
		return "the least-squares fit of the positions on the angle(s) failed (" + err.Error() + "): the angles are not established", nil
	}
	fit, n, x = a.dropOutliers(fit, h, n, x)
	freq, se := fit.Freq, fit.StdErr
	if k >= 2 {
		freq, se = reducedBasis(n, x, freq, se, p, h)
	}
	if why := a.checkModel(n, x, freq, p, h); why != "" {
		return why, nil
	}
	a.setAngles(freq, se)
	a.setResiduals(fit.Residuals, fmt.Sprintf("lattice plus %d harmonic(s) of the angle(s)", h))
	a.res.AngleMethod = fmt.Sprintf("rotation number of the circular coordinate, refined by a least-squares fit of the positions with %d harmonic(s)", h)
	return "", nil
}

// refine fits positions x at indices n from rough angles: on the first
// poolSize sites with the number of harmonics the criterion chooses, then,
// for a longer chain, once on every site.
func (a *analysis) refine(n []int, x []float64, rough []float64) (topology.FrequencyFit, int, error) {
	fit, h, err := bestFit(n[:min(len(n), poolSize)], x[:min(len(x), poolSize)], rough)
	if err == nil && len(x) > poolSize {
		// A long chain: the harmonics and a first frequency come from its
		// first poolSize sites, whose estimate is already far inside the
		// full chain's resolution 1/L; one fit of every site refines it.
		f0 := make([]float64, len(fit.Freq))
		for i, f := range fit.Freq {
			f0[i] = topology.Fold(f)
		}
		fit, err = topology.RefineFrequencies(n, x, f0, topology.FitOptions{Harmonics: h, Combinations: len(f0) >= 2})
	}
	return fit, h, err
}

// shifts returns the candidate angles f + j/p (every j_i in 0..p−1).
func shifts(f []float64, p int) [][]float64 {
	out := [][]float64{slices.Clone(f)}
	for i := range f {
		var next [][]float64
		for _, c := range out {
			for j := 1; j < p; j++ {
				d := slices.Clone(c)
				d[i] += float64(j) / float64(p)
				next = append(next, d)
			}
		}
		out = append(out, next...)
	}
	return out
}

// setAngles folds the angles, puts them in canonical order and stores
// them with their uncertainties.
func (a *analysis) setAngles(f, e []float64) {
	type pair struct{ f, e float64 }
	ps := make([]pair, len(f))
	for i := range f {
		ps[i] = pair{topology.Fold(f[i]), e[i]}
	}
	slices.SortFunc(ps, func(x, y pair) int { return cmp.Compare(x.f, y.f) })
	a.res.Angles, a.res.AngleUncertainty = nil, nil
	for _, p := range ps {
		a.res.Angles = append(a.res.Angles, p.f)
		a.res.AngleUncertainty = append(a.res.AngleUncertainty, p.e)
	}
}

// roughAngle returns the rotation number of the shift read off a circular
// coordinate of the delay vectors, and an uncertainty for it. The shift
// moves a site's vector to the next site's, so the runs of consecutive
// vectors carry the rotation.
//
// With step > 1, coords and rows are those of the vectors of one component,
// and the runs are of vectors step sites apart; rows[i] is the first
// spacing of the vector of coords[i].
func (a *analysis) roughAngle(coords []float64, rows []int, step int) (float64, float64, error) {
	// Runs of consecutive delay vectors (vectors across missing or
	// spurious sites were left out of the cloud).
	var sum float64
	var steps int
	start := 0
	for i := 1; i <= len(coords); i++ {
		if i < len(coords) && rows[i] == rows[i-1]+step {
			continue
		}
		if run := coords[start:i]; len(run) >= 3 {
			rho, err := topology.WeightedRotationNumber(run)
			if err != nil {
				return 0, 0, err
			}
			sum += rho * float64(len(run)-1)
			steps += len(run) - 1
		}
		start = i
	}
	if steps == 0 {
		return 0, 0, errors.New("measuring angles: no run of three consecutive delay vectors")
	}
	rho := sum / float64(steps)
	// The lifted rotation number of a run of K steps is off by at most the
	// coordinate's error at its two ends divided by K; a coordinate is good
	// to a fraction of a turn, so 1/K bounds it.
	return rho, 1 / float64(steps), nil
}

// fitSites returns the site indices and positions to fit: every site but
// the spurious ones.
func (a *analysis) fitSites() ([]int, []float64) {
	var n []int
	var x []float64
	for j, pos := range a.p.Positions {
		if a.spurious[j] {
			continue
		}
		n = append(n, a.index[j])
		x = append(x, pos)
	}
	return n, x
}

// bestFit refines the frequencies from rough values with 1..maxHarmonics
// harmonics (one frequency) or 1..3 orders with combination tones (two or
// three), and keeps the fit with the lowest Bayesian information criterion
// N log(RSS/N) + P log N (Schwarz, Ann. Stat. 6, 1978), stopping once two
// orders past the best have not lowered it (one for three frequencies).
func bestFit(n []int, x []float64, rough []float64) (topology.FrequencyFit, int, error) {
	f0 := make([]float64, len(rough))
	for i, r := range rough {
		f0[i] = topology.Fold(r)
	}
	maxH := maxHarmonics
	if len(f0) >= 2 {
		maxH = 3
	}
	N := float64(len(x))
	best, bestH, bestBIC := topology.FrequencyFit{}, 0, math.Inf(1)
	var firstErr error
	for h := 1; h <= maxH; h++ {
		opt := topology.FitOptions{Harmonics: h, Combinations: len(f0) >= 2}
		terms := 2 + len(f0)
		switch len(f0) {
		case 1:
			terms += 2 * h
		case 2:
			terms += 2 * (2*h + 2*h*h) // an upper bound on the tones; enough for the criterion
		default:
			// Half the points of the 3D ball |m|₁ ≤ h but the origin: the
			// ball holds (2h+1)(2h²+2h+3)/3 points.
			terms += (2*h+1)*(2*h*h+2*h+3)/3 - 1
		}
		if float64(terms) >= N/4 {
			break
		}
		fit, err := topology.RefineFrequencies(n, x, f0, opt)
		if err != nil {
			if firstErr == nil {
				firstErr = err
			}
			continue
		}
		rss := fit.RMS * fit.RMS * N
		bic := N*math.Log(math.Max(rss/N, 1e-300)) + float64(terms)*math.Log(N)
		if bic < bestBIC {
			best, bestH, bestBIC = fit, h, bic
		} else if bestH > 0 && (h >= bestH+2 || len(f0) == 3) {
			// Two more orders did not help (one for three angles, whose
			// tones grow as the cube of the order): the criterion has
			// turned.
			break
		}
	}
	if bestH == 0 {
		if firstErr == nil {
			firstErr = errors.New("too few sites for the harmonic model")
		}
		return best, 0, firstErr
	}
	return best, bestH, nil
}

// reducedBasis rewrites the fitted basis f of the module
// (1/p)Z + Zf1 + … + Zfd in the basis in which the strong lines of the
// positions have the smallest integer coordinates (topology.ReduceBasis):
// the lines are the tones m·f (+ j/p) of the harmonic model of h orders,
// weighted by their fitted power (summed over j). Any basis of the module
// is equally correct; this one is fixed by the pattern, not by the loops
// the circular coordinates happened to follow, and names the angles by
// which the pattern is visibly modulated: when the strongest lines are the
// generators of the modulation, those are the basis. Standard errors are
// propagated through the unimodular change of basis as if independent.
// The fitted basis stands when the lines do not span every angle.
func reducedBasis(n []int, x []float64, f, se []float64, p, h int) ([]float64, []float64) {
	t, ok := harmonicTones(n, x, f, p, h)
	if !ok {
		return f, se
	}
	var lines [][]int
	var weights []float64
	for _, tn := range t {
		if tn.power > 0 && !tn.nearResonance {
			lines, weights = append(lines, tn.m), append(weights, tn.power)
		}
	}
	r, err := topology.ReduceBasis(f, se, lines, weights)
	if err != nil {
		return f, se
	}
	return r.Angles, r.Uncertainty
}

// outlierFactor is how many robust standard deviations (1.4826 × the
// median absolute residual) a site must lie from the fitted model to be
// left out of the angle fit; maxOutliers the largest fraction left out.
const (
	outlierFactor = 6
	maxOutliers   = 0.05
)

// dropOutliers refits without the sites that lie far from the fitted model
// (displaced sites, a spurious site the spacing rules missed), when they
// are few. The residuals of the sites left out stay those of the first fit,
// so they still show in the per-site residuals; the indices and positions
// returned are those of the sites the fit kept.
func (a *analysis) dropOutliers(fit topology.FrequencyFit, h int, n []int, x []float64) (topology.FrequencyFit, []int, []float64) {
	abs := make([]float64, len(fit.Residuals))
	for i, r := range fit.Residuals {
		abs[i] = math.Abs(r)
	}
	slices.Sort(abs)
	sigma := 1.4826 * abs[len(abs)/2]
	var keepN []int
	var keepX []float64
	var keep []int
	for i, r := range fit.Residuals {
		if math.Abs(r) <= outlierFactor*sigma || sigma == 0 {
			keepN, keepX, keep = append(keepN, n[i]), append(keepX, x[i]), append(keep, i)
		} else {
			a.outliers = append(a.outliers, n[i])
		}
	}
	dropped := len(x) - len(keepX)
	if dropped == 0 || float64(dropped) > maxOutliers*float64(len(x)) {
		return fit, n, x
	}
	f0 := make([]float64, len(fit.Freq))
	for i, f := range fit.Freq {
		f0[i] = topology.Fold(f)
	}
	refit, err := topology.RefineFrequencies(keepN, keepX, f0, topology.FitOptions{Harmonics: h, Combinations: len(f0) >= 2})
	if err != nil {
		return fit, n, x
	}
	// Residuals for every input site: the refit's for the kept ones, the
	// first fit's for those left out.
	res := slices.Clone(fit.Residuals)
	for k, i := range keep {
		res[i] = refit.Residuals[k]
	}
	refit.Residuals = res
	a.res.Warnings = append(a.res.Warnings, fmt.Sprintf("%d site(s) lie more than %d robust standard deviations from the fitted hull model and were left out of the angle fit", dropped, outlierFactor))
	return refit, keepN, keepX
}

// componentAngles returns rough angles of a hull of p components ×
// a k-torus: on each component its own circular coordinates, turned by
// the p-th power of the shift through p·θ; the component with the longest
// runs gives p·θ, and θ = (p·θ)/p up to a multiple of 1/p.
func (a *analysis) componentAngles(ctx context.Context, k, p int) ([]float64, error) {
	comps, err := a.reading.componentCoordinates(ctx, a.cloud, k, a.opt)
	if err != nil {
		return nil, err
	}
	if len(comps) != p {
		return nil, fmt.Errorf("measuring angles: the cloud splits into %d components, the barcodes showed %d", len(comps), p)
	}
	best, bestLen := []float64(nil), 0
	for _, c := range comps {
		rows := make([]int, len(c.points))
		for i, j := range c.points {
			rows[i] = a.em.Rows[j]
		}
		rough := make([]float64, k)
		ok := true
		for i, co := range c.coords {
			r, _, err := a.roughAngle(co, rows, p)
			if err != nil {
				ok = false
				break
			}
			rough[i] = r / float64(p)
		}
		if ok && len(c.points) > bestLen {
			best, bestLen = rough, len(c.points)
		}
	}
	if best == nil {
		return nil, errors.New("measuring angles: no component has a run of three delay vectors p sites apart")
	}
	return best, nil
}

// The model check. The angles stated with a class must reproduce the
// positions: the positions are refitted by linear least squares on the
// stated basis f — a trend, the periodic cell of p sites, and the tones
// m·f + j/p, 1 ≤ |m|₁ ≤ h, 0 ≤ j < p — and the residual sum of squares
// RSS, in units of the measured position noise variance σ², must stay
// below modelSlack times the 0.999 quantile of χ² with N − P degrees of
// freedom. σ² is the measured noise variance of one spacing over two
// (independent position noise; common practice), floored at
// (minModelNoise mean spacings)²; the slack of 2 covers the uncertainty of
// the measured noise variance. A wrong basis leaves the modulation itself
// in the residuals, many times the noise.
//
// modelSlack is calibrated by simulation (BenchmarkCalibration in
// calibrate_test.go: a circle, 2 circles and a two-torus at 500 and 2000
// sites, 0.5% to 5% position noise, 40 draws each): the true angles need
// a slack χ²/q of at most 1.10 (circles, 500 sites; 0.72–0.98 for tori)
// and are refused at 2 in 0 of 40 independent draws per class and size up
// to 3% noise (a slack of 1 would refuse one circle in 40); a wrong basis
// — 2θ or θ1 ± θ2 (index 2 in the module) or the angles 0.00001, 0.346 —
// needs at least 3.39 (a torus of 500 sites at 3%), 5.2 for circles, and
// passed at 2 in none of 2800 tries. Below the embedding's noise tolerance
// the ratio for the true angles does not depend on the noise level. At 5%
// noise the measured noise is capped at the tolerance (3%, embed), σ̂² is
// (5/3)² too small, the true angles need 2.6–2.7 and are refused (39/40
// and 40/40): such chains come out unresolved, which the slack is not
// meant to cover.
const (
	modelSlack    = 2
	modelQuantile = 0.999
	minModelNoise = 1e-6
)

// checkModel applies the model check; it returns why the angles fail it,
// empty when they pass.
func (a *analysis) checkModel(n []int, x []float64, f []float64, p, h int) string {
	mc, ok := modelCheck(n, x, f, p, h, a.res.Embedding.NoiseVariance, a.res.MeanSpacing)
	if !ok {
		return fmt.Sprintf("the harmonic model of %d harmonic(s) on the angles %s has more parameters than %d sites can fit: the angles are not established", h, folded(f), len(x))
	}
	if !mc.pass() {
		return fmt.Sprintf("the positions refitted on the angles %s leave residuals of %.3g mean spacings RMS, %.3g times the measured noise %.3g (χ² %.4g over %g degrees of freedom, bound %.4g): the angles do not reproduce the chain", folded(f), mc.rms/mc.mean, math.Sqrt(mc.chi2/mc.dof), math.Sqrt(mc.sigma2)/mc.mean, mc.chi2, mc.dof, mc.bound)
	}
	return ""
}

// modelFigures are the figures of the model check: χ² = RSS/σ² over dof
// degrees of freedom against bound, with the RMS residual, σ² and the mean
// spacing they were computed with.
type modelFigures struct {
	chi2, dof, bound, quantile float64
	rms, sigma2, mean          float64
}

func (m modelFigures) pass() bool { return m.chi2 <= m.bound }

// modelCheck computes the figures of the model check of the angles f on
// positions x at indices n (p sites in the cell, h harmonics), for a
// measured spacing noise variance noiseVar (in mean spacings squared) and
// mean spacing mean; false when the chain is too short for the model.
func modelCheck(n []int, x []float64, f []float64, p, h int, noiseVar, mean float64) (modelFigures, bool) {
	rss, params, ok := harmonicRSS(n, x, f, p, h)
	if !ok {
		return modelFigures{}, false
	}
	sigma2 := math.Max(noiseVar/2, minModelNoise*minModelNoise) * mean * mean
	dof := float64(len(x) - params)
	q := distuv.ChiSquared{K: dof}.Quantile(modelQuantile)
	return modelFigures{chi2: rss / sigma2, dof: dof, bound: modelSlack * q, quantile: q,
		rms: math.Sqrt(rss / float64(len(x))), sigma2: sigma2, mean: mean}, true
}

func folded(f []float64) string {
	out := make([]string, len(f))
	for i, v := range f {
		out[i] = strconv.FormatFloat(topology.Fold(v), 'g', 6, 64)
	}
	return "(" + strings.Join(out, ", ") + ")"
}

// tone is one tone of the harmonic model: its coefficients m on the
// basis, and its fitted power (a² + b² of its sine and cosine, summed over
// the shifts j/p). nearResonance marks a tone within two Rayleigh
// resolutions 2/L of 0 or ½: nearly the trend or the alternation, so its
// amplitude is ill-determined.
type tone struct {
	m             []int
	power         float64
	nearResonance bool
}

// harmonicRSS fits x_n = c0 + c1·n + cell_{n mod p} + Σ tones by linear
// least squares at the frequencies f (see the model check) and returns the
// residual sum of squares and the number of parameters; false when the
// chain is too short for the model.
func harmonicRSS(n []int, x []float64, f []float64, p, h int) (float64, int, bool) {
	rss, cols, _, ok := harmonicFit(n, x, f, p, h)
	return rss, cols, ok
}

// harmonicTones returns the tones of the harmonic model fitted at the
// frequencies f; false when the chain is too short for the model.
func harmonicTones(n []int, x []float64, f []float64, p, h int) ([]tone, bool) {
	_, _, t, ok := harmonicFit(n, x, f, p, h)
	return t, ok
}

// harmonicFit is the fit behind harmonicRSS and harmonicTones.
func harmonicFit(n []int, x []float64, f []float64, p, h int) (float64, int, []tone, bool) {
	L := float64(n[len(n)-1] - n[0] + 1)
	var freqs []float64
	var owner []int // owner[k]: the tone of freqs[k]
	var ts []tone
	taken := func(g float64) bool {
		if g < 0.5/L || g > 0.5-0.5/L {
			return true
		}
		for _, o := range freqs {
			if math.Abs(o-g) < 1/L {
				return true
			}
		}
		return false
	}
	m := make([]int, len(f))
	var walk func(i, left int)
	walk = func(i, left int) {
		if i == len(f) {
			first := 0
			for _, v := range m {
				if v != 0 {
					first = v
					break
				}
			}
			if first <= 0 { // one of ±m, and not m = 0
				return
			}
			t := tone{m: slices.Clone(m)}
			for j := range p {
				g := topology.Fold(dotInts(m, f) + float64(j)/float64(p))
				t.nearResonance = t.nearResonance || g < 2/L || g > 0.5-2/L
				if !taken(g) {
					freqs, owner = append(freqs, g), append(owner, len(ts))
				}
			}
			ts = append(ts, t)
			return
		}
		for v := -left; v <= left; v++ {
			m[i] = v
			walk(i+1, left-abs(v))
		}
	}
	walk(0, h)
	cols := 2 + (p - 1) + 2*len(freqs)
	if len(x) <= cols+1 {
		return 0, 0, nil, false
	}
	mid := 0.5 * float64(n[0]+n[len(n)-1])
	A := mat.NewDense(len(x), cols, nil)
	for i, v := range n {
		t := float64(v) - mid
		A.Set(i, 0, 1)
		A.Set(i, 1, t)
		if j := ((v % p) + p) % p; j > 0 {
			A.Set(i, 1+j, 1)
		}
		for k, g := range freqs {
			s, c := math.Sincos(2 * math.Pi * math.Mod(g*t, 1))
			A.Set(i, 1+p+2*k, s)
			A.Set(i, 2+p+2*k, c)
		}
	}
	var qr mat.QR
	qr.Factorize(A)
	var beta mat.Dense
	if err := qr.SolveTo(&beta, false, mat.NewDense(len(x), 1, slices.Clone(x))); err != nil {
		return 0, 0, nil, false
	}
	var fitted mat.Dense
	fitted.Mul(A, &beta)
	var rss float64
	for i := range x {
		r := x[i] - fitted.At(i, 0)
		rss += r * r
	}
	for k, o := range owner {
		a, b := beta.At(1+p+2*k, 0), beta.At(2+p+2*k, 0)
		ts[o].power += a*a + b*b
	}
	return rss, cols, ts, true
}

func dotInts(m []int, f []float64) float64 {
	var s float64
	for i, v := range m {
		s += float64(v) * f[i]
	}
	return s
}

func abs(v int) int {
	if v < 0 {
		return -v
	}
	return v
}
