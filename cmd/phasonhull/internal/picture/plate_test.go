package picture

import (
	"bytes"
	"context"
	"image/png"
	"math"
	"os"
	"testing"

	"phasonhull/pattern/design"
	"phasonhull/pattern/lattice"
	"phasonhull/topology/hull"
)

// plateOf generates a twisted plate and recovers its lattice.
func plateOf(t *testing.T, side int) Plate {
	t.Helper()
	s := design.NewSpec(design.Twisted)
	s.Sites, s.Twist, s.Scale, s.Amp, s.Noise, s.Missing, s.Extra = side, 13.2, 0.618034, 0.05, 0.01, 0.01, 0.005
	pl, err := design.GeneratePlane(s)
	if err != nil {
		t.Fatal(err)
	}
	l, err := lattice.Recover(context.Background(), pl, lattice.Options{})
	if err != nil {
		t.Fatal(err)
	}
	return Plate{Plane: pl, Lattice: l, Rotation: s.Rotation(), Class: "torus"}
}

// The plate figures render as PNGs of their stated size with a key, and a
// plate larger than the window is cut to it.
func TestPlateFigures(t *testing.T) {
	p := plateOf(t, 36)
	pics, err := PlateAnalysis(&hull.Result{}, p)
	if err != nil {
		t.Fatal(err)
	}
	for _, pic := range pics {
		b, err := pic.Bytes(PNG)
		if err != nil {
			t.Fatal(err)
		}
		img, err := png.Decode(bytes.NewReader(b))
		if err != nil {
			t.Fatal(err)
		}
		w, h := pic.Pixels()
		if img.Bounds().Dx() != w || img.Bounds().Dy() != h || len(pic.key) == 0 {
			t.Errorf("%s: %v, want %d×%d with a key", pic.Name, img.Bounds(), w, h)
		}
		if dir := os.Getenv("PLATE_FIGURES"); dir != "" {
			os.WriteFile(dir+"/"+pic.Name+".png", b, 0o644)
		}
	}
	on, _, cut := p.window()
	if !cut || len(on) > plateWindow*plateWindow {
		t.Errorf("a 36 × 36 plate: %d sites drawn, cut %v", len(on), cut)
	}
}

// The structure factor of a perfect square lattice has its Bragg peaks at
// integer (h, k), S = N (common practice), which the map's grid hits.
func TestStructureFactorGridHitsBragg(t *testing.T) {
	g := grid{lo: -0.25, step: 1.5 / (structureCells - 1), n: structureCells}
	for _, v := range []float64{0, 1} {
		c := (v - g.lo) / g.step
		if math.Abs(c-math.Round(c)) > 1e-9 {
			t.Errorf("h = %v falls between grid points (%v)", v, c)
		}
	}
}
