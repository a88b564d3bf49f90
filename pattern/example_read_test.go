package pattern_test

import (
	"errors"
	"fmt"
	"strings"

	"phasonhull/pattern"
)

// Read takes a column of positions with a header naming the unit, and
// refuses bad input with the file, line and field of the fault.
func ExampleRead() {
	in := `# row 3 of sample 7
position_um
0
1.618
2.618   # a trailing comment
4.236
5.236
6.854
8.472
9.472
`
	p, err := pattern.Read(strings.NewReader(in), "row3.csv", pattern.ReadOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%d sites in %s, first spacings %.3f\n", p.Len(), p.Unit, p.Spacings()[:3])

	_, err = pattern.Read(strings.NewReader("position\n0\n1\n1.5x\n"), "row4.csv", pattern.ReadOptions{})
	var ie *pattern.InputError
	fmt.Println(err, errors.As(err, &ie))
	// Output:
	// 8 sites in um, first spacings [1.618 1.000 1.618]
	// row4.csv:4:1: "1.5x" is not a number true
}

// ReadFile projects tilted, shuffled centroids from a planar scan onto
// their principal axis and reports the tilt and transverse scatter removed.
func ExampleReadFile() {
	p, err := pattern.ReadFile("../testdata/read/good/centroids_2d_tilted_shuffled.csv", pattern.ReadOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%d sites, mean spacing %.3f %s\n", p.Len(), p.MeanSpacing(), p.Unit)
	fmt.Printf("tilt %.3f°, transverse RMS %.3f %s\n", p.Scan.TiltDeg, p.Scan.TransverseRMS, p.Unit)
	// Output:
	// 16 sites, mean spacing 1.500 um
	// tilt 12.000°, transverse RMS 0.020 um
}

// A tile word needs the length of each letter.
func ExampleParseTileLengths() {
	tiles, err := pattern.ParseTileLengths("L=1.618,S=1")
	if err != nil {
		fmt.Println(err)
		return
	}
	p, err := pattern.Read(strings.NewReader("LSLLSLSL\n"), "word.txt", pattern.ReadOptions{Tiles: tiles})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s: %d sites, the last at %.3f\n", p.Word, p.Len(), p.Positions[p.Len()-1])
	// Output:
	// LSLLSLSL: 9 sites, the last at 11.090
}

// ReadPoints takes a point cloud, one point a row, and refuses a row of
// another dimension with its line; ReadCouplings and ReadValues read the
// tables that go with a pattern the same way.
func ExampleReadPoints() {
	pts, err := pattern.ReadPoints(strings.NewReader("# x, y\n0, 0\n1, 0\n0.5, 0.866\n"), "triangle.csv")
	fmt.Println(pts, err)

	_, err = pattern.ReadPoints(strings.NewReader("0 0\n1 0\n0.5 0.866 1\n"), "bent.txt")
	fmt.Println(err)

	d, c, err := pattern.ReadCouplings(strings.NewReader("distance,coupling\n1,1\n1.618,0.5\n"), "hopping.csv")
	fmt.Println(d, c, err)
	// Output:
	// [[0 0] [1 0] [0.5 0.866]] <nil>
	// bent.txt:3: expected 2 columns like the first data row (line 1), got 3
	// [1 1.618] [1 0.5] <nil>
}

// ReadSites reads a chain or a plate: three rows of pillars, however long,
// are a plane, not a chain; Read refuses them and says how to read them.
func ExampleReadSites() {
	var b strings.Builder
	b.WriteString("x_um,y_um\n")
	for i := range 30 {
		for r := range 3 {
			fmt.Fprintf(&b, "%g,%g\n", 100+2*float64(i)+float64(r%2), 50+1.732*float64(r))
		}
	}
	s, err := pattern.ReadSites(strings.NewReader(b.String()), "rows.csv", pattern.ReadOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(s.Chain == nil, s.Plane.Len(), "sites in", s.Plane.Unit)
	fmt.Println(s.Plane.Notes[0])

	_, err = pattern.Read(strings.NewReader(b.String()), "rows.csv", pattern.ReadOptions{})
	fmt.Println(err)
	// Output:
	// true 90 sites in um
	// 90 sites read as a plane: half of them sit 2.6 spacings or more off their best line, a 2D set (a chain stays within 0.55)
	// rows.csv: the centroids do not lie along a line: half of them sit 2.6 spacings or more off their best line (a chain stays within 0.55): this is a 2D point set, which analyze reads as a plate (pattern.ReadSites), not as a chain
}
