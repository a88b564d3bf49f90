package hull

import "phasonhull/topology"

// LabelGroup is the gap-label group of a hull in the form an operator's
// spectrum is labelled with (package topology/spectrum). At most one of
// Period, Angles and Labels is set; none when the hull gives no labels
// inside a spectrum (a point hull, whose group is Z) or when it is not
// known (an unresolved hull, a tiling whose group was not resolved).
type LabelGroup struct {
	// Period p > 1 of a finite hull: the labels k/p.
	Period int
	// Angles generate the group Z + Zθ1 (+ Zθ2) of a circle, a torus or
	// the Cantor hull of a Sturmian word; Uncertainty is the largest
	// standard uncertainty of the angles.
	Angles      []float64
	Uncertainty float64
	// Labels is the hull's own label list when its group is not written
	// with the angles (the factor frequencies of a substitution tiling),
	// Generators the generators of that group.
	Labels     []topology.Label
	Generators []float64
}

// LabelGroup returns the group the hull's gap labels lie in, by these
// rules in order:
//
//  1. a finite hull of period p: the labels k/p;
//  2. measured angles (circle, torus, a Sturmian word's Cantor hull): the
//     group Z + Zθ1 (+ Zθ2), with the angles' largest uncertainty;
//  3. a point hull: no labels (its group is Z);
//  4. a listed label set (a hull whose group is not Z + Zθ): that list;
//  5. otherwise no labels.
func (r *Result) LabelGroup() LabelGroup {
	switch {
	case r.Hull.Class == Finite:
		return LabelGroup{Period: r.Hull.Period}
	case len(r.Angles) > 0:
		sig := 0.0
		for _, s := range r.AngleUncertainty {
			sig = max(sig, s)
		}
		return LabelGroup{Angles: r.Angles, Uncertainty: sig}
	case r.Hull.Class == Point:
		return LabelGroup{}
	case len(r.GapLabels.Labels) > 0:
		return LabelGroup{Labels: r.GapLabels.Labels, Generators: r.GapLabels.Generators}
	}
	return LabelGroup{}
}
