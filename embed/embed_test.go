package embed

import (
	"math"
	"reflect"
	"strings"
	"testing"

	"phasonhull/pattern"
)

func newPattern(t *testing.T, d []float64) *pattern.Pattern {
	t.Helper()
	p, err := pattern.New(positions(d), "nm", "test")
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// A one-harmonic chain whitens to a circle of radius √2: the two kept
// components are a cosine and a sine of an equidistributed phase, each
// scaled to unit variance, and a cosine of unit variance has amplitude √2
// (common practice).
func TestEmbedCircle(t *testing.T) {
	res, err := Embed(newPattern(t, circleSpacings(2000)), Options{})
	if err != nil {
		t.Fatal(err)
	}
	if res.Window != 2 || res.Whitened.Kept != 2 || res.Choice == nil || !res.Choice.Settled {
		t.Fatalf("window %d, kept %d, want 2 and 2", res.Window, res.Whitened.Kept)
	}
	if len(res.Landmarks) != DefaultLandmarks || len(res.LandmarkCloud) != DefaultLandmarks {
		t.Fatalf("%d landmarks, want %d", len(res.Landmarks), DefaultLandmarks)
	}
	if len(res.Whitened.Cloud) != 2000-2+1 {
		t.Errorf("%d whitened vectors, want %d", len(res.Whitened.Cloud), 1999)
	}
	for i, row := range res.Whitened.Cloud {
		if r := math.Hypot(row[0], row[1]); math.Abs(r-math.Sqrt2) > 0.01 {
			t.Fatalf("vector %d at radius %.4f, want √2", i, r)
		}
	}
	for i, j := range res.Landmarks {
		if !reflect.DeepEqual(res.LandmarkCloud[i], res.Whitened.Cloud[j]) {
			t.Fatalf("landmark %d is not row %d of the cloud", i, j)
		}
	}
	// m arcs of half-length r cover a circle of radius √2 only if
	// 2mr ≥ 2π√2; max–min is within a factor 2 of the best cover
	// (Gonzalez 1985).
	best := math.Pi * math.Sqrt2 / DefaultLandmarks
	if res.CoverRadius < 0.99*best || res.CoverRadius > 2*best {
		t.Errorf("cover radius %.4g, want within [%.4g, %.4g]", res.CoverRadius, best, 2*best)
	}
	if res.Sites != 2001 || res.Unit != "nm" || math.Abs(res.MeanSpacing-1) > 1e-3 {
		t.Errorf("sites %d, mean spacing %v %s", res.Sites, res.MeanSpacing, res.Unit)
	}
}

func TestEmbedPeriodic(t *testing.T) {
	x := make([]float64, 600)
	for i := range x {
		x[i] = 0.37 * float64(i)
	}
	p, err := pattern.New(x, "µm", "test")
	if err != nil {
		t.Fatal(err)
	}
	res, err := Embed(p, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if res.Window != 1 || res.Whitened.Kept != 0 || len(res.Landmarks) != 1 || res.CoverRadius != 0 {
		t.Errorf("one spacing: window %d, kept %d, %d landmarks, cover %v; want 1, 0, 1, 0", res.Window, res.Whitened.Kept, len(res.Landmarks), res.CoverRadius)
	}
	// A 5-periodic cell: five distinct vectors, one landmark on each.
	cell := []float64{1, 1, 1.4, 1, 1.4}
	res, err = Embed(newPattern(t, periodicSpacings(cell, 1000)), Options{})
	if err != nil {
		t.Fatal(err)
	}
	if res.Window != 4 || len(res.Landmarks) != 5 || res.CoverRadius > 1e-9 {
		t.Errorf("cell %v: window %d, %d landmarks, cover %.3g; want 4, 5, 0", cell, res.Window, len(res.Landmarks), res.CoverRadius)
	}
}

func TestEmbedGivenWindow(t *testing.T) {
	p := newPattern(t, jitter(circleSpacings(1500), 0.02, 12))
	res, err := Embed(p, Options{Window: 5, Landmarks: 40})
	if err != nil {
		t.Fatal(err)
	}
	if res.Choice != nil || res.Window != 5 || res.Whitened.Kept != 2 || len(res.Landmarks) != 40 {
		t.Errorf("window %d, kept %d, %d landmarks; want 5, 2 (the noise floor hides the jitter), 40", res.Window, res.Whitened.Kept, len(res.Landmarks))
	}
	if res.NoiseFloor <= 0 {
		t.Errorf("noise floor %v on jittered data", res.NoiseFloor)
	}
}

func TestEmbedDeterministic(t *testing.T) {
	p := newPattern(t, jitter(torusSpacings(3000), 0.02, 13))
	a, err := Embed(p, Options{})
	if err != nil {
		t.Fatal(err)
	}
	b, _ := Embed(p, Options{})
	if !reflect.DeepEqual(a, b) {
		t.Error("two runs differ")
	}
	// Seed 0 stands for the default seed.
	c, _ := Embed(p, Options{Seed: DefaultSeed})
	if !reflect.DeepEqual(a.Landmarks, c.Landmarks) {
		t.Error("seed 0 and the default seed differ")
	}
	d, _ := Embed(p, Options{Seed: 2})
	if reflect.DeepEqual(a.Landmarks, d.Landmarks) {
		t.Error("seeds 1 and 2 gave the same landmarks")
	}
}

func TestEmbedRefuses(t *testing.T) {
	short := newPattern(t, circleSpacings(9)) // 10 sites
	if _, err := Embed(short, Options{Window: 5}); err == nil || !strings.Contains(err.Error(), "too short for window 5") {
		t.Errorf("10 sites, window 5: %v", err)
	}
	p := newPattern(t, circleSpacings(200))
	for _, opt := range []Options{{Window: -1}, {Landmarks: -3}, {MaxWindow: -1}, {Noise: math.Inf(1)}, {Noise: 1}} {
		if _, err := Embed(p, opt); err == nil {
			t.Errorf("%+v: no error", opt)
		}
	}
}

// A missing site merges two spacings into one of about twice the mean;
// every window containing it leaves the circle. Excluding that spacing
// leaves exactly those windows out, and the rest whiten to the circle of
// radius √2 again.
func TestEmbedExclude(t *testing.T) {
	d := circleSpacings(1200)
	merged := append(append(append([]float64(nil), d[:500]...), d[500]+d[501]), d[502:]...)
	exclude := make([]bool, len(merged))
	exclude[500] = true
	p := newPattern(t, merged)
	res, err := Embed(p, Options{Exclude: exclude})
	if err != nil {
		t.Fatal(err)
	}
	w := res.Window
	if w != 2 || res.Excluded != w || len(res.Rows) != len(merged)-w+1-w {
		t.Fatalf("window %d, %d excluded, %d rows; want 2, 2, %d", w, res.Excluded, len(res.Rows), len(merged)-2*w+1)
	}
	for i, n := range res.Rows {
		if n <= 500 && n+w > 500 {
			t.Errorf("row %d starts at %d and contains the excluded spacing", i, n)
		}
		if r := math.Hypot(res.Whitened.Cloud[i][0], res.Whitened.Cloud[i][1]); math.Abs(r-math.Sqrt2) > 0.02 {
			t.Errorf("row %d (start %d) at radius %.4f, want √2", i, n, r)
		}
	}
	// Without the exclusion the merged spacing's windows are outliers.
	res, err = Embed(p, Options{Window: 2})
	if err != nil {
		t.Fatal(err)
	}
	worst := 0.0
	for _, row := range res.Whitened.Cloud {
		worst = math.Max(worst, math.Abs(math.Hypot(row[0], row[1])-math.Sqrt2))
	}
	if worst < 0.5 {
		t.Errorf("without exclusion the largest departure from the circle is only %.3f", worst)
	}
	if _, err := Embed(p, Options{Exclude: exclude[:10]}); err == nil {
		t.Error("exclusion marks of the wrong length: no error")
	}
}

func TestUsableStarts(t *testing.T) {
	ex := make([]bool, 10)
	ex[3] = true
	if got, want := usableStarts(10, ex, 3), []int{0, 4, 5, 6, 7}; !reflect.DeepEqual(got, want) {
		t.Errorf("usableStarts = %v, want %v", got, want)
	}
	if got := usableStarts(5, nil, 2); !reflect.DeepEqual(got, []int{0, 1, 2, 3}) {
		t.Errorf("no exclusion: %v", got)
	}
}

// BenchmarkEmbed runs the whole embedding on a million sites of a jittered
// two-angle chain (window choice on a subsample, whitening of all vectors,
// 300 landmarks).
func BenchmarkEmbed(b *testing.B) {
	d := jitter(torusSpacings(1_000_000), 0.02, 14)
	p, err := pattern.New(positions(d), "nm", "bench")
	if err != nil {
		b.Fatal(err)
	}
	for b.Loop() {
		if _, err := Embed(p, Options{}); err != nil {
			b.Fatal(err)
		}
	}
}
