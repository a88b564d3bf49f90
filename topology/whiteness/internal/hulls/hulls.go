// Package hulls draws the simulated chains that calibrate and test the
// independent-spacings rule: chains that have a hull (the rule must not
// call them independent) and chains of independent spacings (how often it
// does), in units of the mean spacing, with Gaussian position noise of a
// given standard deviation.
//
// What the false-call rates mean depends on these families, so they are
// stated here once. The chains with a hull:
//   - point: x_n = n + e_n;
//   - finite: a period p drawn from 2..6, offsets u_j evenly spread over a
//     range drawn in [0.02, 0.2], in random order, x_n = n + u_{n mod p} + e_n;
//   - circle: θ uniform in [0.02, 0.48] and at least 0.5/N from every j/p
//     with p ≤ 6, amplitude a₁ uniform in [0.01, 0.15], a second harmonic
//     of amplitude up to 0.3·a₁, random phases;
//   - torus and torus3: two or three such angles, each of amplitude
//     uniform in [0.01, 0.1];
//   - decorated: a circle as above plus a cell of p = 2 or 3 offsets
//     spread over a range drawn in [0.05, 0.25];
//   - cantor: a Sturmian tiling, spacings S or L by the cutting sequence
//     of slope α uniform in [0.2, 0.8] with a random intercept, S/L uniform
//     in [0.6, 0.9], scaled to mean spacing 1.
//
// The chains of independent spacings (Law): spacings 1 + U(−s, s)
// (uniform), 1 + s·z with z a standard Gaussian cut at 4 (gaussian), and
// 1 − s + s·Exp(1) (exponential), as the random design family draws them.
package hulls

import (
	"math"
	"math/rand/v2"
	"phasonhull/topology/internal/simchain"
)

// Family is a class of simulated chains with a hull.
type Family int

// The families.
const (
	Point Family = iota
	Finite
	Circle
	Torus
	Torus3
	Decorated
	Cantor
)

// Families lists them.
var Families = [...]Family{Point, Finite, Circle, Torus, Torus3, Decorated, Cantor}

// String names a family.
func (f Family) String() string {
	return [...]string{"point", "finite", "circle", "torus", "torus3", "decorated", "cantor"}[f]
}

// Rand returns the generator of draw i of the cell (size, noise index,
// family), so that every draw is reproducible on its own.
func Rand(seed uint64, size, noise, family, i int) *rand.Rand {
	return rand.New(rand.NewPCG(seed^uint64(size)<<40^uint64(noise)<<32^uint64(family)<<24, uint64(i)))
}

// Draw returns N positions of family f with position noise sigma.
func Draw(f Family, N int, sigma float64, r *rand.Rand) []float64 {
	x := make([]float64, N)
	for i := range x {
		x[i] = float64(i)
	}
	switch f {
	case Finite:
		addCell(x, 2+r.IntN(5), 0.02+0.18*r.Float64(), r)
	case Circle:
		a := 0.01 + 0.14*r.Float64()
		addAngle(x, angle(N, r), []float64{a, 0.3 * a * r.Float64()}, r)
	case Torus, Torus3:
		for range 2 + int(f-Torus) {
			addAngle(x, angle(N, r), []float64{0.01 + 0.09*r.Float64()}, r)
		}
	case Decorated:
		addCell(x, 2+r.IntN(2), 0.05+0.2*r.Float64(), r)
		a := 0.01 + 0.14*r.Float64()
		addAngle(x, angle(N, r), []float64{a, 0.3 * a * r.Float64()}, r)
	case Cantor:
		x = sturmian(N, 0.2+0.6*r.Float64(), r.Float64(), 0.6+0.3*r.Float64())
	}
	return simchain.Shake(x, sigma, r)
}

// Law is a law of independent spacings.
type Law int

// The laws.
const (
	Uniform Law = iota
	Gaussian
	Exponential
)

// String names a law.
func (l Law) String() string { return [...]string{"uniform", "gaussian", "exponential"}[l] }

// SD returns the standard deviation of a spacing of law l and spread s.
func (l Law) SD(s float64) float64 {
	if l == Uniform {
		return s / math.Sqrt(3)
	}
	return s
}

// Independent returns N positions whose spacings are drawn independently
// from law l with spread s, plus position noise sigma.
func Independent(l Law, s float64, N int, sigma float64, r *rand.Rand) []float64 {
	x := make([]float64, N)
	for i := 1; i < N; i++ {
		var d float64
		switch l {
		case Uniform:
			d = 1 + s*(2*r.Float64()-1)
		case Gaussian:
			z := r.NormFloat64()
			for math.Abs(z) > 4 {
				z = r.NormFloat64()
			}
			d = 1 + s*z
		case Exponential:
			d = 1 - s + s*r.ExpFloat64()
		}
		x[i] = x[i-1] + d
	}
	return simchain.Shake(x, sigma, r)
}

// angle draws θ uniform in [0.02, 0.48], at least 0.5/N from every j/p,
// p ≤ 6 (half a turn of drift over the chain away from any cell).
func angle(N int, r *rand.Rand) float64 {
	for {
		t := 0.02 + 0.46*r.Float64()
		if farFromCells(t, 0.5/float64(N)) {
			return t
		}
	}
}

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

// addAngle adds Σ_k a_k sin 2π(k·n·θ + φ_k), random phases.
func addAngle(x []float64, theta float64, amp []float64, r *rand.Rand) {
	for k, a := range amp {
		phi := r.Float64()
		for i := range x {
			x[i] += a * math.Sin(2*math.Pi*(float64((k+1)*i)*theta+phi))
		}
	}
}

// addCell adds a cell of p distinct offsets spread over the given range.
func addCell(x []float64, p int, spread float64, r *rand.Rand) {
	u := make([]float64, p)
	for j, k := range r.Perm(p) {
		u[j] = spread * (float64(k)/float64(p-1) - 0.5)
	}
	for i := range x {
		x[i] += u[i%p]
	}
}

// sturmian returns the positions of the tiling whose n-th tile is L when
// ⌊(n+1)α + ρ⌋ − ⌊nα + ρ⌋ = 1 and S = ratio·L otherwise, mean spacing 1.
func sturmian(N int, alpha, rho, ratio float64) []float64 {
	mean := alpha + (1-alpha)*ratio
	x := make([]float64, N)
	for n := 1; n < N; n++ {
		d := ratio
		if math.Floor(float64(n)*alpha+rho)-math.Floor(float64(n-1)*alpha+rho) == 1 {
			d = 1
		}
		x[n] = x[n-1] + d/mean
	}
	return x
}
