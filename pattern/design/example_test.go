package design_test

import (
	"fmt"
	"log"
	"math"
	"os"
	"strings"

	"phasonhull/pattern"
	"phasonhull/pattern/design"
)

// A Fibonacci chain: long tiles L and short tiles S in the mechanical word
// of slope 1/φ², the frequency of the short tile.
func ExampleGenerate() {
	s := design.NewSpec("sturmian")
	s.Sites = 14
	s.Theta = (3 - math.Sqrt(5)) / 2
	s.Tiles = map[string]float64{"L": 1.618, "S": 1}
	p, err := design.Generate(s)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println(p.Word)
	fmt.Printf("%.4f\n", p.Positions[:6])
	fmt.Println(p.Source, p.Len(), "sites")
	// Output:
	// LLSLLSLSLLSLL
	// [0.0000 1.6180 3.2360 4.2360 5.8540 7.4720]
	// generated 14 sites
}

// A design spec read from JSON, generated and written as a CSV file that
// records its own design (here only its first comment lines).
func ExampleReadSpec() {
	spec := `{"family": "modulated", "sites": 8, "unit": "um", "theta": 0.25, "sin": [0.1]}`
	s, err := design.ReadSpec(strings.NewReader(spec), "design.json")
	if err != nil {
		log.Fatal(err)
	}
	p, err := design.Generate(s)
	if err != nil {
		log.Fatal(err)
	}
	if err := pattern.WriteCSV(os.Stdout, p, s.Comments()[:4]); err != nil {
		log.Fatal(err)
	}
	// Output:
	// # family = modulated
	// # sites = 8
	// # unit = um
	// # spacing = 1
	// position_um
	// 0
	// 1.1
	// 2
	// 2.9
	// 4
	// 5.1
	// 6
	// 6.9
}

// A 40 × 40 plate of a square lattice displaced by two longitudinal waves
// whose rotation matrix A has irrational entries: its hull is a 2-torus.
func ExampleGeneratePlane() {
	s := design.NewSpec(design.Plate)
	s.Unit = "um"
	s.Matrix = [][]float64{{0.4142, 0}, {0, 0.2679}}
	s.Amps = []float64{0.1, 0.08}
	s.Missing, s.Noise = 0.02, 0.01
	p, err := design.GeneratePlane(s)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println(p.Len(), "sites in", p.Unit, "from", p.Source)
	fmt.Println("A =", s.Rotation(), "dimension", s.Family.Dimension())
	// Output:
	// 1568 sites in um from generated
	// A = [[0.4142 0] [0 0.2679]] dimension 2
}
