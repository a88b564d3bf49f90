package notation_test

import (
	"fmt"
	"testing"

	"phasonhull/topology/notation"
)

func TestPlusMinus(t *testing.T) {
	for _, c := range []struct {
		v, u float64
		want string
	}{
		{0.318307339, 3.4e-06, "0.3183073 ± 0.0000034"},
		{0.318307339, 3.44e-06, "0.3183073 ± 0.0000034"},
		{0.318307339, 3.46e-06, "0.3183073 ± 0.0000035"},
		{0.34219, 0.00912, "0.3422 ± 0.0091"},
		{13.4094, 0.00086, "13.40940 ± 0.00086"},
		{1.00000044, 1.4e-06, "1.0000004 ± 0.0000014"},
		{0.4, 1.4, "0.4 ± 1.4"},
		// Rounding u to two digits carries into a third: the value follows.
		{0.123456, 0.00996, "0.123 ± 0.010"},
		{0.5, 0.0999, "0.50 ± 0.10"},
		{1234.5, 56, "1235 ± 56"},
		{1234.5, 123, "1230 ± 120"},
		{-2.5e-5, 0.0013, "0.0000 ± 0.0013"},
		{-0.25, 0.0013, "-0.2500 ± 0.0013"},
		// Small uncertainties in exponent form, the last digit at the value's.
		{0.3183, 1.7e-12, "0.3183000000000 ± 1.7e-12"},
		// Below the resolution of a float64 at the value: the value in full.
		{0.2763, 4.6e-17, "0.2763 ± 4.6e-17"},
		{4*0.2763 - 1, 1.8e-16, "0.1052 ± 1.8e-16"},
		{0.25, 0, "0.25 ± 0"},
	} {
		if got := notation.PlusMinus(c.v, c.u); got != c.want {
			t.Errorf("PlusMinus(%g, %g) = %q, want %q", c.v, c.u, got, c.want)
		}
	}
}

func TestTuple(t *testing.T) {
	for _, c := range []struct {
		v    []int
		want string
	}{
		{[]int{1, -3}, "(1, -3)"},
		{[]int{1, 2, 1}, "(1, 2, 1)"},
		{[]int{}, "()"},
	} {
		if got := notation.Tuple(c.v); got != c.want {
			t.Errorf("Tuple(%v) = %q, want %q", c.v, got, c.want)
		}
	}
}

// An angle with its standard uncertainty, and a gap label's coefficients.
func Example() {
	fmt.Println("θ =", notation.PlusMinus(0.318307339, 3.4e-06))
	fmt.Println("label", notation.Tuple([]int{1, -3}))
	// Output:
	// θ = 0.3183073 ± 0.0000034
	// label (1, -3)
}

func TestUnit(t *testing.T) {
	if got := notation.Unit("mm"); got != " mm" {
		t.Errorf("Unit(mm) = %q", got)
	}
	if got := notation.Unit(""); got != "" {
		t.Errorf("Unit() = %q", got)
	}
}
