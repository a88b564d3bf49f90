package spectrum

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"

	"phasonhull/pattern"
)

// Kind is the physical model an Operator stands for.
type Kind string

// The models.
const (
	// Hopping is the tight-binding matrix
	//
	//	H = Σ_n ε_n |n⟩⟨n| − Σ_bonds t (|n⟩⟨m| + |m⟩⟨n|),
	//
	// with the minus sign: a positive hopping t lowers the energy of the
	// bonding state, and a uniform chain's band is ε − 2t cos k. Its
	// eigenvalues are energies.
	Hopping Kind = "hopping"
	// Springs is the dynamical matrix of unit masses joined by springs,
	//
	//	D = Σ_n ε_n |n⟩⟨n| + Σ_bonds k (|n⟩ − |m⟩)(⟨n| − ⟨m|),
	//
	// with the spring constants k given by the coupling law and the
	// on-site terms ε_n read as springs to ground. Its eigenvalues are the
	// squared angular frequencies ω²; free ends (open) hold the zero mode
	// of rigid translation.
	Springs Kind = "springs"
)

// Ends says how the chain ends.
type Ends string

// The ends.
const (
	// Open: the first and the last site have neighbours on one side only.
	Open Ends = "open"
	// Periodic: the last site is joined to the first across a closing
	// spacing, Model.Closing or, when that is 0, the mean spacing; the
	// next-nearest bonds across the seam use it too.
	Periodic Ends = "periodic"
)

// OnSite are the diagonal terms of an Operator; the three parts add.
type OnSite struct {
	// Constant is added on every site.
	Constant float64
	// Values, when not nil, holds one term per site.
	Values []float64
	// Lambda, Theta and Phase add the almost-Mathieu term
	// 2λ·cos 2π(nθ + φ) on site n = 0, 1, ... (Theta and Phase in turns);
	// Lambda 0 leaves it out.
	Lambda, Theta, Phase float64
}

// term returns the on-site term of site n.
func (o OnSite) term(n int) float64 {
	v := o.Constant
	if o.Values != nil {
		v += o.Values[n]
	}
	if o.Lambda != 0 {
		// Reduce nθ + φ to a fraction of a turn before the cosine, so
		// that large n keep their digits.
		u := float64(n)*o.Theta + o.Phase
		v += 2 * o.Lambda * math.Cos(2*math.Pi*(u-math.Floor(u)))
	}
	return v
}

// Model says how to build an Operator on a pattern.
type Model struct {
	// Kind is Hopping (the default, "") or Springs.
	Kind Kind
	// Law gives the nearest-neighbour coupling from the spacing; nil
	// means Exp{T0: 1} (every coupling 1).
	Law Law
	// NNN is the ratio of the next-nearest coupling: the bond between
	// sites n and n+2 carries NNN·Law((d_n + d_{n+1})/2), the ratio to the
	// nearest-neighbour law at the mean of the two spacings it spans.
	// 0 leaves next-nearest bonds out (a tridiagonal operator).
	NNN float64
	// OnSite are the diagonal terms.
	OnSite OnSite
	// Ends is Open (the default, "") or Periodic.
	Ends Ends
	// Closing is the spacing that closes a periodic chain; 0 means the
	// pattern's mean spacing. It must be 0 for open ends.
	Closing float64
}

// Operator is a real symmetric matrix on the sites of a chain, banded
// (nearest or next-nearest neighbours) with the corner terms of a periodic
// chain. It is immutable once built.
type Operator struct {
	kind Kind
	ends Ends
	diag []float64
	// off[k−1][n] = H[n][n+k], n = 0..N−1−k: the bonds of range k.
	off [][]float64
	// wrap[k−1][j] = H[N−k+j][j], j = 0..k−1: the bonds of range k that
	// cross the seam of a periodic chain (nil for open ends).
	wrap [][]float64
	// scale bounds |H|: the largest Gershgorin radius plus |diagonal|.
	scale float64
	// near2[n] = H[n][n+1]², and piv the pivot safeguard, for the Sturm
	// count of a nearest-neighbour operator.
	near2 []float64
	piv   float64
}

// New builds the operator of model m on the sites of p.
func New(p *pattern.Pattern, m Model) (*Operator, error) {
	if p == nil {
		return nil, errors.New("spectrum: no pattern")
	}
	if err := m.check(p.Len()); err != nil {
		return nil, fmt.Errorf("spectrum: %w", err)
	}
	m = m.withDefaults()
	n := p.Len()
	mean := p.MeanSpacing()
	d := p.Spacings()
	if m.Ends == Periodic {
		c := m.Closing
		if c == 0 {
			c = mean
		}
		d = append(d, c) // d[N−1] closes the ring
	}
	// spanned returns the distance from site i to site i+k along the
	// chain, wrapping across the closing spacing of a ring.
	spanned := func(i, k int) float64 {
		s := 0.0
		for j := range k {
			s += d[(i+j)%n]
		}
		return s
	}
	coupling := func(i, k int) (float64, error) {
		dist := spanned(i, k)
		var t float64
		var err error
		if k == 1 {
			t, err = m.Law.Coupling(dist, mean)
		} else {
			t, err = m.Law.Coupling(dist/2, mean)
			t *= m.NNN
		}
		switch {
		case err != nil:
			return 0, fmt.Errorf("bond %d–%d: %w", i+1, (i+k)%n+1, err)
		case math.IsNaN(t) || math.IsInf(t, 0):
			return 0, fmt.Errorf("bond %d–%d (distance %.6g): the law gives %v", i+1, (i+k)%n+1, dist, t)
		case m.Kind == Springs && t <= 0:
			return 0, fmt.Errorf("bond %d–%d (distance %.6g): spring constant %.6g must be positive", i+1, (i+k)%n+1, dist, t)
		}
		return t, nil
	}
	bw := 1
	if m.NNN != 0 {
		bw = 2
	}
	op := &Operator{kind: m.Kind, ends: m.Ends, diag: make([]float64, n), off: make([][]float64, bw)}
	for i := range op.diag {
		op.diag[i] = m.OnSite.term(i)
	}
	// bond adds the coupling t between sites i and j to the matrix:
	// −t off the diagonal; for springs also +t on both diagonals.
	bond := func(i, j int, t float64) float64 {
		if m.Kind == Springs {
			op.diag[i] += t
			op.diag[j] += t
		}
		return -t
	}
	for k := 1; k <= bw; k++ {
		op.off[k-1] = make([]float64, n-k)
		for i := 0; i+k < n; i++ {
			t, err := coupling(i, k)
			if err != nil {
				return nil, fmt.Errorf("spectrum: %w", err)
			}
			op.off[k-1][i] = bond(i, i+k, t)
		}
	}
	if m.Ends == Periodic {
		op.wrap = make([][]float64, bw)
		for k := 1; k <= bw; k++ {
			op.wrap[k-1] = make([]float64, k)
			for j := range k {
				i := n - k + j // the bond from site i to site j = i+k−N
				t, err := coupling(i, k)
				if err != nil {
					return nil, fmt.Errorf("spectrum: %w", err)
				}
				op.wrap[k-1][j] = bond(i, j, t)
			}
		}
	}
	for i := range n {
		r := math.Abs(op.diag[i])
		op.forRow(i, func(_ int, v float64) { r += math.Abs(v) })
		op.scale = max(op.scale, r)
	}
	if op.scale == 0 {
		op.scale = 1
	}
	op.prepare()
	return op, nil
}

// prepare fills in what the counts need from the matrix entries.
func (op *Operator) prepare() {
	op.near2 = make([]float64, len(op.off[0]))
	for i, b := range op.off[0] {
		op.near2[i] = b * b
	}
	op.piv = pivmin(op.near2)
}

func (m Model) withDefaults() Model {
	if m.Kind == "" {
		m.Kind = Hopping
	}
	if m.Ends == "" {
		m.Ends = Open
	}
	if m.Law == nil {
		m.Law = Exp{T0: 1}
	}
	return m
}

// check refuses models that cannot be built on n sites.
func (m Model) check(n int) error {
	switch m.Kind {
	case "", Hopping, Springs:
	default:
		return fmt.Errorf("model %q: want %s or %s", m.Kind, Hopping, Springs)
	}
	switch m.Ends {
	case "", Open:
		if m.Closing != 0 {
			return fmt.Errorf("closing spacing %g: only a periodic chain has one", m.Closing)
		}
	case Periodic:
		if m.Closing < 0 || math.IsNaN(m.Closing) || math.IsInf(m.Closing, 0) {
			return fmt.Errorf("closing spacing %g: must be positive (0: the mean spacing)", m.Closing)
		}
	default:
		return fmt.Errorf("ends %q: want %s or %s", m.Ends, Open, Periodic)
	}
	o := m.OnSite
	for name, v := range map[string]float64{"next-nearest ratio": m.NNN, "on-site constant": o.Constant,
		"almost-Mathieu λ": o.Lambda, "almost-Mathieu θ": o.Theta, "almost-Mathieu φ": o.Phase} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("%s %v: not a finite number", name, v)
		}
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
	if m.NNN != 0 && n < 5 {
		return fmt.Errorf("next-nearest bonds need at least 5 sites, got %d", n)
	}
	return nil
}

// forRow calls f(j, H[i][j]) for every off-diagonal entry of row i.
func (op *Operator) forRow(i int, f func(j int, v float64)) {
	n := len(op.diag)
	for k, band := range op.off {
		if i-k-1 >= 0 {
			f(i-k-1, band[i-k-1])
		}
		if i < len(band) {
			f(i+k+1, band[i])
		}
	}
	for k, w := range op.wrap {
		r := k + 1
		for j, v := range w {
			switch i {
			case n - r + j:
				f(j, v)
			case j:
				f(n-r+j, v)
			}
		}
	}
}

// Len returns the number of sites.
func (op *Operator) Len() int { return len(op.diag) }

// Kind returns the model the operator stands for.
func (op *Operator) Kind() Kind { return op.kind }

// Ends returns how the chain ends.
func (op *Operator) Ends() Ends { return op.ends }

// Bandwidth returns the range of the longest bond: 1 for nearest
// neighbours (a tridiagonal matrix, with corners when periodic), 2 with
// next-nearest ones.
func (op *Operator) Bandwidth() int { return len(op.off) }

// Diagonal returns a copy of the diagonal.
func (op *Operator) Diagonal() []float64 { return append([]float64(nil), op.diag...) }

// Bond returns the matrix entry H[i][i+k] for k = 1..Bandwidth(), i and
// i+k counted modulo Len() for a periodic chain (0 for an open chain's
// missing bonds).
func (op *Operator) Bond(i, k int) float64 {
	n := len(op.diag)
	if k < 1 || k > len(op.off) || i < 0 || i >= n {
		return 0
	}
	if i+k < n {
		return op.off[k-1][i]
	}
	if op.wrap == nil {
		return 0
	}
	return op.wrap[k-1][i-(n-k)]
}

// Dense returns the operator as a dense symmetric matrix.
func (op *Operator) Dense() *mat.SymDense {
	n := len(op.diag)
	a := mat.NewSymDense(n, nil)
	for i := range n {
		a.SetSym(i, i, op.diag[i])
		op.forRow(i, func(j int, v float64) {
			if j > i {
				a.SetSym(i, j, a.At(i, j)+v)
			}
		})
	}
	return a
}

// Bounds returns an interval holding every eigenvalue (Gershgorin's
// discs).
func (op *Operator) Bounds() (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for i, a := range op.diag {
		r := 0.0
		op.forRow(i, func(_ int, v float64) { r += math.Abs(v) })
		lo, hi = min(lo, a-r), max(hi, a+r)
	}
	// Widen by rounding so that Count(lo) = 0 and Count(hi) = N for sure.
	pad := 1e-12 * op.scale
	return lo - pad, hi + pad
}
