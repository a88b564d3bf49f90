package hull

import (
	"context"
	"errors"
	"fmt"

	"phasonhull/pattern"
	"phasonhull/pattern/lattice"
	"phasonhull/topology"
)

// AnalyzeSites runs the hull analysis of what pattern.ReadSites read: a
// chain through AnalyzeContext, a plane through lattice.Recover and
// AnalyzePlane. A plane with no average lattice (lattice.ErrNoLattice: a
// Poisson set, a glass) is not an error: its hull is disordered, with the
// recovery's reason, and the returned lattice is nil. The Result's Source
// is the sites'. The lattice is returned for pictures of a plane (nil for
// a chain).
func AnalyzeSites(ctx context.Context, s pattern.Sites, lopt lattice.Options, opt Options) (*Result, *lattice.Lattice, error) {
	switch {
	case s.Chain != nil && s.Plane == nil:
		res, err := AnalyzeContext(ctx, s.Chain, opt)
		return res, nil, err
	case s.Plane == nil || s.Chain != nil:
		return nil, nil, errors.New("hull analysis: want exactly one of a chain and a plane")
	}
	p := s.Plane
	l, err := lattice.Recover(ctx, p, lopt)
	if errors.Is(err, lattice.ErrNoLattice) {
		return noLattice(p, err, opt), nil, nil
	}
	if err != nil {
		return nil, nil, fmt.Errorf("%s: %w", p.Source, err)
	}
	res, err := AnalyzePlane(ctx, l, opt)
	if err != nil {
		return nil, nil, fmt.Errorf("%s: %w", p.Source, err)
	}
	res.Source = p.Source
	res.Notes = append(append([]string{}, p.Notes...), res.Notes...)
	return res, l, nil
}

// noLattice is the result of a plane with no average lattice: disordered,
// the recovery's refusal as the reason, no lattice and no labels but the
// integers.
func noLattice(p *pattern.Plane, why error, opt Options) *Result {
	opt, _ = opt.withDefaults()
	return &Result{
		Schema: Schema, Dimension: 2, Source: p.Source, Sites: p.Len(), Unit: p.Unit,
		Hull:   Hull{Class: Disordered, Reason: fmt.Sprintf("%v; a plate's hull is read on its lattice, and sites with none are disordered at the resolution of the data", why)},
		Angles: []float64{}, AngleUncertainty: []float64{},
		GapLabels: GapLabels{Generators: []float64{1}, MaxCoeff: opt.MaxCoeff, Labels: []topology.Label{}},
		Notes:     append([]string{}, p.Notes...), Warnings: []string{},
	}
}
