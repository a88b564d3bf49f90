package shortchain_test

import (
	"context"
	"fmt"
	"math"

	"phasonhull/topology/shortchain"
)

// A dimerised chain of 48 sites, offsets ±5% of the spacing, with a small
// deterministic jitter standing in for position noise.
func ExampleDecide() {
	x := make([]float64, 48)
	for i := range x {
		x[i] = 2.0 * (float64(i) + 0.05*math.Pow(-1, float64(i)) + 0.01*math.Sin(float64(i*i)))
	}
	d, err := shortchain.Decide(context.Background(), x, shortchain.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(d.Kind, d.Period, d.FalseCallRate <= 0.01)
	// Output: cell 2 true
}
