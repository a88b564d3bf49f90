package lattice_test

import (
	"context"
	"fmt"
	"log"
	"math"

	"phasonhull/pattern"
	"phasonhull/pattern/lattice"
)

// A 12 × 10 square plate of pillars at a 2.5 µm pitch, turned by 30° on
// the stage and offset, with one pillar missing and one spurious site at
// a cell centre: the recovery finds the pitch, the turn, the missing
// lattice point and the spurious site.
func ExampleRecover() {
	const pitch = 2.5
	c, s := math.Cos(math.Pi/6), math.Sin(math.Pi/6)
	at := func(i, j float64) [2]float64 {
		return [2]float64{100 + pitch*(c*i-s*j), 40 + pitch*(s*i+c*j)}
	}
	var pts [][2]float64
	for i := range 12 {
		for j := range 10 {
			if i == 5 && j == 4 {
				continue // missing pillar
			}
			pts = append(pts, at(float64(i), float64(j)))
		}
	}
	pts = append(pts, at(8.5, 2.5)) // spurious site
	plane, err := pattern.NewPlane(pts, "µm", "example")
	if err != nil {
		log.Fatal(err)
	}
	l, err := lattice.Recover(context.Background(), plane, lattice.Options{})
	if err != nil {
		log.Fatal(err)
	}
	for k, a := range l.Basis {
		fmt.Printf("a%d = (%.3f, %.3f) µm, |a%d| = %.3f µm at %.1f°\n", k+1, a[0], a[1], k+1, math.Hypot(a[0], a[1]), math.Atan2(a[1], a[0])*180/math.Pi)
	}
	fmt.Println("missing lattice points:", l.Missing)
	fmt.Println("last site on the lattice:", l.OnLattice[len(pts)-1])
	// Output:
	// a1 = (2.165, 1.250) µm, |a1| = 2.500 µm at 30.0°
	// a2 = (-1.250, 2.165) µm, |a2| = 2.500 µm at 120.0°
	// missing lattice points: 1
	// last site on the lattice: false
}
