package audit

import (
	"fmt"
	"math"

	"phasonhull/pattern"
)

// DefaultMaxScaleError is the default of Options.MaxScaleError: a
// registration scale more than 2% from 1 fails the audit.
const DefaultMaxScaleError = 0.02

// unitRatio is a ratio between two length units that a fitted scale may
// show when the design and the sample are written in different units.
type unitRatio struct {
	value float64
	text  string
	inch  bool // a ratio with inches, which the readers do not convert
}

// unitRatios are the ratios a scale is checked against: every power of ten
// between nm and m, and inches against mm and cm.
var unitRatios = func() []unitRatio {
	var r []unitRatio
	for k := 1; k <= 9; k++ {
		p, text := math.Pow(10, float64(k)), fmt.Sprintf("10^%d", k)
		if k <= 3 {
			text = fmt.Sprint(p)
		}
		r = append(r, unitRatio{p, text + "×", false}, unitRatio{1 / p, "1/" + text + " of", false})
	}
	for _, p := range []float64{25.4, 2.54} {
		r = append(r, unitRatio{p, fmt.Sprintf("%g×", p), true}, unitRatio{1 / p, fmt.Sprintf("1/%g of", p), true})
	}
	return r
}()

// likelyUnits returns why a scale of |scale| ± scaleErr (sample over
// design) looks like a unit mismatch, with the flag that fixes it, or ""
// when it is near no unit ratio: within the allowed relative error
// maxErr plus three standard errors of it. designUnit and sampleUnit are
// the units the files (or flags) gave, "" for none.
func likelyUnits(scale, scaleErr, maxErr float64, designUnit, sampleUnit string) string {
	s := math.Abs(scale)
	var best *unitRatio
	for i, r := range unitRatios {
		if math.Abs(s-r.value) <= r.value*maxErr+3*scaleErr &&
			(best == nil || math.Abs(math.Log(s/r.value)) < math.Abs(math.Log(s/best.value))) {
			best = &unitRatios[i]
		}
	}
	if best == nil {
		return ""
	}
	head := fmt.Sprintf("the sample looks %s the design", best.text)
	if best.inch {
		return head + ": one in inches and the other in mm or cm? convert the one in inches (the readers take nm, um, mm, cm and m)"
	}
	// unitFor returns the unit u with from = ratio·u, "" if none.
	unitFor := func(from string, ratio float64) string {
		for _, u := range []string{"nm", "um", "mm", "cm", "m"} {
			if f, err := pattern.UnitFactor(from, u); err == nil && math.Abs(f/ratio-1) < 1e-9 {
				return u
			}
		}
		return ""
	}
	switch {
	case designUnit != "" && sampleUnit == "":
		if u := unitFor(designUnit, best.value); u != "" {
			return fmt.Sprintf("%s: written in %s against a design in %s? give --unit %s (or --design-unit)", head, u, designUnit, u)
		}
		if w := unitFor(designUnit, 1/best.value); w != "" {
			return fmt.Sprintf("%s: a design written in %s rather than %s? give --design-unit %s (or --unit)", head, w, designUnit, w)
		}
	case designUnit == "" && sampleUnit != "":
		if u := unitFor(sampleUnit, 1/best.value); u != "" {
			return fmt.Sprintf("%s: a design written in %s against a sample in %s? give --design-unit %s (or --unit)", head, u, sampleUnit, u)
		}
	case designUnit != "" && sampleUnit != "":
		f, err := pattern.UnitFactor(designUnit, sampleUnit)
		if err != nil {
			break
		}
		if u := unitFor(designUnit, best.value*f); u != "" {
			return fmt.Sprintf("%s after converting %s to %s: the sample written in %s rather than %s? give --unit %s (or --design-unit)", head, designUnit, sampleUnit, u, sampleUnit, u)
		}
	}
	return head + ": are the design and the sample in different units? give them with --unit and --design-unit"
}
