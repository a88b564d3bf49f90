package register_test

import (
	"fmt"
	"log"

	"phasonhull/pattern/register"
)

// A measured chain with its first design site missing, one spurious site,
// a scale error of 2·10⁻³ and an offset of 12.5: the registration finds
// the calibration and names the defects by index.
func ExampleRegister() {
	design := []float64{0, 3.1, 5.9, 9.2, 12.0, 15.1, 17.9, 21.0, 24.1, 26.9}
	var measured []float64
	for j, d := range design {
		if j == 0 {
			continue // missing
		}
		measured = append(measured, 12.5+1.002*d)
	}
	measured = append(measured, 12.5+1.002*10.6) // spurious, between sites 3 and 4
	r, err := register.Register(design, measured, register.Options{})
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("offset %.4f, scale %.4f\n", r.Offset, r.Scale)
	fmt.Println("missing design sites:", r.Missing)
	fmt.Println("extra measured sites:", r.Extra)
	// Output:
	// offset 12.5000, scale 1.0020
	// missing design sites: [0]
	// extra measured sites: [9]
}
