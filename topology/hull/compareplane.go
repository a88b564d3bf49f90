package hull

import (
	"fmt"
	"math"
	"slices"
	"strings"

	"phasonhull/topology"
)

// comparePlanes finishes CompareWith for two planes of the same class
// with a torus (circle, torus, torus3): their rotation matrices must
// describe the same hull, compared as modules — any integer change of
// lattice basis or torus coordinates, and any integer shift, is the same
// hull (topology.PlaneModuleDistance, coefficients up to
// DefaultMaxCoeff). Each AngleCheck holds two matrices row by row;
// Difference is their distance and Allowed compareSigmas times the
// combined standard uncertainty of the largest uncertainty of an entry on
// each side, plus, when the spec fixes the matrix (ref.Rotation), the
// distance of the design's own analysis from it (the analysis's error on
// the design, as for angles). The sample is checked against the design's
// analysis and, when ref fixes it, against the exact matrix.
func comparePlanes(c Comparison, design, measured *Result, ref *Reference) Comparison {
	modelTol := 0.0
	useRef := ref != nil && len(ref.Rotation) > 0 && len(ref.Rotation) == len(design.Rotation)
	if useRef {
		modelTol = moduleDistance(ref.Rotation, design.Rotation)
	}
	c.Angles = append(c.Angles, checkRotation("design", design.Rotation, design.RotationUncertainty, measured, modelTol))
	if useRef {
		zero := make([][]float64, len(ref.Rotation))
		for i, row := range ref.Rotation {
			zero[i] = make([]float64, len(row))
		}
		c.Angles = append(c.Angles, checkRotation("reference", ref.Rotation, zero, measured, modelTol))
	}
	c.Agree = true
	var parts []string
	for _, a := range c.Angles {
		c.Agree = c.Agree && a.Within
		of := "the design's analysis"
		if a.Against == "reference" {
			of = "the exact matrix of the spec"
		}
		rel := "allowed"
		if !a.Within {
			rel = "beyond the allowed"
		}
		parts = append(parts, fmt.Sprintf("%.3g from %s (%s %.3g)", a.Difference, of, rel, a.Allowed))
	}
	if c.Agree {
		c.Verdict = fmt.Sprintf("both hulls are %s; the sample's rotation matrix, as a module, is %s", describeClass(c.DesignClass, 0), strings.Join(parts, " and "))
	} else {
		c.Verdict = fmt.Sprintf("both hulls are %s, but the sample's rotation matrix, as a module, is %s: the sample does not have the intended rotation matrix", describeClass(c.DesignClass, 0), strings.Join(parts, " and "))
	}
	return c
}

// checkRotation compares an expected rotation matrix (with
// uncertainties) with the measured one, as modules.
func checkRotation(against string, exp, expErr [][]float64, m *Result, modelTol float64) AngleCheck {
	flat := func(v [][]float64) []float64 { return append([]float64{}, slices.Concat(v...)...) }
	largest := func(v [][]float64) float64 {
		out := 0.0
		for _, x := range slices.Concat(v...) {
			out = math.Max(out, x)
		}
		return out
	}
	a := AngleCheck{
		Against: against, Expected: flat(exp), ExpectedErr: flat(expErr),
		Measured: flat(m.Rotation), MeasuredErr: flat(m.RotationUncertainty), ModelTolerance: modelTol,
	}
	a.Sigma = math.Hypot(largest(expErr), largest(m.RotationUncertainty))
	a.Difference = moduleDistance(exp, m.Rotation)
	a.Allowed = compareSigmas*a.Sigma + modelTol
	a.Within = a.Difference <= a.Allowed
	return a
}

// moduleDistance is topology.PlaneModuleDistance with coefficients up to
// DefaultMaxCoeff, ½ (the largest distance there is) when no integer
// change of basis relates the two.
func moduleDistance(a, b [][]float64) float64 {
	d := topology.PlaneModuleDistance(a, b, DefaultMaxCoeff)
	if math.IsInf(d, 0) {
		return 0.5
	}
	return d
}
