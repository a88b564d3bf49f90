package spectrum

import (
	"context"
	"errors"
	"fmt"

	"phasonhull/pattern"
	"phasonhull/pattern/design"
	"phasonhull/topology"
	"phasonhull/topology/hull"
)

// LabelSource says where the gap labels of a spectrum came from.
type LabelSource string

// The sources ChooseLabels can pick, in the order it tries them.
const (
	GivenAngles  LabelSource = "given angles"
	GivenPeriod  LabelSource = "given period"
	DesignAngles LabelSource = "design angles"
	DesignCell   LabelSource = "design cell"
	HullAnalysis LabelSource = "hull analysis"
)

// LabelSources are the places a spectrum's labels may come from. Leave a
// source zero when it is not available.
type LabelSources struct {
	// Angles θ_i in turns (one or two) and Period are given labels: the
	// group Z + Zθ1 (+ Zθ2), or k/p.
	Angles []float64
	Period int
	// Design is the design the chain was built from.
	Design *design.Spec
	// Pattern is the chain itself, whose hull analysis gives the labels
	// when no source before it does.
	Pattern *pattern.Pattern
	// MaxCoeff bounds the angle coefficients |m_i| of the labels tried, in
	// the hull analysis and in the match width; 0 means DefaultMaxCoeff.
	MaxCoeff int
}

// Labelling is the label group ChooseLabels picked. At most one of
// Angles, Period and Labels is set; none when nothing labels the gaps.
type Labelling struct {
	Source LabelSource
	// Class is the hull class the analysis found (Source HullAnalysis).
	Class hull.Class
	// Angles, Period, and Labels with their Generators: the group, as in
	// hull.LabelGroup.
	Angles     []float64
	Period     int
	Labels     []topology.Label
	Generators []float64
	// Resolution is the match width when the angles carry an uncertainty;
	// 0 leaves the default DefaultResolution/N.
	Resolution float64
	// Unresolved is set, to the analysis's reason (hull.Hull.Reason), when
	// the hull analysis gave no label group: the gaps are not labelled.
	Unresolved string
	// Notes say why the gaps carry no label when that is a fact of the
	// pattern (a lattice); Warnings are the hull analysis's.
	Notes    []string
	Warnings []string
}

// ChooseLabels picks what labels a spectrum's gaps, by these rules in
// order, the first that applies:
//
//  1. given angles: the group Z + Zθ1 (+ Zθ2);
//  2. a given period p: the labels k/p;
//  3. the design's own angles, θ (and θ2), when its family takes θ (a
//     valid spec has θ ≠ 0 exactly then);
//  4. the cell of a periodic design (a valid spec has a cell exactly
//     then): the labels k/p, p the number of spacings in the cell;
//  5. the hull analysis of the pattern (hull.Analyze), through
//     hull.Result.LabelGroup: a finite hull's period; measured angles
//     (circle, torus, the Cantor hull of a Sturmian word); nothing for a
//     point hull, whose group Z has no label inside the spectrum; a hull's
//     own label list when its group is not Z + Zθ; else nothing, with the
//     analysis's reason in Unresolved.
//
// The match width: a label matches within DefaultResolution/N (the charge
// a finite chain's ends hold), widened, for angles the analysis measured,
// by |m|·σ ≤ MaxCoeff·σ, σ the largest standard uncertainty of the angles
// (an angle off by σ moves the label n + mθ by |m|·σ); N is the number of
// sites of the pattern.
func ChooseLabels(ctx context.Context, src LabelSources) (Labelling, error) {
	switch {
	case len(src.Angles) > 0:
		return Labelling{Source: GivenAngles, Angles: src.Angles}, nil
	case src.Period > 0:
		return Labelling{Source: GivenPeriod, Period: src.Period}, nil
	case src.Design != nil && src.Design.Theta != 0:
		l := Labelling{Source: DesignAngles, Angles: []float64{src.Design.Theta}}
		if src.Design.Theta2 != 0 {
			l.Angles = append(l.Angles, src.Design.Theta2)
		}
		return l, nil
	case src.Design != nil && len(src.Design.Cell) > 0:
		return Labelling{Source: DesignCell, Period: len(src.Design.Cell)}, nil
	case src.Pattern == nil:
		return Labelling{}, errors.New("spectrum: nothing to label the gaps with: give angles, a period, a design or the pattern")
	}
	mc := src.MaxCoeff
	if mc == 0 {
		mc = DefaultMaxCoeff
	}
	res, err := hull.AnalyzeContext(ctx, src.Pattern, hull.Options{MaxCoeff: mc})
	if err != nil {
		return Labelling{}, fmt.Errorf("spectrum: labels from the hull analysis: %w", err)
	}
	g := res.LabelGroup()
	l := Labelling{Source: HullAnalysis, Class: res.Hull.Class, Angles: g.Angles, Period: g.Period, Labels: g.Labels, Generators: g.Generators}
	switch {
	case len(g.Angles) > 0:
		l.Resolution = DefaultResolution/float64(src.Pattern.Len()) + float64(mc)*g.Uncertainty
	case g.Period > 0 || len(g.Labels) > 0:
	case res.Hull.Class == hull.Point:
		l.Notes = append(l.Notes, "the pattern is periodic with one site per cell: its gap-label group is Z, no gap inside the spectrum has a label")
	default:
		l.Unresolved = res.Hull.Reason
	}
	l.Warnings = res.Warnings
	return l, nil
}

// Apply returns opt labelled by l: its angles, period or label list and
// match width.
func (l Labelling) Apply(opt Options) Options {
	opt.Angles, opt.Period, opt.Labels = l.Angles, l.Period, l.Labels
	if l.Resolution != 0 {
		opt.Resolution = l.Resolution
	}
	return opt
}
