// Package simchain holds what the calibrations' simulated chains share.
package simchain

import "math/rand/v2"

// Shake adds Gaussian noise of standard deviation sigma to the positions x
// (in place) and keeps them increasing: at the noises simulated a swap is
// rare, and it is undone by sorting, as a reader would.
func Shake(x []float64, sigma float64, r *rand.Rand) []float64 {
	if sigma > 0 {
		for i := range x {
			x[i] += sigma * r.NormFloat64()
		}
	}
	for i := 1; i < len(x); i++ {
		for j := i; j > 0 && x[j] < x[j-1]; j-- {
			x[j], x[j-1] = x[j-1], x[j]
		}
	}
	return x
}
