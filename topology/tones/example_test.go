package tones_test

import (
	"context"
	"fmt"
	"math"

	"phasonhull/topology/tones"
)

// A dimerised chain with a quasi-periodic modulation,
// x_n = n + 0.12·(−1)^n + 0.1·sin 2π(nθ + 0.3): its spacings have lines
// at ½ and θ, a module (1/2)Z + Zθ.
func ExampleRead() {
	theta := (math.Sqrt(5) - 1) / 2
	x := func(n int) float64 {
		return float64(n) + 0.12*float64(1-2*(n%2)) + 0.1*math.Sin(2*math.Pi*(float64(n)*theta+0.3))
	}
	s := make([]float64, 2000)
	for n := range s {
		s[n] = x(n+1) - x(n)
	}
	r, err := tones.Read(context.Background(), s, tones.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	for i, l := range r.Lines {
		fmt.Printf("line %.6f, amplitude %.3f, coordinates %v\n", l.Freq, l.Amp, r.Coeffs[i])
	}
	fmt.Printf("p = %d, d = %d, basis %.6f\n", r.Period, r.Rank, r.Basis)
	// Output:
	// line 0.500000, amplitude 0.240, coordinates [1 0]
	// line 0.381966, amplitude 0.186, coordinates [0 1]
	// p = 2, d = 1, basis [0.381966]
}
