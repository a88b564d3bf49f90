package hull

import (
	"fmt"
	"math"
	"slices"

	"phasonhull/topology"
)

// comparePlanes finishes CompareWith for two planes of the same class
// with a torus (circle, torus, torus3): their rotation matrices must
// describe the same hull, compared as modules — any integer change of
// lattice basis or torus coordinates, and any integer shift, is the same
// hull (topology.PlaneModuleDistance, coefficients up to
// DefaultMaxCoeff). The one AngleCheck holds both matrices row by row;
// Difference is that distance and Allowed compareSigmas times the
// combined standard uncertainty of the largest uncertainty of an entry
// on each side.
func comparePlanes(c Comparison, design, measured *Result) Comparison {
	flat := func(m [][]float64) []float64 { return slices.Concat(m...) }
	maxOf := func(m [][]float64) float64 {
		v := 0.0
		for _, x := range flat(m) {
			v = math.Max(v, x)
		}
		return v
	}
	a := AngleCheck{
		Against: "design", Expected: flat(design.Rotation), ExpectedErr: flat(design.RotationUncertainty),
		Measured: flat(measured.Rotation), MeasuredErr: flat(measured.RotationUncertainty),
	}
	if a.Expected == nil {
		a.Expected, a.ExpectedErr = []float64{}, []float64{}
	}
	if a.Measured == nil {
		a.Measured, a.MeasuredErr = []float64{}, []float64{}
	}
	a.Sigma = math.Hypot(maxOf(design.RotationUncertainty), maxOf(measured.RotationUncertainty))
	a.Difference = topology.PlaneModuleDistance(design.Rotation, measured.Rotation, DefaultMaxCoeff)
	if math.IsInf(a.Difference, 0) {
		a.Difference = 0.5
	}
	a.Allowed = compareSigmas * a.Sigma
	a.Within = a.Difference <= a.Allowed
	c.Angles = append(c.Angles, a)
	c.Agree = a.Within
	rel := "allowed"
	if !a.Within {
		rel = "beyond the allowed"
	}
	if c.Agree {
		c.Verdict = fmt.Sprintf("both hulls are %s moved by the plane; the sample's rotation matrix is %.3g from the design's as a module (%s %.3g)", describeClass(c.DesignClass, 0), a.Difference, rel, a.Allowed)
	} else {
		c.Verdict = fmt.Sprintf("both hulls are %s, but the sample's rotation matrix is %.3g from the design's as a module (%s %.3g): the sample does not have the intended rotation matrix", describeClass(c.DesignClass, 0), a.Difference, rel, a.Allowed)
	}
	return c
}
