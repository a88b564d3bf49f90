package register

import (
	"context"
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

// BenchmarkRegisterPlane registers a side × side square plate with one
// wave, turned by 7°, scaled by 1 + 3·10⁻⁴ and offset, with noise of 1% of
// the step.
func BenchmarkRegisterPlane(b *testing.B) {
	for _, side := range []int{40, 100} {
		b.Run("sites="+strconv.Itoa(side*side), func(b *testing.B) {
			var d [][2]float64
			for y := range side {
				for x := range side {
					u := 0.2763932*float64(x) + 0.1458980*float64(y)
					d = append(d, [2]float64{float64(x) + 0.1*sin2pi(u), float64(y)})
				}
			}
			rng := rand.New(rand.NewPCG(3, 4))
			c, s := math.Cos(7*math.Pi/180), math.Sin(7*math.Pi/180)
			m := make([][2]float64, len(d))
			for i, p := range d {
				m[i] = [2]float64{9 + (1+3e-4)*(c*p[0]-s*p[1]) + 0.01*rng.NormFloat64(), -4 + (1+3e-4)*(s*p[0]+c*p[1]) + 0.01*rng.NormFloat64()}
			}
			b.ResetTimer()
			for range b.N {
				if _, err := RegisterPlane(context.Background(), d, m, PlaneOptions{}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
