package pattern

import (
	"math"
	"strings"
	"testing"
)

// Unit factors are exact powers of ten (SI prefixes; common practice).
func TestUnitFactor(t *testing.T) {
	for _, c := range []struct {
		from, to string
		want     float64
	}{
		{"mm", "um", 1000}, {"um", "mm", 1e-3}, {"nm", "m", 1e-9}, {"cm", "mm", 10},
		{"µm", "nm", 1000}, {"mm", "mm", 1}, {"", "", 1}, {"px", "px", 1},
	} {
		got, err := UnitFactor(c.from, c.to)
		if err != nil || got != c.want {
			t.Errorf("UnitFactor(%q, %q) = %v, %v; want %v", c.from, c.to, got, err, c.want)
		}
	}
	for _, c := range [][2]string{{"mm", ""}, {"", "nm"}, {"px", "mm"}, {"mm", "deg"}} {
		if _, err := UnitFactor(c[0], c[1]); err == nil {
			t.Errorf("UnitFactor(%q, %q): no error", c[0], c[1])
		}
	}
}

// ParseLength takes a number with an optional unit, spaced or not, any
// micro sign; In converts it by powers of ten (SI prefixes; common
// practice).
func TestParseLength(t *testing.T) {
	for _, c := range []struct {
		s    string
		to   string
		want float64
	}{
		{"20um", "nm", 20000}, {"0.02 mm", "um", 20}, {"1e-3mm", "um", 1}, {"20 µm", "mm", 0.02},
		{"20μm", "mm", 0.02}, {" 3 ", "nm", 3}, {"3", "", 3}, {"2.5E2nm", "um", 0.25}, {"0.02um", "nm", 20},
	} {
		l, err := ParseLength(c.s)
		if err != nil {
			t.Errorf("ParseLength(%q): %v", c.s, err)
			continue
		}
		got, err := l.In(c.to)
		if err != nil || math.Abs(got-c.want) > 1e-12*c.want {
			t.Errorf("ParseLength(%q).In(%q) = %v, %v; want %v", c.s, c.to, got, err, c.want)
		}
	}
	for _, s := range []string{"", "-3nm", "0nm", "0", "x", "3 n m", "1e999nm", "3nm5", "+3nm", "nm"} {
		if l, err := ParseLength(s); err == nil {
			t.Errorf("ParseLength(%q) = %v, want an error", s, l)
		} else if !strings.Contains(err.Error(), "want a positive length") {
			t.Errorf("ParseLength(%q): %v", s, err)
		}
	}
	for _, c := range [][2]string{{"0.02deg", "nm"}, {"3nm", ""}, {"3nm", "px"}} {
		l, err := ParseLength(c[0])
		if err != nil {
			t.Fatal(err)
		}
		if v, err := l.In(c[1]); err == nil {
			t.Errorf("ParseLength(%q).In(%q) = %v, want an error", c[0], c[1], v)
		}
	}
	if s := (Length{Value: 0.02, Unit: "mm"}).String(); s != "0.02 mm" {
		t.Errorf("String %q", s)
	}
}

// ParseSignedLength takes amplitudes and noise levels: either sign, zero,
// with or without a unit; ParseLength still wants a positive length.
func TestParseSignedLength(t *testing.T) {
	for _, c := range []struct {
		in   string
		want Length
		ok   bool
	}{
		{"-0.1", Length{-0.1, ""}, true},
		{"+20 nm", Length{20, "nm"}, true},
		{"0", Length{0, ""}, true},
		{"1e-3mm", Length{1e-3, "mm"}, true},
		{"- 3", Length{}, false},
		{"1e400", Length{}, false},
		{"mm", Length{}, false},
	} {
		got, err := ParseSignedLength(c.in)
		if (err == nil) != c.ok || got != c.want {
			t.Errorf("ParseSignedLength(%q) = %v, %v; want %v (ok %v)", c.in, got, err, c.want, c.ok)
		}
	}
	for _, s := range []string{"0", "-1um"} {
		if _, err := ParseLength(s); err == nil {
			t.Errorf("ParseLength(%q) accepted a length that is not positive", s)
		}
	}
}
