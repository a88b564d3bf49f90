package spectrum

import (
	"errors"
	"fmt"
	"math"
	"slices"
)

// Measured is the method of a Result computed from measured levels.
const Measured Method = "measured"

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
