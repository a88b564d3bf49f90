package tones

import (
	"math"
	"math/rand/v2"
)

// chain describes a test chain: x_k = k + cell[k mod p] + Σ_j amp_j·sin 2π(k·angle_j + phase_j)
// + Gaussian position noise of standard deviation noise (in spacings).
type chain struct {
	n      int // number of spacings
	angles []float64
	amps   []float64
	cell   []float64
	noise  float64
	seed   uint64
}

func (c chain) spacings() []float64 {
	rng := rand.New(rand.NewPCG(c.seed, 0x70e5))
	phase := make([]float64, len(c.angles))
	for j := range phase {
		phase[j] = rng.Float64()
	}
	x := make([]float64, c.n+1)
	for k := range x {
		v := float64(k)
		if len(c.cell) > 0 {
			v += c.cell[k%len(c.cell)]
		}
		for j, th := range c.angles {
			v += c.amps[j] * math.Sin(2*math.Pi*(float64(k)*th+phase[j]))
		}
		x[k] = v + c.noise*rng.NormFloat64()
	}
	s := make([]float64, c.n)
	for k := range s {
		s[k] = x[k+1] - x[k]
	}
	return s
}

// whiteSpacings returns n independent Gaussian spacings of mean 1 and
// standard deviation sd.
func whiteSpacings(n int, sd float64, seed uint64) []float64 {
	rng := rand.New(rand.NewPCG(seed, 0xa11))
	s := make([]float64, n)
	for i := range s {
		s[i] = 1 + sd*rng.NormFloat64()
	}
	return s
}

var (
	golden = (math.Sqrt(5) - 1) / 2 // 0.618…, folded 0.382…
	silver = math.Sqrt2 - 1         // 0.414…
	bronze = math.Sqrt(3) - 1       // 0.732…, folded 0.268…
)
