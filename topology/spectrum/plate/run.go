package plate

import (
	"context"
	"fmt"
)

// Config is an operator and the analysis of its spectrum on a sample: the
// Model (its on-site Values, if any, are added to the potential of the
// phase), the strength λ and phase shift φ of the potential
// Σ_k 2λ·cos 2π(ψ_k + φ) of a design's phase field (Harper; 0 for none),
// and the Options of Analyze (their Generators are the sample's).
type Config struct {
	Model       Model
	Harper      float64
	HarperPhase float64
	Options     Options
}

// Operator builds the operator of c on the sample.
func (c Config) Operator(s *Sample) (*Operator, error) {
	m := c.Model
	if c.Harper != 0 {
		v, err := s.PhasePotential(c.Harper, c.HarperPhase)
		if err != nil {
			return nil, err
		}
		if m.OnSite.Values != nil {
			for i := range v {
				v[i] += m.OnSite.Values[i]
			}
		}
		m.OnSite.Values = v
	}
	return New(s.Lattice, s.Plane.Points, m)
}

// Run builds the operator of c on the sample and analyses its spectrum,
// labelling the gaps in the sample's group (with the model's flux).
func (c Config) Run(ctx context.Context, s *Sample) (*Result, *Operator, error) {
	op, err := c.Operator(s)
	if err != nil {
		return nil, nil, err
	}
	opt := c.Options
	if opt.Generators, err = s.Generators(c.Model.Flux); err != nil {
		return nil, nil, err
	}
	res, err := Analyze(ctx, op, opt)
	if err != nil {
		return nil, nil, fmt.Errorf("plate: %w", err)
	}
	res.Warnings = append(res.Warnings, s.Warnings...)
	return res, op, nil
}
