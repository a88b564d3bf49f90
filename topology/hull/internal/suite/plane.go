package main

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"time"

	"phasonhull/pattern"
	"phasonhull/pattern/design"
	"phasonhull/pattern/lattice"
	"phasonhull/topology/hull"
)

// The two-dimensional family set (-plane): generated plates through the
// whole pipeline, design.GeneratePlane → (pattern.WritePlane →
// pattern.ReadSites, for the cases marked ThroughFile) → lattice.Recover
// → hull.AnalyzePlane, scored by the same rules as the chains (assess)
// plus the two a plane adds:
//
//   - the rotation matrix A as a module: any V·A·U + N (V ∈ GL(d, Z),
//     U ∈ GL(2, Z) the change to the reported lattice basis, N integer)
//     describes the same hull, so each true row, carried to the reported
//     basis, must be a small integer combination of the reported rows
//     modulo Z² and each reported row one of the true rows, within
//     wrongAngleFactor stated uncertainties (moduleRatio);
//   - the lattice basis: the reported basis must be the true one up to a
//     unimodular change of basis, each component within wrongAngleFactor
//     stated uncertainties (plus the rounding of a written file).
//
// A set with no average lattice (lattice.ErrNoLattice) is reported
// disordered, as the lattice package documents.

// Poisson and hard-disk sets, the negative cases.
const (
	poissonSet  = "poisson"
	hardDiskSet = "hard-disk"
)

// planeGrid lists the plane cases. Spacing is 1; noise, missing and extra
// are shares of the spacing and of the sites.
func planeGrid(cfg Config) []Case {
	var cases []Case
	add := func(c Case, name string) {
		c.Name = name
		c.Noise = c.Spec.Noise
		cases = append(cases, c)
	}
	plate := func(lat string, side int, A [][]float64, amps []float64, noise, missing, extra float64) Case {
		s := design.Spec{Family: "plate", Lattice: lat, Sites: side, Matrix: A, Amps: amps, Noise: noise, Missing: missing, Extra: extra}
		c := Case{Spec: s, Rotation: A}
		if idx, ok := supercellIndex(A); ok {
			c.Class, c.Period, c.Rotation = hull.Finite, idx, nil
		} else if len(A) == 0 {
			c.Class, c.Period = hull.Point, 1
		} else {
			c.Class = hullOf(1, len(A))
		}
		return c
	}
	q1 := []float64{(math.Sqrt(5) - 1) / 8, (math.Sqrt(2) - 1) / 3}
	q2 := []float64{(math.Sqrt(3) - 1) / 5, (math.Sqrt(7) - 2) / 2}
	q3 := []float64{(math.Sqrt(11) - 3) / 2, -(math.Sqrt(6) - 2) / 3}
	lats := []string{design.LatticeSquare, design.LatticeHex}
	sides := []int{10, 40, 100}
	noises := []float64{0, 0.01, 0.05}
	if cfg.Quick {
		sides, noises = []int{40}, []float64{0.01}
	}
	for _, lat := range lats {
		for _, side := range sides {
			for _, noise := range noises {
				tag := fmt.Sprintf("%s/%dx%d/σ%g%%", lat, side, side, 100*noise)
				add(plate(lat, side, nil, nil, noise, 0, 0), "point/"+tag)
				add(plate(lat, side, [][]float64{q1}, []float64{0.08}, noise, 0, 0), "circle/"+tag)
				add(plate(lat, side, [][]float64{q1, q2}, []float64{0.06, 0.06}, noise, 0, 0), "torus/"+tag)
			}
		}
		// Supercells of index 2 to 6 (A = ½ along a1; ⅓ along a1 + a2; ¼, ½;
		// ⅕, ⅖; ½ and ⅓ on two waves).
		for _, A := range [][][]float64{
			{{0.5, 0}}, {{1.0 / 3, 1.0 / 3}}, {{0.25, 0.5}}, {{0.2, 0.4}}, {{0.5, 0}, {0, 1.0 / 3}},
		} {
			c := plate(lat, 40, A, fill(len(A), 0.05), 0.01, 0, 0)
			// Phase 0 would silence a wave of frequency ½ (sin πn = 0).
			c.Spec.Phases = fill(len(A), 0.2)
			add(c, fmt.Sprintf("finite/%s/index%d/40x40/σ1%%", lat, c.Period))
		}
		// A rotated periodic potential A = s·R(φ).
		for _, tw := range []struct{ s, deg float64 }{{0.3 * math.Sqrt2, 20.78}, {1 / math.Sqrt(7), 31.4}} {
			side := 60
			if cfg.Quick {
				side = 40
			}
			s := design.Spec{Family: "twisted", Lattice: lat, Sites: side, Scale: tw.s, Twist: tw.deg, Amp: 0.05, Noise: 0.003}
			c := Case{Spec: s, Class: hull.Torus, Rotation: s.Rotation()}
			add(c, fmt.Sprintf("twisted/%s/s%.3f/φ%g/%dx%d/σ0.3%%", lat, tw.s, tw.deg, side, side))
		}
		// Three waves.
		add(plate(lat, 60, [][]float64{q1, q2, q3}, []float64{0.05, 0.05, 0.05}, 0.002, 0, 0), "torus3/"+lat+"/60x60/σ0.2%")
		// Missing and spurious sites, some through a written file.
		for _, pert := range []struct{ missing, extra float64 }{{0.02, 0}, {0.05, 0.02}} {
			tag := fmt.Sprintf("%s/40x40/σ1%%/missing%g%%/extra%g%%", lat, 100*pert.missing, 100*pert.extra)
			c := plate(lat, 40, [][]float64{q1}, []float64{0.08}, 0.01, pert.missing, pert.extra)
			c.ThroughFile = true
			add(c, "circle/"+tag)
			c = plate(lat, 40, [][]float64{q1, q2}, []float64{0.06, 0.06}, 0.01, pert.missing, pert.extra)
			add(c, "torus/"+tag)
			c = plate(lat, 40, nil, nil, 0.01, pert.missing, pert.extra)
			c.ThroughFile = true
			add(c, "point/"+tag)
		}
	}
	if !cfg.Quick {
		// The largest plates.
		add(plate(design.LatticeSquare, 200, [][]float64{q1, q2}, []float64{0.06, 0.06}, 0.01, 0.02, 0.01), "torus/square/200x200/σ1%/missing2%/extra1%")
		add(plate(design.LatticeHex, 200, [][]float64{q1}, []float64{0.08}, 0.05, 0, 0), "circle/hex/200x200/σ5%")
	}
	// Poisson and hard-disk sets: disordered (or unresolved), never a
	// hull with angles.
	for _, set := range []string{poissonSet, hardDiskSet} {
		for _, side := range []int{20, 60} {
			c := Case{Spec: design.Spec{Sites: side}, Points: set, Class: disordered}
			add(c, fmt.Sprintf("disordered/%s/%dx%d", set, side, side))
		}
	}
	return cases
}

func fill(n int, v float64) []float64 {
	out := make([]float64, n)
	for i := range out {
		out[i] = v
	}
	return out
}

// supercellIndex returns the index of the period lattice {n ∈ Z² : A·n ∈
// Z^d} of a rational A (denominators up to 12), counted as Q² over the
// number of n in [0, Q)² with A·n integral (the period lattice contains
// QZ², Q the common denominator); ok is false for an A with an entry of
// no such denominator (an irrational one).
func supercellIndex(A [][]float64) (int, bool) {
	if len(A) == 0 {
		return 1, false
	}
	const maxDen = 12
	Q := 1
	for _, row := range A {
		for _, v := range row {
			den := 0
			for q := 1; q <= maxDen; q++ {
				if x := v * float64(q); math.Abs(x-math.Round(x)) < 1e-9 {
					den = q
					break
				}
			}
			if den == 0 {
				return 0, false
			}
			Q = lcm(Q, den)
		}
	}
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
	return Q * Q / kernel, true
}

func lcm(a, b int) int {
	g, h := a, b
	for h != 0 {
		g, h = h, g%h
	}
	return a / g * b
}

// disorderedSet returns side² points of a Poisson set (uniform in the
// square of side side) or of a hard-disk set (random sequential addition
// of disks of diameter 0.8 at density 1, tries bounded), seeded.
func disorderedSet(kind string, side int, seed uint64) [][2]float64 {
	rng := rand.New(rand.NewPCG(seed, 11))
	n := side * side
	L := float64(side)
	var pts [][2]float64
	if kind == poissonSet {
		for range n {
			pts = append(pts, [2]float64{L * rng.Float64(), L * rng.Float64()})
		}
		return pts
	}
	const d = 0.8
	grid := map[[2]int][]int{}
	cell := func(p [2]float64) [2]int { return [2]int{int(p[0] / d), int(p[1] / d)} }
	for tries := 0; len(pts) < n && tries < 200*n; tries++ {
		p := [2]float64{L * rng.Float64(), L * rng.Float64()}
		c, ok := cell(p), true
		for dx := -1; dx <= 1 && ok; dx++ {
			for dy := -1; dy <= 1 && ok; dy++ {
				for _, j := range grid[[2]int{c[0] + dx, c[1] + dy}] {
					if math.Hypot(pts[j][0]-p[0], pts[j][1]-p[1]) < d {
						ok = false
						break
					}
				}
			}
		}
		if ok {
			grid[c] = append(grid[c], len(pts))
			pts = append(pts, p)
		}
	}
	return pts
}

// planeOf builds the plane of a case: generated, or a disordered set; a
// ThroughFile case is written with pattern.WritePlane and read back with
// pattern.ReadSites.
func planeOf(c Case, seed uint64) (*pattern.Plane, error) {
	var p *pattern.Plane
	var err error
	if c.Points != "" {
		p, err = pattern.NewPlane(disorderedSet(c.Points, c.Spec.Sites, seed), "um", "generated")
	} else {
		spec := c.Spec
		spec.Seed = seed
		p, err = design.GeneratePlane(spec)
	}
	if err != nil || !c.ThroughFile {
		return p, err
	}
	var buf bytes.Buffer
	if err := pattern.WritePlane(&buf, p, p.Notes); err != nil {
		return nil, err
	}
	s, err := pattern.ReadSites(&buf, c.Name+".csv", pattern.ReadOptions{})
	if err != nil {
		return nil, err
	}
	if s.Plane == nil {
		return nil, errors.New("the written plate was read back as a chain")
	}
	return s.Plane, nil
}

// runPlaneCase generates a plane case, analyses it and compares the result
// with the truth.
func runPlaneCase(c Case, seed uint64) (Outcome, error) {
	s := caseSeed(seed, c.Name)
	p, err := planeOf(c, s)
	if err != nil {
		return Outcome{}, fmt.Errorf("case %s: %w", c.Name, err)
	}
	o := Outcome{Case: c, Sites: p.Len(), Angles: []float64{}}
	ctx := context.Background()
	t0 := time.Now()
	l, err := lattice.Recover(ctx, p, lattice.Options{})
	var r *hull.Result
	if err == nil {
		r, err = hull.AnalyzePlane(ctx, l, hull.Options{Seed: s})
	}
	o.Seconds = time.Since(t0).Seconds()
	switch {
	case errors.Is(err, lattice.ErrNoLattice):
		o.Reported, o.Reason = disordered, err.Error()
		o.assess(nil)
		return o, nil
	case err != nil:
		o.Reported, o.Err = failed, err.Error()
		return o, nil
	}
	o.Reported, o.Period, o.Betti, o.Confidence, o.Reason = r.Hull.Class, r.Hull.Period, r.Hull.Betti, r.Hull.Confidence, r.Hull.Reason
	if o.Components, err = reportedComponents(r.Hull); err != nil {
		return Outcome{}, fmt.Errorf("case %s: %w", c.Name, err)
	}
	o.Barcode = barcodeOf(r)
	if r.Disorder != nil {
		v := r.Disorder.Relative
		o.Residual = &v
	}
	o.assess(nil)
	o.assessPlane(r)
	return o, nil
}

// assessPlane scores what a plane adds: the lattice basis and the
// rotation matrix as a module (see the comment at the top of the file).
func (o *Outcome) assessPlane(r *hull.Result) {
	c := o.Case
	if r.Lattice == nil {
		return
	}
	o.Rotation = r.Rotation
	if c.Points != "" {
		return
	}
	truth := trueBasis(c.Spec)
	M, ok := basisChange(truth, r.Lattice.Basis)
	// A written file keeps every digit (WritePlane writes the shortest
	// form that reads back), so a file needs no rounding slack.
	worst := 0.0
	if ok {
		for i := range 2 {
			want := [2]float64{float64(M[0][i])*truth[0][0] + float64(M[1][i])*truth[1][0], float64(M[0][i])*truth[0][1] + float64(M[1][i])*truth[1][1]}
			for j := range 2 {
				e := math.Abs(r.Lattice.Basis[i][j] - want[j])
				u := r.Lattice.BasisUncertainty[i][j]
				worst = math.Max(worst, e/math.Max(u, 1e-15))
			}
		}
	}
	o.BasisRatio = &worst
	if !ok || worst > wrongAngleFactor {
		o.ConfidentWrong = true
		o.Wrong = fmt.Sprintf("basis %v ± %v is not the true lattice %v (%.3g stated uncertainties)", r.Lattice.Basis, r.Lattice.BasisUncertainty, truth, worst)
		return
	}
	right := o.Reported == c.Class && len(c.Rotation) > 0
	if !right || len(r.Rotation) != len(c.Rotation) {
		if right {
			o.ConfidentWrong = true
			o.Wrong = fmt.Sprintf("%d rows of A reported for a hull of %d", len(r.Rotation), len(c.Rotation))
		}
		return
	}
	// The true A in the reported basis: x = B n = B' n' with B' = B·M
	// gives n = M n', so ψ = A n = (A·M) n'.
	At := make([][]float64, len(c.Rotation))
	for k, row := range c.Rotation {
		At[k] = []float64{row[0]*float64(M[0][0]) + row[1]*float64(M[1][0]), row[0]*float64(M[0][1]) + row[1]*float64(M[1][1])}
	}
	ratio, err := moduleRatio(At, r.Rotation, r.RotationUncertainty)
	var v float64
	for _, row := range r.RotationUncertainty {
		for _, u := range row {
			v += u * u
		}
	}
	u := math.Sqrt(v)
	o.Uncertainty, o.Ratio = &u, &ratio
	e := ratio * u
	o.AngleError = &e
	if err != nil || ratio > wrongAngleFactor {
		o.ConfidentWrong = true
		o.Wrong = fmt.Sprintf("A = %v ± %v is not the module of the true %v (%.3g stated uncertainties)", r.Rotation, r.RotationUncertainty, At, ratio)
	}
}

// trueBasis is the generating basis of a plate spec (spacing 1 when
// unset), rows a1 and a2.
func trueBasis(s design.Spec) [2][2]float64 {
	a := s.Spacing
	if a == 0 {
		a = 1
	}
	if s.Lattice == design.LatticeHex {
		return [2][2]float64{{a, 0}, {a / 2, a * math.Sqrt(3) / 2}}
	}
	return [2][2]float64{{a, 0}, {0, a}}
}

// basisChange returns the integer matrix M with reported column i =
// Σ_k M[k][i]·true_k (rounded), and whether it is unimodular.
func basisChange(truth, got [2][2]float64) ([2][2]int, bool) {
	det := truth[0][0]*truth[1][1] - truth[0][1]*truth[1][0]
	var M [2][2]int
	for i := range 2 {
		// Solve got_i = m0·t0 + m1·t1.
		m0 := (got[i][0]*truth[1][1] - got[i][1]*truth[1][0]) / det
		m1 := (truth[0][0]*got[i][1] - truth[0][1]*got[i][0]) / det
		M[0][i], M[1][i] = int(math.Round(m0)), int(math.Round(m1))
	}
	d := M[0][0]*M[1][1] - M[0][1]*M[1][0]
	return M, d == 1 || d == -1
}

// maxModuleCoeff bounds the integer coefficients moduleRatio tries.
const maxModuleCoeff = 2

// moduleRatio returns how many stated uncertainties separate the modules
// of the true rows T and the reported rows R (uncertainties U), both
// modulo Z²: the largest, over the true rows, of the smallest distance to
// a combination Σ c_k R_k (|c_k| ≤ maxModuleCoeff, not all zero), in
// units of that combination's uncertainty √(Σ c_k² U_kj²), and over the
// reported rows, of the smallest distance to a combination of the true
// rows, in units of the row's own uncertainty. An error when R has no
// uncertainty.
func moduleRatio(T, R, U [][]float64) (float64, error) {
	d := len(R)
	for _, row := range U {
		for _, u := range row {
			if !(u > 0) {
				return math.Inf(1), errors.New("a zero or missing uncertainty")
			}
		}
	}
	coeffs := combos(d)
	worst := 0.0
	for _, t := range T {
		best := math.Inf(1)
		for _, c := range coeffs {
			q := 0.0
			for j := range 2 {
				var s, v float64
				for k := range d {
					s += float64(c[k]) * R[k][j]
					v += float64(c[k]*c[k]) * U[k][j] * U[k][j]
				}
				q = math.Max(q, math.Abs(wrapZ(s-t[j]))/math.Sqrt(v))
			}
			best = math.Min(best, q)
		}
		worst = math.Max(worst, best)
	}
	for k, rrow := range R {
		best := math.Inf(1)
		for _, c := range combos(len(T)) {
			q := 0.0
			for j := range 2 {
				var s float64
				for i := range T {
					s += float64(c[i]) * T[i][j]
				}
				q = math.Max(q, math.Abs(wrapZ(s-rrow[j]))/U[k][j])
			}
			best = math.Min(best, q)
		}
		worst = math.Max(worst, best)
	}
	return worst, nil
}

// combos lists the integer vectors of length d with entries in
// [−maxModuleCoeff, maxModuleCoeff], not all zero.
func combos(d int) [][]int {
	var out [][]int
	c := make([]int, d)
	var walk func(i int)
	walk = func(i int) {
		if i == d {
			for _, v := range c {
				if v != 0 {
					out = append(out, append([]int(nil), c...))
					return
				}
			}
			return
		}
		for v := -maxModuleCoeff; v <= maxModuleCoeff; v++ {
			c[i] = v
			walk(i + 1)
		}
	}
	walk(0)
	return out
}

// wrapZ folds x into [−½, ½).
func wrapZ(x float64) float64 { return x - math.Floor(x+0.5) }
