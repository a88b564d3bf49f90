package hull

import (
	"cmp"
	"math"
	"slices"
	"testing"

	"phasonhull/pattern"
	"phasonhull/pattern/design"
	"phasonhull/topology"
)

// chain returns the noise-free chain x_n = n + f(n), n < sites.
func chain(t *testing.T, sites int, f func(n float64) float64) *pattern.Pattern {
	t.Helper()
	x := make([]float64, sites)
	for i := range x {
		x[i] = float64(i) + f(float64(i))
	}
	p, err := pattern.New(x, "", "test")
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// A periodic cell of p sites decorating a one-angle modulation,
// x_n = n + c_{n mod p} + 0.1 sin 2π(nθ + φ), has a hull of p circles: the
// shift visits them in turn (common practice: the hull of a product of a
// rotation by 1/p on p points and a rotation by θ on the circle is p
// circles). Its Betti numbers are p·(1, 1, 0) (Künneth and additivity;
// common practice), and its label group (1/p)Z + Zθ.
func TestDecoratedCircle(t *testing.T) {
	theta := math.Sqrt2 - 1
	for _, cell := range [][]float64{{0.12, -0.12}, {0, 0.15, -0.1}} {
		p := len(cell)
		r := analyze(t, chain(t, 3000, func(n float64) float64 {
			return cell[int(n)%p] + 0.1*math.Sin(2*math.Pi*(n*theta+0.2))
		}))
		h := r.Hull
		if h.Class != Circle || h.Components != p || h.TorusDimension != 1 {
			t.Fatalf("cell of %d: class %s × %d components, torus dimension %d (%s), want circle × %d, 1", p, h.Class, h.Components, h.TorusDimension, h.Reason, p)
		}
		if want := []int{p, p, 0}; !slices.Equal(h.Betti, want) {
			t.Errorf("cell of %d: Betti %v, want %v", p, h.Betti, want)
		}
		// θ is defined up to a multiple of 1/p; the fit picks the tone the
		// positions carry, θ itself.
		if len(r.Angles) != 1 || math.Abs(r.Angles[0]-topology.Fold(theta)) > 1e-8 {
			t.Errorf("cell of %d: angles %v, want %v", p, r.Angles, topology.Fold(theta))
		}
		if g := r.GapLabels.Generators; len(g) != 3 || g[1] != 1/float64(p) {
			t.Errorf("cell of %d: generators %v, want 1, 1/%d, θ", p, g, p)
		}
	}
}

// A torus on 400 sites with 0.5% noise may come out unresolved, but never
// a torus with angles that do not generate the true module: the model
// check refuses angles that do not reproduce the positions.
func TestShortTorusNeverWrong(t *testing.T) {
	t1, t2 := math.Sqrt2-1, 2-math.Sqrt(3)
	for _, n := range []int{300, 400, 500} {
		p := generateTorus(t, n, t1, t2, 0.005)
		r := analyze(t, p)
		if len(r.Angles) > 0 && !topology.SameModule([]float64{t1, t2}, r.Angles, 3, 20*slices.Max(r.AngleUncertainty)+1e-9) {
			t.Errorf("%d sites: class %s with angles %v ± %v, which do not generate Z + Zθ1 + Zθ2", n, r.Hull.Class, r.Angles, r.AngleUncertainty)
		}
	}
}

// Three-distance theorem (Sós 1958): the points nθ mod 1, n < N, split the
// circle into gaps of at most three lengths, and neighbours on the circle
// differ in index by one of at most three values, the largest the sum of
// the other two. The circular coordinate of a noise-free circle reading is
// an orientation-preserving function of the phase, so ordering the first
// 50 delay vectors by it (points 1/50 of a turn apart on average, far above
// the coordinate's error) must show those index differences.
func TestCircleReadingThreeGaps(t *testing.T) {
	theta := 0.2763
	r := analyze(t, chain(t, 600, func(n float64) float64 { return 0.1 * math.Sin(2*math.Pi*n*theta) }))
	if r.Hull.Class != Circle || len(r.Trace.Coordinates) != 1 {
		t.Fatalf("class %s (%s), want circle with one coordinate", r.Hull.Class, r.Hull.Reason)
	}
	c, rows := r.Trace.Coordinates[0][:50], r.Trace.Rows[:50]
	order := make([]int, len(c))
	for i := range order {
		order[i] = i
	}
	slices.SortFunc(order, func(i, j int) int { return cmp.Compare(c[i], c[j]) })
	diffs := map[int]bool{}
	for k := range order {
		i, j := order[k], order[(k+1)%len(order)]
		if k == len(order)-1 {
			continue // the wrap-around pair joins the two ends of the orbit
		}
		d := rows[j] - rows[i]
		if d < 0 {
			d = -d
		}
		diffs[d] = true
	}
	var ds []int
	for d := range diffs {
		ds = append(ds, d)
	}
	slices.Sort(ds)
	if len(ds) > 3 || (len(ds) == 3 && ds[2] != ds[0]+ds[1]) {
		t.Errorf("neighbours on the circle differ in index by %v: not the three distances of a rotation", ds)
	}
}

// generateTorus is the two-angle design with position noise.
func generateTorus(t *testing.T, sites int, t1, t2, noise float64) *pattern.Pattern {
	return generate(t, design.Spec{Family: "two-angle", Sites: sites, Theta: t1, Amp: 0.1, Theta2: t2, Amp2: 0.08, Noise: noise, Seed: 3})
}

// A torus modulated by θ1 and θ2, its two strongest lines, reports the
// basis (θ1, θ2) folded and ascending (topology.ReduceBasis), within five
// stated uncertainties; the design's angles are its closed form.
func TestTorusReportsReducedBasis(t *testing.T) {
	t1, t2 := math.Sqrt2-1, 2-math.Sqrt(3)
	r := analyze(t, generateTorus(t, 2000, t1, t2, 0.005))
	if r.Hull.Class != Torus {
		t.Fatalf("class %s (%s), want torus", r.Hull.Class, r.Hull.Reason)
	}
	want := topology.CanonicalBasis([]float64{t1, t2})
	for i, w := range want {
		if math.Abs(r.Angles[i]-w) > 5*r.AngleUncertainty[i]+1e-9 {
			t.Errorf("angles %v ± %v, want the generators %v", r.Angles, r.AngleUncertainty, want)
			break
		}
	}
}

// A dimerised circle at 3% noise, whose two components blur together in
// the H0 bars but not at the scale of the loop: the analysis must answer
// (2 circles, or unresolved with the reason), not fail. The hull is 2
// circles (see the decorated family).
func TestBlurredComponentsAnswer(t *testing.T) {
	p := generate(t, design.Spec{Family: "decorated", Sites: 2000, Cell: []float64{0.88, 1.12}, Theta: math.Sqrt2 - 1, Sin: []float64{0.1}, Phase: 0.13, Noise: 0.03, Seed: 1})
	r := analyze(t, p)
	if r.Hull.Class != Unresolved && (r.Hull.Class != Circle || r.Hull.Components != 2) {
		t.Errorf("class %s with %d components (%s), want 2 circles or unresolved", r.Hull.Class, r.Hull.Components, r.Hull.Reason)
	}
}

// A cell of two sites decorating two angles,
// x_n = n + c_{n mod 2} + 0.08 sin 2π(nθ1 + φ1) + 0.06 sin 2π(nθ2 + φ2),
// has a hull of 2 two-tori (common practice, as for the decorated circle:
// the product of a rotation by ½ on 2 points and a rotation by (θ1, θ2) on
// the two-torus). Its Betti numbers are 2·C(2, k) = (2, 4, 2) (Künneth and
// additivity; common practice). On 300 landmarks the two components are
// not yet told apart and the four loops stay under τ; the denser cover
// (denserCover) separates them.
func TestDecoratedTorus(t *testing.T) {
	thetas := []float64{math.Sqrt2 - 1, 2 - math.Sqrt(3)}
	p, err := design.Generate(design.Spec{Family: "decorated", Sites: 2000, Cell: []float64{0.88, 1.12}, Thetas: thetas, Amps: []float64{0.08, 0.06}, Phases: []float64{0.13, 0.71}, Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	r := analyze(t, p)
	h := r.Hull
	if h.Class != Torus || h.Components != 2 || h.TorusDimension != 2 {
		t.Fatalf("class %s × %d components, torus dimension %d (%s), want torus × 2, 2", h.Class, h.Components, h.TorusDimension, h.Reason)
	}
	if want := []int{2 * 1, 2 * 2, 2 * 1}; !slices.Equal(h.Betti, want) {
		t.Errorf("Betti %v, want 2·C(2, k) = %v", h.Betti, want)
	}
	if len(r.Angles) != 2 || len(r.AngleUncertainty) != 2 {
		t.Fatalf("angles %v ± %v, want two", r.Angles, r.AngleUncertainty)
	}
	tol := 5 * slices.Max(r.AngleUncertainty)
	if !topology.SameModule(thetas, r.Angles, 2, tol) {
		t.Errorf("angles %v ± %v do not generate the module of %v within %.3g", r.Angles, r.AngleUncertainty, thetas, tol)
	}
}
