package hull

import (
	"math"

	"gonum.org/v1/gonum/stat"

	"phasonhull/embed"
)

// estimatorSample bounds the points the nearest-neighbour estimators see:
// the first estimatorSample delay vectors (and spacing pairs) in chain
// order, so the cost stays bounded and the result deterministic.
const estimatorSample = 4000

// disorderFigures estimates, on the clean spacings and the delay cloud, the
// mutual information of consecutive spacings (Kraskov, Stögbauer &
// Grassberger, Phys. Rev. E 69, 066138, 2004) and the intrinsic dimension
// of the cloud (Levina & Bickel, NIPS 17, 2004), with k = 4 neighbours and
// k = 5..15.
func (a *analysis) disorderFigures() (mi, dim float64, ok bool) {
	u := a.cleanSpacings()
	var x, y [][]float64
	for i := 0; i+1 < len(u) && len(x) < estimatorSample; i++ {
		x = append(x, []float64{u[i]})
		y = append(y, []float64{u[i+1]})
	}
	mi, err := embed.MutualInformation(x, y, 4)
	if err != nil {
		return 0, 0, false
	}
	cloud := a.em.Whitened.Cloud
	if len(cloud) > estimatorSample {
		cloud = cloud[:estimatorSample]
	}
	dim, err = embed.IntrinsicDimension(cloud, 5, 15)
	if err != nil {
		return mi, 0, false
	}
	return mi, dim, true
}

// Thresholds of the disorder rules.
const (
	// independentMI is the mutual information, in nats, below which
	// consecutive spacings count as independent: the KSG estimator's
	// bias for independent samples of a few thousand is a few hundredths.
	independentMI = 0.1
	// acfLags is the number of autocorrelation lags the jitter test
	// examines.
	acfLags = 8
)

// noiseKind tells apart the ways a chain of nearly equal spacings can
// scatter, from the autocorrelation of its spacings at lags 1 to acfLags,
// each judged within four standard errors 1/√N (Bartlett's formula for
// white noise; common practice):
//
//   - exact: the spacings agree to rounding;
//   - jittered: a uniform lattice with independent position noise — the
//     spacing noise e_{n+1} − e_n is a moving average, with autocorrelation
//     −½ at lag 1 and 0 beyond; jitter of any size passes;
//   - independent: no correlation at any lag — independent spacings, whose
//     positions wander like a random walk away from any lattice;
//   - other: neither, or too few spacings (fewer than 50) to tell.
type noiseKind int

const (
	otherNoise noiseKind = iota
	exactLattice
	jitteredLattice
	independentSpacings
)

func classifyNoise(u []float64) noiseKind {
	n := len(u)
	m, v := stat.PopMeanVariance(u, nil)
	s0 := v * float64(n)
	if math.Sqrt(v) <= 1e-9*math.Abs(m) {
		return exactLattice
	}
	if n < 50 {
		return otherNoise
	}
	acf := func(k int) float64 {
		var s float64
		for i := 0; i+k < n; i++ {
			s += (u[i] - m) * (u[i+k] - m)
		}
		return s / s0
	}
	tol := 4 / math.Sqrt(float64(n))
	rest := true
	for k := 2; k <= acfLags; k++ {
		rest = rest && math.Abs(acf(k)) <= tol
	}
	// The nearer of the two hypotheses, if it fits: with few spacings
	// both may lie within the tolerance.
	r1 := acf(1)
	switch {
	case rest && math.Abs(r1+0.5) <= tol && math.Abs(r1+0.5) < math.Abs(r1):
		return jitteredLattice
	case rest && math.Abs(r1) <= tol:
		return independentSpacings
	}
	return otherNoise
}

// spacingSpread sets the disorder figure of a chain without a hull model:
// the standard deviation of its spacings.
func (a *analysis) spacingSpread() {
	rel := math.Sqrt(stat.PopVariance(a.cleanSpacings(), nil))
	a.res.Disorder = &Disorder{RMS: rel * a.res.MeanSpacing, Relative: rel, Model: "none: the spread of the spacings"}
}

// latticeFits checks a jittered lattice against the positions: on a
// lattice with independent position noise of variance σ², the spacings
// have variance 2σ², so the sites must lie on the fitted lattice within
// cellFitFactor·σ, σ = sd(spacings)/√2. Independent spacings wander away
// like a random walk, far beyond that.
func (a *analysis) latticeFits(u []float64) bool {
	return a.cellFits(1, stat.PopVariance(u, nil))
}
