package spectrum

import (
	"math"
	"math/rand/v2"
	"slices"
	"sort"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// randomOperator builds an operator with random diagonal, bonds and (for a
// ring) corner terms directly, bypassing New, for property tests.
func randomOperator(rng *rand.Rand, n, bw int, ring bool) *Operator {
	op := &Operator{kind: Hopping, ends: Open, diag: make([]float64, n), off: make([][]float64, bw)}
	for i := range op.diag {
		op.diag[i] = 4*rng.Float64() - 2
	}
	for k := range bw {
		op.off[k] = make([]float64, n-k-1)
		for i := range op.off[k] {
			op.off[k][i] = 2*rng.Float64() - 1
		}
	}
	if ring {
		op.ends = Periodic
		op.wrap = make([][]float64, bw)
		for k := range bw {
			op.wrap[k] = make([]float64, k+1)
			for j := range op.wrap[k] {
				op.wrap[k][j] = 2*rng.Float64() - 1
			}
		}
	}
	for i := range n {
		r := math.Abs(op.diag[i])
		op.forRow(i, func(_ int, v float64) { r += math.Abs(v) })
		op.scale = max(op.scale, r)
	}
	op.prepare()
	return op
}

// denseValues returns the eigenvalues of op's dense matrix by gonum's
// symmetric eigensolver, the reference of these checks.
func denseValues(t *testing.T, op *Operator) []float64 {
	t.Helper()
	var es mat.EigenSym
	if !es.Factorize(op.Dense(), false) {
		t.Fatal("EigenSym did not converge")
	}
	v := es.Values(nil)
	slices.Sort(v)
	return v
}

// Sturm counts equal the number of dense eigenvalues below each energy
// (Sylvester's law of inertia; common practice), on random tridiagonal
// matrices, open and periodic, at random energies and at energies just
// either side of every eigenvalue.
func TestCountMatchesDense(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 0))
	for trial := range 40 {
		n := 8 + rng.IntN(120)
		ring := trial%2 == 1
		op := randomOperator(rng, n, 1, ring)
		want := denseValues(t, op)
		var es []float64
		for range 50 {
			es = append(es, 6*rng.Float64()-3)
		}
		// Either side of each eigenvalue, away from its neighbours.
		for k, v := range want {
			gapL, gapR := math.Inf(1), math.Inf(1)
			if k > 0 {
				gapL = v - want[k-1]
			}
			if k+1 < n {
				gapR = want[k+1] - v
			}
			if d := 1e-7; gapL > 2*d && gapR > 2*d {
				es = append(es, v-d, v+d)
			}
		}
		got := make([]int, len(es))
		op.countMany(es, got)
		for j, e := range es {
			if w := sort.SearchFloat64s(want, e); got[j] != w {
				t.Fatalf("trial %d (n %d, ring %v): count below %.12g = %d, dense eigenvalues give %d", trial, n, ring, e, got[j], w)
			}
		}
	}
}

// At exact symmetric points (zero diagonal, energy 0 hitting a zero pivot)
// the safeguards still give the dense count.
func TestCountZeroPivots(t *testing.T) {
	for _, ring := range []bool{false, true} {
		n := 40
		op := &Operator{kind: Hopping, diag: make([]float64, n), off: [][]float64{make([]float64, n-1)}, scale: 2}
		for i := range op.off[0] {
			op.off[0][i] = -1 - 0.3*float64(i%3)
		}
		op.prepare()
		if ring {
			op.ends, op.wrap = Periodic, [][]float64{{-1.2}}
		}
		want := denseValues(t, op)
		for _, e := range []float64{0, 1e-300, -1e-300, 1, -1} {
			got, err := op.Count(e)
			if err != nil {
				t.Fatal(err)
			}
			// An eigenvalue at e itself may count either way.
			lo, hi := sort.SearchFloat64s(want, e-1e-9), sort.SearchFloat64s(want, e+1e-9)
			if got < lo || got > hi {
				t.Errorf("ring %v: count below %g = %d, dense gives %d..%d", ring, e, got, lo, hi)
			}
		}
	}
}

// Every eigenvalue by each method agrees with the dense solver: the QL
// iteration (open), bisection on ring counts (periodic) and the dense path
// itself (next-nearest bonds) — to 1e-11 of the operator's scale.
func TestEigenvaluesMatchDense(t *testing.T) {
	rng := rand.New(rand.NewPCG(8, 0))
	for _, c := range []struct {
		bw   int
		ring bool
	}{{1, false}, {1, true}, {2, false}, {2, true}} {
		op := randomOperator(rng, 150, c.bw, c.ring)
		want := denseValues(t, op)
		got, err := op.Eigenvalues()
		if err != nil {
			t.Fatal(err)
		}
		for k := range want {
			if math.Abs(got[k]-want[k]) > 1e-11*op.scale {
				t.Fatalf("bandwidth %d ring %v: eigenvalue %d = %.15g, dense %.15g", c.bw, c.ring, k, got[k], want[k])
			}
		}
	}
}

// Located levels match the dense eigenvalues, and inverse iteration gives
// unit vectors with residual ‖Hx − λx‖ at rounding level, open and
// periodic, nearest and next-nearest.
func TestLevelsAndVectors(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 0))
	for _, c := range []struct {
		bw   int
		ring bool
	}{{1, false}, {1, true}, {2, false}, {2, true}} {
		op := randomOperator(rng, 90, c.bw, c.ring)
		want := denseValues(t, op)
		a := op.Dense()
		lv := &levels{op: op, n: op.Len(), tol: 1e-13 * op.scale}
		lo, hi := op.Bounds()
		for _, k := range []int{0, 1, 44, 88, 89} {
			e := want[k]
			if c.bw == 1 {
				e = lv.level(k, lo, hi)
				if math.Abs(e-want[k]) > 1e-11*op.scale {
					t.Errorf("bandwidth %d ring %v: level %d = %.15g, dense %.15g", c.bw, c.ring, k, e, want[k])
				}
			}
			x := op.eigenvector(e, 1)
			var hx mat.VecDense
			hx.MulVec(a, mat.NewVecDense(len(x), x))
			res, norm := 0.0, 0.0
			for i, v := range x {
				r := hx.AtVec(i) - e*v
				res += r * r
				norm += v * v
			}
			if math.Abs(norm-1) > 1e-12 || math.Sqrt(res) > 1e-9*op.scale {
				t.Errorf("bandwidth %d ring %v: level %d: |x|² = %v, residual %.3g", c.bw, c.ring, k, norm, math.Sqrt(res))
			}
		}
	}
}

// At energies that are eigenvalues of a leading block of a ring's matrix
// the fast ring count meets a vanishing pivot; the count with 2×2 block
// pivots still equals the dense one, and so does countRing, which hands
// such energies over to it.
func TestRingCountBlockPivots(t *testing.T) {
	rng := rand.New(rand.NewPCG(10, 0))
	hits := 0
	for trial := range 20 {
		n := 10 + rng.IntN(60)
		op := randomOperator(rng, n, 1, true)
		want := denseValues(t, op)
		for _, size := range []int{1, 2, n / 2, n - 2, n - 1} {
			// The leading block of this size, as an open operator.
			blk := &Operator{kind: Hopping, diag: op.diag[:size], off: [][]float64{op.off[0][:max(size-1, 0)]}, scale: op.scale}
			blk.prepare()
			var es mat.EigenSym
			if !es.Factorize(blk.Dense(), false) {
				t.Fatal("EigenSym did not converge")
			}
			for _, e := range es.Values(nil) {
				lo, hi := sort.SearchFloat64s(want, e-1e-9), sort.SearchFloat64s(want, e+1e-9)
				if lo != hi {
					continue // e is also (nearly) an eigenvalue of the ring
				}
				if _, ok := op.tryRing([batch]float64{e, e, e, e}); !ok[0] {
					hits++
				}
				c := []int{0}
				op.countRing([]float64{e}, c)
				if p := op.countRingPivoted(e); p != lo || c[0] != lo {
					t.Fatalf("trial %d n %d block %d: at %.15g pivoted count %d, ring count %d, dense %d", trial, n, size, e, p, c[0], lo)
				}
			}
		}
		for range 30 {
			e := 6*rng.Float64() - 3
			if p, w := op.countRingPivoted(e), sort.SearchFloat64s(want, e); p != w {
				t.Fatalf("trial %d: pivoted count at %g = %d, dense %d", trial, e, p, w)
			}
		}
	}
	if hits < 20 {
		t.Errorf("only %d energies met a vanishing pivot: the block path was hardly exercised", hits)
	}
}

// The band reduction of an open operator with next-nearest bonds keeps
// every eigenvalue: against gonum's dense eigensolver on random band
// matrices, some bonds zero (which leave fill-in chases empty) and some
// matrices split into decoupled blocks.
func TestPentadiagonalReduction(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 0))
	for trial := range 8 {
		n := 20 + rng.IntN(380)
		op := randomOperator(rng, n, 2, false)
		for k := range op.off {
			for i := range op.off[k] {
				if rng.IntN(6) == 0 || (trial%2 == 1 && i%50 == 7) {
					op.off[k][i] = 0
				}
			}
		}
		want := denseValues(t, op)
		d, e := pentaToTridiagonal(op)
		tri := &Operator{kind: Hopping, diag: d, off: [][]float64{e}, scale: op.scale}
		tri.prepare()
		got, err := tri.Eigenvalues()
		if err != nil {
			t.Fatal(err)
		}
		closeTo(t, "reduced band", got, want, 1e-11*op.scale)
	}
}
