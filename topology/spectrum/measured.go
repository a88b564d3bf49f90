package spectrum

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"
)

// Measured is the method of a Result computed from measured levels.
const Measured Method = "measured"

// MaxValues bounds the levels ReadValues accepts.
const MaxValues = 10_000_000

// ReadValues reads measured levels — resonance frequencies, squared
// frequencies or energies — one per line: the first field of each line
// (fields separated by commas, semicolons, tabs or spaces). Blank lines
// and lines starting with '#' are skipped, and so is a first line whose
// first field is not a number (a header). Every value must be finite; at
// least two are needed. name is used in messages.
func ReadValues(r io.Reader, name string) ([]float64, error) {
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 64<<10), 1<<20)
	var v []float64
	line, seen := 0, 0
	for sc.Scan() {
		line++
		s := strings.TrimSpace(sc.Text())
		if s == "" || s[0] == '#' {
			continue
		}
		seen++
		f := splitFields(s)
		x, err := strconv.ParseFloat(f[0], 64)
		if err != nil {
			if seen == 1 {
				continue // a header
			}
			return nil, fmt.Errorf("reading %s: line %d: %q is not a number", name, line, f[0])
		}
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return nil, fmt.Errorf("reading %s: line %d: %v is not a finite number", name, line, x)
		}
		if len(v) >= MaxValues {
			return nil, fmt.Errorf("reading %s: more than %d values", name, MaxValues)
		}
		v = append(v, x)
	}
	if err := sc.Err(); err != nil {
		return nil, fmt.Errorf("reading %s: line %d: %w", name, line+1, err)
	}
	if len(v) < 2 {
		return nil, fmt.Errorf("reading %s: %d value(s); a spectrum needs at least two", name, len(v))
	}
	return v, nil
}

// AnalyzeMeasured finds the gaps of a measured spectrum — the levels of a
// sample, in any order — wider than MinGap, their IDS (levels at or below
// the gap over the number of levels given) and, with angles or a period,
// their labels. Options.Method and Workers are ignored.
//
// Without eigenvectors nothing tells a boundary state from a bulk level:
// a level inside a gap splits it into two gaps whose IDS differ by 1/N.
// And a level missing from the list lowers every IDS above it by 1/N.
func AnalyzeMeasured(values []float64, opt Options) (*Result, error) {
	if len(values) < 2 {
		return nil, errors.New("spectrum: a measured spectrum needs at least two levels")
	}
	for i, x := range values {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return nil, fmt.Errorf("spectrum: level %d: %v is not a finite number", i+1, x)
		}
	}
	if err := opt.check(); err != nil {
		return nil, fmt.Errorf("spectrum: %w", err)
	}
	v := slices.Clone(values)
	slices.Sort(v)
	n := len(v)
	res := &Result{Sites: n, Method: Measured, Values: v, Lowest: v[0], Highest: v[n-1]}
	res.MinGap = opt.minGap() * (res.Highest - res.Lowest)
	var gaps []Gap
	for k := 0; k+1 < n; k++ {
		if w := v[k+1] - v[k]; w >= res.MinGap && w > 0 {
			gaps = append(gaps, Gap{
				Lower: v[k], Upper: v[k+1], Width: w, RelWidth: w / (res.Highest - res.Lowest),
				Below: k + 1, IDS: float64(k+1) / float64(n),
			})
		}
	}
	if err := finish(res, gaps, opt); err != nil {
		return nil, fmt.Errorf("spectrum: %w", err)
	}
	return res, nil
}
