package lattice

import "math"

// Reciprocal returns the reciprocal basis b1 = R[0], b2 = R[1] of the
// lattice, with b_i·a_j = δ_ij (turns per unit length: exp(2πi b·x) is 1
// on every lattice point relative to the origin). The lattice index of a
// position x is n_i = b_i·(x − Origin).
func (l *Lattice) Reciprocal() [2][2]float64 { return reciprocal(l.Basis) }

func reciprocal(b [2][2]float64) [2][2]float64 {
	det := cross(b[0], b[1])
	return [2][2]float64{
		{b[1][1] / det, -b[1][0] / det},
		{-b[0][1] / det, b[0][0] / det},
	}
}

func cross(u, v [2]float64) float64 { return u[0]*v[1] - u[1]*v[0] }
func dot(u, v [2]float64) float64   { return u[0]*v[0] + u[1]*v[1] }
func norm2(u [2]float64) float64    { return dot(u, u) }

// tieTolerance is the relative difference of squared lengths below which
// two lattice vectors count as equally short when the basis is chosen.
const tieTolerance = 1e-9

// reduce returns the Lagrange–Gauss reduced, right-handed basis of the
// lattice spanned by b, chosen the same way whatever basis of the lattice
// it is given: a1 is the shortest lattice vector (among equally short
// ones, the one of smallest polar angle in [0, 2π)), a2 the shortest
// lattice vector with a1 × a2 > 0 (among equally short ones, the first
// counterclockwise from a1). Two vectors attaining the successive minima
// of a planar lattice form a basis, and such a basis is reduced:
// |a1| ≤ |a2| and |a1·a2| ≤ |a1|²/2 (common practice).
func reduce(b [2][2]float64) [2][2]float64 {
	a1, a2 := b[0], b[1]
	for range 64 { // the Lagrange–Gauss loop converges in O(log) steps
		if norm2(a2) < norm2(a1) {
			a1, a2 = a2, a1
		}
		mu := math.Round(dot(a1, a2) / norm2(a1))
		if mu == 0 {
			break
		}
		a2 = [2]float64{a2[0] - mu*a1[0], a2[1] - mu*a1[1]}
	}
	// Every vector at most as long as a2 of a reduced basis is among
	// i·a1 + j·a2 with |i|, |j| ≤ 2.
	var cands [][2]float64
	for i := -2; i <= 2; i++ {
		for j := -2; j <= 2; j++ {
			if i == 0 && j == 0 {
				continue
			}
			cands = append(cands, [2]float64{float64(i)*a1[0] + float64(j)*a2[0], float64(i)*a1[1] + float64(j)*a2[1]})
		}
	}
	shortest := math.Inf(1)
	for _, v := range cands {
		shortest = math.Min(shortest, norm2(v))
	}
	var c1 [2]float64
	best := math.Inf(1)
	for _, v := range cands {
		if norm2(v) <= shortest*(1+tieTolerance) {
			if ang := polar(v); ang < best {
				best, c1 = ang, v
			}
		}
	}
	second := math.Inf(1)
	for _, v := range cands {
		if cross(c1, v) > 1e-9*norm2(c1) {
			second = math.Min(second, norm2(v))
		}
	}
	var c2 [2]float64
	best = math.Inf(1)
	for _, v := range cands {
		if cross(c1, v) > 1e-9*norm2(c1) && norm2(v) <= second*(1+tieTolerance) {
			if ang := math.Atan2(cross(c1, v), dot(c1, v)); ang < best {
				best, c2 = ang, v
			}
		}
	}
	return [2][2]float64{c1, c2}
}

// polar is the polar angle of v in [0, 2π), with an angle within 10⁻⁹ of
// 2π taken as slightly below 0, so that a vector along +x is first however
// rounding tilts it.
func polar(v [2]float64) float64 {
	a := math.Atan2(v[1], v[0])
	if a < 0 {
		a += 2 * math.Pi
	}
	if a > 2*math.Pi-1e-9 {
		a -= 2 * math.Pi
	}
	return a
}

// change returns the integer matrix M with b = M·a (rows the basis
// vectors) for two bases of the same lattice.
func change(b, a [2][2]float64) [2][2]int {
	r := reciprocal(a)
	var m [2][2]int
	for k := range 2 {
		for i := range 2 {
			m[k][i] = int(math.Round(dot(b[k], r[i])))
		}
	}
	return m
}
