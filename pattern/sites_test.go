package pattern

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
)

// hexPlate is a rows × cols patch of a hexagonal lattice of step a,
// shuffled, tilted by 17° and offset, with one site in 20 left out and
// three spurious sites inside the patch.
func hexPlate(rows, cols int, a float64) [][2]float64 {
	rng := rand.New(rand.NewPCG(7, 11))
	var pts [][2]float64
	for r := range rows {
		for c := range cols {
			if rng.IntN(20) == 0 {
				continue
			}
			pts = append(pts, [2]float64{a * (float64(c) + 0.5*float64(r)), a * math.Sqrt(3) / 2 * float64(r)})
		}
	}
	for range 3 {
		pts = append(pts, [2]float64{a * (float64(cols)*rng.Float64() + 0.25), a * float64(rows-1) * 0.8 * rng.Float64()})
	}
	rng.Shuffle(len(pts), func(i, j int) { pts[i], pts[j] = pts[j], pts[i] })
	return place(pts, 17*math.Pi/180, [2]float64{153.2, -48.7})
}

// A plate of centroids, in CSV with a unit in its header and in JSON
// "sites", comes back as a Plane with every site in the input's order;
// Read refuses it, naming the file and saying how to read it.
func TestReadSitesPlate(t *testing.T) {
	pts := hexPlate(12, 30, 0.5)
	var csv, js strings.Builder
	csv.WriteString("# a plate\nid,x [mm],y [mm]\n")
	js.WriteString(`{"unit": "mm", "sites": [`)
	for i, p := range pts {
		fmt.Fprintf(&csv, "%d,%s,%s\n", i+7, fmtG(p[0]), fmtG(p[1]))
		if i > 0 {
			js.WriteString(",\n")
		}
		fmt.Fprintf(&js, `{"y": %s, "x": %s}`, fmtG(p[1]), fmtG(p[0]))
	}
	js.WriteString("]}\n")
	for _, in := range []struct {
		name, data string
		opt        ReadOptions
	}{
		{"plate.csv", csv.String(), ReadOptions{Columns: []string{"x", "y"}}},
		{"plate.json", js.String(), ReadOptions{}},
	} {
		s, err := ReadSites(strings.NewReader(in.data), in.name, in.opt)
		if err != nil {
			t.Fatalf("%s: %v", in.name, err)
		}
		if s.Chain != nil || s.Plane == nil {
			t.Fatalf("%s: got chain %v, plane %v; want a plane alone", in.name, s.Chain != nil, s.Plane != nil)
		}
		p := s.Plane
		if p.Len() != len(pts) || p.Unit != "mm" || p.Source != in.name {
			t.Errorf("%s: %d sites in %q from %q, want %d in mm from %s", in.name, p.Len(), p.Unit, p.Source, len(pts), in.name)
		}
		for i, q := range p.Points {
			if q != pts[i] || p.Rows[i] != i {
				t.Fatalf("%s: site %d is %v (row %d), want %v (row %d)", in.name, i, q, p.Rows[i], pts[i], i)
			}
		}
		_, err = Read(strings.NewReader(in.data), in.name, in.opt)
		var ie *InputError
		if !errors.As(err, &ie) || ie.File != in.name || !strings.Contains(err.Error(), "2D point set") || !strings.Contains(err.Error(), "plate") {
			t.Errorf("%s: Read gave %v, want a located refusal saying it is a 2D set read as a plate", in.name, err)
		}
	}
}

// A tilted chain is still a chain through ReadSites, the same chain Read
// gives; a 3D set off a line is refused by both.
func TestReadSitesChainAnd3D(t *testing.T) {
	var b strings.Builder
	for i := range 60 {
		fmt.Fprintf(&b, "%g,%g\n", 3+float64(i)*math.Cos(0.4)-0.2*math.Sin(0.4)*float64(i%3-1), 5+float64(i)*math.Sin(0.4)+0.2*math.Cos(0.4)*float64(i%3-1))
	}
	s, err := ReadSites(strings.NewReader(b.String()), "chain.csv", ReadOptions{})
	if err != nil || s.Chain == nil || s.Plane != nil {
		t.Fatalf("chain: %v (plane %v)", err, s.Plane != nil)
	}
	p, err := Read(strings.NewReader(b.String()), "chain.csv", ReadOptions{})
	if err != nil || fmt.Sprint(p.Positions) != fmt.Sprint(s.Chain.Positions) {
		t.Errorf("Read and ReadSites differ on a chain: %v", err)
	}

	b.Reset()
	for i := range 10 {
		for j := range 10 {
			fmt.Fprintf(&b, "%d,%d,%g\n", i, j, 0.1*float64(i))
		}
	}
	for _, read := range []func() error{
		func() error {
			_, err := ReadSites(strings.NewReader(b.String()), "slab.csv", ReadOptions{})
			return err
		},
		func() error { _, err := Read(strings.NewReader(b.String()), "slab.csv", ReadOptions{}); return err },
	} {
		if err := read(); err == nil || !strings.HasPrefix(err.Error(), "slab.csv: the centroids do not lie along a line") {
			t.Errorf("3D slab: %v, want a refusal", err)
		}
	}
}

// Two sites of a plate at the same place are refused with both lines.
func TestReadSitesDuplicate(t *testing.T) {
	var b strings.Builder
	b.WriteString("x,y\n")
	for i := range 10 {
		for j := range 10 {
			fmt.Fprintf(&b, "%d,%d\n", i, j)
		}
	}
	b.WriteString("3,4\n")
	_, err := ReadSites(strings.NewReader(b.String()), "dup.csv", ReadOptions{})
	want := "dup.csv:102: two sites at the same position: (3, 4), as on line 36"
	if err == nil || err.Error() != want {
		t.Errorf("error %v, want %q", err, want)
	}
	// NewPlane keeps the same invariant.
	if _, err := NewPlane([][2]float64{{0, 0}, {1, 0}, {0, 1}, {1, 1}, {2, 0}, {2, 1}, {0, 2}, {1, 1 + 1e-12}}, "", "x"); !errors.Is(err, ErrDuplicate) {
		t.Errorf("NewPlane with a duplicate: %v", err)
	}
}

// The Plane that WritePlane writes reads back exactly.
func TestWritePlaneRoundTrip(t *testing.T) {
	pts := hexPlate(9, 15, 1/3.0)
	p, err := NewPlane(pts, "um", "generated")
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := WritePlane(&buf, p, []string{"a plate", "second line"}); err != nil {
		t.Fatal(err)
	}
	if !strings.HasPrefix(buf.String(), "# a plate\n# second line\nx_um,y_um\n") {
		t.Errorf("written:\n%.80s", buf.String())
	}
	s, err := ReadSites(&buf, "back.csv", ReadOptions{})
	if err != nil || s.Plane == nil {
		t.Fatalf("reading back: %v", err)
	}
	if s.Plane.Unit != "um" || len(s.Plane.Points) != len(pts) {
		t.Fatalf("read back %d sites in %q", len(s.Plane.Points), s.Plane.Unit)
	}
	for i := range pts {
		if s.Plane.Points[i] != pts[i] {
			t.Fatalf("site %d read back as %v, written %v", i, s.Plane.Points[i], pts[i])
		}
	}
	if err := WritePlane(&buf, p, []string{"two\nlines"}); err == nil {
		t.Error("a comment with a line break was written")
	}
}

func fmtG(v float64) string { return fmt.Sprint(v) }

// BenchmarkReadSitesPlate reads hexagonal plates of 300 × 300 and
// 1000 × 1000 sites written as CSV: parsing, the 1D/2D rule and the
// duplicate check.
func BenchmarkReadSitesPlate(b *testing.B) {
	for _, side := range []int{300, 1000} {
		b.Run(fmt.Sprintf("%dx%d", side, side), func(b *testing.B) {
			p, err := NewPlane(hexPlate(side, side, 1), "um", "bench")
			if err != nil {
				b.Fatal(err)
			}
			var buf bytes.Buffer
			if err := WritePlane(&buf, p, nil); err != nil {
				b.Fatal(err)
			}
			data := buf.Bytes()
			b.ResetTimer()
			for range b.N {
				s, err := ReadSites(bytes.NewReader(data), "plate.csv", ReadOptions{})
				if err != nil || s.Plane == nil {
					b.Fatal(err)
				}
			}
		})
	}
}
