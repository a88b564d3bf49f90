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

// LengthGrid is a flag value holding lengths given as a comma-separated
// list ("0.01,0.02mm") or as an even grid START:STOP:COUNT, both ends
// included ("0:0.2mm:5"; a unit on either end applies to both, as on
// each element of a list).
type LengthGrid struct {
	list LengthList
}

// NewLengthGrid returns a LengthGrid that fills dst.
func NewLengthGrid(dst *[]float64) *LengthGrid { return &LengthGrid{list: LengthList{dst: dst}} }

// Set parses a list or a grid; each Set replaces the earlier one.
func (v *LengthGrid) Set(s string) error {
	parts := strings.Split(s, ":")
	if len(parts) == 1 {
		return v.list.Set(s)
	}
	if len(parts) != 3 {
		return fmt.Errorf("%q: want a list of lengths or START:STOP:COUNT", s)
	}
	a, err := pattern.ParseSignedLength(parts[0])
	if err != nil {
		return fmt.Errorf("%q: %w", s, err)
	}
	b, err := pattern.ParseSignedLength(parts[1])
	if err != nil {
		return fmt.Errorf("%q: %w", s, err)
	}
	n, err := strconv.Atoi(strings.TrimSpace(parts[2]))
	if err != nil || n < 2 {
		return fmt.Errorf("%q: COUNT must be a whole number of at least 2", s)
	}
	switch {
	case a.Unit == "":
		a.Unit = b.Unit
	case b.Unit == "":
		b.Unit = a.Unit
	case a.Unit != b.Unit:
		return fmt.Errorf("%q: the two ends have different units", s)
	}
	v.list.ls = v.list.ls[:0]
	for i := range n {
		x := a.Value + (b.Value-a.Value)*float64(i)/float64(n-1)
		v.list.ls = append(v.list.ls, pattern.Length{Value: x, Unit: a.Unit})
	}
	return nil
}

func (v *LengthGrid) String() string { return v.list.String() }

// Type names the value in help.
func (v *LengthGrid) Type() string { return "lengths" }

// Resolve stores the lengths in unit into its slice.
func (v *LengthGrid) Resolve(unit string) error { return v.list.Resolve(unit) }
