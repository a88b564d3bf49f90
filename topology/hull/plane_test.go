package hull_test

import (
	"context"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"phasonhull/pattern/lattice"
	"phasonhull/topology"
	"phasonhull/topology/hull"
)

// plate builds a square lattice (spacing 1) of side×side sites displaced by
// u_n = Σ_k amp·ê_k sin 2π(ψ0_k + A_k·n) plus white Gaussian noise of
// standard deviation noise per component, ê_k the direction of row k of A
// (longitudinal waves). The basis is given; sites sit at n1·a1 + n2·a2.
func plate(A [][]float64, amp, noise float64, side int, seed uint64) *lattice.Lattice {
	rng := rand.New(rand.NewPCG(seed, 7))
	l := &lattice.Lattice{Basis: [2][2]float64{{1, 0}, {0, 1}}, BasisUncertainty: [2][2]float64{{1e-4, 1e-4}, {1e-4, 1e-4}}, Unit: "um"}
	psi0 := []float64{0.13, 0.61, 0.37}
	for n1 := range side {
		for n2 := range side {
			var u [2]float64
			for k, r := range A {
				e := [2]float64{r[0], r[1]}
				if h := math.Hypot(e[0], e[1]); h > 0 {
					e = [2]float64{e[0] / h, e[1] / h}
				}
				s := amp * math.Sin(2*math.Pi*(psi0[k]+r[0]*float64(n1)+r[1]*float64(n2)))
				u[0] += s * e[0]
				u[1] += s * e[1]
			}
			u[0] += noise * rng.NormFloat64()
			u[1] += noise * rng.NormFloat64()
			l.Index = append(l.Index, [2]int{n1, n2})
			l.OnLattice = append(l.OnLattice, true)
			l.Displacement = append(l.Displacement, u)
		}
	}
	return l
}

func analyzePlane(t testing.TB, l *lattice.Lattice) *hull.Result {
	t.Helper()
	r, err := hull.AnalyzePlane(context.Background(), l, hull.Options{})
	if err != nil {
		t.Fatal(err)
	}
	if r.Dimension != 2 {
		t.Errorf("dimension %d, want 2", r.Dimension)
	}
	return r
}

// binomialBetti returns C(d, k) for k = 0, 1, 2: the Betti numbers of the
// d-torus (Künneth formula; common practice), computed here by Pascal's
// rule.
func binomialBetti(d int) []int {
	row := []int{1}
	for range d {
		next := make([]int, len(row)+1)
		for i := range next {
			if i < len(row) {
				next[i] += row[i]
			}
			if i > 0 {
				next[i] += row[i-1]
			}
		}
		row = next
	}
	out := make([]int, 3)
	copy(out, row)
	return out
}

// sameRow reports whether rows p and q agree modulo Z² and up to sign
// within tol per entry.
func sameRow(p, q []float64, tol []float64) bool {
	for _, s := range []float64{1, -1} {
		ok := true
		for j := range 2 {
			d := s*p[j] - q[j]
			ok = ok && math.Abs(d-math.Round(d)) <= tol[j]
		}
		if ok {
			return true
		}
	}
	return false
}

// One displacement wave at an irrational frequency q: a circle, with A = q
// (modulo Z² and sign) within four stated standard uncertainties; the
// Betti numbers are those of the circle, C(1, k) (common practice).
func TestPlaneCircle(t *testing.T) {
	q := []float64{(math.Sqrt(5) - 1) / 8, (math.Sqrt(2) - 1) / 3}
	r := analyzePlane(t, plate([][]float64{q}, 0.08, 0.005, 40, 1))
	if r.Hull.Class != hull.Circle {
		t.Fatalf("class %s %v (%s), want circle", r.Hull.Class, r.Hull.Betti, r.Hull.Reason)
	}
	if want := binomialBetti(1); !equalInts(r.Hull.Betti, want) {
		t.Errorf("Betti %v, want %v", r.Hull.Betti, want)
	}
	if len(r.Rotation) != 1 {
		t.Fatalf("rotation %v, want one row", r.Rotation)
	}
	u := r.RotationUncertainty[0]
	if !(u[0] > 0 && u[1] > 0) || !sameRow(r.Rotation[0], q, []float64{4 * u[0], 4 * u[1]}) {
		t.Errorf("A = %v ± %v, want %v", r.Rotation[0], u, q)
	}
	if len(r.GapLabels.Generators) != 3 || len(r.GapLabels.Labels) == 0 {
		t.Errorf("generators %v (%d labels), want 1, θ1, θ2", r.GapLabels.Generators, len(r.GapLabels.Labels))
	}
}

// Two incommensurate waves: a torus with Betti numbers C(2, k), A of the
// same group as the true one (SameModule of the plane generators), and
// the generators 1, the four entries and det A.
func TestPlaneTwoWaves(t *testing.T) {
	A := [][]float64{{(math.Sqrt(5) - 1) / 8, (math.Sqrt(2) - 1) / 3}, {(math.Sqrt(3) - 1) / 5, (math.Sqrt(7) - 2) / 2}}
	r := analyzePlane(t, plate(A, 0.06, 0.003, 40, 2))
	if r.Hull.Class != hull.Torus {
		t.Fatalf("class %s %v (%s), want torus", r.Hull.Class, r.Hull.Betti, r.Hull.Reason)
	}
	if want := binomialBetti(2); !equalInts(r.Hull.Betti, want) {
		t.Errorf("Betti %v, want %v", r.Hull.Betti, want)
	}
	want, err := topology.PlaneGenerators(A, 1e-12)
	if err != nil {
		t.Fatal(err)
	}
	got := r.GapLabels.Generators
	if len(got) != 6 || len(want) != 6 || !topology.SameModule(got[1:], want[1:], 3, 1e-4) {
		t.Errorf("generators %v, want the group of %v", got, want)
	}
	checkRowsInModule(t, r, A)
}

// checkRowsInModule checks that each true row of A is ± a reported row
// plus integer combinations of the others (A and the report describe the
// same hull): with |coefficients| ≤ 2, within five stated uncertainties.
func checkRowsInModule(t *testing.T, r *hull.Result, A [][]float64) {
	t.Helper()
	d := len(A)
	if len(r.Rotation) != d {
		t.Fatalf("rotation %v, want %d rows", r.Rotation, d)
	}
	for _, row := range A {
		found := false
		for c1 := -2; c1 <= 2 && !found; c1++ {
			for c2 := -2; c2 <= 2 && !found; c2++ {
				c := []int{c1, c2}
				var s [2]float64
				var tol [2]float64
				for k := range d {
					for j := range 2 {
						s[j] += float64(c[k]) * r.Rotation[k][j]
						tol[j] += 5 * math.Abs(float64(c[k])) * r.RotationUncertainty[k][j]
					}
				}
				found = (c1 != 0 || c2 != 0) && sameRow(s[:], row, tol[:])
			}
		}
		if !found {
			t.Errorf("row %v of the true A is no small integer combination of the reported %v ± %v", row, r.Rotation, r.RotationUncertainty)
		}
	}
}

// A lattice on a rotated periodic potential, A = s·R(φ): a torus whose
// gap-label generators are reduced to 1, A11, A12 and det A (A11 = A22 and
// A12 = −A21 found as integer relations).
func TestPlaneRotatedPotential(t *testing.T) {
	s, phi := 0.3*math.Sqrt(2), 0.2*math.Pi/math.Sqrt(3)
	A := [][]float64{{s * math.Cos(phi), -s * math.Sin(phi)}, {s * math.Sin(phi), s * math.Cos(phi)}}
	// The relations need the entries to about 10⁻⁵ (four numbers at a
	// time, see topology.CoefficientBound): a plate measured to 5·10⁻⁴
	// of the spacing.
	r := analyzePlane(t, plate(A, 0.06, 0.0005, 40, 3))
	if r.Hull.Class != hull.Torus {
		t.Fatalf("class %s %v (%s), want torus", r.Hull.Class, r.Hull.Betti, r.Hull.Reason)
	}
	if g := r.GapLabels.Generators; len(g) != 4 {
		t.Errorf("generators %v, want 4 (1, A11, A12, det A)", g)
	}
	checkRowsInModule(t, r, A)
}

// A rational A: a periodic plate, finite, with the index of the period
// lattice {n : A·n ∈ Z^d} as its period; the index is computed here as
// Q² over the number of n in [0, Q)² with A·n integral (the period lattice
// contains QZ²), and the labels are k/index.
func TestPlaneRational(t *testing.T) {
	for _, A := range [][][]float64{
		{{1.0 / 3, 1.0 / 3}},
		{{0.25, 0.25}, {-0.25, 0.25}},
		{{0.5, 0}, {0, 0.2}},
	} {
		Q := 60
		kernel := 0
		for n1 := range Q {
			for n2 := range Q {
				ok := true
				for _, row := range A {
					v := row[0]*float64(n1) + row[1]*float64(n2)
					ok = ok && math.Abs(v-math.Round(v)) < 1e-9
				}
				if ok {
					kernel++
				}
			}
		}
		index := Q * Q / kernel
		r := analyzePlane(t, plate(A, 0.05, 0.003, 30, 4))
		if r.Hull.Class != hull.Finite || r.Hull.Period != index {
			t.Errorf("A = %v: class %s, period %d (%s), want finite, %d", A, r.Hull.Class, r.Hull.Period, r.Hull.Reason, index)
			continue
		}
		if len(r.GapLabels.Labels) != index-1 {
			t.Errorf("A = %v: %d labels, want %d", A, len(r.GapLabels.Labels), index-1)
		}
	}
}

// A Poisson-like field, each site anywhere in its cell (uniform
// displacements over the cell): disordered or unresolved, never a hull
// with angles; and a lattice with small independent displacements: point.
func TestPlaneDisordered(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 5))
	l := plate(nil, 0, 0, 40, 5)
	for i := range l.Displacement {
		l.Displacement[i] = [2]float64{rng.Float64() - 0.5, rng.Float64() - 0.5}
	}
	r := analyzePlane(t, l)
	if c := r.Hull.Class; c != hull.Disordered && c != hull.Unresolved {
		t.Errorf("class %s (%s), want disordered or unresolved", c, r.Hull.Reason)
	}
	if len(r.Rotation) != 0 {
		t.Errorf("rotation %v for a disordered field", r.Rotation)
	}
	r = analyzePlane(t, plate(nil, 0, 0.03, 40, 6))
	if r.Hull.Class != hull.Point {
		t.Errorf("shaken lattice: class %s (%s), want point", r.Hull.Class, r.Hull.Reason)
	}
}

// Module invariance: the same plate described in another lattice basis
// (a1' = a2, a2' = −a1, indices n' = (n2, −n1)) gives a rotation matrix
// A' of the same gap-label group (compared with SameModule here).
func TestPlaneModuleInvariance(t *testing.T) {
	A := [][]float64{{(math.Sqrt(5) - 1) / 8, (math.Sqrt(2) - 1) / 3}, {(math.Sqrt(3) - 1) / 5, (math.Sqrt(7) - 2) / 2}}
	l := plate(A, 0.06, 0.003, 40, 2)
	r := analyzePlane(t, l)
	m := *l
	m.Basis = [2][2]float64{{0, 1}, {-1, 0}}
	m.Index = make([][2]int, len(l.Index))
	m.Displacement = make([][2]float64, len(l.Index))
	for i, n := range l.Index {
		m.Index[i] = [2]int{n[1], -n[0]}
		m.Displacement[i] = l.Displacement[i] // the same site, the same (x, y)
	}
	r2 := analyzePlane(t, &m)
	if r.Hull.Class != hull.Torus || r2.Hull.Class != hull.Torus {
		t.Fatalf("classes %s and %s, want torus twice", r.Hull.Class, r2.Hull.Class)
	}
	g1, g2 := r.GapLabels.Generators, r2.GapLabels.Generators
	if len(g1) != len(g2) || !topology.SameModule(g1[1:], g2[1:], 3, 1e-4) {
		t.Errorf("generators %v and %v in the two bases differ", g1, g2)
	}
}

func equalInts(a, b []int) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

// BenchmarkAnalyzePlane100 times AnalyzePlane on a 100×100 plate displaced
// by two waves (goal: under 2 s).
func BenchmarkAnalyzePlane100(b *testing.B) {
	A := [][]float64{{(math.Sqrt(5) - 1) / 8, (math.Sqrt(2) - 1) / 3}, {(math.Sqrt(3) - 1) / 5, (math.Sqrt(7) - 2) / 2}}
	l := plate(A, 0.06, 0.003, 100, 9)
	r := analyzePlane(b, l)
	if r.Hull.Class != hull.Torus {
		b.Fatalf("class %s (%s), want torus", r.Hull.Class, r.Hull.Reason)
	}
	for b.Loop() {
		if _, err := hull.AnalyzePlane(context.Background(), l, hull.Options{}); err != nil {
			b.Fatal(err)
		}
	}
}

// The text of a plane result shows the lattice, the rotation matrix with
// an uncertainty per entry and the plane's label group.
func TestPlaneText(t *testing.T) {
	q := []float64{(math.Sqrt(5) - 1) / 8, (math.Sqrt(2) - 1) / 3}
	r := analyzePlane(t, plate([][]float64{q}, 0.08, 0.005, 40, 1))
	var b strings.Builder
	if err := r.WriteText(&b, false); err != nil {
		t.Fatal(err)
	}
	txt := b.String()
	for _, want := range []string{"lattice     a1 = (", "rotation    A in turns per lattice step", " ± ", "gap labels  Z + Z·A11 + Z·A12", "patches of 3×3 lattice steps"} {
		if !strings.Contains(txt, want) {
			t.Errorf("text lacks %q:\n%s", want, txt)
		}
	}
	t.Log("\n" + txt)
}

// Sites off the lattice (spurious, NaN displacement) and lattice points
// with no site leave the circle and its A as they were: the lines are read
// on the sites there are, and the patches that would cross a hole are left
// out.
func TestPlaneHoles(t *testing.T) {
	q := []float64{(math.Sqrt(5) - 1) / 8, (math.Sqrt(2) - 1) / 3}
	l := plate([][]float64{q}, 0.08, 0.005, 40, 1)
	rng := rand.New(rand.NewPCG(8, 8))
	m := &lattice.Lattice{Basis: l.Basis, BasisUncertainty: l.BasisUncertainty, Unit: l.Unit}
	for i := range l.Index {
		switch x := rng.Float64(); {
		case x < 0.05: // a missing site
			m.Missing++
			continue
		case x < 0.07: // a spurious site besides this one
			m.Index = append(m.Index, [2]int{})
			m.OnLattice = append(m.OnLattice, false)
			m.Displacement = append(m.Displacement, [2]float64{math.NaN(), math.NaN()})
		}
		m.Index = append(m.Index, l.Index[i])
		m.OnLattice = append(m.OnLattice, true)
		m.Displacement = append(m.Displacement, l.Displacement[i])
	}
	r := analyzePlane(t, m)
	if r.Hull.Class != hull.Circle {
		t.Fatalf("class %s %v (%s), want circle", r.Hull.Class, r.Hull.Betti, r.Hull.Reason)
	}
	u := r.RotationUncertainty[0]
	if !sameRow(r.Rotation[0], q, []float64{4 * u[0], 4 * u[1]}) {
		t.Errorf("A = %v ± %v, want %v", r.Rotation[0], u, q)
	}
	if r.Lattice.OffLattice == 0 || r.Lattice.Missing == 0 || r.Embedding.Excluded == 0 {
		t.Errorf("lattice report %+v, excluded patches %d: want off-lattice and missing sites and patches left out", *r.Lattice, r.Embedding.Excluded)
	}
	if n := len(r.SiteResiduals); n != len(m.Index) {
		t.Errorf("%d site residuals for %d sites", n, len(m.Index))
	}
}
