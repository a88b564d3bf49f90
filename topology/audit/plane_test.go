package audit

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"phasonhull/pattern"
	"phasonhull/pattern/design"
	"phasonhull/topology/hull"
)

// plateDesign is a 20 × 20 square plate of step 1 µm displaced by one
// wave of the rotation row a, amplitude 0.12 µm.
func plateDesign(t *testing.T, a []float64) *Design {
	t.Helper()
	s := design.NewSpec(design.Plate)
	s.Lattice, s.Sites, s.Spacing, s.Unit = "square", 20, 1, "um"
	s.Matrix, s.Amps = [][]float64{a}, []float64{0.12}
	p, err := design.GeneratePlane(s)
	if err != nil {
		t.Fatal(err)
	}
	p.Source = "design"
	return NewDesign(context.Background(), &design.File{Path: "design.json", Kind: design.KindSpec, Plane: p, Spec: &s}, hullOptions())
}

// plateSample moves the design's points by x = offset + scale·R(deg)·d,
// adds isotropic Gaussian noise sigma per coordinate, and writes them in
// unit.
func plateSample(t *testing.T, d *Design, offset [2]float64, scale, deg, sigma float64, unit string) *pattern.Plane {
	t.Helper()
	rng := rand.New(rand.NewPCG(5, 6))
	c, s := math.Cos(deg*math.Pi/180), math.Sin(deg*math.Pi/180)
	var pts [][2]float64
	for _, q := range d.File.Plane.Points {
		pts = append(pts, [2]float64{
			offset[0] + scale*(c*q[0]-s*q[1]) + sigma*rng.NormFloat64(),
			offset[1] + scale*(s*q[0]+c*q[1]) + sigma*rng.NormFloat64(),
		})
	}
	p, err := pattern.NewPlane(pts, unit, "sample")
	if err != nil {
		t.Fatal(err)
	}
	return p
}

func hullOptions() hull.Options { return hull.Options{} }

// A plate made as designed, moved on the stage and measured with noise
// well below the modulation, passes; the transform comes back within
// three of its standard uncertainties (its calibration against least
// squares is register's TestRegisterPlaneRecoversTransform); the same
// sample written in mm against a design in µm fails on the scale, named
// as a unit mismatch (1 mm = 1000 µm; common practice).
func TestPlateAuditPasses(t *testing.T) {
	a := []float64{0.2763932, 0.1458980}
	d := plateDesign(t, a)
	if d.HullErr != nil {
		t.Fatalf("design hull: %v", d.HullErr)
	}
	p := plateSample(t, d, [2]float64{40, -12}, 1.001, 12, 0.01, "um")
	rep, err := RunPlane(context.Background(), d, p, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if !rep.Passed() {
		t.Fatalf("verdict %s: %v", rep.Verdict, rep.Reasons)
	}
	tr := rep.Transform
	for _, c := range []struct {
		name           string
		got, err, want float64
	}{{"rotation", tr.Rotation, tr.RotationErr, 12}, {"scale", tr.Scale, tr.ScaleErr, 1.001},
		{"offset x", tr.Offset[0], tr.OffsetErr[0], 40}, {"offset y", tr.Offset[1], tr.OffsetErr[1], -12}} {
		if !(math.Abs(c.got-c.want) <= 3*c.err) {
			t.Errorf("%s %.8g ± %.2g, want %.8g", c.name, c.got, c.err, c.want)
		}
	}
	if rep.Dimension != 2 || rep.Matched != 400 || len(rep.Missing) != 0 || len(rep.Extra) != 0 {
		t.Errorf("dimension %d, %d matched, %d missing, %d extra; want 2, 400, 0, 0", rep.Dimension, rep.Matched, len(rep.Missing), len(rep.Extra))
	}

	mm := plateSample(t, d, [2]float64{0.04, -0.012}, 0.001, 12, 1e-5, "mm")
	mm.Unit = "" // written in mm, said to be nothing: taken to be in µm
	rep, err = RunPlane(context.Background(), d, mm, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Passed() || !strings.Contains(strings.Join(rep.Reasons, "; "), "written in mm") {
		t.Errorf("a sample in mm against a design in µm: verdict %s, reasons %v; want the unit mismatch named", rep.Verdict, rep.Reasons)
	}
}

// A plate made with another rotation matrix — the wave along a different
// lattice direction, not a change of basis of the design's — registers
// but fails on the hull in another basis (n1 and n2
// exchanged and the matrix mirrored accordingly is not a similarity, so
// the test uses the design's own A with torus coordinate −1: A → −A,
// common practice) passes the hull comparison.
func TestPlateAuditFailsOnTheHull(t *testing.T) {
	d := plateDesign(t, []float64{0.2763932, 0.1458980})
	other := plateDesign(t, []float64{0.3090170, 0.0901699})
	p := plateSample(t, other, [2]float64{3, 4}, 1, -7, 0.005, "um")
	rep, err := RunPlane(context.Background(), d, p, Options{})
	if err != nil {
		t.Fatal(err)
	}
	c := rep.Hull.Comparison
	if c == nil || c.Agree || rep.Passed() {
		t.Fatalf("another rotation matrix: comparison %+v, verdict %s %v; want the hulls to disagree", c, rep.Verdict, rep.Reasons)
	}
	if !strings.Contains(strings.Join(rep.Reasons, "; "), "rotation matrix") {
		t.Errorf("reasons %v do not name the rotation matrix", rep.Reasons)
	}
}

// Missing and extra counts exact: design sites left out of the sample
// are missing, sites placed at lattice-cell centres are extra, and both
// are named by their indices (extra by the sample's rows).
func TestPlateAuditMissingExtra(t *testing.T) {
	d := plateDesign(t, []float64{0.2763932, 0.1458980})
	full := plateSample(t, d, [2]float64{0, 0}, 1, 0, 0.005, "um")
	drop := map[int]bool{21: true, 22: true, 250: true}
	var pts [][2]float64
	for i, q := range full.Points {
		if !drop[i] {
			pts = append(pts, q)
		}
	}
	pts = append(pts, [2]float64{4.5, 4.5}, [2]float64{10.5, 15.5})
	p, err := pattern.NewPlane(pts, "um", "sample")
	if err != nil {
		t.Fatal(err)
	}
	rep, err := RunPlane(context.Background(), d, p, Options{AllowMissing: 3, AllowExtra: 2})
	if err != nil {
		t.Fatal(err)
	}
	if len(rep.Missing) != 3 || rep.Missing[0] != 21 || rep.Missing[1] != 22 || rep.Missing[2] != 250 {
		t.Errorf("missing %v, want [21 22 250]", rep.Missing)
	}
	if n := len(pts); len(rep.Extra) != 2 || rep.Extra[0] != n-2 || rep.Extra[1] != n-1 {
		t.Errorf("extra %v, want [%d %d]", rep.Extra, n-2, n-1)
	}
	if !rep.Passed() {
		t.Errorf("within the allowances, yet %s: %v", rep.Verdict, rep.Reasons)
	}
	if n := len(rep.Defects()); n != 5 {
		t.Errorf("%d defects, want 3 missing + 2 extra", n)
	}
}

// A plate against a chain design is refused with the reason.
func TestSitesRefusesOtherDimension(t *testing.T) {
	d := plateDesign(t, []float64{0.2763932, 0.1458980})
	chain, err := pattern.New([]float64{0, 1, 2.1, 3, 4.2, 5, 6.1, 7, 8.2, 9}, "um", "chain")
	if err != nil {
		t.Fatal(err)
	}
	_, err = Sites(context.Background(), d, pattern.Sites{Chain: chain}, Options{})
	if !errors.Is(err, ErrDimensions) {
		t.Errorf("a chain against a plate design: %v, want ErrDimensions", err)
	}
}
