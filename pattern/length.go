package pattern

import (
	"fmt"
	"math"
	"regexp"
	"strconv"
	"strings"
)

// decades holds the length units UnitFactor converts between: the power
// of ten of each in metres.
var decades = map[string]int{"nm": -9, "um": -6, "mm": -3, "cm": -2, "m": 0}

// UnitFactor returns the factor that turns a length in unit from into unit
// to: 1 when the units are the same, a power of ten between nm, um, mm, cm
// and m (micrometres spelt any way the readers accept). Any other pair of
// different units is an error, and so is a pair with exactly one unit
// empty (unknown), since nothing says they agree.
func UnitFactor(from, to string) (float64, error) {
	f, t := normalizeUnit(strings.TrimSpace(from)), normalizeUnit(strings.TrimSpace(to))
	if f == t {
		return 1, nil
	}
	a, okA := decades[f]
	b, okB := decades[t]
	switch {
	case f == "" || t == "":
		return 0, fmt.Errorf("unit %q and unit %q: one is unknown, so they cannot be compared", from, to)
	case !okA || !okB:
		return 0, fmt.Errorf("unit %q cannot be converted to %q (convertible units: nm, um, mm, cm, m)", from, to)
	}
	// An exact power of ten, not a quotient of two rounded ones.
	return math.Pow10(a - b), nil
}

// Length is a length with its unit. A Length without a unit is in the
// unit of whatever it is compared with; the zero Length is no length.
type Length struct {
	Value float64
	Unit  string
}

// lengthRE matches a length: a number with an optional sign and an
// optional unit, spaces allowed around and between them.
var lengthRE = regexp.MustCompile(`^\s*([-+]?[0-9.]+(?:[eE][-+]?[0-9]+)?)\s*([A-Za-zµμ]*)\s*$`)

// ParseSignedLength reads a finite length of either sign, or zero (an
// amplitude, a noise level), written as ParseLength takes it: "-0.1",
// "+20 nm", "0". The error quotes s.
func ParseSignedLength(s string) (Length, error) {
	m := lengthRE.FindStringSubmatch(s)
	if m == nil {
		return Length{}, fmt.Errorf("%q: want a length like 0.02mm, -20um or 0.1", s)
	}
	v, err := strconv.ParseFloat(m[1], 64)
	if err != nil || math.IsInf(v, 0) {
		return Length{}, fmt.Errorf("%q: want a finite length like 0.02mm, -20um or 0.1", s)
	}
	return Length{Value: v, Unit: m[2]}, nil
}

// ParseLength reads a positive length written as a number and an optional
// unit: "20um", "0.02 mm", "1e-3mm", "20 µm", "3". The unit is not checked
// here; In refuses one it cannot convert. The error quotes s.
func ParseLength(s string) (Length, error) {
	l, err := ParseSignedLength(s)
	if t := strings.TrimSpace(s); err != nil || !(l.Value > 0) || strings.HasPrefix(t, "+") || strings.HasPrefix(t, "-") {
		return Length{}, fmt.Errorf("%q: want a positive length like 0.02mm or 20um", s)
	}
	return l, nil
}

// In returns the length in unit. A length without a unit is taken to be in
// unit already; a length with a unit cannot be put in an unknown unit ("").
func (l Length) In(unit string) (float64, error) {
	if l.Unit == "" {
		return l.Value, nil
	}
	if strings.TrimSpace(unit) == "" {
		return 0, fmt.Errorf("%v: the other length has no unit to convert to", l)
	}
	k, err := UnitFactor(l.Unit, unit)
	if err != nil {
		return 0, err
	}
	return l.Value * k, nil
}

// String writes the length as ParseLength reads it: "0.02 mm".
func (l Length) String() string {
	s := strconv.FormatFloat(l.Value, 'g', -1, 64)
	if l.Unit != "" {
		s += " " + l.Unit
	}
	return s
}
