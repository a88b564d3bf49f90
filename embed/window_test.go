package embed

import (
	"fmt"
	"math"
	"reflect"
	"testing"
)

func choose(t *testing.T, d []float64, opt Options) *WindowChoice {
	t.Helper()
	ch, err := ChooseWindow(d, opt)
	if err != nil {
		t.Fatal(err)
	}
	return ch
}

// The window that unfolds a one-harmonic circle hull is 2: one coordinate
// folds the ellipse onto a segment (each value is met twice), two hold it
// (the trigonometric identity of TestOneHarmonicSpansAPlane).
func TestWindowCircle(t *testing.T) {
	for _, sigma := range []float64{0, 0.02} {
		d := circleSpacings(2000)
		if sigma > 0 {
			d = jitter(d, sigma, 6)
		}
		ch := choose(t, d, Options{})
		if ch.Window != 2 || !ch.Settled {
			t.Errorf("jitter %v: window %d (settled %v), want 2; FNN %.3f, rank %v", sigma, ch.Window, ch.Settled, ch.FalseNeighbours, ch.Rank)
		}
		if ch.FalseNeighbours[0] < 0.15 {
			t.Errorf("jitter %v: only %.3f false neighbours at window 1, the fold should give many", sigma, ch.FalseNeighbours[0])
		}
	}
}

// Two angles need a window of 4: the trace spans four directions
// (TestTwoAnglesSpanA4Space).
func TestWindowTorus(t *testing.T) {
	for _, sigma := range []float64{0, 0.02} {
		d := torusSpacings(3000)
		if sigma > 0 {
			d = jitter(d, sigma, 7)
		}
		ch := choose(t, d, Options{})
		if ch.Window != 4 || !ch.Settled {
			t.Errorf("jitter %v: window %d (settled %v), want 4; FNN %.3f, rank %v", sigma, ch.Window, ch.Settled, ch.FalseNeighbours, ch.Rank)
		}
	}
}

// Independent random spacings fill every direction at every window and
// keep false neighbours: the window is capped and flagged.
func TestWindowRandom(t *testing.T) {
	for _, sigma := range []float64{0, 0.02} {
		for _, cap_ := range []int{0, 6} {
			d := randomSpacings(3000, 0.5, 8)
			if sigma > 0 {
				d = jitter(d, sigma, 9)
			}
			ch := choose(t, d, Options{MaxWindow: cap_})
			want := cap_
			if want == 0 {
				want = DefaultMaxWindow
			}
			if ch.Settled || ch.Window != want || ch.Cap != want {
				t.Errorf("jitter %v cap %d: window %d of cap %d, settled %v; want the cap %d, not settled", sigma, cap_, ch.Window, ch.Cap, ch.Settled, want)
			}
			if ch.RankWindow != 0 || ch.Rank[want] != want+1 {
				t.Errorf("jitter %v cap %d: rank %v, want every direction filled", sigma, cap_, ch.Rank)
			}
			for k, f := range ch.FalseNeighbours {
				if f < 0.05 {
					t.Errorf("jitter %v cap %d: %.3f false neighbours at window %d, random spacings should keep many", sigma, cap_, f, k+1)
				}
			}
		}
	}
}

// separatingWindow returns, by brute force on the cyclic word cell, the
// smallest k at which every window of length k has a single continuation,
// and the number of distinct windows of that length.
func separatingWindow(cell []float64) (k, distinct int) {
	p := len(cell)
	for k = 1; ; k++ {
		next := map[string]float64{}
		unique := true
		for i := range p {
			key := ""
			for j := range k {
				key += fmt.Sprint(cell[(i+j)%p], ",")
			}
			c := cell[(i+k)%p]
			if old, ok := next[key]; ok && old != c {
				unique = false
			}
			next[key] = c
		}
		if unique {
			return k, len(next)
		}
	}
}

// distinctRows counts the distinct rows of the delay vectors of window k,
// rows closer than tol counting as one.
func distinctRows(t *testing.T, d []float64, k int, tol float64) int {
	t.Helper()
	x, err := Delay(d, k)
	if err != nil {
		t.Fatal(err)
	}
	r, _ := x.Dims()
	var reps [][]float64
	for i := range r {
		row := x.RawRowView(i)
		found := false
		for _, q := range reps {
			var s float64
			for j := range row {
				s += (row[j] - q[j]) * (row[j] - q[j])
			}
			if math.Sqrt(s) <= tol {
				found = true
				break
			}
		}
		if !found {
			reps = append(reps, row)
		}
	}
	return len(reps)
}

// A p-periodic chain's vectors are finitely many points. False neighbours
// settle at the first window whose every occurrence has a single
// continuation, and there the p windows of a period are all distinct
// (Morse & Hedlund, Amer. J. Math. 60, 815, 1938, checked here by brute
// force on the cell).
func TestWindowPeriodic(t *testing.T) {
	for _, cell := range [][]float64{
		{1, 2},
		{1, 1, 2},
		{1, 1, 1, 2},
		{1, 1, 1.4, 1, 1.4}, // the rank settles before the windows separate
		{1.2, 0.9, 0.9, 1.2, 1.2, 0.9, 1.5},
	} {
		sep, distinct := separatingWindow(cell)
		if distinct != len(cell) {
			t.Fatalf("cell %v: brute force finds %d distinct windows, want %d", cell, distinct, len(cell))
		}
		for _, sigma := range []float64{0, 0.02} {
			d := periodicSpacings(cell, 1400)
			if sigma > 0 {
				d = jitter(d, sigma, 10)
			}
			ch := choose(t, d, Options{})
			if !ch.Settled || ch.NeighbourWindow != sep || ch.Window < sep {
				t.Errorf("cell %v jitter %v: window %d (neighbours %d, rank %d, settled %v), want neighbours %d; FNN %.3f", cell, sigma, ch.Window, ch.NeighbourWindow, ch.RankWindow, ch.Settled, sep, ch.FalseNeighbours)
			}
			if sigma == 0 {
				if got := distinctRows(t, d, ch.Window, 1e-9); got != len(cell) {
					t.Errorf("cell %v: %d distinct vectors at window %d, want %d", cell, got, ch.Window, len(cell))
				}
				if sep > 1 {
					if got := distinctRows(t, d, sep-1, 1e-9); got >= len(cell) {
						t.Errorf("cell %v: already %d distinct vectors at window %d", cell, got, sep-1)
					}
				}
			}
		}
	}
}

// False nearest neighbours on two systems whose window is known in closed
// form. The delay vectors of a sine need 2: sin(x+2ω) = 2cos ω·sin(x+ω) −
// sin x (common practice), so two coordinates fix the third, and a pair at
// distance R moves apart by at most (2|cos ω|+1)R < 15R — no false
// neighbour at all. The Hénon map x_{n+1} = 1 − 1.4x_n² + 0.3x_{n−1}
// (Hénon, Commun. Math. Phys. 50, 69, 1976) is a function of the last two
// values with slope below 2.8·1.3 + 0.3 < 15 on its attractor (|x| < 1.3):
// none either at 2, and many at 1, where its parabola folds. Kennel, Brown
// & Abarbanel (1992) show the Hénon map's fraction falling to zero at
// dimension 2 (from memory); the bound above is the independent check.
func TestFalseNeighboursKnownSystems(t *testing.T) {
	sine := make([]float64, 2000)
	for i := range sine {
		sine[i] = 1 + 0.3*math.Sin(0.7*float64(i))
	}
	henon := make([]float64, 2000)
	x, xPrev := 0.1, 0.0
	for i := -100; i < len(henon); i++ { // drop a transient
		x, xPrev = 1-1.4*x*x+0.3*xPrev, x
		if i >= 0 {
			henon[i] = x
		}
	}
	for name, d := range map[string][]float64{"sine": sine, "Hénon": henon} {
		ch := choose(t, d, Options{Noise: -1, MaxWindow: 4})
		if f := ch.FalseNeighbours; f[0] < 0.3 || f[1] != 0 {
			t.Errorf("%s: FNN %.3f, want many at window 1 and none at 2", name, f)
		}
		if ch.NeighbourWindow != 2 {
			t.Errorf("%s: neighbour window %d, want 2", name, ch.NeighbourWindow)
		}
	}
}

func TestWindowDeterministic(t *testing.T) {
	d := jitter(torusSpacings(20000), 0.02, 11)
	a := choose(t, d, Options{Seed: 3})
	b := choose(t, d, Options{Seed: 3})
	if !reflect.DeepEqual(a, b) {
		t.Errorf("two runs with one seed differ:\n%+v\n%+v", a, b)
	}
	if a.Vectors != MaxSample {
		t.Errorf("examined %d vectors of %d, want a subsample of %d", a.Vectors, len(d), MaxSample)
	}
	if c := choose(t, d, Options{Seed: 4}); c.Window != a.Window {
		t.Errorf("the window depends on the subsample: %d with seed 3, %d with seed 4", a.Window, c.Window)
	}
}

func TestWindowShortPattern(t *testing.T) {
	// 7 spacings (8 sites, the fewest a pattern holds) leave room for a
	// cap of 1 only.
	ch := choose(t, circleSpacings(7), Options{})
	if ch.Cap != 1 || ch.Window != 1 {
		t.Errorf("7 spacings: cap %d, window %d, want 1 and 1", ch.Cap, ch.Window)
	}
	if _, err := ChooseWindow(circleSpacings(4), Options{}); err == nil {
		t.Error("4 spacings: no error")
	}
	if _, err := ChooseWindow(circleSpacings(100), Options{Noise: math.NaN()}); err == nil {
		t.Error("NaN noise: no error")
	}
}
