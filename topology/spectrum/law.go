package spectrum

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
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

// maxTableRows bounds the rows ReadTable accepts.
const maxTableRows = 1_000_000

// ReadTable reads a coupling table: one row per line, a distance and a
// coupling separated by a comma, semicolon, tab or spaces. Lines starting
// with '#' and blank lines are skipped, and so is a first line that holds
// no numbers (a header). Distances must be finite, positive and strictly
// ascending; couplings finite. name is used in messages.
func ReadTable(r io.Reader, name string) (Table, error) {
	var t Table
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 64<<10), 1<<20)
	line, data := 0, 0
	for sc.Scan() {
		line++
		s := strings.TrimSpace(sc.Text())
		if s == "" || s[0] == '#' {
			continue
		}
		f := splitFields(s)
		if len(f) != 2 {
			if data == 0 && !looksNumeric(f) {
				data++ // a header line
				continue
			}
			return Table{}, fmt.Errorf("reading %s: line %d: want two fields (distance, coupling), got %d", name, line, len(f))
		}
		d, err1 := strconv.ParseFloat(f[0], 64)
		v, err2 := strconv.ParseFloat(f[1], 64)
		if err1 != nil || err2 != nil {
			if data == 0 && !looksNumeric(f) {
				data++
				continue
			}
			return Table{}, fmt.Errorf("reading %s: line %d: %q is not two numbers", name, line, s)
		}
		data++
		if math.IsNaN(d) || math.IsInf(d, 0) || math.IsNaN(v) || math.IsInf(v, 0) {
			return Table{}, fmt.Errorf("reading %s: line %d: values must be finite", name, line)
		}
		if d <= 0 {
			return Table{}, fmt.Errorf("reading %s: line %d: distance %g must be positive", name, line, d)
		}
		if n := len(t.D); n > 0 && d <= t.D[n-1] {
			return Table{}, fmt.Errorf("reading %s: line %d: distance %g does not exceed the previous row's %g; distances must ascend", name, line, d, t.D[n-1])
		}
		if len(t.D) >= maxTableRows {
			return Table{}, fmt.Errorf("reading %s: more than %d rows", name, maxTableRows)
		}
		t.D, t.T = append(t.D, d), append(t.T, v)
	}
	if err := sc.Err(); err != nil {
		return Table{}, fmt.Errorf("reading %s: line %d: %w", name, line+1, err)
	}
	if len(t.D) < 2 {
		return Table{}, fmt.Errorf("reading %s: a coupling table needs at least two rows, got %d", name, len(t.D))
	}
	return t, nil
}

// splitFields splits a line on commas, semicolons, tabs and spaces.
func splitFields(s string) []string {
	return strings.FieldsFunc(s, func(r rune) bool {
		return r == ',' || r == ';' || r == ' ' || r == '\t'
	})
}

// looksNumeric reports whether any field parses as a number.
func looksNumeric(f []string) bool {
	for _, s := range f {
		if _, err := strconv.ParseFloat(s, 64); err == nil {
			return true
		}
	}
	return false
}
