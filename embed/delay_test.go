package embed

import (
	"math"
	"testing"
)

func TestDelayShapeAndScale(t *testing.T) {
	d := []float64{2, 4, 6, 4, 2, 6} // mean 4
	for k := 1; k <= len(d); k++ {
		x, err := Delay(d, k)
		if err != nil {
			t.Fatalf("k=%d: %v", k, err)
		}
		r, c := x.Dims()
		if r != len(d)-k+1 || c != k {
			t.Fatalf("k=%d: %d×%d, want %d×%d", k, r, c, len(d)-k+1, k)
		}
		for n := range r {
			for j := range c {
				if got, want := x.At(n, j), d[n+j]/4; got != want {
					t.Fatalf("k=%d: row %d col %d = %v, want %v", k, n, j, got, want)
				}
			}
		}
	}
}

// The vectors are dimensionless: the same chain in another unit gives the
// same vectors.
func TestDelayIsDimensionless(t *testing.T) {
	d := circleSpacings(50)
	scaled := make([]float64, len(d))
	for i, v := range d {
		scaled[i] = 1e-9 * v // the chain in metres instead of nanometres
	}
	a, _ := Delay(d, 3)
	b, _ := Delay(scaled, 3)
	r, c := a.Dims()
	for i := range r {
		for j := range c {
			if math.Abs(a.At(i, j)-b.At(i, j)) > 1e-14 {
				t.Fatalf("row %d col %d: %v and %v", i, j, a.At(i, j), b.At(i, j))
			}
		}
	}
}

func TestDelayRefuses(t *testing.T) {
	for _, tc := range []struct {
		d []float64
		k int
	}{
		{[]float64{1, 2, 3}, 0},
		{[]float64{1, 2, 3}, 4},
		{[]float64{-1, -2}, 1},
		{nil, 1},
	} {
		if _, err := Delay(tc.d, tc.k); err == nil {
			t.Errorf("Delay(%v, %d): no error", tc.d, tc.k)
		}
	}
}
