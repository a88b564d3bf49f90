package topology

import (
	"math"
	"math/rand/v2"
	"sort"
	"testing"

	"phasonhull/topology/rips"
)

// mostPersistentH1 returns the cocycle of the longest H1 bar and that bar.
func mostPersistentH1(t *testing.T, pts [][]float64) (rips.Cocycle, rips.Bar) {
	t.Helper()
	d, err := rips.VietorisRips(pts, rips.Options{MaxDim: 1, Prime: 47, Cocycles: true})
	if err != nil {
		t.Fatal(err)
	}
	best := -1
	for k, c := range d.Cocycles {
		if b := d.Bars[c.Bar]; b.Dim == 1 && (best < 0 || b.Persistence() > d.Bars[d.Cocycles[best].Bar].Persistence()) {
			best = k
		}
	}
	if best < 0 {
		t.Fatal("no H1 cocycle")
	}
	return d.Cocycles[best], d.Bars[d.Cocycles[best].Bar]
}

// TestCircularCoordinatesFromRips feeds a cocycle from the persistence
// engine (a Z/47 cocycle lifted to the integers) to CircularCoordinates:
// on a noisy circle the coordinate, on the landmarks and extended to fresh
// points, has degree ±1.
func TestCircularCoordinatesFromRips(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 0))
	angles := func(n int) []float64 {
		phi := make([]float64, n)
		for i := range phi {
			phi[i] = 2 * math.Pi * rng.Float64()
		}
		sort.Float64s(phi)
		return phi
	}
	phi := angles(120)
	pts := circlePoints(phi, 0.05, rng)
	c, bar := mostPersistentH1(t, pts)
	r, err := DefaultScale(bar)
	if err != nil {
		t.Fatal(err)
	}
	m, err := CircularCoordinates(pts, c, r)
	if err != nil {
		t.Fatal(err)
	}
	fresh := angles(500)
	ext, err := m.Extend(circlePoints(fresh, 0.05, rng))
	if err != nil {
		t.Fatal(err)
	}
	for name, th := range map[string][]float64{"landmarks": m.Coordinates(), "extension": ext} {
		total := 0.0
		for k := range th {
			total += wrap(th[(k+1)%len(th)] - th[k])
		}
		if math.Abs(math.Abs(total)-1) > 1e-9 {
			t.Errorf("%s: degree %g, want ±1", name, total)
		}
	}
}

// TestChainPipelineRips is TestChainPipeline with the cocycle computed by
// the persistence engine instead of built from the known phase.
func TestChainPipelineRips(t *testing.T) {
	const N = 2000
	theta := math.Sqrt2 - 1
	x := make([]float64, N+2)
	for n := range x {
		x[n] = float64(n) + 0.2*math.Sin(2*math.Pi*float64(n)*theta)
	}
	cloud := make([][]float64, N)
	for n := range cloud {
		cloud[n] = []float64{x[n+1] - x[n], x[n+2] - x[n+1]}
	}
	var lm [][]float64
	for n := 0; n < N; n += 20 {
		lm = append(lm, cloud[n])
	}
	c, bar := mostPersistentH1(t, lm)
	r, err := DefaultScale(bar)
	if err != nil {
		t.Fatal(err)
	}
	m, err := CircularCoordinates(lm, c, r)
	if err != nil {
		t.Fatal(err)
	}
	coord, err := m.Extend(cloud)
	if err != nil {
		t.Fatal(err)
	}
	w, err := WeightedRotationNumber(coord)
	if err != nil {
		t.Fatal(err)
	}
	// As in TestChainPipeline: within 1/(N−1) of ±θ (closed form).
	if e := math.Abs(Fold(w) - Fold(theta)); e > 1.0/(N-1) {
		t.Errorf("rotation number %.8f folds to %.8f, want %.8f (error %.3g)", w, Fold(w), Fold(theta), e)
	}
	t.Logf("bar [%.4f, %.4f), r = %.4f: rotation number error %.3g", bar.Birth, bar.Death, r, Fold(w)-Fold(theta))
}
