package design

import (
	"bytes"
	"encoding/json"
	"math"
	"reflect"
	"strings"
	"testing"

	"phasonhull/pattern"
)

// plateSpec is a valid plate: a hexagonal lattice of step 2 µm displaced
// by two waves.
func plateSpec() Spec {
	s := NewSpec(Plate)
	s.Lattice, s.Spacing, s.Unit = LatticeHex, 2, "um"
	s.Matrix = [][]float64{{0.4142, 0.1}, {-0.2, 0.2679}}
	s.Amps, s.Phases = []float64{0.2, 0.15}, []float64{0.3}
	return s
}

// latticePoint is n1·a1 + n2·a2 for the spec's lattice, computed here from
// the textbook bases (square: (a,0), (0,a); hexagonal: (a,0),
// (a/2, a√3/2); common practice).
func latticePoint(s Spec, n1, n2 int) [2]float64 {
	a := s.WithDefaults().Spacing
	if s.Lattice == LatticeHex {
		return [2]float64{a * (float64(n1) + 0.5*float64(n2)), a * math.Sqrt(3) / 2 * float64(n2)}
	}
	return [2]float64{a * float64(n1), a * float64(n2)}
}

// A perfect square lattice has 4 nearest neighbours per interior site and
// a hexagonal one 6, at distance a (common practice).
func TestPlateNearestNeighbours(t *testing.T) {
	for lat, want := range map[string]int{LatticeSquare: 4, LatticeHex: 6} {
		s := NewSpec(Plate)
		s.Lattice, s.Sites, s.Spacing = lat, 9, 1.5
		p, err := GeneratePlane(s)
		if err != nil {
			t.Fatal(err)
		}
		if p.Len() != 81 {
			t.Fatalf("%s: %d sites, want 9 × 9", lat, p.Len())
		}
		centre := p.Points[4*9+4] // n = (4, 4)
		nearest, count := math.Inf(1), 0
		for i, q := range p.Points {
			if i == 4*9+4 {
				continue
			}
			d := math.Hypot(q[0]-centre[0], q[1]-centre[1])
			switch {
			case d < nearest*(1-1e-9):
				nearest, count = d, 1
			case d <= nearest*(1+1e-9):
				count++
			}
		}
		if count != want || math.Abs(nearest-1.5) > 1e-12 {
			t.Errorf("%s lattice: %d nearest neighbours at %v, want %d at 1.5", lat, count, nearest, want)
		}
	}
}

// Each site sits at its lattice point plus Σ_k a_k ê_k sin 2π(ψ0_k + A_k·n),
// computed here independently, with ê_k along wave k: the step of ψ_k
// along a_j is A_kj, so ê_k·a_j is proportional to A_kj.
func TestPlateDisplacement(t *testing.T) {
	s := plateSpec()
	p, err := GeneratePlane(s)
	if err != nil {
		t.Fatal(err)
	}
	a1, a2 := latticePoint(s, 1, 0), latticePoint(s, 0, 1)
	// ê_k from the two conditions ê·a1 ∝ A_k1, ê·a2 ∝ A_k2: solve
	// q·a1 = A_k1, q·a2 = A_k2 by Cramer's rule and normalise.
	det := a1[0]*a2[1] - a1[1]*a2[0]
	phases := []float64{0.3, 0}
	for n2 := range s.Sites {
		for n1 := range s.Sites {
			want := latticePoint(s, n1, n2)
			for k, row := range s.Matrix {
				q := [2]float64{(row[0]*a2[1] - row[1]*a1[1]) / det, (a1[0]*row[1] - a2[0]*row[0]) / det}
				l := math.Hypot(q[0], q[1])
				sn := math.Sin(2 * math.Pi * (phases[k] + row[0]*float64(n1) + row[1]*float64(n2)))
				want[0] += s.Amps[k] * q[0] / l * sn
				want[1] += s.Amps[k] * q[1] / l * sn
			}
			got := p.Points[n2*s.Sites+n1]
			if math.Hypot(got[0]-want[0], got[1]-want[1]) > 1e-9 {
				t.Fatalf("site n = (%d, %d) at %v, want %v", n1, n2, got, want)
			}
		}
	}
	// A polarisation given in degrees overrides the longitudinal one.
	s.Polar = []float64{90, 0}
	p, err = GeneratePlane(s)
	if err != nil {
		t.Fatal(err)
	}
	got, base := p.Points[s.Sites+3], latticePoint(s, 3, 1)
	sn1 := math.Sin(2 * math.Pi * (0.3 + 3*0.4142 + 0.1))
	sn2 := math.Sin(2 * math.Pi * (-0.2*3 + 0.2679))
	if want := [2]float64{base[0] + 0.15*sn2, base[1] + 0.2*sn1}; math.Hypot(got[0]-want[0], got[1]-want[1]) > 1e-9 {
		t.Errorf("polarised site at %v, want %v", got, want)
	}
}

// The twisted family's A is s·R(twist): A·Aᵀ = s²·I and det A = s² (a
// scaled rotation; common practice), and its displacements follow the
// axes turned by the twist.
func TestTwisted(t *testing.T) {
	s := NewSpec(Twisted)
	s.Twist, s.Scale, s.Amp, s.Sites = 7.5, 1.02, 0.1, 12
	A := s.Rotation()
	if len(A) != 2 {
		t.Fatalf("A = %v", A)
	}
	s2 := 1.02 * 1.02
	for i := range 2 {
		for j := range 2 {
			var dotij float64
			for k := range 2 {
				dotij += A[i][k] * A[j][k]
			}
			want := 0.0
			if i == j {
				want = s2
			}
			if math.Abs(dotij-want) > 1e-12 {
				t.Errorf("(A·Aᵀ)[%d][%d] = %v, want %v", i, j, dotij, want)
			}
		}
	}
	if det := A[0][0]*A[1][1] - A[0][1]*A[1][0]; math.Abs(det-s2) > 1e-12 {
		t.Errorf("det A = %v, want %v", det, s2)
	}
	p, err := GeneratePlane(s)
	if err != nil {
		t.Fatal(err)
	}
	tw := 7.5 * math.Pi / 180
	n1, n2 := 5, 3
	p1 := 1.02 * (math.Cos(tw)*5 - math.Sin(tw)*3)
	p2 := 1.02 * (math.Sin(tw)*5 + math.Cos(tw)*3)
	u := [2]float64{0.1 * (math.Cos(tw)*math.Sin(2*math.Pi*p1) - math.Sin(tw)*math.Sin(2*math.Pi*p2)),
		0.1 * (math.Sin(tw)*math.Sin(2*math.Pi*p1) + math.Cos(tw)*math.Sin(2*math.Pi*p2))}
	got := p.Points[n2*12+n1]
	if math.Hypot(got[0]-5-u[0], got[1]-3-u[1]) > 1e-9 {
		t.Errorf("site (5, 3) at %v, want (5, 3) + %v", got, u)
	}
	if (Spec{Family: Modulated}).Rotation() != nil {
		t.Error("a chain family has a rotation matrix")
	}
}

// A rational A repeats on a supercell: A = [[1/4, 0], [0, 1/3]] gives the
// same displacement at n, n + (4, 0) and n + (0, 3).
func TestPlateSupercell(t *testing.T) {
	s := NewSpec(Plate)
	s.Sites, s.Matrix, s.Amps = 13, [][]float64{{0.25, 0}, {0, 1.0 / 3}}, []float64{0.1, 0.1}
	p, err := GeneratePlane(s)
	if err != nil {
		t.Fatal(err)
	}
	disp := func(n1, n2 int) [2]float64 {
		q, l := p.Points[n2*13+n1], latticePoint(s, n1, n2)
		return [2]float64{q[0] - l[0], q[1] - l[1]}
	}
	for n2 := range 9 {
		for n1 := range 8 {
			d, e, f := disp(n1, n2), disp(n1+4, n2), disp(n1, n2+3)
			if math.Hypot(d[0]-e[0], d[1]-e[1]) > 1e-12 || math.Hypot(d[0]-f[0], d[1]-f[1]) > 1e-12 {
				t.Fatalf("n = (%d, %d): displacements %v, %v, %v differ over the supercell", n1, n2, d, e, f)
			}
		}
	}
}

// Amplitudes just inside the bound keep every site in its own Voronoi
// cell, checked by brute force (the nearest lattice point of each site is
// its own); just outside they are refused.
func TestPlateVoronoiBound(t *testing.T) {
	for _, lat := range []string{LatticeSquare, LatticeHex} {
		s := NewSpec(Plate)
		s.Lattice, s.Sites = lat, 20
		s.Matrix = [][]float64{{0.4142, 0.1}, {0.1, 0.2679}, {0.3, -0.17}}
		s.Polar = []float64{0, 60, 120}
		s.Amps = []float64{1, 1, 1}
		// The reach along the worst lattice vector, from the bound's own
		// formula; scale the amplitudes just below and just above it.
		_, w := s.WithDefaults().waves()
		worst := 0.0
		for _, v := range [][2]float64{latticePoint(s, 1, 0), latticePoint(s, 0, 1), latticePoint(s, 1, 1), latticePoint(s, 1, -1)} {
			var reach float64
			for _, wk := range w {
				reach += math.Abs(wk[0]*v[0] + wk[1]*v[1])
			}
			worst = max(worst, reach/((v[0]*v[0]+v[1]*v[1])/2))
		}
		below := s
		below.Amps = []float64{0.999 / worst, 0.999 / worst, 0.999 / worst}
		p, err := GeneratePlane(below)
		if err != nil {
			t.Fatalf("%s: amplitudes inside the cell refused: %v", lat, err)
		}
		for n2 := range s.Sites {
			for n1 := range s.Sites {
				q, own := p.Points[n2*s.Sites+n1], latticePoint(s, n1, n2)
				dOwn := math.Hypot(q[0]-own[0], q[1]-own[1])
				for m2 := n2 - 2; m2 <= n2+2; m2++ {
					for m1 := n1 - 2; m1 <= n1+2; m1++ {
						o := latticePoint(s, m1, m2)
						if (m1 != n1 || m2 != n2) && math.Hypot(q[0]-o[0], q[1]-o[1]) <= dOwn {
							t.Fatalf("%s: site (%d, %d) is as close to lattice point (%d, %d) as to its own", lat, n1, n2, m1, m2)
						}
					}
				}
			}
		}
		above := s
		above.Amps = []float64{1.001 / worst, 1.001 / worst, 1.001 / worst}
		if err := above.Validate(); err == nil || !strings.Contains(err.Error(), "Voronoi cell") {
			t.Errorf("%s: amplitudes beyond the cell: %v", lat, err)
		}
	}
}

// Bad parameters are refused with the field named.
func TestPlaneRefusals(t *testing.T) {
	for _, c := range []struct {
		edit func(*Spec)
		want string
	}{
		{func(s *Spec) { s.Matrix[0][0] = math.NaN() }, "rotation = NaN: not a finite number"},
		{func(s *Spec) { s.Polar = []float64{math.Inf(1), 0} }, "polar = +Inf: not a finite number"},
		{func(s *Spec) {
			s.Matrix = append(s.Matrix, []float64{0.1, 0.2}, []float64{0.3, 0.1})
			s.Amps = []float64{0.1, 0.1, 0.1, 0.1}
		}, "rotation: 4 rows; a plate takes 0 to 3 waves"},
		{func(s *Spec) { s.Matrix[1] = []float64{0.1, 0.2, 0.3} }, "rotation row 2: 3 numbers"},
		{func(s *Spec) { s.Matrix[1] = []float64{0, 0} }, "rotation row 2 is zero"},
		{func(s *Spec) { s.Amps = []float64{0.1} }, "amps: 1 amplitudes for 2 rows"},
		{func(s *Spec) { s.Amps = []float64{0.9, 0.9} }, "Voronoi cell"},
		{func(s *Spec) { s.Polar = []float64{10} }, "polar: 1 angles for 2 rows"},
		{func(s *Spec) { s.Lattice = "kagome" }, `lattice "kagome": unknown`},
		{func(s *Spec) { s.Sites = 2 }, "sites = 2: a plate has 3 to 3162 sites per side"},
		{func(s *Spec) { s.Sites = 4000 }, "sites = 4000"},
		{func(s *Spec) { s.Drift = 0.01 }, "drift = 0.01: a scale drift is a perturbation of chains"},
		{func(s *Spec) { s.Twist = 3 }, "twist = 3 has no effect on the plate family"},
		{func(s *Spec) { s.Theta = 0.3 }, "theta = 0.3 has no effect on the plate family"},
		{func(s *Spec) { s.Missing = 0.999 }, "missing = 0.999"},
	} {
		s := plateSpec()
		c.edit(&s)
		_, err := GeneratePlane(s)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("error %v, want it to contain %q", err, c.want)
		}
	}
	tw := NewSpec(Twisted)
	tw.Scale = -1
	if err := tw.Validate(); err == nil || !strings.Contains(err.Error(), "scale = -1: must be positive") {
		t.Errorf("negative scale: %v", err)
	}
	if _, err := Generate(plateSpec()); err == nil || !strings.Contains(err.Error(), "GeneratePlane") {
		t.Errorf("Generate of a plate: %v", err)
	}
	if _, err := GeneratePlane(allFamilies()[1]); err == nil || !strings.Contains(err.Error(), "generate it with Generate") {
		t.Errorf("GeneratePlane of a chain: %v", err)
	}
	m := NewSpec(Modulated)
	m.Lattice = LatticeHex
	if err := m.Validate(); err == nil || !strings.Contains(err.Error(), "lattice = hex has no effect on the modulated family") {
		t.Errorf("lattice on a chain: %v", err)
	}
}

// Missing, extra and noise: the counts asked for, extra sites inside the
// patch, isotropic noise of the standard deviation asked for, the same
// plane for the same seed and another for another seed.
func TestPlanePerturbations(t *testing.T) {
	s := NewSpec(Plate)
	s.Sites, s.Missing, s.Extra, s.Noise = 40, 0.1, 0.02, 0.05
	p, err := GeneratePlane(s)
	if err != nil {
		t.Fatal(err)
	}
	if want := 1600 - 160 + 32; p.Len() != want {
		t.Fatalf("%d sites, want %d", p.Len(), want)
	}
	var sx, sy float64
	kept := p.Points[:p.Len()-32]
	for _, q := range kept {
		dx, dy := q[0]-math.Round(q[0]), q[1]-math.Round(q[1])
		sx += dx * dx
		sy += dy * dy
	}
	// 1440 samples: the sample standard deviation is within 10% of 0.05
	// far beyond 3 of its standard errors (1.9% each).
	for _, sd := range []float64{math.Sqrt(sx / 1440), math.Sqrt(sy / 1440)} {
		if math.Abs(sd-0.05) > 0.005 {
			t.Errorf("noise standard deviation %v per coordinate, want 0.05", sd)
		}
	}
	for _, q := range p.Points[p.Len()-32:] {
		if q[0] < -0.5-0.3 || q[0] > 39.5+0.3 || q[1] < -0.5-0.3 || q[1] > 39.5+0.3 {
			t.Errorf("extra site %v outside the patch", q)
		}
	}
	again, _ := GeneratePlane(s)
	if !reflect.DeepEqual(p.Points, again.Points) {
		t.Error("the same seed gave another plane")
	}
	s.Seed = 2
	other, _ := GeneratePlane(s)
	if reflect.DeepEqual(p.Points, other.Points) {
		t.Error("another seed gave the same plane")
	}
}

// A plate spec goes through JSON and back unchanged, with its family's
// default sites per side when it names none; its comments' spec line
// rebuilds the same plane; the plane written as CSV reads back exactly.
func TestPlaneSpecRoundTrip(t *testing.T) {
	for _, s := range []Spec{plateSpec(), func() Spec { s := NewSpec(Twisted); s.Twist, s.Amp = 4, 0.08; return s }()} {
		js, err := json.Marshal(s)
		if err != nil {
			t.Fatal(err)
		}
		back, err := ReadSpec(bytes.NewReader(js), "spec.json")
		if err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(back, s) {
			t.Errorf("%s: JSON round trip gave\n%+v\nwant\n%+v", s.Family, back, s)
		}
		p, err := GeneratePlane(s)
		if err != nil {
			t.Fatal(err)
		}
		var line string
		for _, c := range s.Comments() {
			if strings.HasPrefix(c, "spec: ") {
				line = strings.TrimPrefix(c, "spec: ")
			}
		}
		again, err := ReadSpec(strings.NewReader(line), "comment")
		if err != nil {
			t.Fatal(err)
		}
		q, err := GeneratePlane(again)
		if err != nil || !reflect.DeepEqual(p.Points, q.Points) {
			t.Errorf("%s: the spec line rebuilds another plane (%v)", s.Family, err)
		}
		var buf bytes.Buffer
		if err := pattern.WritePlane(&buf, p, s.Comments()); err != nil {
			t.Fatal(err)
		}
		sites, err := pattern.ReadSites(&buf, "plate.csv", pattern.ReadOptions{})
		if err != nil || sites.Plane == nil {
			t.Fatalf("%s: reading the written plane: %v", s.Family, err)
		}
		if !reflect.DeepEqual(sites.Plane.Points, p.Points) || sites.Plane.Unit != s.Unit {
			t.Errorf("%s: the written plane reads back otherwise", s.Family)
		}
	}
	s, err := ReadSpec(strings.NewReader(`{"family": "plate"}`), "p.json")
	if err != nil || s.Sites != DefaultSitesPerSide {
		t.Errorf("a plate spec without sites: %d sites per side (%v), want %d", s.Sites, err, DefaultSitesPerSide)
	}
	s, err = ReadSpec(strings.NewReader(`{"family": "periodic", "cell": [1, 2]}`), "p.json")
	if err != nil || s.Sites != DefaultSites {
		t.Errorf("a chain spec without sites: %d sites (%v), want %d", s.Sites, err, DefaultSites)
	}
}

// Dimension tells the families of plates from those of chains, and
// Families lists only the latter.
func TestFamilyDimension(t *testing.T) {
	if Plate.Dimension() != 2 || Twisted.Dimension() != 2 || Modulated.Dimension() != 1 || Family("helix").Dimension() != 0 {
		t.Error("wrong dimensions")
	}
	if got := PlaneFamilies(); !reflect.DeepEqual(got, []Family{Plate, Twisted}) {
		t.Errorf("PlaneFamilies() = %v", got)
	}
	for _, f := range Families() {
		if f.Dimension() != 1 {
			t.Errorf("Families() lists %s", f)
		}
	}
}
