package hull

import (
	"slices"
	"testing"

	"phasonhull/pattern/design"
	"phasonhull/topology"
)

// A noise-free chain modulated by three independent angles,
// x_n = n + Σ_k a_k sin 2π(nθ_k + φ_k), has a three-torus for hull (the
// orbit of a rotation by (θ1, θ2, θ3) with 1, θ1, θ2, θ3 rationally
// independent is dense in the 3-torus; Kronecker's theorem, common
// practice). Its Betti numbers are C(3, k) (Künneth formula; common
// practice), computed here, and its angles generate the module
// Z + Zθ1 + Zθ2 + Zθ3 of the generating angles.
func TestThreeTorus(t *testing.T) {
	thetas := []float64{0.4142136, 0.2679492, 0.618034}
	p, err := design.Generate(design.Spec{Family: "multi-angle", Sites: 5000, Thetas: thetas, Amps: []float64{0.05, 0.04, 0.03}, Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	r := analyze(t, p)
	h := r.Hull
	if h.Class != Torus3 || h.Components != 1 || h.TorusDimension != 3 {
		t.Fatalf("class %s × %d components, torus dimension %d (%s), want torus3 × 1, 3", h.Class, h.Components, h.TorusDimension, h.Reason)
	}
	// C(3, k) by Pascal's rule, k = 0, 1, 2.
	row := []int{1}
	for range 3 {
		next := make([]int, len(row)+1)
		for k := range next {
			if k < len(row) {
				next[k] += row[k]
			}
			if k > 0 {
				next[k] += row[k-1]
			}
		}
		row = next
	}
	if want := row[:3]; !slices.Equal(h.Betti, want) {
		t.Errorf("Betti %v, want C(3, k) = %v", h.Betti, want)
	}
	if len(r.Angles) != 3 || len(r.AngleUncertainty) != 3 {
		t.Fatalf("angles %v ± %v, want three", r.Angles, r.AngleUncertainty)
	}
	tol := 5 * slices.Max(r.AngleUncertainty)
	if !topology.SameModule(thetas, r.Angles, 2, tol) {
		t.Errorf("angles %v ± %v do not generate the module of %v within %.3g", r.Angles, r.AngleUncertainty, thetas, tol)
	}
	t.Logf("angles %.10g ± %.2g (generating %v)", r.Angles, r.AngleUncertainty, thetas)
	if g := r.GapLabels.Generators; len(g) != 4 || g[0] != 1 {
		t.Errorf("label generators %v, want 1, θ1, θ2, θ3", g)
	}
}
