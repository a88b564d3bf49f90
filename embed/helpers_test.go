package embed

import (
	"math"
	"math/rand/v2"
)

// The test patterns are built from explicit formulas, so that this
// package's tests stand on their own.

// Golden-mean and other badly approximable step angles (in turns) keep the
// phases nθ equidistributed with O(log N / N) discrepancy.
const (
	theta1 = 0.2763
	theta2 = 0.3819660112501051 // 2 − φ, φ the golden mean
)

// harmonic returns n spacings d_j = 1 + Σ_i amp[i]·cos(2π(j·theta[i] + phase[i])).
func harmonic(n int, amp, theta, phase []float64) []float64 {
	d := make([]float64, n)
	for j := range d {
		d[j] = 1
		for i := range amp {
			d[j] += amp[i] * math.Cos(2*math.Pi*(float64(j)*theta[i]+phase[i]))
		}
	}
	return d
}

// circleSpacings is a one-harmonic modulation: a circle hull.
func circleSpacings(n int) []float64 {
	return harmonic(n, []float64{0.2}, []float64{theta1}, []float64{0.1})
}

// torusSpacings is a two-angle modulation: a 2-torus hull.
func torusSpacings(n int) []float64 {
	return harmonic(n, []float64{0.15, 0.15}, []float64{theta1, theta2}, []float64{0.1, 0.3})
}

// periodicSpacings repeats cell to n spacings.
func periodicSpacings(cell []float64, n int) []float64 {
	d := make([]float64, n)
	for i := range d {
		d[i] = cell[i%len(cell)]
	}
	return d
}

// randomSpacings draws n independent spacings uniform on [1−s, 1+s].
func randomSpacings(n int, s float64, seed uint64) []float64 {
	rng := rand.New(rand.NewPCG(seed, 0))
	d := make([]float64, n)
	for i := range d {
		d[i] = 1 - s + 2*s*rng.Float64()
	}
	return d
}

// positions returns the sites 0, d_0, d_0+d_1, … of spacings d.
func positions(d []float64) []float64 {
	x := make([]float64, len(d)+1)
	for i, v := range d {
		x[i+1] = x[i] + v
	}
	return x
}

// jitter moves every site of the chain with spacings d by an independent
// normal offset of standard deviation sigma (in units of the spacings) and
// returns the new spacings.
func jitter(d []float64, sigma float64, seed uint64) []float64 {
	rng := rand.New(rand.NewPCG(seed, 2))
	x := positions(d)
	for i := range x {
		x[i] += sigma * rng.NormFloat64()
	}
	out := make([]float64, len(d))
	for i := range out {
		out[i] = x[i+1] - x[i]
	}
	return out
}
