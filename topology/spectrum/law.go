package spectrum

import (
	"errors"
	"fmt"
	"math"
)

// Law gives the coupling (a hopping t or a spring constant k) between two
// sites a distance d apart on a chain of mean spacing mean.
type Law interface {
	// Coupling returns the coupling at distance d; it refuses distances
	// the law does not cover.
	Coupling(d, mean float64) (float64, error)
	// String describes the law as a formula, for reports.
	String() string
}

// Exp is the exponential law t = T0·exp(−Decay·(d/d̄ − 1)), d̄ the mean
// spacing: T0 at the mean spacing, falling by e over Decay⁻¹ mean spacings.
// Decay 0 gives the same coupling T0 everywhere.
type Exp struct {
	T0, Decay float64
}

// Coupling implements Law.
func (l Exp) Coupling(d, mean float64) (float64, error) {
	return l.T0 * math.Exp(-l.Decay*(d/mean-1)), nil
}

// String implements Law.
func (l Exp) String() string {
	if l.Decay == 0 {
		return fmt.Sprintf("t = %g on every bond", l.T0)
	}
	return fmt.Sprintf("t = %g·exp(−%g·(d/d̄ − 1))", l.T0, l.Decay)
}

// Power is the power law t = T0·(d/d̄)^(−Power), d̄ the mean spacing.
type Power struct {
	T0, Power float64
}

// Coupling implements Law.
func (l Power) Coupling(d, mean float64) (float64, error) {
	return l.T0 * math.Pow(d/mean, -l.Power), nil
}

// String implements Law.
func (l Power) String() string {
	if l.Power == 0 {
		return fmt.Sprintf("t = %g on every bond", l.T0)
	}
	return fmt.Sprintf("t = %g·(d/d̄)^(−%g)", l.T0, l.Power)
}

// Table is a coupling law given as a table of distances (in the pattern's
// unit, strictly ascending) and couplings, interpolated linearly between
// rows. A distance outside [D[0], D[len−1]] is refused, never
// extrapolated, unless it lies within 1e-9 of the largest distance of an
// end: spacings computed from positions carry rounding, and a table of
// tile lengths must still take them.
type Table struct {
	D, T []float64
}

// tableSlack is the rounding, relative to a table's largest distance, by
// which a distance may pass an end of the table.
const tableSlack = 1e-9

// Coupling implements Law.
func (l Table) Coupling(d, _ float64) (float64, error) {
	n := len(l.D)
	if n < 2 || len(l.T) != n {
		return 0, errors.New("coupling table: needs at least two rows of distance and coupling")
	}
	// Distances from positions carry rounding: within tableSlack of an
	// end they are taken as the end.
	slack := tableSlack * l.D[n-1]
	if !(d >= l.D[0]-slack && d <= l.D[n-1]+slack) {
		return 0, fmt.Errorf("distance %.6g lies outside the coupling table's range [%.6g, %.6g]", d, l.D[0], l.D[n-1])
	}
	d = min(max(d, l.D[0]), l.D[n-1])
	// Binary search for the row interval holding d.
	lo, hi := 0, n-1
	for hi-lo > 1 {
		mid := (lo + hi) / 2
		if l.D[mid] <= d {
			lo = mid
		} else {
			hi = mid
		}
	}
	f := (d - l.D[lo]) / (l.D[hi] - l.D[lo])
	return l.T[lo] + f*(l.T[hi]-l.T[lo]), nil
}

// String implements Law.
func (l Table) String() string {
	if len(l.D) == 0 {
		return "t from an empty table"
	}
	return fmt.Sprintf("t from a table of %d rows, d in [%g, %g], linear between rows", len(l.D), l.D[0], l.D[len(l.D)-1])
}
