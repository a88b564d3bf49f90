package plate

import (
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"phasonhull/topology/spectrum"
)

// The matrix is Hermitian, and the Peierls phases of the hops around each
// cell multiply to exp(2πiα) — each triangle of a hexagonal lattice to
// exp(πiα) — on open and periodic ends, the seams included (a uniform
// field of flux α per cell; common practice).
func TestPeierlsPhasesGiveFluxPerCell(t *testing.T) {
	const L = 6
	alpha := Rational(2, 3)
	for _, c := range []struct {
		name  string
		basis [2][2]float64
		ends  spectrum.Ends
	}{
		{"square open", square, spectrum.Open},
		{"square periodic", square, spectrum.Periodic},
		{"hex periodic", hex, spectrum.Periodic},
	} {
		t.Run(c.name, func(t *testing.T) {
			pts, l := grid(L, L, c.basis)
			op := build(t, pts, l, Model{Flux: alpha, Ends: c.ends})
			row := map[[2]int]int{}
			for i := range op.Len() {
				row[op.Index(i)] = i
			}
			for i := range op.Len() {
				for j := range op.Len() {
					if a, b := op.At(i, j), cmplx.Conj(op.At(j, i)); cmplx.Abs(a-b) > 1e-14 {
						t.Fatalf("H[%d][%d] = %v, conj H[%d][%d] = %v", i, j, a, j, i, b)
					}
				}
			}
			at := func(n [2]int, s ...[2]int) [2]int {
				for _, d := range s {
					n = [2]int{n[0] + d[0], n[1] + d[1]}
				}
				if c.ends == spectrum.Periodic {
					n = [2]int{mod(n[0], L), mod(n[1], L)}
				}
				return n
			}
			// loop multiplies the hops −⟨b|H|a⟩ along the lattice steps.
			loop := func(n [2]int, steps ...[2]int) (complex128, bool) {
				p := complex(1, 0)
				cur := n
				for _, s := range steps {
					nx := at(cur, s)
					a, okA := row[cur]
					b, okB := row[nx]
					if !okA || !okB {
						return 0, false
					}
					p *= -op.At(b, a)
					cur = nx
				}
				return p, true
			}
			e1, e2 := [2]int{1, 0}, [2]int{0, 1}
			checked := 0
			for n := range row {
				var p complex128
				var ok bool
				want := alpha.Float()
				if c.basis == hex {
					p, ok = loop(n, e1, [2]int{-1, 1}, [2]int{0, -1})
					want /= 2
				} else {
					p, ok = loop(n, e1, e2, [2]int{-1, 0}, [2]int{0, -1})
				}
				if !ok {
					continue
				}
				checked++
				if w := cmplx.Exp(complex(0, 2*math.Pi*want)); cmplx.Abs(p-w) > 1e-12 {
					t.Fatalf("loop from %v: product %v, want exp(2πi·%g) = %v", n, p, want, w)
				}
			}
			if min := (L - 1) * (L - 1); checked < min {
				t.Fatalf("%d loops checked, want at least %d", checked, min)
			}
		})
	}
}

// Bond counts of an open L×L patch (common practice): a square lattice has
// 2L(L−1) nearest-neighbour bonds, a triangular (hexagonal-basis) lattice
// (L−1)(3L−1), and a square lattice with every pair closer than 1.5
// (nearest and diagonal neighbours) 2L(L−1) + 2(L−1)².
func TestBondCounts(t *testing.T) {
	const L = 9
	sq, ls := grid(L, L, square)
	hx, lh := grid(L, L, hex)
	for _, c := range []struct {
		name string
		op   *Operator
		want int
	}{
		{"square", build(t, sq, ls, Model{}), 2 * L * (L - 1)},
		{"hexagonal", build(t, hx, lh, Model{}), (L - 1) * (3*L - 1)},
		{"square, cutoff 1.5", build(t, sq, ls, Model{Cutoff: 1.5}), 2*L*(L-1) + 2*(L-1)*(L-1)},
	} {
		if got := c.op.Bonds(); got != c.want {
			t.Errorf("%s: %d bonds, want %d", c.name, got, c.want)
		}
	}
}

// A bond's coupling follows the law at its length over the mean
// nearest-neighbour bond length; the spring model's matrix annihilates a
// uniform translation (its rows sum to zero; common practice).
func TestLawAndSprings(t *testing.T) {
	pts, l := grid(4, 4, square)
	pts[5][0] += 0.2 // site (1, 1) moves towards (2, 1)
	law := spectrum.Exp{T0: 1, Decay: 2}
	op := build(t, pts, l, Model{Law: law})
	var sum float64
	var n int
	for i := range pts {
		for j := i + 1; j < len(pts); j++ {
			a, b := l.Index[i], l.Index[j]
			if abs(a[0]-b[0])+abs(a[1]-b[1]) == 1 {
				sum += math.Hypot(pts[i][0]-pts[j][0], pts[i][1]-pts[j][1])
				n++
			}
		}
	}
	mean := sum / float64(n)
	for _, j := range []int{9, 4, 6} { // (2, 1), (1, 0), (1, 2)
		d := math.Hypot(pts[5][0]-pts[j][0], pts[5][1]-pts[j][1])
		want, _ := law.Coupling(d, mean)
		if got := op.At(5, j); math.Abs(real(got)+want) > 1e-14 || imag(got) != 0 {
			t.Errorf("bond to site %d (length %.3f): entry %v, want −%.6f", j, d, got, want)
		}
	}
	sp := build(t, pts, l, Model{Kind: spectrum.Springs, Law: law})
	one := make([]complex128, sp.Len())
	out := make([]complex128, sp.Len())
	for i := range one {
		one[i] = 1
	}
	sp.MulVec(out, one)
	for i, v := range out {
		if cmplx.Abs(v) > 1e-12 {
			t.Fatalf("springs: (D·1)[%d] = %v, want 0", i, v)
		}
	}
}

// Refusals say why: a flux p/q on periodic ends needs q | L1; periodic
// ends need every lattice point of the box; a flux needs hopping.
func TestRefusals(t *testing.T) {
	pts, l := grid(10, 9, square)
	for _, c := range []struct {
		name string
		m    Model
		want string
	}{
		{"q does not divide L1", Model{Flux: Rational(1, 3), Ends: spectrum.Periodic}, "multiple of 3"},
		{"decimal flux", Model{Flux: Flux{Value: 0.123}, Ends: spectrum.Periodic}, "integer"},
		{"springs with flux", Model{Kind: spectrum.Springs, Flux: Rational(1, 5)}, "hopping"},
	} {
		_, err := New(l, pts, c.m)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one saying %q", c.name, err, c.want)
		}
	}
	if _, err := New(l, pts, Model{Flux: Rational(2, 5), Ends: spectrum.Periodic}); err != nil {
		t.Errorf("flux 2/5 on a periodic 10×9 box: %v", err)
	}
	l.OnLattice[17] = false
	if _, err := New(l, pts, Model{Ends: spectrum.Periodic}); err == nil || !strings.Contains(err.Error(), "1 of them carry none") {
		t.Errorf("a missing site on periodic ends: error %v", err)
	}
}

func TestParseFlux(t *testing.T) {
	for in, want := range map[string]Flux{"3/11": {P: 3, Q: 11}, " 6/22 ": {P: 3, Q: 11}, "-1/3": {P: -1, Q: 3}, "0.25": {Value: 0.25}} {
		got, err := ParseFlux(in)
		if err != nil || got != want {
			t.Errorf("ParseFlux(%q) = %+v, %v; want %+v", in, got, err, want)
		}
		if back, _ := ParseFlux(got.String()); back != got {
			t.Errorf("%q written as %q reads back as %+v", in, got.String(), back)
		}
	}
	for _, bad := range []string{"1/0", "1/-3", "a/b", "x", "NaN", "1/3/4"} {
		if _, err := ParseFlux(bad); err == nil {
			t.Errorf("ParseFlux(%q) accepted", bad)
		}
	}
}
