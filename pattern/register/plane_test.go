package register

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"

	"phasonhull/pattern/design"
)

// testPlate is a 20 × 20 plate of step 1 displaced by one wave, amplitude
// 0.12 of the step, on lat ("square" or "hex").
func testPlate(t *testing.T, lat string) [][2]float64 {
	t.Helper()
	s := design.NewSpec(design.Plate)
	s.Lattice, s.Sites, s.Spacing = lat, 20, 1
	s.Matrix, s.Amps = [][]float64{{0.2763932, 0.1458980}}, []float64{0.12}
	p, err := design.GeneratePlane(s)
	if err != nil {
		t.Fatal(err)
	}
	return p.Points
}

// moved applies x = offset + scale·R(deg)·d and isotropic Gaussian noise
// of standard deviation sigma per coordinate.
func moved(pts [][2]float64, offset [2]float64, scale, deg, sigma float64, seed uint64) [][2]float64 {
	rng := rand.New(rand.NewPCG(seed, 1))
	c, s := math.Cos(deg*math.Pi/180), math.Sin(deg*math.Pi/180)
	out := make([][2]float64, len(pts))
	for i, p := range pts {
		out[i] = [2]float64{
			offset[0] + scale*(c*p[0]-s*p[1]) + sigma*rng.NormFloat64(),
			offset[1] + scale*(s*p[0]+c*p[1]) + sigma*rng.NormFloat64(),
		}
	}
	return out
}

// A rotated, scaled and offset plate registers back: over several noise
// draws the transform lies within its stated standard uncertainties (the
// root mean square of the standardised errors near 1, none beyond 4), and
// those uncertainties are what least squares predicts. For a similarity
// x = t + L·d fitted to N points with isotropic noise σ per coordinate,
// the coefficients p, q of L = [[p, −q], [q, p]] have variance σ²/S,
// S = Σ|d − d̄|², so σ_scale = σ/√S and σ_rotation = σ/(scale·√S)
// radians; the biweight's efficiency of 95% under Gaussian noise raises
// both by 1/√0.95 (common practice; the test computes S from the design).
// Exact data registers exactly, with no tie.
func TestRegisterPlaneRecoversTransform(t *testing.T) {
	const scale, deg, sigma = 1.004, 23.5, 0.01
	offset := [2]float64{120.25, -45.5}
	for _, lat := range []string{"square", "hex"} {
		d := testPlate(t, lat)
		var cx, cy, S float64
		for _, p := range d {
			cx += p[0] / float64(len(d))
			cy += p[1] / float64(len(d))
		}
		for _, p := range d {
			S += (p[0]-cx)*(p[0]-cx) + (p[1]-cy)*(p[1]-cy)
		}
		wantScaleErr := sigma / math.Sqrt(S) / math.Sqrt(0.95)
		wantRotErr := wantScaleErr / scale * 180 / math.Pi

		exact, err := RegisterPlane(context.Background(), d, moved(d, offset, scale, deg, 0, 1), PlaneOptions{})
		if err != nil {
			t.Fatalf("%s, exact: %v", lat, err)
		}
		if math.Abs(exact.Rotation-deg) > 1e-9 || math.Abs(exact.Scale-scale) > 1e-12 || len(exact.Ties) != 0 {
			t.Errorf("%s, exact: rotation %.12g, scale %.12g, %d ties; want %g, %g, none", lat, exact.Rotation, exact.Scale, len(exact.Ties), deg, scale)
		}

		const draws = 6
		var z2 [4]float64
		for seed := uint64(1); seed <= draws; seed++ {
			r, err := RegisterPlane(context.Background(), d, moved(d, offset, scale, deg, sigma, seed), PlaneOptions{})
			if err != nil {
				t.Fatalf("%s: %v", lat, err)
			}
			if len(r.Matches) != len(d) || len(r.Missing) != 0 || len(r.Extra) != 0 || len(r.Ties) != 0 {
				t.Fatalf("%s: %d matched, %d missing, %d extra, %d ties; want all %d matched, no tie", lat, len(r.Matches), len(r.Missing), len(r.Extra), len(r.Ties), len(d))
			}
			for i, c := range []struct{ got, err, want float64 }{
				{r.Scale, r.ScaleErr, scale}, {r.Rotation, r.RotationErr, deg},
				{r.Offset[0], r.OffsetErr[0], offset[0]}, {r.Offset[1], r.OffsetErr[1], offset[1]},
			} {
				z := (c.got - c.want) / c.err
				if !(math.Abs(z) < 4) {
					t.Errorf("%s, seed %d: parameter %d is %.10g ± %.2g, want %.10g", lat, seed, i, c.got, c.err, c.want)
				}
				z2[i] += z * z / draws
			}
			for _, c := range []struct {
				name      string
				got, want float64
			}{{"scale uncertainty", r.ScaleErr, wantScaleErr}, {"rotation uncertainty", r.RotationErr, wantRotErr}} {
				if ratio := c.got / c.want; !(ratio > 0.85 && ratio < 1.2) {
					t.Errorf("%s: %s %.3g, least squares gives %.3g", lat, c.name, c.got, c.want)
				}
			}
		}
		for i, v := range z2 {
			if rms := math.Sqrt(v); !(rms > 0.3 && rms < 2) {
				t.Errorf("%s: parameter %d: RMS standardised error %.2g over %d draws, want near 1", lat, i, rms, draws)
			}
		}
	}
}

// Missing and extra sites counted exactly: design sites removed from the
// sample are missing, sites placed at the centres of lattice cells (as far
// from every design site as the lattice allows) are extra.
func TestRegisterPlaneMissingExtra(t *testing.T) {
	d := testPlate(t, "square")
	m := moved(d, [2]float64{3, 4}, 1, -8, 0.005, 3)
	drop := map[int]bool{0: true, 45: true, 210: true, 211: true, 399: true}
	var sample [][2]float64
	var rows []int // design index of each sample row, −1 for an extra one
	for i, p := range m {
		if !drop[i] {
			sample = append(sample, p)
			rows = append(rows, i)
		}
	}
	c, s := math.Cos(-8*math.Pi/180), math.Sin(-8*math.Pi/180)
	for _, cell := range [][2]float64{{5.5, 5.5}, {12.5, 3.5}, {17.5, 16.5}} {
		sample = append(sample, [2]float64{3 + c*cell[0] - s*cell[1], 4 + s*cell[0] + c*cell[1]})
		rows = append(rows, -1)
	}
	r, err := RegisterPlane(context.Background(), d, sample, PlaneOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Missing) != len(drop) || len(r.Extra) != 3 {
		t.Fatalf("%d missing %v, %d extra %v; want %d and 3", len(r.Missing), r.Missing, len(r.Extra), r.Extra, len(drop))
	}
	for _, j := range r.Missing {
		if !drop[j] {
			t.Errorf("design site %d reported missing; it is in the sample", j)
		}
	}
	for _, k := range r.Extra {
		if rows[k] != -1 {
			t.Errorf("sample row %d reported extra; it is design site %d", k, rows[k])
		}
	}
	for _, mt := range r.Matches {
		if rows[mt.Measured] != mt.Design {
			t.Errorf("sample row %d matched to design site %d; it is design site %d", mt.Measured, mt.Design, rows[mt.Measured])
		}
	}
}

// A pure square lattice on a square patch maps onto itself by the
// quarter turns and reflections about the patch's centre: the
// registration cannot tell them apart and must say so, while one wave of
// modulation (TestRegisterPlaneRecoversTransform) breaks the tie.
func TestRegisterPlaneLatticeTies(t *testing.T) {
	var d [][2]float64
	for y := range 12 {
		for x := range 12 {
			d = append(d, [2]float64{float64(x), float64(y)})
		}
	}
	m := moved(d, [2]float64{-2, 7}, 1, 31, 0.01, 11)
	r, err := RegisterPlane(context.Background(), d, m, PlaneOptions{})
	if err != nil {
		t.Fatal(err)
	}
	type motion struct {
		turn   int
		mirror bool
	}
	seen := map[motion]bool{}
	for _, tie := range r.Ties {
		turn := (int(math.Round(tie.Turn)) + 360) % 360
		seen[motion{turn, tie.Mirrored}] = true
		if tie.Missing != 0 || tie.Extra != 0 || tie.Shift != [2]int{} {
			t.Errorf("tie %+v moves or leaves sites unmatched", tie)
		}
	}
	// The symmetries of a square about its centre: the dihedral group of
	// order 8, four turns and four reflections (common practice).
	for _, turn := range []int{0, 90, 180, 270} {
		for _, mirror := range []bool{false, true} {
			if want := turn != 0 || mirror; want != seen[motion{turn, mirror}] {
				t.Errorf("turn %d, mirrored %v: tie %v, want %v (ties %+v)", turn, mirror, !want, want, r.Ties)
			}
		}
	}
	if r.Mirrored {
		t.Error("a lattice that is its own mirror image registered mirrored")
	}
}

// A sample that is the design's mirror image (a camera image whose y axis
// points down) registers as one, with the transform of the mirror image;
// the design as it is registers unmirrored.
func TestRegisterPlaneMirrored(t *testing.T) {
	d := testPlate(t, "hex")
	flipped := make([][2]float64, len(d))
	for i, p := range d {
		flipped[i] = [2]float64{p[0], -p[1]}
	}
	m := moved(flipped, [2]float64{5, 50}, 0.999, 40, 0.005, 2)
	r, err := RegisterPlane(context.Background(), d, m, PlaneOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if !r.Mirrored || len(r.Missing) != 0 || len(r.Extra) != 0 {
		t.Fatalf("mirrored %v, %d missing, %d extra; want a mirror image with every site matched", r.Mirrored, len(r.Missing), len(r.Extra))
	}
	if math.Abs(r.Rotation-40) > 4*r.RotationErr || math.Abs(r.Scale-0.999) > 4*r.ScaleErr {
		t.Errorf("rotation %.6g ± %.2g, scale %.8g ± %.2g; want 40 and 0.999", r.Rotation, r.RotationErr, r.Scale, r.ScaleErr)
	}
	for i, p := range d {
		q := r.Predict(p)
		if math.Hypot(q[0]-m[i][0], q[1]-m[i][1]) > 0.05 {
			t.Fatalf("design site %d predicted at %v, measured at %v", i, q, m[i])
		}
	}
	r, err = RegisterPlane(context.Background(), d, moved(d, [2]float64{5, 50}, 0.999, 40, 0.005, 2), PlaneOptions{})
	if err != nil || r.Mirrored {
		t.Errorf("the design as it is: mirrored %v, err %v", r != nil && r.Mirrored, err)
	}
}
