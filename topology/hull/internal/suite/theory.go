package main

import (
	"errors"
	"math"

	"gonum.org/v1/gonum/mat"
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
