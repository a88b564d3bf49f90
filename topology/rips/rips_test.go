package rips_test

import (
	"errors"
	"math"
	"math/rand/v2"
	"reflect"
	"slices"
	"strings"
	"testing"

	"phasonhull/topology/rips"
	"phasonhull/topology/rips/ripstest"
)

func compute(t *testing.T, pts [][]float64, opt rips.Options) *rips.Diagram {
	t.Helper()
	d, err := rips.VietorisRips(pts, opt)
	if err != nil {
		t.Fatal(err)
	}
	return d
}

// sortedBars returns the bars sorted by dimension, birth and death.
func sortedBars(d *rips.Diagram) []rips.Bar {
	b := slices.Clone(d.Bars)
	slices.SortFunc(b, func(x, y rips.Bar) int {
		switch {
		case x.Dim != y.Dim:
			return x.Dim - y.Dim
		case x.Birth != y.Birth:
			if x.Birth < y.Birth {
				return -1
			}
			return 1
		case x.Death < y.Death:
			return -1
		case x.Death > y.Death:
			return 1
		}
		return 0
	})
	return b
}

// H0 of a Rips filtration is single-linkage clustering: its finite deaths
// are the edge lengths of a minimum spanning tree (common practice),
// computed here independently with Prim's algorithm on the full distance
// matrix.
func TestH0IsMinimumSpanningTree(t *testing.T) {
	for _, pts := range [][][]float64{
		ripstest.Cube(150, 3, 31),
		ripstest.Gaussian(120, 2, 32),
		ripstest.Clusters(90, 3, 4, 0.02, 33),
	} {
		n := len(pts)
		inTree := make([]bool, n)
		best := make([]float64, n)
		for i := range best {
			best[i] = math.Inf(1)
		}
		best[0] = 0
		var mst []float64
		for range n {
			u := -1
			for i := range n {
				if !inTree[i] && (u < 0 || best[i] < best[u]) {
					u = i
				}
			}
			inTree[u] = true
			if best[u] > 0 {
				mst = append(mst, best[u])
			}
			for i := range n {
				if !inTree[i] {
					best[i] = min(best[i], dist(pts[u], pts[i]))
				}
			}
		}
		slices.Sort(mst)

		d := compute(t, pts, rips.Options{MaxDim: 0})
		var deaths []float64
		essential := 0
		for _, b := range d.Bars {
			if b.Dim != 0 {
				t.Fatalf("MaxDim 0 gave a bar in dimension %d", b.Dim)
			}
			if b.Essential() {
				essential++
			} else {
				deaths = append(deaths, b.Death)
			}
		}
		slices.Sort(deaths)
		if essential != 1 {
			t.Errorf("%d essential H0 bars, want 1", essential)
		}
		if len(deaths) != len(mst) {
			t.Fatalf("%d finite H0 bars, the spanning tree has %d edges", len(deaths), len(mst))
		}
		for i := range mst {
			if math.Abs(deaths[i]-mst[i]) > 1e-12*mst[i] {
				t.Errorf("H0 death %d: %v, spanning tree edge %v", i, deaths[i], mst[i])
			}
		}
	}
}

// The barcode depends on the distances only, not on the order of the
// points.
func TestPermutationInvariance(t *testing.T) {
	r := rand.New(rand.NewPCG(41, 0))
	for _, pts := range [][][]float64{ripstest.Cube(90, 3, 42), ripstest.Torus(100, 2, 1, 43), ripstest.Quantize(ripstest.Cube(60, 2, 44))} {
		perm := slices.Clone(pts)
		r.Shuffle(len(perm), func(i, j int) { perm[i], perm[j] = perm[j], perm[i] })
		a := sortedBars(compute(t, pts, rips.Options{MaxDim: 2}))
		b := sortedBars(compute(t, perm, rips.Options{MaxDim: 2}))
		if !reflect.DeepEqual(a, b) {
			t.Errorf("%d points: the barcode changed under a permutation:\n%v\n%v", len(pts), a, b)
		}
	}
}

// Homology of a space without torsion does not depend on the field: Z/2,
// Z/3 and Z/5 give the same bars on samples of a circle, a sphere and a
// torus. The projective plane, whose H1 is Z/2, shows the difference.
func TestFieldsAgreeWithoutTorsion(t *testing.T) {
	for _, pts := range [][][]float64{ripstest.Circle(80, 0.1, 51), ripstest.Sphere(90, 52), ripstest.Torus(110, 2, 1, 53), ripstest.Cube(80, 3, 54)} {
		z2 := sortedBars(compute(t, pts, rips.Options{MaxDim: 2, Prime: 2}))
		for _, p := range []int{3, 5} {
			zp := sortedBars(compute(t, pts, rips.Options{MaxDim: 2, Prime: p}))
			if !reflect.DeepEqual(z2, zp) {
				t.Errorf("%d points: Z/2 and Z/%d differ:\n%v\n%v", len(pts), p, z2, zp)
			}
		}
	}
	rp2 := ripstest.FibonacciSphere(400)
	for i, p := range rp2 {
		x, y, z := p[0], p[1], p[2]
		rp2[i] = []float64{x * y, x * z, y*y - z*z, 2 * y * z}
	}
	long := func(prime int) []int {
		d := compute(t, rp2, rips.Options{MaxDim: 2, Prime: prime})
		bars := longBars(d, 2, d.Radius/4)
		return []int{len(bars[0]), len(bars[1]), len(bars[2])}
	}
	if got := long(2); !slices.Equal(got, []int{1, 1, 1}) {
		t.Errorf("projective plane over Z/2: long bars %v, want [1 1 1]", got)
	}
	if got := long(3); !slices.Equal(got, []int{1, 0, 0}) {
		t.Errorf("projective plane over Z/3: long bars %v, want [1 0 0]", got)
	}
}

// Cutting the filtration at t keeps every bar that ends by t, turns every
// bar alive at t into an essential one, and adds nothing.
func TestThresholdTruncates(t *testing.T) {
	for _, pts := range [][]([]float64){ripstest.Cube(100, 3, 61), ripstest.Circle(90, 0.05, 62)} {
		full := compute(t, pts, rips.Options{MaxDim: 2})
		cut := full.Radius * 0.45
		got := sortedBars(compute(t, pts, rips.Options{MaxDim: 2, Threshold: cut}))
		var want []rips.Bar
		for _, b := range full.Bars {
			switch {
			case b.Death <= cut:
				want = append(want, b)
			case b.Birth <= cut:
				want = append(want, rips.Bar{Dim: b.Dim, Birth: b.Birth, Death: math.Inf(1)})
			}
		}
		want = sortedBars(&rips.Diagram{Bars: want})
		if !reflect.DeepEqual(got, want) {
			t.Errorf("%d points, threshold %v: got\n%v\nwant\n%v", len(pts), cut, got, want)
		}
		// A threshold above the radius of the cloud changes nothing.
		above := compute(t, pts, rips.Options{MaxDim: 2, Threshold: 3 * full.Radius})
		if !reflect.DeepEqual(sortedBars(above), sortedBars(full)) {
			t.Errorf("%d points: a threshold above the radius of the cloud changed the bars", len(pts))
		}
	}
}

// Every reported cocycle of an H1 bar [b, d) is a cocycle of the complex
// below d: its coboundary, Σ_i (−1)^i c(τ minus its i-th vertex), vanishes
// mod p on every triangle τ of diameter < d, while some triangle of
// diameter d (the death simplex) sees it.
func TestCocycles(t *testing.T) {
	const p = 47
	cases := []struct {
		pts       [][]float64
		threshold float64
	}{
		{ripstest.Circle(70, 0.08, 71), 0},
		{ripstest.FigureEight(70, 0.04, 72), 0},
		{ripstest.Torus(60, 2, 1, 73), 0},
		{ripstest.Circle(60, 0.05, 74), 0.8}, // the big class is essential
	}
	for _, c := range cases {
		pts := c.pts
		d := compute(t, pts, rips.Options{MaxDim: 1, Prime: p, Cocycles: true, Threshold: c.threshold})
		h1 := 0
		for _, b := range d.Bars {
			if b.Dim == 1 {
				h1++
			}
		}
		if len(d.Cocycles) != h1 || h1 == 0 {
			t.Fatalf("%d cocycles for %d H1 bars", len(d.Cocycles), h1)
		}
		n := len(pts)
		for _, cc := range d.Cocycles {
			bar := d.Bars[cc.Bar]
			if bar.Dim != 1 {
				t.Fatalf("cocycle of a bar in dimension %d", bar.Dim)
			}
			val := make(map[[2]int]int)
			for _, e := range cc.Edges {
				if e.I >= e.J || e.Value <= -p/2 || e.Value > p/2 || e.Value == 0 {
					t.Fatalf("bad cocycle edge %+v", e)
				}
				if l := dist(pts[e.I], pts[e.J]); l < bar.Birth {
					t.Fatalf("cocycle edge %+v of length %v is shorter than the birth %v", e, l, bar.Birth)
				}
				val[[2]int{e.I, e.J}] = e.Value
			}
			end := bar.Death
			if bar.Essential() {
				end = math.Nextafter(d.Threshold, math.Inf(1))
			}
			seen := false
			for a := 0; a < n; a++ {
				for b := a + 1; b < n; b++ {
					for c := b + 1; c < n; c++ {
						diam := max(dist(pts[a], pts[b]), dist(pts[a], pts[c]), dist(pts[b], pts[c]))
						if diam > end {
							continue
						}
						s := ((val[[2]int{b, c}]-val[[2]int{a, c}]+val[[2]int{a, b}])%p + p) % p
						if diam < end && s != 0 {
							t.Fatalf("bar %v: the cocycle's coboundary is %d on triangle {%d %d %d} of diameter %v", bar, s, a, b, c, diam)
						}
						if diam == end && s != 0 {
							seen = true
						}
					}
				}
			}
			if !bar.Essential() && !seen {
				t.Errorf("bar %v: no triangle of diameter %v sees the cocycle", bar, end)
			}
		}
	}
}

// The parallel stages do not change the result.
func TestWorkersDoNotChangeResult(t *testing.T) {
	pts := ripstest.Torus(120, 2, 1, 81)
	a := compute(t, pts, rips.Options{MaxDim: 2, Workers: 1, Cocycles: true, Prime: 7})
	b := compute(t, pts, rips.Options{MaxDim: 2, Workers: 5, Cocycles: true, Prime: 7})
	if !reflect.DeepEqual(a, b) {
		t.Error("one worker and five workers gave different diagrams")
	}
}

func TestBudgetRefused(t *testing.T) {
	pts := ripstest.Cube(200, 3, 91)
	c, err := rips.Estimate(pts, rips.Options{MaxDim: 2})
	if err != nil {
		t.Fatal(err)
	}
	for _, budget := range []int64{1 << 10, c.Bytes / 2} {
		_, err := rips.VietorisRips(pts, rips.Options{MaxDim: 2, MemoryBudget: budget})
		if !errors.Is(err, rips.ErrBudget) {
			t.Fatalf("budget %d: error %v, want one wrapping ErrBudget", budget, err)
		}
		for _, word := range []string{"memory budget", "threshold", "dimension", "points"} {
			if !strings.Contains(err.Error(), word) {
				t.Errorf("budget %d: the error %q does not mention %q", budget, err, word)
			}
		}
	}
	// The same job fits twice its estimate.
	if _, err := rips.VietorisRips(pts, rips.Options{MaxDim: 2, MemoryBudget: 2 * c.Bytes}); err != nil {
		t.Fatal(err)
	}
}

// Estimate counts edges exactly and estimates triangles and tetrahedra
// within 20%.
func TestEstimate(t *testing.T) {
	pts := ripstest.Cube(60, 3, 101)
	c, err := rips.Estimate(pts, rips.Options{MaxDim: 2})
	if err != nil {
		t.Fatal(err)
	}
	n := len(pts)
	var edges, tri, tet float64
	in := func(i, j int) bool { return dist(pts[i], pts[j]) <= c.Threshold }
	for a := 0; a < n; a++ {
		for b := a + 1; b < n; b++ {
			if !in(a, b) {
				continue
			}
			edges++
			for x := b + 1; x < n; x++ {
				if !in(a, x) || !in(b, x) {
					continue
				}
				tri++
				for y := x + 1; y < n; y++ {
					if in(a, y) && in(b, y) && in(x, y) {
						tet++
					}
				}
			}
		}
	}
	if c.Simplices[0] != float64(n) || c.Simplices[1] != edges {
		t.Errorf("estimate %v: want %d vertices and %v edges exactly", c.Simplices, n, edges)
	}
	for k, want := range map[int]float64{2: tri, 3: tet} {
		if got := c.Simplices[k]; math.Abs(got-want) > 0.2*want {
			t.Errorf("%d-simplices: estimate %.0f, exact %.0f", k, got, want)
		}
	}
	if c.Bytes <= 0 || c.Work <= 0 {
		t.Errorf("estimate %+v: no work or memory", c)
	}
}

func TestBadInput(t *testing.T) {
	good := [][]float64{{0, 0}, {1, 0}, {0, 1}}
	cases := []struct {
		name string
		pts  [][]float64
		opt  rips.Options
	}{
		{"empty", nil, rips.Options{}},
		{"ragged", [][]float64{{0, 0}, {1}}, rips.Options{}},
		{"NaN", [][]float64{{0, 0}, {math.NaN(), 1}}, rips.Options{}},
		{"no coordinates", [][]float64{{}, {}}, rips.Options{}},
		{"dimension", good, rips.Options{MaxDim: 4}},
		{"negative dimension", good, rips.Options{MaxDim: -1}},
		{"threshold", good, rips.Options{Threshold: -1}},
		{"composite", good, rips.Options{Prime: 4}},
		{"large prime", good, rips.Options{Prime: 65537}},
		{"workers", good, rips.Options{Workers: -2}},
	}
	for _, c := range cases {
		if _, err := rips.VietorisRips(c.pts, c.opt); err == nil {
			t.Errorf("%s: no error", c.name)
		}
	}
}

// A single point and two points: the smallest ripstest.
func TestTinyClouds(t *testing.T) {
	d := compute(t, [][]float64{{1, 2}}, rips.Options{MaxDim: 2})
	if len(d.Bars) != 1 || !d.Bars[0].Essential() || d.Bars[0].Dim != 0 {
		t.Errorf("one point: %v", d.Bars)
	}
	d = compute(t, [][]float64{{0, 0}, {3, 4}}, rips.Options{MaxDim: 2})
	want := []rips.Bar{{Dim: 0, Birth: 0, Death: 5}, {Dim: 0, Birth: 0, Death: math.Inf(1)}}
	if !reflect.DeepEqual(d.Bars, want) {
		t.Errorf("two points: %v, want %v", d.Bars, want)
	}
}

// A quick computation writes no progress lines.
func TestProgressQuiet(t *testing.T) {
	var b strings.Builder
	compute(t, ripstest.Cube(30, 3, 111), rips.Options{MaxDim: 2, Progress: &b})
	if b.Len() != 0 {
		t.Errorf("progress on a quick job: %q", b.String())
	}
}

// A repeated point joins at length 0, so its H0 bar has no length and is
// left out: repeating points changes no bar.
func TestDuplicatePoints(t *testing.T) {
	pts := ripstest.Torus(60, 2, 1, 121)
	twice := append(slices.Clone(pts), pts[:25]...)
	a := sortedBars(compute(t, pts, rips.Options{MaxDim: 2}))
	b := sortedBars(compute(t, twice, rips.Options{MaxDim: 2}))
	if !reflect.DeepEqual(a, b) {
		t.Errorf("repeating 25 of 60 points changed the barcode:\n%v\n%v", a, b)
	}
}
