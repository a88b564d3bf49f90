package topology

import (
	"math"
	"testing"
)

// The rotation matrix of a plane's hull is defined up to B = V·A·U + N,
// V ∈ GL(d, Z), U ∈ GL(2, Z), N integer (another torus basis, another
// lattice basis, whole turns; common practice): every such B is at
// distance 0 from A, computed here by applying the changes of basis; a
// matrix with a different entry is as far from A as that entry's change
// allows.
func TestPlaneModuleDistanceInvariant(t *testing.T) {
	A := [][]float64{{math.Sqrt2 - 1, 0.1}, {-0.2, 2 - math.Sqrt(3)}}
	vs := [][2][2]float64{{{1, 0}, {0, 1}}, {{0, 1}, {1, 0}}, {{1, 1}, {0, 1}}, {{-1, 0}, {2, 1}}, {{2, 1}, {1, 1}}}
	us := [][2][2]float64{{{1, 0}, {0, 1}}, {{0, -1}, {1, 0}}, {{1, 1}, {-1, 0}}, {{-1, 0}, {0, 1}}}
	for _, v := range vs {
		for _, u := range us {
			B := make([][]float64, 2)
			for i := range 2 {
				B[i] = make([]float64, 2)
				for j := range 2 {
					for k := range 2 {
						for l := range 2 {
							B[i][j] += v[i][k] * A[k][l] * u[l][j]
						}
					}
					B[i][j] += float64(i - j) // an integer shift
				}
			}
			if d := PlaneModuleDistance(A, B, 3); d > 1e-12 {
				t.Errorf("V = %v, U = %v: distance %.3g, want 0", v, u, d)
			}
		}
	}
	moved := [][]float64{{A[0][0] + 0.01, A[0][1]}, A[1]}
	if d := PlaneModuleDistance(A, moved, 3); !(d > 1e-4) {
		t.Errorf("an entry moved by 0.01: distance %.3g, want it seen", d)
	}
	if d := PlaneModuleDistance(A, A[:1], 3); !math.IsInf(d, 1) {
		t.Errorf("a 2-torus against a circle: distance %v, want +Inf", d)
	}
	// One row: the circle of a single wave, the row read in a rotated
	// basis of a square lattice, (a, b)·U for U a quarter turn.
	row := [][]float64{{0.2763932, 0.1458980}}
	turned := [][]float64{{0.1458980, -0.2763932}}
	if d := PlaneModuleDistance(row, turned, 3); d > 1e-12 {
		t.Errorf("one wave in a turned basis: distance %.3g, want 0", d)
	}
}
