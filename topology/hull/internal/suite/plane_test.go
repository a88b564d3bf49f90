package main

import (
	"bytes"
	"math"
	"strings"
	"testing"

	"phasonhull/topology/hull"
)

// planeCase returns the case of the quick plane grid with the given name.
func planeCase(t *testing.T, name string) Case {
	t.Helper()
	for _, c := range planeGrid(Config{Quick: true, Seed: 1}) {
		if c.Name == name {
			return c
		}
	}
	t.Fatalf("no case %q in the quick plane grid", name)
	return Case{}
}

// Generated designs of every 2D family recovered through the whole
// pipeline (generation, a written and read file for some, the average
// lattice, the plane analysis): the class (and the supercell index of a
// finite one), A within five stated uncertainties as a module, and the
// lattice basis within five of its stated uncertainties. The truths come
// from the specs: A as generated, its supercell index counted over the
// period lattice (supercellIndex), the lattice basis of the spec; a
// Poisson set has no average lattice (common practice).
func TestPlaneFamiliesRecovered(t *testing.T) {
	names := []string{
		"point/square/40x40/σ1%",
		"finite/square/index3/40x40/σ1%",
		"finite/hex/index5/40x40/σ1%",
		"circle/hex/40x40/σ1%",
		"circle/square/40x40/σ1%/missing5%/extra2%",
		"torus/square/40x40/σ1%",
		"twisted/hex/s0.424/φ20.78/40x40/σ0.3%",
		"disordered/poisson/20x20",
		"disordered/hard-disk/20x20",
	}
	if testing.Short() {
		names = []string{names[1], names[3], names[7]}
	}
	rep := &Report{Seed: 1, Quick: true, Plane: true}
	for _, name := range names {
		o, err := runPlaneCase(planeCase(t, name), 1)
		if err != nil {
			t.Fatal(err)
		}
		rep.Outcomes = append(rep.Outcomes, o)
		if !o.Correct || o.ConfidentWrong {
			t.Errorf("%s: reported %s (period %d; %s%s), want %s period %d", name, o.Reported, o.Period, o.Reason, o.Wrong, o.Case.Class, o.Case.Period)
			continue
		}
		if o.Case.Points == "" && (o.BasisRatio == nil || *o.BasisRatio > wrongAngleFactor) {
			t.Errorf("%s: basis error %v stated uncertainties", name, o.BasisRatio)
		}
		switch len(o.Case.Rotation) {
		case 0:
			if len(o.Rotation) != 0 && o.Case.Class != hull.Finite {
				t.Errorf("%s: a rotation %v for a hull without angles", name, o.Rotation)
			}
		default:
			if o.Ratio == nil || *o.Ratio > wrongAngleFactor {
				t.Errorf("%s: A %v misses the true %v by %v stated uncertainties", name, o.Rotation, o.Case.Rotation, o.Ratio)
			}
		}
	}
	rep.Confusion = confusion(rep.Outcomes)
	rep.ConfidentWrong, rep.FalseCalls = falseCalls(rep.Outcomes)
	var b bytes.Buffer
	if err := writeText(&b, rep); err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"Confusion matrix", "confident wrong answers: 0", "basis err/unc", names[0]} {
		if !strings.Contains(b.String(), want) {
			t.Errorf("the plane report lacks %q", want)
		}
	}
}

// moduleRatio accepts any description V·A + N of the same module (V
// unimodular, N integer; common practice: the group generated modulo Z²
// is unchanged) and refuses a row moved by ten stated uncertainties.
func TestModuleRatio(t *testing.T) {
	A := [][]float64{{(math.Sqrt(5) - 1) / 8, (math.Sqrt(2) - 1) / 3}, {(math.Sqrt(3) - 1) / 5, (math.Sqrt(7) - 2) / 2}}
	U := [][]float64{{1e-5, 2e-5}, {1e-5, 1e-5}}
	// V = [[1, 1], [0, -1]] (det −1), N = (2, −1) on the first row.
	R := [][]float64{{A[0][0] + A[1][0] + 2, A[0][1] + A[1][1] - 1}, {-A[1][0], -A[1][1]}}
	if q, err := moduleRatio(A, R, U); err != nil || q > 1e-6 {
		t.Errorf("V·A + N: ratio %g (%v), want 0", q, err)
	}
	R[1][0] += 10 * U[1][0]
	if q, _ := moduleRatio(A, R, U); q < wrongAngleFactor {
		t.Errorf("a row moved by 10 uncertainties: ratio %g, want above %d", q, wrongAngleFactor)
	}
	// A module of another rank is never the same.
	if q, _ := moduleRatio(A[:1], R[:1], U[:1]); q < wrongAngleFactor {
		t.Errorf("one row of two: ratio %g, want above %d", q, wrongAngleFactor)
	}
}

// supercellIndex counts the index of the period lattice; checked against
// the determinant of a basis of that lattice written out by hand (common
// practice: the index of a sublattice is |det| of its basis).
func TestSupercellIndex(t *testing.T) {
	for _, c := range []struct {
		A     [][]float64
		basis [2][2]int // a basis of {n : A·n ∈ Z^d}
	}{
		{[][]float64{{0.5, 0}}, [2][2]int{{2, 0}, {0, 1}}},
		{[][]float64{{1.0 / 3, 1.0 / 3}}, [2][2]int{{1, -1}, {3, 0}}},
		{[][]float64{{0.2, 0.4}}, [2][2]int{{2, -1}, {5, 0}}},
		{[][]float64{{0.5, 0}, {0, 1.0 / 3}}, [2][2]int{{2, 0}, {0, 3}}},
		{[][]float64{{0.25, 0.25}, {-0.25, 0.25}}, [2][2]int{{2, 2}, {2, -2}}},
	} {
		det := c.basis[0][0]*c.basis[1][1] - c.basis[0][1]*c.basis[1][0]
		if det < 0 {
			det = -det
		}
		got, ok := supercellIndex(c.A)
		if !ok || got != det {
			t.Errorf("A = %v: index %d (%v), want %d", c.A, got, ok, det)
		}
	}
	if _, ok := supercellIndex([][]float64{{math.Sqrt2 - 1, 0.5}}); ok {
		t.Error("an irrational A was given a supercell")
	}
}
