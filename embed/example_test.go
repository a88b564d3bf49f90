package embed_test

import (
	"fmt"
	"log"
	"math"

	"phasonhull/embed"
	"phasonhull/pattern"
)

// A chain whose spacings follow one cosine of the site index: its hull is
// a circle, which a window of two spacings unfolds.
func ExampleEmbed() {
	x := make([]float64, 1001)
	for n := 1; n < len(x); n++ {
		x[n] = x[n-1] + 250*(1+0.12*math.Cos(2*math.Pi*0.2763*float64(n)))
	}
	p, err := pattern.New(x, "nm", "example")
	if err != nil {
		log.Fatal(err)
	}
	res, err := embed.Embed(p, embed.Options{Landmarks: 100})
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("window %d (settled %v), FNN at 1 and 2: %.2f %.2f\n",
		res.Window, res.Choice.Settled, res.Choice.FalseNeighbours[0], res.Choice.FalseNeighbours[1])
	fmt.Printf("kept %d of %d components\n", res.Whitened.Kept, len(res.Whitened.Spectrum))
	fmt.Printf("%d landmarks, cover radius %.3f\n", len(res.Landmarks), res.CoverRadius)
	// Output:
	// window 2 (settled true), FNN at 1 and 2: 0.94 0.00
	// kept 2 of 2 components
	// 100 landmarks, cover radius 0.064
}
