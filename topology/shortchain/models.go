package shortchain

import (
	"context"
	"math"
	"sort"

	"phasonhull/topology"
)

// The candidate models, in units of the mean spacing (positions y_n,
// n = 0..N−1, spacings s_n = y_{n+1} − y_n, M = N − 1 of them):
//
//	lattice      y_n = c + n·L + e_n
//	cell p       y_n = c + n·L + u_{n mod p} + e_n            p = 2..6
//	harmonic     y_n = c + n·L + Σ_{k≤H} a_k sin 2πknθ + b_k cos 2πknθ + e_n
//	independent  s_n = L + η_n
//
// with e_n (position noise) and η_n (spacing noise) independent Gaussians.
// The first three differ only in their mean; the fourth in its covariance.
// All four are compared as models of the spacings, the data that does not
// depend on where the chain starts.
//
// Position noise gives the spacings s = D·y the covariance σ²·DDᵀ, D the
// M×N difference matrix: the tridiagonal matrix (2, −1), whose lag-1
// autocorrelation is −½ (common practice) and whose determinant is M + 1 = N.
// Its generalised least squares over any mean with a constant column is the
// ordinary least squares of the positions (Dᵀ(DDᵀ)⁻¹D projects on the
// vectors orthogonal to the constant), so the maximised log-likelihood is
//
//	ℓ = −(M/2)·(ln 2πσ̂² + 1) − ½·ln N,   σ̂² = RSS_positions / M.
//
// Independent spacings have covariance τ²·I and
//
//	ℓ = −(M/2)·(ln 2πτ̂² + 1),            τ̂² = Σ(s_n − s̄)² / M.
//
// Neither variance is used to call anything equal: only the likelihood of
// each model's covariance shape is compared, with a penalty k·ln M for k
// free parameters, and the winner is called only when its
// lead over every other class exceeds a threshold calibrated by simulation
// (table.go).

// penalty is the price of k free parameters on M spacings: twice the
// Schwarz penalty, so that a simpler model can lead a richer one that
// fits no better by a margin the calibration can use.
func penalty(k int, M float64) float64 { return float64(k) * math.Log(M) }

// maxPeriod and maxHarmonics bound the cell and the harmonic models.
const (
	maxPeriod    = 6
	maxHarmonics = 3
)

// fit is one fitted model.
type fit struct {
	kind      Kind
	period    int       // cell
	angle     float64   // harmonic
	angleErr  float64   // harmonic
	harmonics int       // harmonic
	params    int       // free parameters of the spacings' model
	posCols   int       // columns of the positions' mean, constant included
	rss       float64   // residual sum of squares (positions, or spacings for independent)
	resid     []float64 // position residuals (nil for independent)
	score     float64   // ℓ − (params/2)·ln M
}

// chain holds a chain in units of its mean spacing.
type chain struct {
	y     []float64 // positions, y_0 = 0
	n     []int     // site indices 0..N−1
	s     []float64 // spacings
	floor float64   // variance floor (resolution²), in mean spacings²
}

func (c *chain) m() float64 { return float64(len(c.s)) }

// positionScore scores a position-noise model from its residual sum of squares.
func (c *chain) positionScore(rss float64, params int) float64 {
	M := c.m()
	v := rss/M + c.floor
	ll := -0.5*M*(math.Log(2*math.Pi*v)+1) - 0.5*math.Log(float64(len(c.y)))
	return ll - penalty(params, M)
}

// lattice fits y_n = c + nL.
func (c *chain) lattice() fit {
	cols := [][]float64{ones(len(c.y)), index(len(c.y))}
	rss, res := leastSquares(cols, c.y)
	return fit{kind: Lattice, params: 2, posCols: 2, rss: rss, resid: res, score: c.positionScore(rss, 2)}
}

// cell fits a periodic cell of p offsets and returns the best p by score.
func (c *chain) cell() fit {
	N := len(c.y)
	best := fit{kind: Cell, score: math.Inf(-1)}
	for p := 2; p <= maxPeriod; p++ {
		if N < 2*p+4 {
			break
		}
		cols := [][]float64{ones(N), index(N)}
		for j := 1; j < p; j++ {
			col := make([]float64, N)
			for i := j; i < N; i += p {
				col[i] = 1
			}
			cols = append(cols, col)
		}
		rss, res := leastSquares(cols, c.y)
		k := 2 + p - 1
		if s := c.positionScore(rss, k); s > best.score {
			best = fit{kind: Cell, period: p, params: k, posCols: 1 + p, rss: rss, resid: res, score: s}
		}
	}
	return best
}

// harmonic scans the angle θ of one sine over a grid of step 1/(4N) in
// [0.75/N, ½ − 0.5/N], refines the two deepest minima of the residual by
// nonlinear least squares (topology.RefineFrequency), and refits the better
// angle with up to maxHarmonics harmonics, keeping the best by score.
func (c *chain) harmonic(ctx context.Context) (fit, error) {
	N := len(c.y)
	lat := c.lattice()
	r := lat.resid
	q1, q2 := orthonormalTrend(N)
	type peak struct{ theta, gain float64 }
	var grid []peak
	step := 1 / (4 * float64(N))
	sn, cs := make([]float64, N), make([]float64, N)
	for th := 0.75 / float64(N); th <= 0.5-0.5/float64(N); th += step {
		// sin and cos of 2πθn by rotation, re-anchored every 32 sites.
		ds, dc := math.Sincos(2 * math.Pi * th)
		for i := range N {
			if i%32 == 0 {
				sn[i], cs[i] = math.Sincos(2 * math.Pi * th * float64(i))
				continue
			}
			sn[i] = sn[i-1]*dc + cs[i-1]*ds
			cs[i] = cs[i-1]*dc - sn[i-1]*ds
		}
		removeTrend(sn, q1, q2)
		removeTrend(cs, q1, q2)
		a, b, d := dot(sn, sn), dot(sn, cs), dot(cs, cs)
		u, v := dot(sn, r), dot(cs, r)
		det := a*d - b*b
		if det <= 1e-12*a*d {
			grid = append(grid, peak{th, 0})
			continue
		}
		grid = append(grid, peak{th, (d*u*u - 2*b*u*v + a*v*v) / det})
	}
	var peaks []peak
	for i, p := range grid {
		if (i == 0 || p.gain >= grid[i-1].gain) && (i == len(grid)-1 || p.gain > grid[i+1].gain) {
			peaks = append(peaks, p)
		}
	}
	sort.Slice(peaks, func(i, j int) bool { return peaks[i].gain > peaks[j].gain })
	if len(peaks) > 2 {
		peaks = peaks[:2]
	}
	best := fit{kind: Harmonic, score: math.Inf(-1)}
	try := func(theta float64, h int) {
		k := 2 + 2*h + 1
		if len(c.s) < k+6 {
			return
		}
		f, err := topology.RefineFrequency(c.n, c.y, theta, h)
		if err != nil {
			return
		}
		rss := f.RMS * f.RMS * float64(N)
		if s := c.positionScore(rss, k); s > best.score {
			best = fit{kind: Harmonic, angle: topology.Fold(f.Freq[0]), angleErr: f.StdErr[0], harmonics: h,
				params: k, posCols: 2 + 2*h, rss: rss, resid: f.Residuals, score: s}
		}
	}
	for _, p := range peaks {
		if err := ctx.Err(); err != nil {
			return fit{}, err
		}
		try(p.theta, 1)
	}
	if math.IsInf(best.score, -1) {
		return best, nil
	}
	theta := best.angle
	for h := 2; h <= maxHarmonics; h++ {
		try(theta, h)
	}
	return best, nil
}

// independent fits independent spacings s_n = L + η_n.
func (c *chain) independent() fit {
	M := c.m()
	mean := 0.0
	for _, v := range c.s {
		mean += v
	}
	mean /= M
	rss := 0.0
	for _, v := range c.s {
		rss += (v - mean) * (v - mean)
	}
	// The spacing of two positions each resolved to the floor.
	v := rss/M + 2*c.floor
	ll := -0.5 * M * (math.Log(2*math.Pi*v) + 1)
	return fit{kind: Independent, params: 2, rss: rss, score: ll - penalty(2, M)}
}

// leastSquares returns the residual sum of squares and the residuals of y
// on the span of cols, by modified Gram–Schmidt applied twice (enough for
// the few well-scaled columns here); a column already in the span of the
// ones before it is dropped.
func leastSquares(cols [][]float64, y []float64) (float64, []float64) {
	r := append([]float64(nil), y...)
	var q [][]float64
	for _, c := range cols {
		v := append([]float64(nil), c...)
		n0 := math.Sqrt(dot(v, v))
		for range 2 {
			for _, u := range q {
				axpy(-dot(u, v), u, v)
			}
		}
		nv := math.Sqrt(dot(v, v))
		if nv <= 1e-10*n0 {
			continue
		}
		for i := range v {
			v[i] /= nv
		}
		q = append(q, v)
	}
	for range 2 {
		for _, u := range q {
			axpy(-dot(u, r), u, r)
		}
	}
	return dot(r, r), r
}

// orthonormalTrend returns an orthonormal basis of the constants and the
// linear trend on N sites.
func orthonormalTrend(N int) ([]float64, []float64) {
	q1, q2 := make([]float64, N), make([]float64, N)
	mid := 0.5 * float64(N-1)
	var s float64
	for i := range N {
		q1[i] = 1 / math.Sqrt(float64(N))
		q2[i] = float64(i) - mid
		s += q2[i] * q2[i]
	}
	s = math.Sqrt(s)
	for i := range q2 {
		q2[i] /= s
	}
	return q1, q2
}

func removeTrend(v, q1, q2 []float64) {
	axpy(-dot(q1, v), q1, v)
	axpy(-dot(q2, v), q2, v)
}

func ones(N int) []float64 {
	v := make([]float64, N)
	for i := range v {
		v[i] = 1
	}
	return v
}

func index(N int) []float64 {
	v := make([]float64, N)
	for i := range v {
		v[i] = float64(i)
	}
	return v
}

func dot(a, b []float64) float64 {
	s := 0.0
	for i := range a {
		s += a[i] * b[i]
	}
	return s
}

func axpy(a float64, x, y []float64) {
	for i := range x {
		y[i] += a * x[i]
	}
}

// lag1 returns the lag-1 autocorrelation of the differences of v (the
// residual spacings) and its sampling error by Bartlett's formula for a
// moving average of order one, (1 − 3ρ² + 4ρ⁴)/M (Bartlett 1946; common
// practice).
func lag1(d []float64) (float64, float64) {
	M := float64(len(d))
	mean := 0.0
	for _, v := range d {
		mean += v
	}
	mean /= M
	var c0, c1 float64
	for i, v := range d {
		c0 += (v - mean) * (v - mean)
		if i > 0 {
			c1 += (v - mean) * (d[i-1] - mean)
		}
	}
	if c0 == 0 {
		return 0, math.Sqrt(1 / M)
	}
	rho := c1 / c0
	return rho, math.Sqrt(math.Max(1-3*rho*rho+4*rho*rho*rho*rho, 0) / M)
}

func diff(v []float64) []float64 {
	d := make([]float64, len(v)-1)
	for i := range d {
		d[i] = v[i+1] - v[i]
	}
	return d
}
