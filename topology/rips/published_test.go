package rips_test

import (
	"math"
	"slices"
	"testing"

	"phasonhull/topology/rips"
	"phasonhull/topology/rips/ripstest"
)

// roundoff bounds the floating-point noise in lengths computed from
// coordinates made with sin and cos: chords that are equal in exact
// arithmetic differ by a few units in the last place. Bars shorter than
// that are such noise.
const roundoff = 1e-9

// longBars returns the bars of the diagram longer than minPersistence, by
// dimension up to maxDim.
func longBars(d *rips.Diagram, maxDim int, minPersistence float64) [][]rips.Bar {
	out := make([][]rips.Bar, maxDim+1)
	for _, b := range d.Bars {
		if b.Dim <= maxDim && b.Persistence() > minPersistence {
			out[b.Dim] = append(out[b.Dim], b)
		}
	}
	return out
}

func near(a, b float64) bool { return math.Abs(a-b) <= roundoff }

// Adamaszek & Adams, "The Vietoris–Rips complexes of a circle", Pacific J.
// Math. 290 (2017): the regular hexagon of unit side has H1 = [1, √3) and
// H2 = [√3, 2).
func TestHexagon(t *testing.T) {
	d, err := rips.VietorisRips(ripstest.RegularPolygon(6), rips.Options{MaxDim: 2})
	if err != nil {
		t.Fatal(err)
	}
	bars := longBars(d, 2, roundoff)
	if len(bars[0]) != 6 {
		t.Errorf("H0: %d bars, want 6: %v", len(bars[0]), bars[0])
	}
	for _, b := range bars[0] {
		if b.Essential() {
			continue
		}
		if !near(b.Death, 1) {
			t.Errorf("H0 bar %v: want death 1 (the side)", b)
		}
	}
	// Betti numbers inside each bar, and past the radius of the cloud.
	for _, c := range []struct {
		t    float64
		want []int
	}{{0.5, []int{6, 0, 0}}, {1.5, []int{1, 1, 0}}, {1.9, []int{1, 0, 1}}, {2.5, []int{1, 0, 0}}} {
		if got := d.Betti(2, c.t); !slices.Equal(got, c.want) {
			t.Errorf("Betti numbers at %v: %v, want %v", c.t, got, c.want)
		}
	}
	want := map[int]rips.Bar{1: {Dim: 1, Birth: 1, Death: math.Sqrt(3)}, 2: {Dim: 2, Birth: math.Sqrt(3), Death: 2}}
	for dim, w := range want {
		if len(bars[dim]) != 1 || !near(bars[dim][0].Birth, w.Birth) || !near(bars[dim][0].Death, w.Death) {
			t.Errorf("H%d: %v, want [%v, %v)", dim, bars[dim], w.Birth, w.Death)
		}
	}
}

// Evenly spaced points on a circle. The Rips complex of the n points at
// the length of the chord over k steps is the clique complex of the k-th
// power C_n^k of the n-cycle. From memory, Adamaszek & Adams (Pacific J.
// Math. 290, 2017; after Adamaszek, Israel J. Math. 196, 2013): C_n^k is
// homotopy equivalent to S^(2l+1) when l/(2l+1) < k/n < (l+1)/(2l+3), and
// to a wedge of n−2k−1 spheres S^(2l) when k/n = l/(2l+1).
//
// For l = 0 this is a circle for 0 < k/n < 1/3, so the H1 bar is born at
// the side (k = 1) and dies at the first k with k/n ≥ 1/3, k = ⌈n/3⌉:
// when 3 divides n the complex at k = n/3 is a wedge of n/3 − 1 two-spheres
// (no H1), otherwise k/n > 1/3 and it is an odd sphere of dimension at
// least 3. The two-spheres at k = n/3 die at the next chord, k = n/3 + 1,
// where k/n > 1/3 leaves only spheres of dimension 3 or more; for n not
// divisible by 3 there is no H2 at all.
func TestEvenlySpacedCircle(t *testing.T) {
	chord := func(k, n int) float64 { return 2 * math.Sin(math.Pi*float64(k)/float64(n)) }
	for _, n := range []int{4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15, 16, 18, 20, 21, 24, 25} {
		d, err := rips.VietorisRips(ripstest.RegularPolygon(n), rips.Options{MaxDim: 2})
		if err != nil {
			t.Fatal(err)
		}
		bars := longBars(d, 2, roundoff)
		k := (n + 2) / 3 // ⌈n/3⌉
		if len(bars[1]) != 1 || !near(bars[1][0].Birth, chord(1, n)) || !near(bars[1][0].Death, chord(k, n)) {
			t.Errorf("n = %d: H1 %v, want one bar [%.6f, %.6f) (k = %d)", n, bars[1], chord(1, n), chord(k, n), k)
		}
		wantH2 := 0
		if n%3 == 0 {
			wantH2 = n/3 - 1
		}
		if len(bars[2]) != wantH2 {
			t.Errorf("n = %d: %d H2 bars %v, want %d", n, len(bars[2]), bars[2], wantH2)
			continue
		}
		for _, b := range bars[2] {
			if !near(b.Birth, chord(n/3, n)) || !near(b.Death, chord(n/3+1, n)) {
				t.Errorf("n = %d: H2 bar %v, want [%.6f, %.6f)", n, b, chord(n/3, n), chord(n/3+1, n))
			}
		}
	}
}

// Common practice: a well-sampled sphere shows Betti numbers (1, 0, 1) and
// a well-sampled flat torus (1, 2, 1) as long bars, while sampling noise
// gives short ones. "Long" here is a persistence above a quarter of the
// radius of the cloud.
func TestLongBarsOfSphereAndTorus(t *testing.T) {
	cases := []struct {
		name string
		pts  [][]float64
		want []int
	}{
		{"sphere", ripstest.FibonacciSphere(150), []int{1, 0, 1}},
		{"flat torus", ripstest.FlatTorusGrid(12), []int{1, 2, 1}},
	}
	for _, c := range cases {
		d, err := rips.VietorisRips(c.pts, rips.Options{MaxDim: 2})
		if err != nil {
			t.Fatal(err)
		}
		bars := longBars(d, 2, d.Radius/4)
		for dim, w := range c.want {
			if len(bars[dim]) != w {
				t.Errorf("%s: %d long H%d bars %v, want %d", c.name, len(bars[dim]), dim, bars[dim], w)
			}
		}
	}
}
