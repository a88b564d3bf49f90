// Package flagval holds the command-line values that take a length: a
// number in the unit of the input (or of --unit) or a number with its own
// unit, converted once that unit is known.
package flagval

import (
	"fmt"
	"strconv"
	"strings"

	"phasonhull/pattern"
)

// Length is a flag value holding one length of either sign. Bind it to the
// float64 it fills; Resolve converts and stores it once the unit is known.
type Length struct {
	dst *float64
	l   pattern.Length
}

// NewLength returns a Length that fills dst, whose current value is the
// default (a bare number).
func NewLength(dst *float64) *Length { return &Length{dst: dst, l: pattern.Length{Value: *dst}} }

// Set parses "450nm", "0.45 um", "-0.1" or "0".
func (v *Length) Set(s string) error {
	l, err := pattern.ParseSignedLength(s)
	if err != nil {
		return err
	}
	v.l = l
	return nil
}

func (v *Length) String() string { return strconv.FormatFloat(v.l.Value, 'g', -1, 64) + v.l.Unit }

// Type names the value in help: LENGTH.
func (v *Length) Type() string { return "length" }

// Resolve stores the length in unit into its float64.
func (v *Length) Resolve(unit string) error {
	x, err := v.l.In(unit)
	if err != nil {
		return err
	}
	*v.dst = x
	return nil
}

// LengthList is a flag value holding a comma-separated list of lengths,
// each with or without its own unit ("0.1,30nm").
type LengthList struct {
	dst *[]float64
	ls  []pattern.Length
}

// NewLengthList returns a LengthList that fills dst.
func NewLengthList(dst *[]float64) *LengthList { return &LengthList{dst: dst} }

// Set parses the list; each Set replaces the earlier one.
func (v *LengthList) Set(s string) error {
	v.ls = v.ls[:0]
	for _, part := range strings.Split(s, ",") {
		l, err := pattern.ParseSignedLength(part)
		if err != nil {
			return fmt.Errorf("%q: %w", s, err)
		}
		v.ls = append(v.ls, l)
	}
	return nil
}

func (v *LengthList) String() string {
	parts := make([]string, len(v.ls))
	for i, l := range v.ls {
		parts[i] = strconv.FormatFloat(l.Value, 'g', -1, 64) + l.Unit
	}
	return "[" + strings.Join(parts, ",") + "]"
}

// Type names the value in help: LIST.
func (v *LengthList) Type() string { return "lengths" }

// Resolve stores the lengths in unit into its slice.
func (v *LengthList) Resolve(unit string) error {
	out := make([]float64, len(v.ls))
	for i, l := range v.ls {
		x, err := l.In(unit)
		if err != nil {
			return err
		}
		out[i] = x
	}
	*v.dst = out
	return nil
}
