package design

import (
	"fmt"
	"math"

	"phasonhull/pattern"
)

// The two-dimensional families: a lattice of step a (square, a1 = (a, 0),
// a2 = (0, a), or hexagonal, a2 = (a/2, a√3/2)) on a Sites × Sites patch
// n = (n1, n2), each site displaced by a field of the torus coordinate
//
//	x_n = n1·a1 + n2·a2 + u(ψ_n),  ψ_n = ψ0 + A·n mod 1 on the d-torus.
//
// The plate family takes A (d × 2, d = 0 to 3) and
// u(ψ) = Σ_k amps[k]·ê_k·sin 2πψ_k, ê_k along the wave of row k in real
// space (the gradient B⁻ᵀ·A_kᵀ of ψ_k, B = [a1 a2]) unless "polar" gives
// its angle; the twisted family takes A = s·R(twist), R the rotation
// matrix, and u(ψ) = amp·(ê1 sin 2πψ1 + ê2 sin 2πψ2), ê the x and y axes
// turned by the twist. When 1 and the entries of A are rationally
// independent the hull is the d-torus; a rational A repeats on a
// supercell (a finite hull).

// Limits of the two-dimensional families.
const (
	minSitesPerSide = 3    // 9 sites, at least pattern.MinSites
	maxSitesPerSide = 3162 // 3162² ≤ MaxSites
	maxPlaneWaves   = 3    // rows of A
)

// Lattices are the lattices of the two-dimensional families.
const (
	LatticeSquare = "square"
	LatticeHex    = "hex"
)

func defaultsPlane(s *Spec) {
	if s.Lattice == "" {
		s.Lattice = LatticeSquare
	}
	if s.Family == Twisted && s.Scale == 0 {
		s.Scale = 1
	}
	d := len(s.Matrix)
	if s.Family == Twisted {
		d = 2
	}
	for len(s.Phases) < d {
		s.Phases = append(s.Phases, 0)
	}
}

// firstPlanePhase points at ψ0 of the first wave in a copy of the spec's
// phases (padded with zeros to one per row of A).
func firstPlanePhase(s *Spec) *float64 {
	s.Phases = cloneFloats(s.Phases)
	c := s.WithDefaults()
	s.Phases = c.Phases
	if len(s.Phases) == 0 {
		s.Phases = []float64{0}
	}
	return &s.Phases[0]
}

// Rotation returns the matrix A of a two-dimensional family, d rows of 2
// numbers in turns per lattice step (rows the torus coordinates, columns
// the basis steps a1, a2): the plate family's "rotation", the twisted
// family's s·R(twist). It is nil for the families of chains and for a
// plate without waves.
func (s Spec) Rotation() [][]float64 {
	switch s.Family {
	case Plate:
		if len(s.Matrix) == 0 {
			return nil
		}
		return s.WithDefaults().Matrix
	case Twisted:
		sc := s.Scale
		if sc == 0 {
			sc = 1
		}
		t := s.Twist * math.Pi / 180
		c, sn := math.Cos(t), math.Sin(t)
		return [][]float64{{sc * c, -sc * sn}, {sc * sn, sc * c}}
	}
	return nil
}

// basis returns the lattice's basis vectors a1, a2.
func (s Spec) basis() [2][2]float64 {
	a := s.Spacing
	if s.Lattice == LatticeHex {
		return [2][2]float64{{a, 0}, {a / 2, a * math.Sqrt(3) / 2}}
	}
	return [2][2]float64{{a, 0}, {0, a}}
}

// waves returns, for a spec with defaults, A and the displacement vector
// w_k = amplitude·ê_k of each of its rows: u(ψ) = Σ_k w_k sin 2πψ_k.
func (s Spec) waves() (A [][]float64, w [][2]float64) {
	A = s.Rotation()
	if s.Family == Twisted {
		t := s.Twist * math.Pi / 180
		c, sn := math.Cos(t), math.Sin(t)
		return A, [][2]float64{{s.Amp * c, s.Amp * sn}, {-s.Amp * sn, s.Amp * c}}
	}
	b := s.basis()
	det := b[0][0]*b[1][1] - b[1][0]*b[0][1]
	for k, row := range A {
		var e [2]float64
		if k < len(s.Polar) {
			p := s.Polar[k] * math.Pi / 180
			e = [2]float64{math.Cos(p), math.Sin(p)}
		} else {
			// The gradient of ψ_k in real space, B⁻ᵀ·A_kᵀ.
			q := [2]float64{(b[1][1]*row[0] - b[0][1]*row[1]) / det, (-b[1][0]*row[0] + b[0][0]*row[1]) / det}
			l := math.Hypot(q[0], q[1])
			e = [2]float64{q[0] / l, q[1] / l}
		}
		w = append(w, [2]float64{s.Amps[k] * e[0], s.Amps[k] * e[1]})
	}
	return A, w
}

func checkLattice(s Spec) error {
	if s.Lattice != LatticeSquare && s.Lattice != LatticeHex {
		return fmt.Errorf("lattice %q: unknown; choose %s or %s", s.Lattice, LatticeSquare, LatticeHex)
	}
	if s.Spacing <= 0 {
		return fmt.Errorf("spacing = %s: must be positive", formatFloat(s.Spacing))
	}
	return nil
}

func checkPlate(s Spec) error {
	if err := checkLattice(s); err != nil {
		return err
	}
	d := len(s.Matrix)
	if d > maxPlaneWaves {
		return fmt.Errorf("rotation: %d rows; a plate takes 0 to %d waves (rows of 2 numbers, e.g. rotation = 0.4142,0.2679)", d, maxPlaneWaves)
	}
	for k, row := range s.Matrix {
		if len(row) != 2 {
			return fmt.Errorf("rotation row %d: %d numbers; each row of A holds 2, its turns per step along a1 and a2", k+1, len(row))
		}
		if row[0] == 0 && row[1] == 0 {
			return fmt.Errorf("rotation row %d is zero: a wave needs a nonzero row", k+1)
		}
	}
	if len(s.Amps) != d {
		return fmt.Errorf("amps: %d amplitudes for %d rows of rotation; give one amplitude per row", len(s.Amps), d)
	}
	if len(s.Phases) > d {
		return fmt.Errorf("phases: %d phases for %d rows of rotation; give at most one phase per row", len(s.Phases), d)
	}
	if len(s.Polar) != 0 && len(s.Polar) != d {
		return fmt.Errorf("polar: %d angles for %d rows of rotation; give one polarisation per row, or none for longitudinal waves", len(s.Polar), d)
	}
	return checkCells(s)
}

func checkTwisted(s Spec) error {
	if err := checkLattice(s); err != nil {
		return err
	}
	if s.Scale <= 0 {
		return fmt.Errorf("scale = %s: must be positive (turn the twist by 180° for a negative one)", formatFloat(s.Scale))
	}
	if len(s.Phases) > 2 {
		return fmt.Errorf("phases: %d phases; the twisted family has 2 waves", len(s.Phases))
	}
	return checkCells(s)
}

// checkCells refuses displacements that could take a site out of its
// Voronoi cell, so that no two sites can overlap. The displacements u(ψ)
// fill the zonotope Σ_k t_k·w_k, t_k ∈ [−1, 1] (every corner is reached
// when the waves are independent, and the zonotope bounds them always);
// the Voronoi cell of a site is {x : |x·v| < |v|²/2} over the lattice
// vectors v = a1, a2, a1 + a2, a1 − a2 (those that bound it, plus
// harmless others; common practice), and the zonotope's largest reach
// along v is Σ_k |w_k·v|.
func checkCells(s Spec) error {
	_, w := s.waves()
	b := s.basis()
	vs := []struct {
		name string
		v    [2]float64
	}{
		{"a1", b[0]}, {"a2", b[1]},
		{"a1+a2", [2]float64{b[0][0] + b[1][0], b[0][1] + b[1][1]}},
		{"a1−a2", [2]float64{b[0][0] - b[1][0], b[0][1] - b[1][1]}},
	}
	for _, v := range vs {
		l2 := v.v[0]*v.v[0] + v.v[1]*v.v[1]
		var reach float64
		for _, wk := range w {
			reach += math.Abs(wk[0]*v.v[0] + wk[1]*v.v[1])
		}
		if reach >= l2/2 {
			return fmt.Errorf("the displacement can reach %.4g along %s, the edge of a site's Voronoi cell sits at %.4g: sites could overlap; lower the amplitudes",
				reach/math.Sqrt(l2), v.name, math.Sqrt(l2)/2)
		}
	}
	return nil
}

// sitesOf lays out the Sites × Sites patch, n1 fastest, displaced by
// u(ψ_n) = Σ_k w_k sin 2πψ_k.
func sitesOf(s Spec) [][2]float64 {
	A, w := s.waves()
	b := s.basis()
	n := s.Sites
	pts := make([][2]float64, 0, n*n)
	for n2 := range n {
		for n1 := range n {
			x := float64(n1)*b[0][0] + float64(n2)*b[1][0]
			y := float64(n1)*b[0][1] + float64(n2)*b[1][1]
			for k, row := range A {
				psi := s.Phases[k] + row[0]*float64(n1) + row[1]*float64(n2)
				sn := math.Sin(2 * math.Pi * (psi - math.Floor(psi)))
				x += w[k][0] * sn
				y += w[k][1] * sn
			}
			pts = append(pts, [2]float64{x, y})
		}
	}
	return pts
}

func buildPlate(s Spec) [][2]float64   { return sitesOf(s) }
func buildTwisted(s Spec) [][2]float64 { return sitesOf(s) }

// GeneratePlane builds the plate a valid spec of a two-dimensional family
// describes, then its perturbations in this order, each from its own
// random stream of the seed: missing (sites removed uniformly), extra
// (spurious sites placed uniformly in the patch, the parallelogram of the
// lattice cells around its sites), noise (isotropic Gaussian noise of that
// standard deviation on each coordinate). The sites come row by row (n1
// fastest), the spurious ones last. The plane's Source is "generated", its
// Unit the spec's, and its Notes give the family, every parameter and
// every perturbation.
func GeneratePlane(spec Spec) (*pattern.Plane, error) {
	c, _, err := spec.prepare()
	if err != nil {
		return nil, fmt.Errorf("design: %w", err)
	}
	fam, _ := lookupFamily(c.Family)
	if fam.dim != 2 {
		return nil, fmt.Errorf("design: the %s family makes chains: generate it with Generate", c.Family)
	}
	pts, notes := perturbPlane(c, fam.plane(c))
	p, err := pattern.NewPlane(pts, c.Unit, "generated")
	if err != nil {
		return nil, fmt.Errorf("design %s: %w", c.Family, err)
	}
	head := c.generatedNote(fam.formula)
	p.Notes = append(append([]string{head}, notes...), p.Notes...)
	return p, nil
}

// perturbPlane applies the perturbations of a two-dimensional spec (see
// GeneratePlane) and returns the sites and one note per perturbation.
func perturbPlane(s Spec, pts [][2]float64) ([][2]float64, []string) {
	var notes []string
	n := len(pts)
	if k := countOf(s.Missing, n); k > 0 {
		drop := make([]bool, n)
		for _, i := range newRand(s.Seed, streamMissing).Perm(n)[:k] {
			drop[i] = true
		}
		kept := pts[:0]
		for i, p := range pts {
			if !drop[i] {
				kept = append(kept, p)
			}
		}
		pts = kept
		notes = append(notes, fmt.Sprintf("removed %d of %d sites at random (missing = %s, seed %d)", k, n, formatFloat(s.Missing), s.Seed))
	}
	if k := countOf(s.Extra, n); k > 0 {
		rng := newRand(s.Seed, streamExtra)
		b := s.basis()
		side := float64(s.Sites)
		for range k {
			t1, t2 := side*rng.Float64()-0.5, side*rng.Float64()-0.5
			pts = append(pts, [2]float64{t1*b[0][0] + t2*b[1][0], t1*b[0][1] + t2*b[1][1]})
		}
		notes = append(notes, fmt.Sprintf("placed %d spurious sites uniformly in the patch (extra = %s, seed %d)", k, formatFloat(s.Extra), s.Seed))
	}
	if s.Noise > 0 {
		rng := newRand(s.Seed, streamNoise)
		for i := range pts {
			pts[i][0] += s.Noise * rng.NormFloat64()
			pts[i][1] += s.Noise * rng.NormFloat64()
		}
		notes = append(notes, fmt.Sprintf("added isotropic Gaussian position noise of standard deviation %s on each coordinate (seed %d)", formatFloat(s.Noise), s.Seed))
	}
	return pts, notes
}
