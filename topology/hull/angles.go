package hull

import (
	"cmp"
	"context"
	"errors"
	"fmt"
	"math"
	"slices"

	"phasonhull/topology"
)

// measureAngles measures the effective step angle(s) of a circle or torus
// hull.
//
// Rough value: the most persistent H1 cocycle(s) of the landmark barcode
// give circular coordinates (de Silva, Morozov & Vejdemo-Johansson 2011),
// extended to every delay vector; the rotation number of the shift is the
// mean lifted increment of the coordinate from one vector to the next,
// weighted as Das & Yorke (2018) prescribe when the chain has no gaps.
// This is the rotation number on the hull, not any generating parameter:
// it is what a deformed loop or a nonlinear circle map still has.
//
// Refinement: the site positions are fitted by least squares with a
// harmonic series in the rotation number(s) plus a linear trend (variable
// projection; topology.RefineFrequencies), the number of harmonics chosen
// by the Bayesian information criterion. In white position noise this is
// the maximum-likelihood estimate; its standard error is the reported
// uncertainty. Where the fit cannot be made, the rough value stands, with
// its own uncertainty.
//
// k is the number of angles: 1 for a circle, 2 for a torus.
func (a *analysis) measureAngles(ctx context.Context, k int) error {
	coords, err := a.reading.coordinates(a.cloud, k)
	if err != nil {
		return err
	}
	a.res.Trace.Coordinates = append(a.res.Trace.Coordinates, coords...)
	rough := make([]float64, k)
	roughErr := make([]float64, k)
	for i, c := range coords {
		rough[i], roughErr[i], err = a.roughAngle(c)
		if err != nil {
			return err
		}
	}
	if err := ctx.Err(); err != nil {
		return err
	}
	n, x := a.fitSites()
	fit, h, err := bestFit(n[:min(len(n), poolSize)], x[:min(len(x), poolSize)], rough)
	if err == nil && len(x) > poolSize {
		// A long chain: the harmonics and a first frequency come from its
		// first poolSize sites, whose estimate is already far inside the
		// full chain's resolution 1/L; one fit of every site refines it.
		f0 := make([]float64, len(fit.Freq))
		for i, f := range fit.Freq {
			f0[i] = topology.Fold(f)
		}
		fit, err = topology.RefineFrequencies(n, x, f0, topology.FitOptions{Harmonics: h, Combinations: len(f0) == 2})
	}
	if err == nil {
		fit, n, x = a.dropOutliers(fit, h, n, x)
	}
	if err != nil {
		// The rough angles stand.
		a.res.Warnings = append(a.res.Warnings, "the least-squares refinement of the angle failed ("+err.Error()+"); the angle is the circular-coordinate estimate")
		a.setAngles(rough, roughErr)
		a.res.AngleMethod = "rotation number of the circular coordinate"
		return nil
	}
	freq, se := fit.Freq, fit.StdErr
	if k == 2 {
		freq, se = dominantBasis(n, x, freq, se)
	}
	a.setAngles(freq, se)
	a.setResiduals(fit.Residuals, fmt.Sprintf("lattice plus %d harmonic(s) of the angle(s)", h))
	a.res.AngleMethod = fmt.Sprintf("rotation number of the circular coordinate, refined by a least-squares fit of the positions with %d harmonic(s)", h)
	for i := range rough {
		if d := math.Abs(topology.Fold(fit.Freq[i]) - topology.Fold(rough[i])); d > 3*roughErr[i]+3*fit.StdErr[i] {
			a.res.Warnings = append(a.res.Warnings, fmt.Sprintf("the refined angle %.6g differs from the circular-coordinate estimate %.6g by more than their uncertainties: check the class", topology.Fold(fit.Freq[i]), topology.Fold(rough[i])))
		}
	}
	return nil
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
func (a *analysis) roughAngle(coords []float64) (float64, float64, error) {
	// Runs of consecutive delay vectors (vectors across missing or
	// spurious sites were left out of the cloud).
	rows := a.em.Rows
	var sum float64
	var steps int
	start := 0
	for i := 1; i <= len(coords); i++ {
		if i < len(coords) && rows[i] == rows[i-1]+1 {
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
// harmonics (one frequency) or 1..3 orders with combination tones (two),
// and keeps the fit with the lowest Bayesian information criterion
// N log(RSS/N) + P log N (Schwarz, Ann. Stat. 6, 1978), stopping once two
// orders past the best have not lowered it.
func bestFit(n []int, x []float64, rough []float64) (topology.FrequencyFit, int, error) {
	f0 := make([]float64, len(rough))
	for i, r := range rough {
		f0[i] = topology.Fold(r)
	}
	maxH := maxHarmonics
	if len(f0) == 2 {
		maxH = 3
	}
	N := float64(len(x))
	best, bestH, bestBIC := topology.FrequencyFit{}, 0, math.Inf(1)
	var firstErr error
	for h := 1; h <= maxH; h++ {
		opt := topology.FitOptions{Harmonics: h, Combinations: len(f0) == 2}
		terms := 2 + len(f0)
		if len(f0) == 1 {
			terms += 2 * h
		} else {
			terms += 2 * (2*h + 2*h*h) // an upper bound on the tones; enough for the criterion
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
		} else if bestH > 0 && h >= bestH+2 {
			break // two more harmonics did not help: the criterion has turned
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

// dominantBasis rewrites two frequencies f (a basis of the module
// Z + Zf1 + Zf2) in the basis of the two strongest tones of the positions:
// among the tones m·f with |m_i| ≤ 3, ranked by the periodogram of the
// detrended positions, the strongest one and the next strongest that
// completes it to a unimodular basis (det = ±1, so the module is
// unchanged). Any basis of the module is equally correct; this one names
// the angles by which the pattern is visibly modulated, so that the same
// pattern gives the same basis whichever loops the circular coordinates
// happened to follow. Standard errors are propagated as if independent.
func dominantBasis(n []int, x []float64, f, se []float64) ([]float64, []float64) {
	r, ok := cellResiduals(n, x, 1)
	if !ok {
		return f, se
	}
	type tone struct {
		m     [2]int
		power float64
	}
	var tones []tone
	span := float64(n[len(n)-1] - n[0] + 1)
	for m1 := 0; m1 <= 3; m1++ {
		for m2 := -3; m2 <= 3; m2++ {
			if m1 == 0 && m2 <= 0 {
				continue // one of ±m
			}
			g := float64(m1)*f[0] + float64(m2)*f[1]
			// A tone within the resolution of 0 or ½ is a near-resonance
			// (a small element of the module), not a modulation the
			// pattern shows; it would also pick up the trend.
			if fg := topology.Fold(g); fg < 2/span || fg > 0.5-2/span {
				continue
			}
			var re, im float64
			for i, v := range n {
				s, c := math.Sincos(2 * math.Pi * g * float64(v))
				re += r[i] * c
				im += r[i] * s
			}
			tones = append(tones, tone{[2]int{m1, m2}, re*re + im*im})
		}
	}
	slices.SortStableFunc(tones, func(a, b tone) int { return cmp.Compare(b.power, a.power) })
	if len(tones) < 2 {
		return f, se
	}
	first := tones[0].m
	for _, t := range tones[1:] {
		if det := first[0]*t.m[1] - first[1]*t.m[0]; det == 1 || det == -1 {
			out := make([]float64, 2)
			outSE := make([]float64, 2)
			for i, m := range [2][2]int{first, t.m} {
				out[i] = float64(m[0])*f[0] + float64(m[1])*f[1]
				outSE[i] = math.Hypot(float64(m[0])*se[0], float64(m[1])*se[1])
			}
			return out, outSE
		}
	}
	return f, se
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
// so they still show in the per-site residuals.
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
	refit, err := topology.RefineFrequencies(keepN, keepX, f0, topology.FitOptions{Harmonics: h, Combinations: len(f0) == 2})
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
	return refit, n, x
}
