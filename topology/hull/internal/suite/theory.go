package main

import (
	"errors"
	"math"
	"slices"

	"gonum.org/v1/gonum/mat"

	"phasonhull/topology/hull"
)

// kayCRB is the Cramér–Rao bound on the variance of the frequency (in
// turns per site) of a real sinusoid of amplitude a in white noise of
// variance σ², from N samples, with amplitude, frequency and phase
// unknown: 24σ²/((2π)² a² N(N²−1)) (Rife & Boorstyn, IEEE Trans. Inf.
// Theory 20, 1974; Kay, Fundamentals of Statistical Signal Processing,
// 1993, Example 3.14, written with the SNR a²/2σ²).
func kayCRB(n int, a, sigma float64) float64 {
	N := float64(n)
	return 24 * sigma * sigma / (4 * math.Pi * math.Pi * a * a * N * (N*N - 1))
}

// exactCRB is the Cramér–Rao bound on the variance of θ for the model the
// analysis fits, x_n = c + L·n + a sin 2π(nθ + φ) + e_n, e_n white of
// variance σ², computed from its Fisher information J = Σ g_n g_nᵀ / σ²
// (g_n the gradient of the mean in (c, L, a, θ, φ)) by inversion. It has
// the two trend parameters beyond kayCRB's model, and no large-N
// approximation.
func exactCRB(n int, a, theta, phase, sigma float64) (float64, error) {
	const d = 5
	j := mat.NewSymDense(d, nil)
	g := make([]float64, d)
	for i := range n {
		t := float64(i)
		s, c := math.Sincos(2 * math.Pi * (t*theta + phase))
		g[0], g[1], g[2], g[3], g[4] = 1, t, s, 2*math.Pi*a*t*c, 2*math.Pi*a*c
		for p := range d {
			for q := p; q < d; q++ {
				j.SetSym(p, q, j.At(p, q)+g[p]*g[q])
			}
		}
	}
	// Normalise to unit diagonal before inverting: the entries span many
	// orders of magnitude.
	scale := make([]float64, d)
	for p := range d {
		scale[p] = math.Sqrt(j.At(p, p))
	}
	c := mat.NewSymDense(d, nil)
	for p := range d {
		for q := p; q < d; q++ {
			c.SetSym(p, q, j.At(p, q)/(scale[p]*scale[q]))
		}
	}
	var ch mat.Cholesky
	if !ch.Factorize(c) {
		return 0, errors.New("the Fisher information is singular")
	}
	var inv mat.SymDense
	if err := ch.InverseTo(&inv); err != nil {
		return 0, err
	}
	return sigma * sigma * inv.At(3, 3) / (scale[3] * scale[3]), nil
}

// --- when a case can be decided -----------------------------------------------

// Normal quantiles of the suite's decidability rule: a class is decidable
// at a size when a one-sided test against its nearest rival, at a 1%
// false-call rate, has 90% power there (common practice).
const (
	zFalse     = 2.3263 // the 99% quantile of the standard normal
	zPower     = 1.2816 // the 90% quantile
	falseAlarm = 0.01
)

// autocorrSites is the smallest chain whose spacings tell a lattice with
// position noise from independent spacings: position noise leaves the
// lag-1 autocorrelation of the spacings at −½, independent spacings at 0,
// and the sample autocorrelation of m spacings has standard error about
// 1/√m (Bartlett's formula; common practice), so m ≥ ((zFalse+zPower)/½)².
func autocorrSites() int {
	m := math.Ceil(math.Pow((zFalse+zPower)/0.5, 2))
	return int(m) + 1
}

// lineDetected reports whether a sinusoid of amplitude a in the positions,
// under white position noise σ, stands out of the periodogram of n sites:
// its peak is about n·a²/4 over a noise level σ² (common practice), and
// the largest of n/2 noise ordinates exceeds ln(n/(2α)) times the level
// with probability α (Fisher's test; common practice). The rule asks for
// twice that threshold, which gives the line 90% power. Noise-free, any
// line of nonzero amplitude stands out.
func lineDetected(n int, a, sigma float64) bool {
	if a == 0 {
		return false
	}
	if sigma == 0 {
		return true
	}
	N := float64(n)
	return N*a*a/(4*sigma*sigma) >= 2*math.Log(N/(2*falseAlarm))
}

// cellResolved reports whether a cell of spacings repeated over n sites
// shows its period: at least three periods, and (under position noise σ,
// which gives each spacing the standard deviation √2σ) the two closest
// distinct cell spacings, each averaged over its r repeats, told apart by
// the rule's test: δ ≥ (zFalse+zPower)·√2·√2σ/√r.
func cellResolved(n int, cell []float64, sigma float64) bool {
	p := len(cell)
	r := (n - 1) / p
	if r < 3 {
		return false
	}
	delta := math.Inf(1)
	for i := range cell {
		for j := range i {
			if d := math.Abs(cell[i] - cell[j]); d > 0 {
				delta = min(delta, d)
			}
		}
	}
	if math.IsInf(delta, 1) || sigma == 0 {
		return true
	}
	return delta >= (zFalse+zPower)*2*sigma/math.Sqrt(float64(r))
}

// decidable reports whether the class of the case can be told from its
// nearest rival on n sites at the case's noise, by the rules above:
//
//   - a lattice (point): exact below any noise; with noise, the rival is
//     independent spacings (autocorrSites);
//   - a cell (finite, and the cell of a decorated hull): cellResolved;
//   - a modulation (circle, torus, 3-torus, decorated): every angle's
//     strongest line detected (lineDetected), and a rational angle p/q
//     seen over three periods;
//   - independent spacings (disordered): the rival is a lattice with
//     position noise (autocorrSites).
//
// Families the rules do not cover (loop, circle-map, the tilings) count
// as decidable.
func decidable(c Case, n int) bool {
	s, sigma := c.Spec, c.Noise
	strongest := func(amps ...float64) float64 {
		m := 0.0
		for _, a := range amps {
			m = max(m, math.Abs(a))
		}
		return m
	}
	switch s.Family {
	case "periodic":
		if len(s.Cell) == 1 || c.Period == 1 {
			return sigma == 0 || n >= autocorrSites()
		}
		return cellResolved(n, s.Cell, sigma)
	case "random":
		return n >= autocorrSites()
	case "modulated":
		if c.Class == hull.Finite && n-1 < 3*c.Period {
			return false
		}
		return lineDetected(n, strongest(append(slices.Clone(s.Sin), s.Cos...)...), sigma)
	case "decorated":
		if !cellResolved(n, s.Cell[:cellPeriodOf(s.Cell)], sigma) {
			return false
		}
		if len(s.Thetas) > 0 { // several angles: every one's line
			for _, a := range s.Amps {
				if a != 0 && !lineDetected(n, math.Abs(a), sigma) {
					return false
				}
			}
			return true
		}
		return lineDetected(n, strongest(append(slices.Clone(s.Sin), s.Cos...)...), sigma)
	case "two-angle":
		return lineDetected(n, math.Abs(s.Amp), sigma) && lineDetected(n, math.Abs(s.Amp2), sigma)
	case "multi-angle":
		for _, a := range s.Amps {
			if a != 0 && !lineDetected(n, math.Abs(a), sigma) {
				return false
			}
		}
		return true
	}
	return true
}

// decidingSites is the smallest number of sites, up to 10⁶, at which the
// case is decidable (0 when it is at every size from 8 on); the rules'
// conditions only get easier with more sites.
func decidingSites(c Case) int {
	const most = 1_000_000
	if decidable(c, 8) {
		return 0
	}
	lo, hi := 8, 16
	for hi < most && !decidable(c, hi) {
		lo, hi = hi, 2*hi
	}
	for hi-lo > 1 {
		mid := (lo + hi) / 2
		if decidable(c, mid) {
			hi = mid
		} else {
			lo = mid
		}
	}
	return hi
}
