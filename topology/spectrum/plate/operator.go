package plate

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"

	"phasonhull/pattern/lattice"
	"phasonhull/topology/spectrum"
)

// Potential is the on-site term V(ψ_n) = Σ_k 2λ_k·cos 2πψ_k of the phase
// field ψ_n = ψ0 + A·n (mod 1) on a d-torus, n the lattice index of a site.
type Potential struct {
	// Rotation is A, d rows of 2 numbers, in turns per lattice step.
	Rotation [][]float64
	// Phase is ψ0, d numbers in turns (nil: zeros).
	Phase []float64
	// Lambda holds λ_k, one per row of Rotation.
	Lambda []float64
}

// At returns V at lattice index n.
func (p Potential) At(n [2]int) float64 {
	v := 0.0
	for k, row := range p.Rotation {
		u := row[0]*float64(n[0]) + row[1]*float64(n[1])
		if p.Phase != nil {
			u += p.Phase[k]
		}
		v += 2 * p.Lambda[k] * math.Cos(2*math.Pi*(u-math.Floor(u)))
	}
	return v
}

// OnSite are the diagonal terms; the three parts add.
type OnSite struct {
	Constant float64
	// Values, when not nil, holds one term per site of the plane, in the
	// plane's order (off-lattice sites included, and ignored).
	Values []float64
	// Potential adds V(ψ_n).
	Potential Potential
}

// Model says how to build an Operator on a plane of sites.
type Model struct {
	// Kind is spectrum.Hopping (the default, "") or spectrum.Springs.
	Kind spectrum.Kind
	// Law gives the coupling from the length of a bond, with the mean
	// length of the nearest-neighbour bonds as its mean spacing d̄; nil
	// means spectrum.Exp{T0: 1} (every coupling 1).
	Law spectrum.Law
	// Cutoff, when positive, joins every pair of sites closer than Cutoff
	// (in the plane's unit) instead of the nearest lattice neighbours.
	Cutoff float64
	// OnSite are the diagonal terms.
	OnSite OnSite
	// Flux is the magnetic flux through each lattice cell a1×a2 (hopping
	// only).
	Flux Flux
	// Ends is spectrum.Open (the default, "") or spectrum.Periodic.
	Ends spectrum.Ends
	// Strip, when set, makes the sample a strip: open along a1 and
	// periodic along a2 (Ends is then ignored), with a site on every
	// lattice point of the box.
	Strip bool
	// Seam is the phase, in turns, that a state picks up going once round
	// a strip (a twisted boundary condition, a momentum Seam/L2 along the
	// strip); Strip only.
	Seam float64
}

// Operator is a sparse Hermitian matrix on the on-lattice sites of a plane,
// held as compressed rows with int32 column indices. It is immutable once
// built.
type Operator struct {
	kind  spectrum.Kind
	ends  spectrum.Ends
	sites []int    // plane index of each row
	index [][2]int // lattice index of each row
	diag  []float64
	// Off-diagonal entries of row i: col[ptr[i]:ptr[i+1]], val[...].
	ptr      []int
	col      []int32
	val      []complex128
	real     bool
	box      [2]int
	boundary int
}

// step is a lattice vector joining two sites, in lattice coordinates.
type step [2]int

// New builds the operator of model m on the sites of a plane whose average
// lattice is l; points are the plane's sites, in the order of l's entries.
// Off-lattice sites are left out (the operator has a row per on-lattice
// site, in the plane's order).
//
// Bonds join the nearest lattice neighbours: the sites at ±a1, ±a2 and, on
// a lattice whose a1 − a2 or a1 + a2 is as short as a2 (within 10^-3, a
// hexagonal lattice), along it too; with Cutoff, every pair of sites closer
// than Cutoff. A bond's coupling follows from its length by the Law, at the
// mean length of the nearest-neighbour bonds.
//
// Periodic ends join the L1×L2 box of lattice indices the sites span into
// a torus; every lattice point of the box must carry a site.
//
// The flux enters by Peierls phases in the Landau gauge A = α·n1·dn2 in
// lattice coordinates: the bond from index n to index m = n + s (its
// lattice step s; across a periodic seam the unwrapped one) carries
// exp(2πi·α·s2·(n1 + m1)/2), n1 counted from the box's first column, so
// that the phases around each cell a1×a2 add up to α (each triangle of a
// hexagonal lattice holds α/2). The matrix entry for a hop from site n to
// m is −t·exp(2πi·α·s2·(n1 + m1)/2).
func New(l *lattice.Lattice, points [][2]float64, m Model) (*Operator, error) {
	if l == nil {
		return nil, errors.New("plate: no lattice")
	}
	if len(points) != len(l.Index) || len(l.OnLattice) != len(l.Index) {
		return nil, fmt.Errorf("plate: %d points for a lattice of %d sites", len(points), len(l.Index))
	}
	m = m.withDefaults()
	if err := m.check(len(points)); err != nil {
		return nil, fmt.Errorf("plate: %w", err)
	}
	op := &Operator{kind: m.Kind, ends: m.Ends}
	row := map[[2]int]int32{}
	lo, hi := [2]int{math.MaxInt, math.MaxInt}, [2]int{math.MinInt, math.MinInt}
	for i, on := range l.OnLattice {
		if !on {
			continue
		}
		n := l.Index[i]
		if _, dup := row[n]; dup {
			return nil, fmt.Errorf("plate: sites %d and another share lattice index (%d, %d)", i+1, n[0], n[1])
		}
		row[n] = int32(len(op.sites))
		op.sites = append(op.sites, i)
		op.index = append(op.index, n)
		for k := range 2 {
			lo[k], hi[k] = min(lo[k], n[k]), max(hi[k], n[k])
		}
	}
	N := len(op.sites)
	if N < 2 {
		return nil, fmt.Errorf("plate: %d on-lattice sites: need at least 2", N)
	}
	if N > math.MaxInt32 {
		return nil, fmt.Errorf("plate: %d sites: at most %d", N, math.MaxInt32)
	}
	op.box = [2]int{hi[0] - lo[0] + 1, hi[1] - lo[1] + 1}
	periodic := m.Ends == spectrum.Periodic || m.Strip
	// wraps says along which axes the box closes.
	wraps := [2]bool{periodic && !m.Strip, periodic}
	if periodic {
		if N != op.box[0]*op.box[1] {
			return nil, fmt.Errorf("plate: periodic ends need a site on every lattice point of the %d×%d box the sites span; %d of them carry none",
				op.box[0], op.box[1], op.box[0]*op.box[1]-N)
		}
		if err := m.Flux.periodicOver(op.box[0]); err != nil && !m.Strip {
			return nil, fmt.Errorf("plate: %w", err)
		}
	}
	B := l.Basis
	vec := func(s step) [2]float64 {
		return [2]float64{float64(s[0])*B[0][0] + float64(s[1])*B[1][0], float64(s[0])*B[0][1] + float64(s[1])*B[1][1]}
	}
	// The steps a bond may take, half of them (the other half is the same
	// bond seen from its other end).
	steps, err := bondSteps(B, m.Cutoff, l, op.box, wraps)
	if err != nil {
		return nil, fmt.Errorf("plate: %w", err)
	}
	// wrap returns the row at index n + s and the unwrapped step's
	// correction, or false when there is no site there.
	wrap := func(n [2]int, s step) (int32, bool) {
		t := [2]int{n[0] + s[0], n[1] + s[1]}
		for k := range 2 {
			if wraps[k] {
				t[k] = lo[k] + mod(t[k]-lo[k], op.box[k])
			}
		}
		j, ok := row[t]
		return j, ok
	}
	type bond struct {
		i, j int32
		s    step
		d    float64
		w    int // turns round a strip from i to the unwrapped j
	}
	var bonds []bond
	nnSum, nnCount := 0.0, 0
	for i, n := range op.index {
		xi := points[op.sites[i]]
		for _, s := range steps {
			j, ok := wrap(n, s)
			if !ok || int(j) == i {
				continue
			}
			xj := points[op.sites[j]]
			// The bond vector: the sites' difference, corrected across a
			// periodic seam by the lattice vector the wrap removed.
			w := [2]int{n[0] + s[0] - op.index[j][0], n[1] + s[1] - op.index[j][1]}
			c := vec(step(w))
			d := math.Hypot(xj[0]-xi[0]+c[0], xj[1]-xi[1]+c[1])
			if m.Cutoff > 0 && d >= m.Cutoff {
				continue
			}
			bonds = append(bonds, bond{int32(i), j, s, d, w[1] / op.box[1]})
			if isNearest(s, B) {
				nnSum += d
				nnCount++
			}
		}
	}
	if nnCount == 0 {
		return nil, errors.New("plate: no two sites are nearest lattice neighbours")
	}
	mean := nnSum / float64(nnCount)
	op.diag = make([]float64, N)
	for i, n := range op.index {
		v := m.OnSite.Constant
		if m.OnSite.Values != nil {
			v += m.OnSite.Values[op.sites[i]]
		}
		if len(m.OnSite.Potential.Rotation) > 0 {
			v += m.OnSite.Potential.At(n)
		}
		op.diag[i] = v
	}
	alpha := m.Flux.Float()
	deg := make([]int, N)
	for _, b := range bonds {
		deg[b.i]++
		deg[b.j]++
	}
	op.ptr = make([]int, N+1)
	for i := range N {
		op.ptr[i+1] = op.ptr[i] + deg[i]
	}
	op.col = make([]int32, op.ptr[N])
	op.val = make([]complex128, op.ptr[N])
	fill := append([]int(nil), op.ptr[:N]...)
	op.real = true
	for _, b := range bonds {
		t, err := m.Law.Coupling(b.d, mean)
		switch {
		case err != nil:
			return nil, fmt.Errorf("plate: bond %d–%d: %w", op.sites[b.i]+1, op.sites[b.j]+1, err)
		case math.IsNaN(t) || math.IsInf(t, 0):
			return nil, fmt.Errorf("plate: bond %d–%d (length %.6g): the law gives %v", op.sites[b.i]+1, op.sites[b.j]+1, b.d, t)
		case m.Kind == spectrum.Springs && t <= 0:
			return nil, fmt.Errorf("plate: bond %d–%d (length %.6g): spring constant %.6g must be positive", op.sites[b.i]+1, op.sites[b.j]+1, b.d, t)
		}
		v := complex(-t, 0)
		if m.Strip && m.Seam != 0 && b.w != 0 {
			// Across the seam: the unwrapped site is b.w turns of the strip
			// away, and the state there carries exp(2πi·Seam·b.w).
			v *= cmplx.Exp(complex(0, 2*math.Pi*m.Seam*float64(b.w)))
			op.real = false
		}
		if alpha != 0 {
			n1 := float64(op.index[b.i][0] - lo[0])
			ph := alpha * float64(b.s[1]) * (2*n1 + float64(b.s[0])) / 2
			ph -= math.Floor(ph) // keep the digits of a large phase
			v *= cmplx.Exp(complex(0, 2*math.Pi*ph))
			if imag(v) != 0 {
				op.real = false
			}
		}
		if m.Kind == spectrum.Springs {
			op.diag[b.i] += t
			op.diag[b.j] += t
		}
		// v is ⟨j|H|i⟩, the hop from i to j; ⟨i|H|j⟩ is its conjugate.
		op.col[fill[b.j]], op.val[fill[b.j]] = b.i, v
		fill[b.j]++
		op.col[fill[b.i]], op.val[fill[b.i]] = b.j, cmplx.Conj(v)
		fill[b.i]++
	}
	op.boundary = boundarySites(op, m, deg, periodic && !m.Strip, lo)
	return op, nil
}

// boundarySites counts the sites where the sample's count of levels can
// differ from the infinite pattern's: on open ends the sites with fewer
// bonds than the most any site has; on periodic ends the sites on the
// seam when the on-site terms need not repeat across it (values or a
// potential), else none.
func boundarySites(op *Operator, m Model, deg []int, periodic bool, lo [2]int) int {
	c := 0
	if !periodic {
		most := 0
		for _, d := range deg {
			most = max(most, d)
		}
		for _, d := range deg {
			if d < most {
				c++
			}
		}
		return c
	}
	if m.OnSite.Values == nil && len(m.OnSite.Potential.Rotation) == 0 {
		return 0
	}
	for _, n := range op.index {
		if n[0] == lo[0] || n[1] == lo[1] {
			c++
		}
	}
	return c
}

// nearTol is the relative tolerance within which a1 ± a2 counts as long
// as a2 (a hexagonal lattice).
const nearTol = 1e-3

// isNearest reports whether s is a nearest-neighbour step: ±a1, ±a2, and
// a1 ± a2 when it is as long as a2.
func isNearest(s step, B [2][2]float64) bool {
	a := [2]int{abs(s[0]), abs(s[1])}
	switch {
	case a == [2]int{1, 0} || a == [2]int{0, 1}:
		return true
	case a == [2]int{1, 1}:
		l2 := math.Hypot(B[1][0], B[1][1])
		v := math.Hypot(float64(s[0])*B[0][0]+float64(s[1])*B[1][0], float64(s[0])*B[0][1]+float64(s[1])*B[1][1])
		return math.Abs(v-l2) <= nearTol*l2
	}
	return false
}

// bondSteps returns one of each pair ±s of the steps bonds may take: the
// nearest-neighbour steps, or with a cutoff every lattice step short
// enough for two displaced sites to lie closer than it.
func bondSteps(B [2][2]float64, cutoff float64, l *lattice.Lattice, box [2]int, wraps [2]bool) ([]step, error) {
	positive := func(s step) bool { return s[0] > 0 || (s[0] == 0 && s[1] > 0) }
	if cutoff <= 0 {
		var out []step
		for _, s := range []step{{1, 0}, {0, 1}, {1, 1}, {1, -1}} {
			if isNearest(s, B) {
				out = append(out, s)
			}
		}
		return out, nil
	}
	umax := 0.0
	for i, u := range l.Displacement {
		if l.OnLattice[i] {
			umax = max(umax, math.Hypot(u[0], u[1]))
		}
	}
	reach := cutoff + 2*umax
	// |s·B| ≥ σmin·|s|, σmin the smaller singular value of B.
	a, b, c := B[0][0]*B[0][0]+B[0][1]*B[0][1], B[0][0]*B[1][0]+B[0][1]*B[1][1], B[1][0]*B[1][0]+B[1][1]*B[1][1]
	smin := math.Sqrt(max(0, (a+c)/2-math.Sqrt((a-c)*(a-c)/4+b*b)))
	if smin <= 0 {
		return nil, errors.New("the lattice basis is degenerate")
	}
	r := int(math.Ceil(reach / smin))
	if (wraps[0] && 2*r >= box[0]) || (wraps[1] && 2*r >= box[1]) {
		return nil, fmt.Errorf("cutoff %.6g reaches %d lattice steps, half the periodic %d×%d box or more: a bond would wrap onto itself", cutoff, r, box[0], box[1])
	}
	var out []step
	for i := -r; i <= r; i++ {
		for j := -r; j <= r; j++ {
			s := step{i, j}
			if !positive(s) {
				continue
			}
			v := math.Hypot(float64(i)*B[0][0]+float64(j)*B[1][0], float64(i)*B[0][1]+float64(j)*B[1][1])
			if v < reach {
				out = append(out, s)
			}
		}
	}
	return out, nil
}

func (m Model) withDefaults() Model {
	if m.Kind == "" {
		m.Kind = spectrum.Hopping
	}
	if m.Ends == "" {
		m.Ends = spectrum.Open
	}
	if m.Law == nil {
		m.Law = spectrum.Exp{T0: 1}
	}
	return m
}

// check refuses models that cannot be built on a plane of n sites.
func (m Model) check(n int) error {
	switch m.Kind {
	case spectrum.Hopping, spectrum.Springs:
	default:
		return fmt.Errorf("model %q: want %s or %s", m.Kind, spectrum.Hopping, spectrum.Springs)
	}
	switch m.Ends {
	case spectrum.Open, spectrum.Periodic:
	default:
		return fmt.Errorf("ends %q: want %s or %s", m.Ends, spectrum.Open, spectrum.Periodic)
	}
	if math.IsNaN(m.Cutoff) || math.IsInf(m.Cutoff, 0) || m.Cutoff < 0 {
		return fmt.Errorf("cutoff %v: must be positive (0: nearest lattice neighbours)", m.Cutoff)
	}
	if a := m.Flux.Float(); math.IsNaN(a) || math.IsInf(a, 0) {
		return fmt.Errorf("flux %v: not a finite number", a)
	}
	if !m.Flux.IsZero() && m.Kind != spectrum.Hopping {
		return fmt.Errorf("a flux needs the %s model, not %s", spectrum.Hopping, m.Kind)
	}
	o := m.OnSite
	if math.IsNaN(o.Constant) || math.IsInf(o.Constant, 0) {
		return fmt.Errorf("on-site constant %v: not a finite number", o.Constant)
	}
	if o.Values != nil {
		if len(o.Values) != n {
			return fmt.Errorf("on-site values: %d given for %d sites", len(o.Values), n)
		}
		for i, v := range o.Values {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return fmt.Errorf("on-site value of site %d: %v is not a finite number", i+1, v)
			}
		}
	}
	p := o.Potential
	d := len(p.Rotation)
	if len(p.Lambda) != d || (p.Phase != nil && len(p.Phase) != d) {
		return fmt.Errorf("potential: %d rows of the rotation, %d λ and %d phases: want one each per row", d, len(p.Lambda), len(p.Phase))
	}
	for k, row := range p.Rotation {
		vals := append([]float64{p.Lambda[k]}, row...)
		if p.Phase != nil {
			vals = append(vals, p.Phase[k])
		}
		for _, v := range vals {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return fmt.Errorf("potential row %d: %v is not a finite number", k+1, v)
			}
		}
		if len(row) != 2 {
			return fmt.Errorf("potential row %d of the rotation: %d numbers, want 2", k+1, len(row))
		}
	}
	return nil
}

// Len returns the number of rows: the on-lattice sites.
func (op *Operator) Len() int { return len(op.diag) }

// Site returns the plane index of row i.
func (op *Operator) Site(i int) int { return op.sites[i] }

// Index returns the lattice index of row i.
func (op *Operator) Index(i int) [2]int { return op.index[i] }

// Kind returns the model the operator stands for.
func (op *Operator) Kind() spectrum.Kind { return op.kind }

// Ends returns how the sample ends.
func (op *Operator) Ends() spectrum.Ends { return op.ends }

// Box returns the number of lattice cells L1, L2 the sites span along a1
// and a2.
func (op *Operator) Box() [2]int { return op.box }

// Bonds returns the number of bonds (nonzero entries above the diagonal).
func (op *Operator) Bonds() int { return len(op.col) / 2 }

// Real reports whether every entry is real (no flux, or a flux whose
// phases are all ±1).
func (op *Operator) Real() bool { return op.real }

// Boundary returns the number of sites where a finite sample's count of
// levels below a gap may depart from the infinite pattern's: the sites of
// an open edge (fewer bonds than in the bulk), or the seam of periodic
// ends when the on-site terms need not repeat across it. Boundary()/Len()
// bounds the finite-size error of an IDS.
func (op *Operator) Boundary() int { return op.boundary }

// At returns the matrix entry H[i][j].
func (op *Operator) At(i, j int) complex128 {
	if i == j {
		return complex(op.diag[i], 0)
	}
	var v complex128
	for k := op.ptr[i]; k < op.ptr[i+1]; k++ {
		if int(op.col[k]) == j {
			v += op.val[k]
		}
	}
	return v
}

// MulVec sets dst = H·src.
func (op *Operator) MulVec(dst, src []complex128) {
	for i, d := range op.diag {
		s := complex(d, 0) * src[i]
		for k := op.ptr[i]; k < op.ptr[i+1]; k++ {
			s += op.val[k] * src[op.col[k]]
		}
		dst[i] = s
	}
}

// Bounds returns an interval holding every eigenvalue (Gershgorin's
// discs), widened by rounding.
func (op *Operator) Bounds() (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	scale := 0.0
	for i, d := range op.diag {
		r := 0.0
		for k := op.ptr[i]; k < op.ptr[i+1]; k++ {
			r += cmplx.Abs(op.val[k])
		}
		lo, hi = min(lo, d-r), max(hi, d+r)
		scale = max(scale, math.Abs(d)+r)
	}
	pad := 1e-12 * max(scale, 1)
	return lo - pad, hi + pad
}

func mod(a, b int) int {
	r := a % b
	if r < 0 {
		r += b
	}
	return r
}

func abs(v int) int {
	if v < 0 {
		return -v
	}
	return v
}
