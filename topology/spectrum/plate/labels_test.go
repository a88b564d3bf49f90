package plate

import (
	"math"
	"slices"
	"testing"
)

// MatchLabel picks the label of least order within the tolerance and
// refuses two of the same least order; labels of equal value (rational
// generators) are one.
func TestMatchLabel(t *testing.T) {
	theta := (math.Sqrt(5) - 1) / 2
	if l, ok := MatchLabel(2*theta-1+1e-7, []float64{theta}, 8, 1e-6); !ok || !slices.Equal(l.Coeffs, []int{-1, 2}) {
		t.Errorf("2θ − 1: label %+v, %v; want (−1, 2)", l, ok)
	}
	// The least order wins over a higher-order label that fits better.
	if l, ok := MatchLabel(theta+2e-4, []float64{theta}, 20, 1e-3); !ok || !slices.Equal(l.Coeffs, []int{0, 1}) {
		t.Errorf("θ + 2e-4 within 1e-3: label %+v, %v; want (0, 1)", l, ok)
	}
	if _, ok := MatchLabel(0.1, []float64{0.1, 0.1000001}, 4, 1e-3); ok {
		t.Error("two labels of order 1 within the tolerance: matched, want refused")
	}
	if l, ok := MatchLabel(2.0/3, []float64{1.0 / 3}, 4, 1e-9); !ok || !slices.Equal(l.Coeffs, []int{1, -1}) {
		t.Errorf("2/3 with α = 1/3: label %+v, %v; want (1, −1)", l, ok)
	}
	// Z + Zθ up to order 2 holds four values in (0, 1): θ, 1 − θ, 2θ − 1,
	// 2 − 2θ; Z + Z/3 two at any order.
	if n := labelValues([]float64{theta}, 2); n != 4 {
		t.Errorf("values of order ≤ 2 in Z + Zθ: %d, want 4", n)
	}
	if n := labelValues([]float64{1.0 / 3}, 5); n != 2 {
		t.Errorf("values of order ≤ 5 in Z + Z/3: %d, want 2", n)
	}
	if _, ok := MatchLabel(0.5, []float64{theta}, 3, 1e-4); ok {
		t.Error("1/2 in Z + Zθ up to order 3: matched, want none")
	}
}
