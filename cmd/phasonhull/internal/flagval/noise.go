package flagval

import (
	"fmt"
	"strconv"
	"strings"

	"phasonhull/pattern"
)

// Noise is the value of --noise on the commands that analyse a pattern:
// the position noise the analysis tolerates, written as a length ("20nm",
// or a bare number in the input's unit) or as a percentage of the mean
// spacing ("3%"). Zero, in either form, means exact data.
type Noise struct {
	percent float64 // used when length is zero and isLength false
	length  pattern.Length
	isLen   bool
}

// NewNoise returns a Noise whose default is pct percent of the mean spacing.
func NewNoise(pct float64) *Noise { return &Noise{percent: pct} }

// Set parses "3%", "0.5 %", "20nm", "0.02" or "0".
func (v *Noise) Set(s string) error {
	if t := strings.TrimSpace(s); strings.HasSuffix(t, "%") {
		p, err := strconv.ParseFloat(strings.TrimSpace(strings.TrimSuffix(t, "%")), 64)
		if err != nil || !(p >= 0 && p < 100) {
			return fmt.Errorf("%q: want a percentage of the mean spacing in [0, 100), like 3%%", s)
		}
		v.percent, v.isLen = p, false
		return nil
	}
	l, err := pattern.ParseSignedLength(s)
	if err != nil || l.Value < 0 {
		return fmt.Errorf("%q: want a length like 20nm (a bare number is in the input's unit) or a percentage of the mean spacing like 3%%", s)
	}
	v.length, v.isLen = l, true
	return nil
}

func (v *Noise) String() string {
	if v.isLen {
		return strconv.FormatFloat(v.length.Value, 'g', -1, 64) + v.length.Unit
	}
	return strconv.FormatFloat(v.percent, 'g', -1, 64) + "%"
}

// Type names the value in help.
func (v *Noise) Type() string { return "noise" }

// Length returns the noise as a length in unit, for a pattern of the given
// mean spacing.
func (v *Noise) Length(unit string, meanSpacing float64) (float64, error) {
	if !v.isLen {
		return v.percent / 100 * meanSpacing, nil
	}
	x, err := v.length.In(unit)
	if err != nil {
		return 0, fmt.Errorf("--noise %v: %w", v.length, err)
	}
	return x, nil
}

// Fraction returns the noise as a fraction of the mean spacing of a
// pattern in unit, below 1: 0 means exact data.
func (v *Noise) Fraction(unit string, meanSpacing float64) (float64, error) {
	if !v.isLen {
		return v.percent / 100, nil
	}
	x, err := v.Length(unit, meanSpacing)
	if err != nil {
		return 0, err
	}
	f := x / meanSpacing
	if !(f < 1) {
		return 0, fmt.Errorf("--noise %v is %.3g mean spacings: want less than one", v.length, f)
	}
	return f, nil
}
