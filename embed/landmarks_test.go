package embed

import (
	"fmt"
	"math"
	"math/rand/v2"
	"reflect"
	"testing"
)

// cloud returns n points uniform in the unit cube of dimension dim.
func cloud(n, dim int, seed uint64) [][]float64 {
	rng := rand.New(rand.NewPCG(seed, 3))
	flat := make([]float64, n*dim)
	for i := range flat {
		flat[i] = rng.Float64()
	}
	pts := make([][]float64, n)
	for i := range pts {
		pts[i] = flat[i*dim : (i+1)*dim]
	}
	return pts
}

func dist(a, b []float64) float64 {
	var s float64
	for i := range a {
		s += (a[i] - b[i]) * (a[i] - b[i])
	}
	return math.Sqrt(s)
}

// coverRadius computes by brute force the largest distance from a point to
// its nearest landmark.
func coverRadius(pts [][]float64, lm []int) float64 {
	var r float64
	for _, p := range pts {
		best := math.Inf(1)
		for _, l := range lm {
			best = math.Min(best, dist(p, pts[l]))
		}
		r = math.Max(r, best)
	}
	return r
}

// The defining property of max–min sampling, checked by brute force: each
// landmark after the first is a point farthest from the landmarks before
// it, and the reported cover radius is the true one.
func TestLandmarksMaxMin(t *testing.T) {
	pts := cloud(300, 3, 1)
	lm, r, err := Landmarks(pts, 25, 7)
	if err != nil {
		t.Fatal(err)
	}
	if len(lm) != 25 {
		t.Fatalf("%d landmarks, want 25", len(lm))
	}
	for s := 1; s < len(lm); s++ {
		far := coverRadius(pts, lm[:s])
		d := math.Inf(1)
		for _, l := range lm[:s] {
			d = math.Min(d, dist(pts[lm[s]], pts[l]))
		}
		if math.Abs(d-far) > 1e-12 {
			t.Errorf("landmark %d is at %.6g from the earlier ones, the farthest point is at %.6g", s, d, far)
		}
	}
	if want := coverRadius(pts, lm); math.Abs(r-want) > 1e-12 {
		t.Errorf("cover radius %.6g, brute force %.6g", r, want)
	}
	// Farthest-point sampling keeps the landmarks at least the final cover
	// radius apart (Gonzalez, Theor. Comput. Sci. 38, 293, 1985), which is
	// what makes its cover within a factor 2 of the best.
	for i, a := range lm {
		for _, b := range lm[:i] {
			if dist(pts[a], pts[b]) < r {
				t.Errorf("landmarks %d and %d are %.4g apart, below the cover radius %.4g", a, b, dist(pts[a], pts[b]), r)
			}
		}
	}
}

func TestLandmarksCoverShrinks(t *testing.T) {
	pts := cloud(2000, 2, 2)
	prev := math.Inf(1)
	var prevLm []int
	for _, m := range []int{5, 10, 20, 40, 80, 160} {
		lm, r, err := Landmarks(pts, m, 1)
		if err != nil {
			t.Fatal(err)
		}
		if r >= prev {
			t.Errorf("m=%d: cover radius %.4g did not shrink from %.4g", m, r, prev)
		}
		// With one seed a larger m extends the same sequence.
		if prevLm != nil && !reflect.DeepEqual(lm[:len(prevLm)], prevLm) {
			t.Errorf("m=%d: the first %d landmarks differ from those for m=%d", m, len(prevLm), len(prevLm))
		}
		prev, prevLm = r, lm
	}
	// Bounds from the geometry of the unit square: 160 discs of radius r
	// cover area 1 only if 160πr² ≥ 1; a 12×13 grid of cells covers it
	// with the half-diagonal g of a cell. Max–min is within a factor 2 of
	// the best cover centred on points of the cloud (Gonzalez 1985), which
	// is within a factor 2 of g.
	lo := 1 / math.Sqrt(160*math.Pi)
	g := math.Hypot(1.0/24, 1.0/26)
	if prev < lo || prev > 4*g {
		t.Errorf("cover radius %.4g for 160 landmarks, want within [%.4g, %.4g]", prev, lo, 4*g)
	}
}

func TestLandmarksDeterministic(t *testing.T) {
	pts := cloud(1000, 4, 3)
	a, ra, _ := Landmarks(pts, 50, 9)
	b, rb, _ := Landmarks(pts, 50, 9)
	if !reflect.DeepEqual(a, b) || ra != rb {
		t.Error("two runs with one seed differ")
	}
	c, _, _ := Landmarks(pts, 50, 10)
	if reflect.DeepEqual(a, c) {
		t.Error("two seeds gave the same landmarks")
	}
}

// The parallel sweep must choose exactly what a serial one does.
func TestLandmarksParallelMatchesSerial(t *testing.T) {
	n := 3 * parallelMin
	if testing.Short() {
		n = parallelMin
	}
	pts := cloud(n, 3, 4)
	lm, r, err := Landmarks(pts, 12, 5)
	if err != nil {
		t.Fatal(err)
	}
	// Serial reference: recompute every distance from scratch each step.
	ref := []int{lm[0]}
	for len(ref) < 12 {
		best, bd := -1, -1.0
		for i, p := range pts {
			d := math.Inf(1)
			for _, l := range ref {
				d = math.Min(d, dist(p, pts[l]))
			}
			if d > bd {
				best, bd = i, d
			}
		}
		ref = append(ref, best)
	}
	if !reflect.DeepEqual(lm, ref) {
		t.Errorf("parallel %v, serial %v", lm, ref)
	}
	if want := coverRadius(pts, lm); math.Abs(r-want) > 1e-12 {
		t.Errorf("cover radius %.6g, brute force %.6g", r, want)
	}
}

func TestLandmarksSmallClouds(t *testing.T) {
	pts := cloud(10, 2, 5)
	lm, r, err := Landmarks(pts, 10, 1)
	if err != nil || len(lm) != 10 || r != 0 {
		t.Errorf("m = n: %v, radius %v, %v; want every point and radius 0", lm, r, err)
	}
	// Five distinct points, each repeated: one landmark each.
	var dup [][]float64
	for i := range 100 {
		dup = append(dup, pts[i%5])
	}
	lm, r, err = Landmarks(dup, 30, 1)
	if err != nil || len(lm) != 5 || r != 0 {
		t.Errorf("5 distinct points: %d landmarks, radius %v, %v; want 5 and 0", len(lm), r, err)
	}
	// Zero-dimensional points (a whitened single point).
	zero := make([][]float64, 50)
	for i := range zero {
		zero[i] = []float64{}
	}
	lm, r, err = Landmarks(zero, 30, 1)
	if err != nil || len(lm) != 1 || r != 0 {
		t.Errorf("a single point: %d landmarks, radius %v, %v; want 1 and 0", len(lm), r, err)
	}
	if _, _, err := Landmarks(nil, 3, 1); err == nil {
		t.Error("empty cloud: no error")
	}
	if _, _, err := Landmarks(pts, 0, 1); err == nil {
		t.Error("m = 0: no error")
	}
	if _, _, err := Landmarks([][]float64{{1, 2}, {1}}, 1, 1); err == nil {
		t.Error("ragged cloud: no error")
	}
}

// BenchmarkLandmarks measures the brief's target: 10⁶ points, 400
// landmarks.
func BenchmarkLandmarks(b *testing.B) {
	for _, dim := range []int{2, 4, 12} {
		pts := cloud(1_000_000, dim, 6)
		b.Run(fmt.Sprintf("n=1e6/m=400/dim=%d", dim), func(b *testing.B) {
			for b.Loop() {
				if _, _, err := Landmarks(pts, 400, 1); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

func BenchmarkLandmarksTorus(b *testing.B) {
	// A flat torus in 4-D, a million points.
	n := 1_000_000
	flat := make([]float64, 4*n)
	pts := make([][]float64, n)
	for i := range pts {
		a, c := 2*math.Pi*float64(i)*theta1, 2*math.Pi*float64(i)*theta2
		copy(flat[4*i:], []float64{math.Cos(a), math.Sin(a), math.Cos(c), math.Sin(c)})
		pts[i] = flat[4*i : 4*i+4]
	}
	for b.Loop() {
		Landmarks(pts, 400, 1)
	}
}
