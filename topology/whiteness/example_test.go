package whiteness_test

import (
	"context"
	"fmt"
	"math/rand/v2"

	"phasonhull/topology/whiteness"
)

// A chain of 3000 sites whose spacings are drawn independently, ±12%
// about the mean, and a lattice of 3000 sites shaken by 5% position noise.
func ExampleDecide() {
	r := rand.New(rand.NewPCG(1, 2))
	walk, shaken := make([]float64, 3000), make([]float64, 3000)
	for i := range walk {
		if i > 0 {
			walk[i] = walk[i-1] + 1 + 0.12*(2*r.Float64()-1)
		}
		shaken[i] = float64(i) + 0.05*r.NormFloat64()
	}
	for _, x := range [][]float64{walk, shaken} {
		d, err := whiteness.Decide(context.Background(), x, whiteness.Options{})
		if err != nil {
			fmt.Println(err)
			return
		}
		fmt.Printf("%s (lag-1 autocorrelation %.1f)\n", d.Kind, d.Lag1)
	}
	// Output:
	// independent (lag-1 autocorrelation 0.0)
	// correlated (lag-1 autocorrelation -0.5)
}
