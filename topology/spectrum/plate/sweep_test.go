package plate

import (
	"bytes"
	"context"
	"encoding/csv"
	"math"
	"slices"
	"testing"

	"phasonhull/pattern"
	"phasonhull/pattern/design"
	"phasonhull/topology/spectrum"
)

// A square lattice on a rotated potential V = 2λ(cos 2πψ1 + cos 2πψ2),
// ψ = A·n with A = s·R(twist): the widest gaps' IDS lie in the group
// Z + Σ Z·A_ij + Z·det A (the gap-labelling theorem for the crossed
// product C(T²) ⋊_A Z²; Bellissard, "Gap labelling theorems for
// Schrödinger operators", 1992), and a sweep of the twist, which moves
// A11 and A12 but not det A = s², confirms the labels det A and 1 − det A:
// a deep potential holds one bound state per minimum, and the minima of V
// lie on the lattice A⁻¹Z² of |det A| minima per site (common practice;
// the expected integers are computed here from that count, not recalled).
func TestTwistSweepConfirmsDeterminantLabels(t *testing.T) {
	const s = 0.32901642 // s² = 0.10825…, irrational
	spec := design.Spec{Family: design.Twisted, Sites: 200, Scale: s}
	c := Config{Harper: 1.5, Model: Model{Ends: spectrum.Periodic}, Options: Options{MinGap: 0.02, Method: KPM, KPM: KPMOptions{Seed: 3}}}
	twists := []float64{0, 10, 20, 30, 40}
	r, err := Sweep(context.Background(), &spec, nil, c, "twist", twists, SweepOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(r.Names, []string{"A11", "A12", "det A"}) {
		t.Fatalf("generators %v, want A11, A12, det A (A22 = A11 and A21 = −A12 for a rotation)", r.Names)
	}
	for k, tw := range twists {
		th := tw * math.Pi / 180
		want := []float64{s * math.Cos(th), -s * math.Sin(th), s * s}
		for i := range want {
			if math.Abs(r.Generators[k][i]-want[i]) > 1e-12 {
				t.Fatalf("twist %g: generators %v, want %v", tw, r.Generators[k], want)
			}
		}
	}
	// The two widest gaps at the first twist, followed through the sweep.
	var tracks []Track
	for _, tr := range r.Tracks {
		if tr.Steps[0] == 0 && len(tr.Steps) == len(twists) {
			tracks = append(tracks, tr)
		}
	}
	slices.SortFunc(tracks, func(a, b Track) int { return cmpFloat(b.Gaps[0].Width, a.Gaps[0].Width) })
	if len(tracks) < 2 {
		t.Fatalf("%d gaps followed through the whole sweep, want 2: %+v", len(tracks), r.Tracks)
	}
	minima := s * s // minima of V per lattice site
	for _, tr := range tracks[:2] {
		// One bound state per minimum: the lowest band holds det A of the
		// states, and by the symmetry E → −E (V(ψ + ½) = −V on a
		// bipartite lattice) the highest band too.
		n, m := 0, 1
		if tr.Gaps[0].IDS > 0.5 {
			n, m = 1, -1
		}
		if math.Abs(tr.Gaps[0].IDS-(float64(n)+float64(m)*minima)) > tr.Gaps[0].Tolerance {
			t.Errorf("gap at IDS %.4f: want %d + %d·det A = %.4f", tr.Gaps[0].IDS, n, m, float64(n)+float64(m)*minima)
		}
		if want := []int{n, 0, 0, m}; !slices.Equal(tr.Coeffs, want) || !tr.Confirmed {
			t.Errorf("gap at IDS %.4f: line %v (confirmed %v: %s), want %v confirmed", tr.Gaps[0].IDS, tr.Coeffs, tr.Confirmed, tr.Reason, want)
		}
	}
	var b bytes.Buffer
	if err := r.WriteCSV(&b); err != nil {
		t.Fatal(err)
	}
	rows, err := csv.NewReader(&b).ReadAll()
	if err != nil || len(rows) < 1+2*len(twists) || rows[0][0] != "param" {
		t.Errorf("CSV: %d rows, err %v", len(rows), err)
	}
}

// A sweep whose generators do not move cannot confirm a label: a
// Hofstadter plate at flux 1/3 seen three times — the integers (s_r, t_r)
// hold at every value, but the sweep tells them apart no better than one
// spectrum.
func TestSweepThatMovesNoGeneratorConfirmsNothing(t *testing.T) {
	pts, l := grid(21, 21, square)
	s := &Sample{Plane: planeOf(pts), Lattice: l}
	c := Config{Model: Model{Flux: Rational(1, 3), Ends: spectrum.Periodic}, Options: Options{Method: Values}}
	r, err := Sweep(context.Background(), nil, s, c, ParamHarper, []float64{0, 0, 0}, SweepOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Tracks) == 0 {
		t.Fatal("no gap followed")
	}
	for _, tr := range r.Tracks {
		if tr.Confirmed || tr.Reason == "" {
			t.Errorf("gap at IDS %.4f confirmed by a sweep that moves nothing", tr.Gaps[0].IDS)
		}
	}
}

func planeOf(pts [][2]float64) *pattern.Plane { return &pattern.Plane{Points: pts} }
