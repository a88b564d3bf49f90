package plate

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// Flux is a uniform magnetic flux α through each cell of the lattice, in
// flux quanta: a fraction P/Q (Q > 0, in lowest terms) or, when Q is 0, the
// decimal Value. The zero Flux is no field.
type Flux struct {
	P, Q  int64
	Value float64
}

// Rational returns the flux p/q, reduced to lowest terms with q > 0. It
// panics for q = 0.
func Rational(p, q int64) Flux {
	if q == 0 {
		panic("plate: Rational: zero denominator")
	}
	if q < 0 {
		p, q = -p, -q
	}
	g := gcd(abs64(p), q)
	return Flux{P: p / g, Q: q / g}
}

// ParseFlux reads a flux written as a fraction ("3/11", "-1/3") or a
// decimal ("0.25").
func ParseFlux(s string) (Flux, error) {
	s = strings.TrimSpace(s)
	if num, den, ok := strings.Cut(s, "/"); ok {
		p, err1 := strconv.ParseInt(strings.TrimSpace(num), 10, 64)
		q, err2 := strconv.ParseInt(strings.TrimSpace(den), 10, 64)
		if err1 != nil || err2 != nil || q <= 0 {
			return Flux{}, fmt.Errorf("flux %q: want a fraction p/q of integers with q > 0, or a decimal", s)
		}
		return Rational(p, q), nil
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return Flux{}, fmt.Errorf("flux %q: want a fraction p/q or a finite decimal", s)
	}
	return Flux{Value: v}, nil
}

// Float returns α as a number.
func (f Flux) Float() float64 {
	if f.Q != 0 {
		return float64(f.P) / float64(f.Q)
	}
	return f.Value
}

// IsZero reports whether there is no field.
func (f Flux) IsZero() bool { return f.Float() == 0 }

// String writes the flux as ParseFlux reads it.
func (f Flux) String() string {
	if f.Q != 0 {
		return fmt.Sprintf("%d/%d", f.P, f.Q)
	}
	return strconv.FormatFloat(f.Value, 'g', -1, 64)
}

// periodicOver returns nil when a ring of l cells along the first lattice
// direction closes the Landau gauge (α·l an integer), else the reason.
func (f Flux) periodicOver(l int) error {
	if f.Q != 0 {
		if int64(l)%f.Q != 0 {
			return fmt.Errorf("flux %s on periodic ends needs the number of cells along a1 (%d) to be a multiple of %d: "+
				"the Landau-gauge phases do not close otherwise", f, l, f.Q)
		}
		return nil
	}
	x := f.Value * float64(l)
	if math.Abs(x-math.Round(x)) > 1e-9*max(1, math.Abs(x)) {
		return fmt.Errorf("flux %s on periodic ends needs α·L1 = %.6g (L1 = %d cells along a1) to be an integer: "+
			"the Landau-gauge phases do not close otherwise; give α as a fraction p/q with q dividing L1", f, x, l)
	}
	return nil
}

func gcd(a, b int64) int64 {
	for b != 0 {
		a, b = b, a%b
	}
	if a == 0 {
		return 1
	}
	return a
}

func abs64(v int64) int64 {
	if v < 0 {
		return -v
	}
	return v
}
