package register

import (
	"math"
	"math/rand/v2"
	"strconv"
	"testing"
)

// benchSample is a modulated chain of n sites, 1 apart with a 0.08
// first-harmonic modulation, and a sample of it with an offset, a scale
// error of 3·10⁻⁴, 0.5% noise, every 500th site missing and an extra site
// every 700.
func benchSample(n int) (d, x []float64) {
	rng := rand.New(rand.NewPCG(1, 2))
	d = make([]float64, n)
	for i := range d {
		u := float64(i) * 0.381966
		d[i] = float64(i) + 0.08*sin2pi(u)
	}
	for i, v := range d {
		if i%500 != 499 {
			x = append(x, 17.25+(1+3e-4)*v+0.005*rng.NormFloat64())
		}
		if i%700 == 350 {
			x = append(x, 17.25+(1+3e-4)*(v+0.45))
		}
	}
	return d, x
}

func BenchmarkRegister(b *testing.B) {
	for _, n := range []int{10_000, 1_000_000} {
		d, x := benchSample(n)
		b.Run(itoa(n), func(b *testing.B) {
			for b.Loop() {
				if _, err := Register(d, x, Options{Drift: true}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

func sin2pi(u float64) float64 { return math.Sin(2 * math.Pi * u) }

func itoa(n int) string { return strconv.Itoa(n) }
