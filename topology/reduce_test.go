package topology

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// randomUnimodular returns a random d×d integer matrix of determinant ±1:
// a product of elementary operations (adding a multiple of one row to
// another, swapping, negating), each unimodular (common practice).
func randomUnimodular(rng *rand.Rand, d, steps int) [][]int {
	V := make([][]int, d)
	for i := range V {
		V[i] = make([]int, d)
		V[i][i] = 1
	}
	for range steps {
		i, j := rng.IntN(d), rng.IntN(d)
		switch {
		case i != j && rng.IntN(4) > 0:
			q := rng.IntN(5) - 2
			for c := range V[i] {
				V[i][c] += q * V[j][c]
			}
		case i != j:
			V[i], V[j] = V[j], V[i]
		default:
			for c := range V[i] {
				V[i][c] = -V[i][c]
			}
		}
	}
	return V
}

// rebase writes the module and its lines in the basis V·θ: the angles
// V·θ and the line coordinates c·V⁻¹ (so that c·θ = (c·V⁻¹)·(V·θ)).
func rebase(theta []float64, lines [][]int, V [][]int) ([]float64, [][]int) {
	d := len(theta)
	out := make([]float64, d)
	for i := range d {
		out[i] = dotInt(V[i], theta)
	}
	cols := make([][]int, d) // columns of V: V⁻¹'s inverse
	for c := range d {
		cols[c] = make([]int, d)
		for r := range d {
			cols[c][r] = V[r][c]
		}
	}
	Vinv := inverseUnimodular(cols, d) // (columns of V)⁻¹ = V⁻¹
	var nl [][]int
	for _, c := range lines {
		nc := make([]int, d)
		for j := range d {
			for i := range d {
				nc[j] += c[i] * Vinv[i][j]
			}
		}
		nl = append(nl, nc)
	}
	return out, nl
}

// Random unimodular changes of basis of a known module, with its lines
// written in each new basis, all reduce to the same basis: the generators
// of the modulation when they are the strongest lines (computed here as
// the canonical form of the generators), and the module is unchanged
// (SameModule). The modules are those of the two- and three-angle designs:
// θ = √2 − 1, 2 − √3, √5 − 2 (quadratic irrationals, so 1, θ1, θ2, θ3 are
// rationally independent as long as the square roots differ; common
// practice).
func TestReduceBasisInvariant(t *testing.T) {
	rng := rand.New(rand.NewPCG(13, 3))
	cases := []struct {
		name    string
		theta   []float64
		lines   [][]int
		weights []float64
		want    []float64 // nil: the generators, folded and sorted
	}{
		{"two angles, generators strongest", []float64{math.Sqrt2 - 1, 2 - math.Sqrt(3)},
			[][]int{{1, 0}, {0, 1}, {1, 1}, {1, -1}, {2, 0}}, []float64{1, 0.64, 0.01, 0.01, 0.002}, nil},
		{"three angles, generators strongest", []float64{math.Sqrt2 - 1, 2 - math.Sqrt(3), math.Sqrt(5) - 2},
			[][]int{{1, 0, 0}, {0, 1, 0}, {0, 0, 1}, {1, 1, 0}, {0, 1, -1}, {1, 0, 1}}, []float64{1, 0.64, 0.36, 0.01, 0.01, 0.01}, nil},
		// Equal weights: θ1, θ2, θ1 + θ2 all cost the same, and the tie is
		// broken by the smaller folded angles.
		{"two angles, a tie", []float64{0.3819660112501051, 0.2360679774997897},
			[][]int{{1, 0}, {0, 1}, {1, 1}}, []float64{1, 1, 1}, nil},
	}
	for _, c := range cases {
		errs := make([]float64, len(c.theta))
		for i := range errs {
			errs[i] = 1e-6 * float64(i+1)
		}
		ref, err := ReduceBasis(c.theta, errs, c.lines, c.weights)
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		want := c.want
		if want == nil && c.name != "two angles, a tie" {
			want = CanonicalBasis(c.theta)
		}
		if want != nil && !closeAll(ref.Angles, want, 1e-12) {
			t.Errorf("%s: reduced basis %v, want %v", c.name, ref.Angles, want)
		}
		if !SameModule(c.theta, ref.Angles, 3, 1e-9) {
			t.Errorf("%s: reduced basis %v does not generate the module of %v", c.name, ref.Angles, c.theta)
		}
		for trial := range 50 {
			V := randomUnimodular(rng, len(c.theta), 12)
			th, ln := rebase(c.theta, c.lines, V)
			e := make([]float64, len(th))
			for i := range e {
				e[i] = 1e-6
			}
			got, err := ReduceBasis(th, e, ln, c.weights)
			if err != nil {
				t.Fatalf("%s, trial %d (V = %v): %v", c.name, trial, V, err)
			}
			if !closeAll(got.Angles, ref.Angles, 1e-9) {
				t.Errorf("%s, trial %d: V = %v gives %v, the input basis %v", c.name, trial, V, got.Angles, ref.Angles)
			}
			if !SameModule(c.theta, got.Angles, 3, 1e-8) {
				t.Errorf("%s, trial %d: %v does not generate the module of %v", c.name, trial, got.Angles, c.theta)
			}
			// The bookkeeping: the change of basis reproduces the
			// angles, and each line's new coordinates give its value.
			for i, row := range got.Change {
				if g := dotInt(row, th); math.Abs(Fold(g)-got.Angles[i]) > 1e-9 || math.Abs(g-math.Floor(g)-got.Angles[i]) > 1e-9 && math.Abs(g-math.Floor(g)-got.Angles[i]) < 1-1e-9 {
					t.Errorf("%s, trial %d: Change[%d]·θ = %g, angle %g", c.name, trial, i, g, got.Angles[i])
				}
			}
			for l, cl := range ln {
				v, w := dotInt(cl, th), dotInt(got.Coords[l], got.Angles)
				if r := v - w; math.Abs(r-math.Round(r)) > 1e-8 {
					t.Errorf("%s, trial %d: line %d is %g, its new coordinates %v give %g", c.name, trial, l, v, got.Coords[l], w)
				}
			}
		}
	}
}

// The uncertainty of a basis element m·θ with independent errors is
// sqrt(Σ m_i² σ_i²) (propagation of independent errors; common practice).
func TestReduceBasisUncertainty(t *testing.T) {
	theta := []float64{math.Sqrt2 - 1, 2 - math.Sqrt(3)}
	// The strongest lines are θ1 + θ2 and θ1: the basis is those two.
	lines := [][]int{{1, 1}, {1, 0}, {0, 1}}
	got, err := ReduceBasis(theta, []float64{3e-6, 4e-6}, lines, []float64{1, 0.5, 0.01})
	if err != nil {
		t.Fatal(err)
	}
	want := CanonicalBasis([]float64{theta[0], theta[0] + theta[1]})
	if !closeAll(got.Angles, want, 1e-12) {
		t.Fatalf("basis %v, want %v", got.Angles, want)
	}
	i := slices.Index(got.Angles, Fold(theta[0]+theta[1])) // θ1 + θ2
	if j := 1 - i; i < 0 || math.Abs(got.Uncertainty[i]-5e-6) > 1e-12 || math.Abs(got.Uncertainty[j]-3e-6) > 1e-12 {
		t.Errorf("uncertainties %v for %v, want 3e-6 for θ1 and 5e-6 for θ1 + θ2", got.Uncertainty, got.Angles)
	}
}

func TestReduceBasisRefuses(t *testing.T) {
	if _, err := ReduceBasis([]float64{0.1, 0.2}, []float64{0, 0}, [][]int{{1, 1}, {2, 2}}, []float64{1, 1}); err == nil {
		t.Error("lines of rank 1 for two angles: no error")
	}
	if _, err := ReduceBasis([]float64{0.1}, []float64{0}, [][]int{{1}}, []float64{0}); err == nil {
		t.Error("a zero weight: no error")
	}
}

func closeAll(a, b []float64, tol float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if math.Abs(a[i]-b[i]) > tol {
			return false
		}
	}
	return true
}
