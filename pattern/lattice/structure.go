package lattice

import "math"

// StructureFactor returns S(k) = |Σ_j exp(−2πi k·x_j)|² / N for each
// wave vector k (in turns per unit length, the convention of Reciprocal)
// over the N points. A perfect lattice of N sites has S(G) = N at every
// reciprocal lattice vector G; a set with no order has S(k) ≈ 1 away from
// k = 0.
func StructureFactor(points [][2]float64, k [][2]float64) []float64 {
	s := make([]float64, len(k))
	if len(points) == 0 {
		return s
	}
	for i, q := range k {
		var re, im float64
		for _, x := range points {
			sn, cs := math.Sincos(2 * math.Pi * (q[0]*x[0] + q[1]*x[1]))
			re += cs
			im -= sn
		}
		s[i] = (re*re + im*im) / float64(len(points))
	}
	return s
}
