package flagval

import (
	"math"
	"testing"
)

// --noise as a percentage or a length comes out as the same fraction of
// the mean spacing; zero is exact data in both forms.
func TestNoiseFraction(t *testing.T) {
	for _, c := range []struct {
		in   string
		unit string
		want float64
		ok   bool
	}{
		{"3%", "um", 0.03, true},
		{"0%", "um", 0, true},
		{"0", "um", 0, true},
		{"13.5nm", "um", 0.03, true}, // mean spacing 0.45 um
		{"0.0135", "um", 0.03, true},
		{"1mm", "um", 0, false}, // more than a spacing
		{"13.5nm", "", 0, false},
	} {
		v := NewNoise(3)
		if err := v.Set(c.in); err != nil {
			t.Fatalf("Set(%q): %v", c.in, err)
		}
		got, err := v.Fraction(c.unit, 0.45)
		if (err == nil) != c.ok || (c.ok && math.Abs(got-c.want) > 1e-12) {
			t.Errorf("%q: %v, %v; want %v (ok %v)", c.in, got, err, c.want, c.ok)
		}
	}
	for _, bad := range []string{"-1nm", "120%", "x"} {
		if err := NewNoise(3).Set(bad); err == nil {
			t.Errorf("Set(%q) accepted", bad)
		}
	}
	if got, _ := NewNoise(3).Fraction("", 1); got != 0.03 {
		t.Errorf("default %v, want 0.03", got)
	}
}
