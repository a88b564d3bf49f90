// Package null draws the simulated chains that calibrate and test the
// short-chain decision: one generator per class, in units of the mean
// spacing, with Gaussian position noise of a given standard deviation.
//
// What the false-call rates mean depends on these families, so they are
// stated here once:
//   - lattice: x_n = n + e_n;
//   - cell: a period p drawn from 2..6, offsets u_j evenly spread over a
//     range of 0.10 to 0.20 in random order (distinct, so the period is
//     exactly p), x_n = n + u_{n mod p} + e_n;
//   - harmonic: θ uniform in [max(0.04, 1/N), 0.46] and at least 0.5/N from
//     every j/p with p ≤ 6 (half a turn of drift over the chain away from any
//     cell), amplitude a₁ uniform in [0.08, 0.15], a second harmonic of
//     amplitude up to 0.3·a₁, random phases;
//   - independent: spacings 1 + U(−a, a) with a uniform in [0.06, 0.15].
package null

import (
	"math"
	"math/rand/v2"
	"phasonhull/topology/internal/simchain"
)

// Family is a class of simulated chains.
type Family int

// The families, in the order of shortchain.Kinds.
const (
	Lattice Family = iota
	Cell
	Harmonic
	Independent
)

// Families lists them.
var Families = [...]Family{Lattice, Cell, Harmonic, Independent}

// Rand returns the generator of draw i of the cell (size, noise index,
// family), so that every draw is reproducible on its own, whatever the
// order of the draws.
func Rand(seed uint64, size, noise int, f Family, i int) *rand.Rand {
	return rand.New(rand.NewPCG(seed^uint64(size)<<40^uint64(noise)<<32^uint64(f)<<28, uint64(i)))
}

// Draw returns N positions of family f with position noise sigma.
func Draw(f Family, N int, sigma float64, r *rand.Rand) []float64 {
	switch f {
	case Cell:
		return CellChain(N, 2+r.IntN(5), sigma, r)
	case Harmonic:
		return harmonic(N, sigma, r)
	case Independent:
		return IndependentChain(N, 0.06+0.09*r.Float64(), sigma, r)
	}
	return simchain.Shake(lattice(N), sigma, r)
}

// CellChain returns a periodic cell of p offsets, as Draw does for Cell.
func CellChain(N, p int, sigma float64, r *rand.Rand) []float64 {
	spread := 0.10 + 0.10*r.Float64()
	u := make([]float64, p)
	for j, k := range r.Perm(p) {
		u[j] = spread * (float64(k)/float64(p-1) - 0.5)
	}
	x := lattice(N)
	for i := range x {
		x[i] += u[i%p]
	}
	return simchain.Shake(x, sigma, r)
}

// HarmonicChain returns x_n = n + Σ a_k sin 2π(k·n·θ + φ_k) plus noise.
func HarmonicChain(N int, theta float64, amp []float64, sigma float64, r *rand.Rand) []float64 {
	x := lattice(N)
	for k, a := range amp {
		phi := r.Float64()
		for i := range x {
			x[i] += a * math.Sin(2*math.Pi*(float64((k+1)*i)*theta+phi))
		}
	}
	return simchain.Shake(x, sigma, r)
}

// IndependentChain returns spacings 1 + U(−a, a), plus position noise.
func IndependentChain(N int, a, sigma float64, r *rand.Rand) []float64 {
	x := make([]float64, N)
	for i := 1; i < N; i++ {
		x[i] = x[i-1] + 1 + a*(2*r.Float64()-1)
	}
	return simchain.Shake(x, sigma, r)
}

func harmonic(N int, sigma float64, r *rand.Rand) []float64 {
	lo := math.Max(0.04, 1/float64(N))
	var theta float64
	for {
		theta = lo + (0.46-lo)*r.Float64()
		if farFromCells(theta, 0.5/float64(N)) {
			break
		}
	}
	a1 := 0.08 + 0.07*r.Float64()
	return HarmonicChain(N, theta, []float64{a1, 0.3 * a1 * r.Float64()}, sigma, r)
}

// farFromCells reports whether θ lies at least d from every j/p, p ≤ 6.
func farFromCells(theta, d float64) bool {
	for p := 1; p <= 6; p++ {
		for j := 0; j <= p; j++ {
			if math.Abs(theta-float64(j)/float64(p)) < d {
				return false
			}
		}
	}
	return true
}

func lattice(N int) []float64 {
	x := make([]float64, N)
	for i := range x {
		x[i] = float64(i)
	}
	return x
}
