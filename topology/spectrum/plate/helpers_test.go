package plate

import (
	"context"
	"math"
	"testing"

	"phasonhull/pattern/lattice"
)

// grid returns the points and lattice of an l1×l2 patch of the lattice
// with basis b, sites exactly on their lattice points, in row order.
func grid(l1, l2 int, b [2][2]float64) ([][2]float64, *lattice.Lattice) {
	l := &lattice.Lattice{Basis: b}
	var pts [][2]float64
	for i := range l1 {
		for j := range l2 {
			x := [2]float64{float64(i)*b[0][0] + float64(j)*b[1][0], float64(i)*b[0][1] + float64(j)*b[1][1]}
			pts = append(pts, x)
			l.Index = append(l.Index, [2]int{i, j})
			l.OnLattice = append(l.OnLattice, true)
			l.Displacement = append(l.Displacement, [2]float64{})
		}
	}
	return pts, l
}

var (
	square = [2][2]float64{{1, 0}, {0, 1}}
	hex    = [2][2]float64{{1, 0}, {0.5, math.Sqrt(3) / 2}}
)

// build builds an operator or fails the test.
func build(t testing.TB, pts [][2]float64, l *lattice.Lattice, m Model) *Operator {
	t.Helper()
	op, err := New(l, pts, m)
	if err != nil {
		t.Fatal(err)
	}
	return op
}

// analyze runs Analyze or fails the test.
func analyze(t testing.TB, op *Operator, opt Options) *Result {
	t.Helper()
	r, err := Analyze(context.Background(), op, opt)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// hallConductance solves r = q·s + p·t for the integer t with |t| ≤ q/2
// (the smallest |t| when two qualify), returning s and t: the Diophantine
// equation of Thouless, Kohmoto, Nightingale & den Nijs, PRL 49, 405
// (1982), t the Hall conductance of the r-th gap of the Hofstadter model
// at flux p/q.
func hallConductance(r, p, q int) (s, t int) {
	best := math.MaxInt
	for tt := -q; tt <= q; tt++ {
		if (r-p*tt)%q != 0 || 2*abs(tt) > q {
			continue
		}
		if abs(tt) < best {
			best, s, t = abs(tt), (r-p*tt)/q, tt
		}
	}
	return s, t
}
