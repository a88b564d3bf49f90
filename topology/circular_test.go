package topology

import (
	"math"
	"math/rand/v2"
	"sort"
	"strings"
	"testing"

	"phasonhull/topology/rips"
)

// circlePoints returns points at the given angles (radians) on a circle of
// radius 1, each radius perturbed by Gaussian noise of deviation sigma.
func circlePoints(phi []float64, sigma float64, rng *rand.Rand) [][]float64 {
	pts := make([][]float64, len(phi))
	for i, p := range phi {
		r := 1.0
		if sigma > 0 {
			r += sigma * rng.NormFloat64()
		}
		pts[i] = []float64{r * math.Cos(p), r * math.Sin(p)}
	}
	return pts
}

// cutCocycle returns the cocycle that is 1 on every edge of length ≤ r
// crossing the ray at angle 0 (its endpoints' angles, in [0, 2π), differ by
// more than π): edge {i, j} with i < j oriented i → j. On a sample of the
// circle dense enough that no triangle of K_r wraps around, it is a
// cocycle over Z whose class generates H¹.
func cutCocycle(pts [][]float64, phi []float64, r float64) rips.Cocycle {
	var c rips.Cocycle
	for i := range pts {
		for j := i + 1; j < len(pts); j++ {
			if Dist(pts[i], pts[j]) <= r && math.Abs(phi[i]-phi[j]) > math.Pi {
				v := 1
				if phi[i] < phi[j] {
					v = -1 // i → j crosses the cut backwards
				}
				c.Edges = append(c.Edges, rips.CocycleEdge{I: i, J: j, Value: v})
			}
		}
	}
	return c
}

func wrap(x float64) float64 { return x - math.Ceil(x-0.5) }

func TestCircularCoordinatesUniform(t *testing.T) {
	// n equally spaced landmarks, K_r joining each to its 3 nearest on each
	// side: by the rotation symmetry the harmonic cocycle is constant on
	// each orbit of edges, so the coordinate advances by exactly ±1/n per
	// landmark (closed form).
	const n = 60
	phi := make([]float64, n)
	for i := range phi {
		phi[i] = 2 * math.Pi * float64(i) / n
	}
	pts := circlePoints(phi, 0, nil)
	r := 2 * math.Sin(3.5*math.Pi/n) // between the 3rd and 4th neighbour chords
	m, err := CircularCoordinates(pts, cutCocycle(pts, phi, r), r)
	if err != nil {
		t.Fatal(err)
	}
	th := m.Coordinates()
	step := wrap(th[1] - th[0])
	if math.Abs(math.Abs(step)-1.0/n) > 1e-9 {
		t.Fatalf("step %g, want ±1/%d", step, n)
	}
	for i := range n {
		if v := th[i]; v < 0 || v >= 1 {
			t.Fatalf("coordinate %d = %g outside [0, 1)", i, v)
		}
		if d := wrap(th[(i+1)%n] - th[i]); math.Abs(d-step) > 1e-9 {
			t.Errorf("step %d: %g, want %g", i, d, step)
		}
	}

	// Extension to points on the circle between the landmarks: landmarks
	// keep their value, midpoints land exactly halfway (φ_b = ½ by
	// symmetry), and elsewhere the chord-ratio partition of unity departs
	// from the true angle by a tiny fraction of a step.
	var probe []float64
	for i := range n {
		probe = append(probe, phi[i], phi[i]+math.Pi/n)
		for _, frac := range []float64{0.1, 0.3, 0.7, 0.93} {
			probe = append(probe, phi[i]+frac*2*math.Pi/n)
		}
	}
	ext, err := m.Extend(circlePoints(probe, 0, nil))
	if err != nil {
		t.Fatal(err)
	}
	for k, p := range probe {
		want := th[0] + step*p*n/(2*math.Pi)
		tol := 0.01 / n
		if k%6 < 2 { // a landmark or a midpoint
			tol = 1e-9
		}
		if e := math.Abs(wrap(ext[k] - want)); e > tol {
			t.Errorf("point at angle %.4f: coordinate %.9f, want %.9f (error %.3g > %.3g)", p, ext[k], mod1(want), e, tol)
		}
	}
}

func TestCircularCoordinatesGauge(t *testing.T) {
	// α and α + δg define the same class: the coordinates agree up to a
	// rotation of the circle (de Silva et al. 2011, §2).
	rng := rand.New(rand.NewPCG(3, 0))
	const n = 150
	phi := make([]float64, n)
	for i := range phi {
		phi[i] = 2 * math.Pi * rng.Float64()
	}
	sort.Float64s(phi)
	pts := circlePoints(phi, 0.03, rng)
	r := 0.4
	c := cutCocycle(pts, phi, r)
	m, err := CircularCoordinates(pts, c, r)
	if err != nil {
		t.Fatal(err)
	}
	g := make([]int, n)
	for i := range g {
		g[i] = rng.IntN(5) - 2
	}
	val := map[[2]int]int{}
	for _, e := range c.Edges {
		val[[2]int{e.I, e.J}] = e.Value
	}
	var c2 rips.Cocycle
	for i := range n {
		for j := i + 1; j < n; j++ {
			if Dist(pts[i], pts[j]) <= r {
				if v := val[[2]int{i, j}] + g[j] - g[i]; v != 0 {
					c2.Edges = append(c2.Edges, rips.CocycleEdge{I: i, J: j, Value: v})
				}
			}
		}
	}
	m2, err := CircularCoordinates(pts, c2, r)
	if err != nil {
		t.Fatal(err)
	}
	a, b := m.Coordinates(), m2.Coordinates()
	for i := range n {
		if d := wrap((b[i] - a[i]) - (b[0] - a[0])); math.Abs(d) > 1e-8 {
			t.Fatalf("landmark %d: coordinates differ by %g after a coboundary", i, d)
		}
	}

	// The map has degree ±1: the steps along the circle add up to one turn.
	// (They need not all have one sign: with radial noise, neighbours in
	// angle can swap order in the coordinate.)
	total := 0.0
	for i := range n {
		total += wrap(a[(i+1)%n] - a[i])
	}
	if math.Abs(math.Abs(total)-1) > 1e-9 {
		t.Errorf("degree %g, want ±1", total)
	}
}

func TestCircularCoordinatesRefusals(t *testing.T) {
	const n = 30
	phi := make([]float64, n)
	for i := range phi {
		phi[i] = 2 * math.Pi * float64(i) / n
	}
	pts := circlePoints(phi, 0, nil)
	r := 2 * math.Sin(2.5*math.Pi/n)
	good := cutCocycle(pts, phi, r)
	cases := []struct {
		name, want string
		c          rips.Cocycle
		r          float64
	}{
		{"disconnected", "components", good, 2 * math.Sin(0.5*math.Pi/n)},
		{"not a cocycle", "not a cocycle", rips.Cocycle{Edges: []rips.CocycleEdge{{I: 0, J: 1, Value: 1}}}, r},
		{"coboundary", "trivial", rips.Cocycle{Edges: []rips.CocycleEdge{
			// δg for g = 1 at landmark 0: −1 on every edge out of 0.
			{I: 0, J: 1, Value: -1}, {I: 0, J: 2, Value: -1}, {I: 0, J: n - 2, Value: -1}, {I: 0, J: n - 1, Value: -1},
		}}, r},
		{"no edge at r", "no edge", rips.Cocycle{Edges: []rips.CocycleEdge{{I: 0, J: n / 2, Value: 1}}}, r},
		{"bad index", "landmark pair", rips.Cocycle{Edges: []rips.CocycleEdge{{I: 3, J: 2, Value: 1}}}, r},
		{"bad scale", "scale", good, math.NaN()},
	}
	for _, c := range cases {
		_, err := CircularCoordinates(pts, c.c, c.r)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one mentioning %q", c.name, err, c.want)
		}
	}
	if _, err := CircularCoordinates(pts, good, r); err != nil {
		t.Errorf("the cut cocycle refused: %v", err)
	}
}

func TestDefaultScale(t *testing.T) {
	s, err := DefaultScale(rips.Bar{Dim: 1, Birth: 0.2, Death: 1.0})
	if err != nil || s != 0.6 {
		t.Errorf("DefaultScale([0.2, 1)) = %g, %v; want 0.6", s, err)
	}
	if _, err := DefaultScale(rips.Bar{Dim: 1, Birth: 0.2, Death: math.Inf(1)}); err == nil {
		t.Error("essential bar accepted")
	}
	if _, err := DefaultScale(rips.Bar{Dim: 1, Birth: 0.2, Death: 0.2}); err == nil {
		t.Error("empty bar accepted")
	}
}

// TestChainPipeline runs the building blocks in the order the hull analysis
// uses them, on a modulated chain x_n = n + 0.2 sin 2πnθ whose hull is a
// circle rotated by θ: delay vectors of the spacings lie on a closed curve
// parametrised by the phase nθ; circular coordinates on landmarks of that
// curve, extended to every delay vector, give a circle coordinate whose
// rotation number is ±θ; refining against the positions recovers θ.
func TestChainPipeline(t *testing.T) {
	const N = 2000
	theta := 1 - golden
	x := make([]float64, N+2)
	idx := make([]int, N+2)
	for n := range x {
		idx[n] = n
		x[n] = float64(n) + 0.2*math.Sin(2*math.Pi*float64(n)*theta)
	}
	cloud := make([][]float64, N)
	phase := make([]float64, N)
	for n := range cloud {
		cloud[n] = []float64{x[n+1] - x[n], x[n+2] - x[n+1]}
		phase[n] = 2 * math.Pi * mod1(float64(n)*theta)
	}
	// Every 25th delay vector as a landmark; the cut cocycle is built from
	// the known phase, standing in for the persistence engine.
	var lm [][]float64
	var lphase []float64
	for n := 0; n < N; n += 25 {
		lm = append(lm, cloud[n])
		lphase = append(lphase, phase[n])
	}
	const r = 0.15
	m, err := CircularCoordinates(lm, cutCocycle(lm, lphase, r), r)
	if err != nil {
		t.Fatal(err)
	}
	c, err := m.Extend(cloud)
	if err != nil {
		t.Fatal(err)
	}
	plain, err := RotationNumber(c)
	if err != nil {
		t.Fatal(err)
	}
	weighted, err := WeightedRotationNumber(c)
	if err != nil {
		t.Fatal(err)
	}
	// The coordinate is h(nθ) for a degree-±1 circle map h with |h − ±id|
	// below ½ up to a constant, so the lifted mean telescopes to within
	// 1/(N−1) of ±θ (closed form).
	if e := math.Abs(Fold(plain) - Fold(theta)); e > 1.0/(N-1) {
		t.Errorf("plain rotation number %.8f folds to %.8f, want %.8f within 1/N (error %.3g)", plain, Fold(plain), Fold(theta), e)
	}
	if e := math.Abs(Fold(weighted) - Fold(theta)); e > 1.0/(N-1) {
		t.Errorf("weighted rotation number %.8f folds to %.8f, want %.8f (error %.3g)", weighted, Fold(weighted), Fold(theta), e)
	}
	fit, err := RefineFrequency(idx, x, Fold(weighted), 1)
	if err != nil {
		t.Fatal(err)
	}
	if e := math.Abs(fit.Freq[0] - Fold(theta)); e > 1e-12 {
		t.Errorf("refined frequency %.15f, want %.15f (error %.3g)", fit.Freq[0], Fold(theta), e)
	}
	t.Logf("rotation number errors: plain %.3g, weighted %.3g; refined %.3g",
		Fold(plain)-Fold(theta), Fold(weighted)-Fold(theta), fit.Freq[0]-Fold(theta))
}

func BenchmarkCircularCoordinates(b *testing.B) {
	rng := rand.New(rand.NewPCG(4, 0))
	const n = 400
	phi := make([]float64, n)
	for i := range phi {
		phi[i] = 2 * math.Pi * rng.Float64()
	}
	sort.Float64s(phi)
	pts := circlePoints(phi, 0.03, rng)
	const r = 0.3
	c := cutCocycle(pts, phi, r)
	for b.Loop() {
		if _, err := CircularCoordinates(pts, c, r); err != nil {
			b.Fatal(err)
		}
	}
}
