package register

import (
	"fmt"
	"math"
	"strings"
)

// decades holds the length units UnitFactor converts between: the power
// of ten of each in metres.
var decades = map[string]int{"nm": -9, "um": -6, "mm": -3, "cm": -2, "m": 0}

// canonicalUnit spells micrometres "um", as the readers do.
func canonicalUnit(u string) string {
	u = strings.TrimSpace(u)
	switch u {
	case "µm", "μm", "micron", "microns", "micrometer", "micrometre":
		return "um"
	}
	return u
}

// UnitFactor returns the factor that turns a length in unit from into unit
// to: 1 when the units are the same, a power of ten between nm, um, mm, cm
// and m. Any other pair of different units is an error, and so is a pair
// with exactly one unit empty (unknown), since nothing says they agree.
func UnitFactor(from, to string) (float64, error) {
	f, t := canonicalUnit(from), canonicalUnit(to)
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
