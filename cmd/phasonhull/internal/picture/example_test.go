package picture_test

import (
	"fmt"
	"log"
	"math"

	"phasonhull/cmd/phasonhull/internal/picture"
)

// A circular coordinate that turns by 0.3183 per site, with two vectors
// left out, lifts to a line of that slope.
func ExampleLiftCoordinate() {
	var rows []int
	var phi []float64
	for i := 0; i < 50; i++ {
		if i == 20 || i == 21 {
			continue
		}
		x := 0.3183 * float64(i)
		rows, phi = append(rows, i), append(phi, x-math.Floor(x))
	}
	l, err := picture.LiftCoordinate(rows, phi)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("slope %.4f turns/site over %d runs\n", l.Slope, l.Runs)
	// Output: slope 0.3183 turns/site over 2 runs
}
