package lattice

import (
	"context"
	"errors"
	"fmt"
	"math"
	"testing"

	"phasonhull/pattern"
)

func recoverPoints(t *testing.T, pts [][2]float64) (*Lattice, error) {
	t.Helper()
	p, err := pattern.NewPlane(pts, "µm", "test")
	if err != nil {
		t.Fatal(err)
	}
	return Recover(context.Background(), p, Options{})
}

// integerChange returns M with got = M·want (rows the basis vectors) when
// M is an integer matrix of determinant +1 to within tol, and an error
// otherwise.
func integerChange(got, want [2][2]float64, tol float64) ([2][2]int, error) {
	r := reciprocal(want) // rows b_i: got_k = Σ_i (got_k·b_i) a_i
	var m [2][2]int
	for k := range 2 {
		for i := range 2 {
			v := dot(got[k], r[i])
			m[k][i] = int(math.Round(v))
			if math.Abs(v-float64(m[k][i])) > tol {
				return m, fmt.Errorf("basis %v is not an integer change of %v: coefficient %v", got, want, v)
			}
		}
	}
	if det := m[0][0]*m[1][1] - m[0][1]*m[1][0]; det != 1 {
		return m, fmt.Errorf("basis %v is %v × %v, determinant %d", got, m, want, det)
	}
	return m, nil
}

func mul(m [2][2]int, b [2][2]float64) [2][2]float64 {
	var out [2][2]float64
	for k := range 2 {
		out[k] = combine(b, float64(m[k][0]), float64(m[k][1]))
	}
	return out
}

// checkReduced checks the Lattice invariant on the basis.
func checkReduced(t *testing.T, b [2][2]float64) {
	t.Helper()
	a1, a2 := norm2(b[0]), norm2(b[1])
	if a1 > a2*(1+1e-9) || math.Abs(dot(b[0], b[1])) > a1/2*(1+1e-9) || cross(b[0], b[1]) <= 0 {
		t.Errorf("basis %v is not Lagrange–Gauss reduced and right-handed", b)
	}
}

// indexMap checks that the recovered index n' of every lattice site that
// sits on the lattice relates to its generating index n by n'·M = n + c,
// one constant c for all: the indexing is a lattice map, not a patchwork.
func indexMap(t *testing.T, l *Lattice, s []site, m [2][2]int) {
	t.Helper()
	var c [2]int
	first := true
	for i := range s {
		if !s[i].real || !l.OnLattice[i] {
			continue
		}
		n := l.Index[i]
		d := [2]int{n[0]*m[0][0] + n[1]*m[1][0] - s[i].n[0], n[0]*m[0][1] + n[1]*m[1][1] - s[i].n[1]}
		if first {
			c, first = d, false
		} else if d != c {
			t.Fatalf("site %d (generated at %v) has index %v: shift %v, not %v as the others", i, s[i].n, n, d, c)
		}
	}
}

// The recovered basis is the generating one up to an integer change of
// basis of determinant 1, within a few standard uncertainties, for square,
// hexagonal and oblique lattices, rotated and offset, with 5% position
// noise, 5% missing and 2% spurious sites, from 8 × 8 to 100 × 100 sites;
// every lattice site is indexed consistently, and the spurious sites
// rarely sit on the lattice (the expected checks of any lattice fit).
func TestRecoverLattices(t *testing.T) {
	names := map[*[2][2]float64]string{&square: "square", &hex: "hex", &oblique: "oblique"}
	for _, b := range []*[2][2]float64{&square, &hex, &oblique} {
		for _, side := range []int{8, 20, 100} {
			for k, rot := range []float64{0, 0.7, 2.9} {
				c := plate{basis: *b, n1: side, n2: side, rot: rot, offset: [2]float64{-40 * float64(k), 13},
					noise: 0.05, missing: 0.05, extra: 0.02, seed: uint64(side + k)}
				t.Run(fmt.Sprintf("%s/%d/rot=%v", names[b], side, rot), func(t *testing.T) {
					s := c.sites()
					l, err := recoverPoints(t, points(s))
					if err != nil {
						t.Fatal(err)
					}
					checkReduced(t, l.Basis)
					truth := rotated(c.basis, c.rot)
					m, err := integerChange(l.Basis, truth, 0.05)
					if err != nil {
						t.Fatal(err)
					}
					want := mul(m, truth)
					for k := range 2 {
						for j := range 2 {
							if d := math.Abs(l.Basis[k][j] - want[k][j]); d > 4*l.BasisUncertainty[k][j] {
								t.Errorf("basis[%d][%d] = %v ± %v, truth %v (%.1fσ)", k, j, l.Basis[k][j], l.BasisUncertainty[k][j], want[k][j], d/l.BasisUncertainty[k][j])
							}
						}
					}
					indexMap(t, l, s, m)
					var realOff, spurOn, spur int
					for i := range s {
						switch {
						case s[i].real && !l.OnLattice[i]:
							realOff++
						case !s[i].real:
							spur++
							if l.OnLattice[i] {
								spurOn++
							}
						}
					}
					// A lattice site is taken off only by a spurious site
					// nearer its lattice point, which then sits on it.
					if realOff > spurOn {
						t.Errorf("%d lattice sites off the lattice, but only %d spurious sites on it", realOff, spurOn)
					}
					if spurOn > max(2, spur/4) {
						t.Errorf("%d of %d spurious sites sit on the lattice", spurOn, spur)
					}
				})
			}
		}
	}
}

// The basis does not depend on where the patch lies or in which order its
// sites are listed: the same sites rotated and moved give the rotated
// basis (up to the integer change the canonical choice makes), and the
// same sites shuffled give the same basis and the same indices.
func TestRecoverInvariance(t *testing.T) {
	base := plate{basis: hex, n1: 30, n2: 25, noise: 0.05, missing: 0.05, extra: 0.02, seed: 7}
	s0 := base.sites()
	l0, err := recoverPoints(t, points(s0))
	if err != nil {
		t.Fatal(err)
	}
	for _, rot := range []float64{0.3, 1.9, -2.5} {
		c := base
		c.rot, c.offset = rot, [2]float64{1e3, -2e3}
		s := c.sites()
		l, err := recoverPoints(t, points(s))
		if err != nil {
			t.Fatal(err)
		}
		want := rotated(l0.Basis, rot)
		m, err := integerChange(l.Basis, want, 1e-6)
		if err != nil {
			t.Fatal(err)
		}
		want = mul(m, want)
		for k := range 2 {
			for j := range 2 {
				if math.Abs(l.Basis[k][j]-want[k][j]) > 1e-9 {
					t.Errorf("rot %v: basis %v, want %v", rot, l.Basis, want)
				}
			}
		}
		for i := range s {
			if l.OnLattice[i] != l0.OnLattice[i] {
				t.Errorf("rot %v: site %d on the lattice %v, unrotated %v", rot, i, l.OnLattice[i], l0.OnLattice[i])
			}
		}
		if l.Missing != l0.Missing {
			t.Errorf("rot %v: %d missing, unrotated %d", rot, l.Missing, l0.Missing)
		}
	}
	c := base
	c.shuffled = true
	s := c.sites()
	l, err := recoverPoints(t, points(s))
	if err != nil {
		t.Fatal(err)
	}
	for k := range 2 {
		for j := range 2 {
			if math.Abs(l.Basis[k][j]-l0.Basis[k][j]) > 1e-9 {
				t.Fatalf("shuffled: basis %v, in order %v", l.Basis, l0.Basis)
			}
		}
	}
	at := map[[2]float64]int{}
	for i := range s0 {
		at[s0[i].x] = i
	}
	var shift [2]int
	for i := range s {
		j := at[s[i].x]
		if l.OnLattice[i] != l0.OnLattice[j] {
			t.Fatalf("shuffled: site %v on the lattice %v, in order %v", s[i].x, l.OnLattice[i], l0.OnLattice[j])
		}
		if !l.OnLattice[i] {
			continue
		}
		d := [2]int{l.Index[i][0] - l0.Index[j][0], l.Index[i][1] - l0.Index[j][1]}
		if i == 0 {
			shift = d
		} else if d != shift {
			t.Fatalf("shuffled: index shift %v at site %v, %v elsewhere", d, s[i].x, shift)
		}
	}
	if l.Missing != l0.Missing {
		t.Errorf("shuffled: %d missing, in order %d", l.Missing, l0.Missing)
	}
}

// A rigid integer change of the generating basis (the patch generated
// along a' = M·a, a sheared patch of the same lattice) gives the same
// reduced basis as the plain patch, and indices that map to the
// generating ones through M (the reduction of a planar lattice basis is
// unique up to its symmetries; common practice).
func TestRecoverIntegerChangeOfBasis(t *testing.T) {
	b := rotated(oblique, 0.5)
	plain, err := recoverPoints(t, latticePatch(b, [2]float64{}, 25, 25, nil))
	if err != nil {
		t.Fatal(err)
	}
	for _, m := range [][2][2]int{{{2, 1}, {1, 1}}, {{1, 3}, {0, 1}}, {{0, -1}, {1, 0}}, {{-3, 2}, {-2, 1}}} {
		gen := mul(m, b)
		c := plate{basis: gen, n1: 25, n2: 25, noise: 0.03, seed: 3}
		s := c.sites()
		l, err := recoverPoints(t, points(s))
		if err != nil {
			t.Fatal(err)
		}
		checkReduced(t, l.Basis)
		mm, err := integerChange(l.Basis, plain.Basis, 0.02)
		if err != nil {
			t.Fatal(err)
		}
		if mm != [2][2]int{{1, 0}, {0, 1}} {
			t.Errorf("M = %v: basis %v, plain patch %v (change %v)", m, l.Basis, plain.Basis, mm)
		}
		g, err := integerChange(l.Basis, gen, 0.02)
		if err != nil {
			t.Fatal(err)
		}
		indexMap(t, l, s, g)
	}
}

// Missing and spurious sites counted exactly on a constructed plate: a
// 20 × 20 square patch (spacing 2.5, rotated) without its corner (0, 0),
// with 7 interior lattice points and the edge point (0, 10) left empty;
// 3 sites at cell centres and 2 second sites near taken lattice points;
// 1 lone site on a lattice point far outside the patch.
func TestMissingAndSpuriousCounts(t *testing.T) {
	b := rotated([2][2]float64{{2.5, 0}, {0, 2.5}}, 0.2)
	empty := map[[2]int]bool{{0, 0}: true, {0, 10}: true, {3, 3}: true, {3, 4}: true, {10, 10}: true, {15, 2}: true, {7, 18}: true, {12, 12}: true, {18, 18}: true}
	var pts [][2]float64
	for i := range 20 {
		for j := range 20 {
			if !empty[[2]int{i, j}] {
				pts = append(pts, combine(b, float64(i), float64(j)))
			}
		}
	}
	lattice := len(pts)
	for _, f := range [][2]float64{{4.5, 4.5}, {10.5, 2.5}, {16.5, 11.5}, {5.08, 6.04}, {13.06, 9.0}, {45, 45}} {
		pts = append(pts, combine(b, f[0], f[1]))
	}
	l, err := recoverPoints(t, pts)
	if err != nil {
		t.Fatal(err)
	}
	if l.Missing != 8 {
		t.Errorf("Missing = %d, want 8", l.Missing)
	}
	for i := range pts {
		if l.OnLattice[i] != (i < lattice) {
			t.Errorf("site %d at %v: on the lattice %v, want %v", i, pts[i], l.OnLattice[i], i < lattice)
		}
		if !l.OnLattice[i] && (l.Index[i] != [2]int{} || !math.IsNaN(l.Displacement[i][0])) {
			t.Errorf("site %d off the lattice has index %v, displacement %v", i, l.Index[i], l.Displacement[i])
		}
	}
	if len(l.Notes) == 0 {
		t.Error("no notes")
	}
	found := false
	for _, n := range l.Notes {
		found = found || n == "6 sites sit on no lattice point (3 beyond the tolerance of 0.40 of the spacing, 2 second on a lattice point, 1 alone outside the patch)"
	}
	if !found {
		t.Errorf("notes %q do not count the 6 sites off the lattice by reason", l.Notes)
	}
}

// A displaced plate's average lattice is the mean lattice, not one
// distorted by the modulation: waves of amplitude 0.15 of the spacing,
// short and long, one and two of them, with 5% noise.
func TestRecoverModulated(t *testing.T) {
	for k, c := range []plate{
		{basis: square, n1: 60, n2: 60, waves: []wave{{q: [2]float64{0.381966, 0.236068}, amp: 0.15, pol: [2]float64{0.85, 0.527}}}},
		{basis: hex, n1: 60, n2: 60, waves: []wave{{q: [2]float64{0.381966, 0}, amp: 0.15, pol: [2]float64{1, 0}}, {q: [2]float64{0, 0.2718}, amp: 0.15, pol: [2]float64{0, 1}}}},
		{basis: square, n1: 60, n2: 60, waves: []wave{{q: [2]float64{0.0309, 0.0191}, amp: 0.15, pol: [2]float64{0.85, 0.527}, phase: 0.2}}},
		{basis: oblique, n1: 50, n2: 70, waves: []wave{{q: [2]float64{0.1, 0.4142}, amp: 0.15, pol: [2]float64{0, 1}}}},
		{basis: hex, n1: 250, n2: 250, waves: []wave{{q: [2]float64{0.00618, 0.00382}, amp: 0.15, pol: [2]float64{0.6, -0.8}, phase: 0.3}, {q: [2]float64{0.2718, 0.3141}, amp: 0.1, pol: [2]float64{0.8, 0.6}}}},
		{basis: square, n1: 250, n2: 250, waves: []wave{{q: [2]float64{0.4987, 0.0123}, amp: 0.15, pol: [2]float64{1, 0}}}},
	} {
		c.noise, c.rot, c.seed = 0.05, 0.4*float64(k), uint64(k)
		s := c.sites()
		l, err := recoverPoints(t, points(s))
		if err != nil {
			t.Fatalf("case %d: %v", k, err)
		}
		truth := rotated(c.basis, c.rot)
		m, err := integerChange(l.Basis, truth, 0.01)
		if err != nil {
			t.Fatalf("case %d: %v", k, err)
		}
		want := mul(m, truth)
		for i := range 2 {
			for j := range 2 {
				d := math.Abs(l.Basis[i][j] - want[i][j])
				if d > 4*l.BasisUncertainty[i][j] || d > 2e-3 {
					t.Errorf("case %d: basis[%d][%d] = %v ± %v, truth %v", k, i, j, l.Basis[i][j], l.BasisUncertainty[i][j], want[i][j])
				}
			}
		}
		// Within the tolerance but for the rare site where the noise adds
		// 0.19 of the spacing at the field's peak (see DefaultTolerance).
		off := 0
		for i := range s {
			if !l.OnLattice[i] {
				off++
			}
		}
		if off > 1+len(s)/1000 {
			t.Errorf("case %d: %d of %d sites off the lattice", k, off, len(s))
		}
		indexMap(t, l, s, m)
	}
}

// Sets with no average lattice are refused with ErrNoLattice and a
// reason; sites along a line too; too few sites with pattern.ErrTooFew;
// a cancelled context with its error.
func TestRecoverRefuses(t *testing.T) {
	for _, n := range []int{8, 100, 3000} {
		_, err := recoverPoints(t, poisson(n, 11))
		if !errors.Is(err, ErrNoLattice) {
			t.Errorf("Poisson set of %d sites: err = %v, want ErrNoLattice", n, err)
		}
	}
	var line [][2]float64
	for i := range 30 {
		line = append(line, [2]float64{float64(i) * 0.6, float64(i) * 0.8})
	}
	if _, err := recoverPoints(t, line); !errors.Is(err, ErrNoLattice) {
		t.Errorf("sites along a line: err = %v, want ErrNoLattice", err)
	}
	// A lattice with position noise of 30% of the spacing keeps no
	// coherent Bragg peak (Debye–Waller factor e^{−4π²σ²|b|²} = 0.03).
	glass := plate{basis: square, n1: 40, n2: 40, noise: 0.3, seed: 2}
	if _, err := recoverPoints(t, points(glass.sites())); !errors.Is(err, ErrNoLattice) {
		t.Errorf("lattice with 30%% noise: err = %v, want ErrNoLattice", err)
	}
	p, _ := pattern.NewPlane(poisson(5, 1), "", "test")
	if p != nil {
		t.Fatal("NewPlane accepted 5 sites")
	}
	if _, err := Recover(context.Background(), &pattern.Plane{Points: poisson(5, 1)}, Options{}); !errors.Is(err, pattern.ErrTooFew) {
		t.Errorf("5 sites: err = %v, want ErrTooFew", err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	pl, _ := pattern.NewPlane(points(plate{basis: square, n1: 10, n2: 10, seed: 1}.sites()), "", "test")
	if _, err := Recover(ctx, pl, Options{}); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled: err = %v", err)
	}
	if _, err := Recover(context.Background(), pl, Options{Tolerance: 0.6}); err == nil {
		t.Error("tolerance 0.6 accepted")
	}
}

// The stated basis uncertainty is a standard uncertainty: over seeded
// draws of noisy plates (with and without a displacement wave), the truth
// lies within 1σ in about 68% and within 2σ in about 95% of the
// components (coverage of a Gaussian standard error; common practice).
// The uncertainty takes the larger of two estimates, so it may cover a
// little more, never much less.
func TestBasisUncertaintyCoverage(t *testing.T) {
	for _, modulated := range []bool{false, true} {
		var in1, in2, total int
		for d := range 100 {
			c := plate{basis: [][2][2]float64{square, hex, oblique}[d%3], n1: 24, n2: 24, rot: float64(d), noise: 0.05, missing: 0.05, extra: 0.02, seed: uint64(d)}
			if modulated {
				c.waves = []wave{{q: [2]float64{0.05 + 0.004*float64(d), 0.31}, amp: 0.15, pol: [2]float64{0.6, 0.8}, phase: 0.01 * float64(d)}}
			}
			l, err := recoverPoints(t, points(c.sites()))
			if err != nil {
				t.Fatal(err)
			}
			truth := rotated(c.basis, c.rot)
			m, err := integerChange(l.Basis, truth, 0.05)
			if err != nil {
				t.Fatal(err)
			}
			want := mul(m, truth)
			for k := range 2 {
				for j := range 2 {
					z := math.Abs(l.Basis[k][j]-want[k][j]) / l.BasisUncertainty[k][j]
					total++
					if z < 1 {
						in1++
					}
					if z < 2 {
						in2++
					}
				}
			}
		}
		f1, f2 := float64(in1)/float64(total), float64(in2)/float64(total)
		t.Logf("modulated %v: %.2f within 1σ, %.2f within 2σ (%d components)", modulated, f1, f2, total)
		if f1 < 0.6 || f2 < 0.9 {
			t.Errorf("modulated %v: the truth lies within 1σ in %.2f and within 2σ in %.2f of the components: the uncertainty is understated", modulated, f1, f2)
		}
		if f1 > 0.95 {
			t.Errorf("modulated %v: the truth lies within 1σ in %.2f of the components: the uncertainty is much overstated", modulated, f1)
		}
	}
}
