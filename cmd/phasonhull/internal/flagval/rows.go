package flagval

import (
	"fmt"
	"strconv"
	"strings"
)

// Rows is a flag value holding a matrix of numbers given row by row: each
// use of the flag adds rows, written as numbers separated by commas and
// rows separated by semicolons ("0.38,0;0,0.27" or "--rotation 0.38,0
// --rotation 0,0.27"). Every row must hold Width numbers.
type Rows struct {
	dst   *[][]float64
	width int
	set   bool
}

// NewRows returns a Rows of rows of width numbers that fills dst.
func NewRows(dst *[][]float64, width int) *Rows { return &Rows{dst: dst, width: width} }

// Set parses one or more rows and appends them (the first use replaces the
// default).
func (v *Rows) Set(s string) error {
	if !v.set {
		*v.dst, v.set = nil, true
	}
	for _, row := range strings.Split(s, ";") {
		parts := strings.Split(row, ",")
		if len(parts) != v.width {
			return fmt.Errorf("row %q: want %d numbers separated by commas, rows separated by ';'", strings.TrimSpace(row), v.width)
		}
		r := make([]float64, v.width)
		for i, p := range parts {
			x, err := strconv.ParseFloat(strings.TrimSpace(p), 64)
			if err != nil {
				return fmt.Errorf("row %q: %q is not a number", strings.TrimSpace(row), strings.TrimSpace(p))
			}
			r[i] = x
		}
		*v.dst = append(*v.dst, r)
	}
	return nil
}

func (v *Rows) String() string {
	rows := make([]string, len(*v.dst))
	for i, r := range *v.dst {
		parts := make([]string, len(r))
		for j, x := range r {
			parts[j] = strconv.FormatFloat(x, 'g', -1, 64)
		}
		rows[i] = strings.Join(parts, ",")
	}
	return strings.Join(rows, ";")
}

// Type names the value in help: ROWS.
func (v *Rows) Type() string { return "rows" }
