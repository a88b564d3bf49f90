package budget

import (
	"context"
	"errors"
	"fmt"

	"phasonhull/pattern/design"
	"phasonhull/topology/hull"
	"phasonhull/topology/spectrum"
)

// Level is one fabrication error: every site moved by a Gaussian error of
// standard deviation Sigma (in the design's unit), a fraction Missing of
// the sites left out, and a linear scale drift (the local scale grows from
// 1 at the first site to 1 + 2·Drift at the last), as the design
// perturbations of package design apply them.
type Level struct {
	Sigma   float64 `json:"sigma"`
	Missing float64 `json:"missing"`
	Drift   float64 `json:"drift"`
}

// Measure says what a trial measures beyond the gaps of its spectrum.
type Measure struct {
	// Hull asks for the hull analysis of the sample (class and angles).
	Hull bool
	// Edges asks for the boundary states over one turn of the phase,
	// followed in the EdgeGaps widest gaps (0: spectrum.DefaultEdgeGaps).
	Edges    bool
	EdgeGaps int
}

// Trial is what one fabricated sample showed.
type Trial struct {
	// Spectrum is the gap analysis of the sample's spectrum, labelled.
	Spectrum *spectrum.Result
	// Class and Angles are the hull analysis's, when it was asked for.
	Class  hull.Class
	Angles []float64
	// Edges are the followed gaps of the phase sweep, when asked for and
	// possible (an open chain of a design with a phase); nil otherwise.
	Edges []spectrum.EdgeGap
}

// Sampler draws fabricated samples of a design and measures them. It is
// the seam between the budget's statistics and a kind of design: Chain is
// the sampler of one-dimensional designs, and a design of another
// dimension plugs in by implementing Sample.
type Sampler interface {
	// Sample draws the sample of error level l seeded by seed (the design
	// itself for the zero Level) and measures it. It must be safe to call
	// from several goroutines and depend on nothing but its arguments.
	Sample(ctx context.Context, l Level, seed uint64, m Measure) (Trial, error)
	// Describe returns the number of sites, the length unit and the mean
	// spacing of the design (the scale the search for a budget starts
	// from when no error level gives one).
	Describe() (sites int, unit string, spacing float64)
}

// Chain samples a one-dimensional design spec: each trial generates the
// design with the level's perturbations (design.Spec Noise, Missing and
// Drift, seeded by the trial) and analyses the spectrum of Model on it
// with Options.
type Chain struct {
	// Spec is the design; its own perturbations are ignored.
	Spec design.Spec
	// Model is the operator built on every sample.
	Model spectrum.Model
	// Options find and label the gaps (the design's labels: see
	// spectrum.ChooseLabels); Workers is set to 1, the trials being run
	// in parallel instead.
	Options spectrum.Options
}

// Describe returns the design's number of sites, unit and mean spacing
// (0 when the design cannot be generated; Sample says why).
func (c Chain) Describe() (int, string, float64) {
	spec := c.Spec
	spec.Noise, spec.Missing, spec.Extra, spec.Drift = 0, 0, 0, 0
	p, err := design.Generate(spec)
	if err != nil {
		return c.Spec.Sites, c.Spec.Unit, 0
	}
	return p.Len(), p.Unit, p.MeanSpacing()
}

// Sample generates and measures one sample of the design.
func (c Chain) Sample(ctx context.Context, l Level, seed uint64, m Measure) (Trial, error) {
	spec := c.Spec
	spec.Noise, spec.Missing, spec.Extra, spec.Drift, spec.Seed = l.Sigma, l.Missing, 0, l.Drift, seed
	p, err := design.Generate(spec)
	if err != nil {
		return Trial{}, fmt.Errorf("budget: the sample at σ = %g, missing %g, drift %g: %w", l.Sigma, l.Missing, l.Drift, err)
	}
	model := c.Model
	if model.OnSite.Values != nil && len(model.OnSite.Values) != p.Len() {
		return Trial{}, errors.New("budget: per-site on-site terms cannot follow missing sites")
	}
	opt := c.Options
	opt.Workers = 1
	op, err := spectrum.New(p, model)
	if err != nil {
		return Trial{}, fmt.Errorf("budget: %w", err)
	}
	var t Trial
	if t.Spectrum, err = spectrum.AnalyzeContext(ctx, op, opt); err != nil {
		return Trial{}, err
	}
	if m.Hull {
		r, err := hull.AnalyzeContext(ctx, p, hull.Options{Workers: 1})
		if err != nil {
			return Trial{}, fmt.Errorf("budget: hull analysis: %w", err)
		}
		t.Class, t.Angles = r.Hull.Class, r.Angles
	}
	if _, phased := spec.ShiftPhase(0); m.Edges && phased && model.Ends != spectrum.Periodic {
		sweep, err := spectrum.PhaseSweep(spec)
		if err != nil {
			return Trial{}, err
		}
		er, err := spectrum.EdgeModesContext(ctx, sweep, model, spectrum.EdgeOptions{Options: opt, Gaps: m.EdgeGaps})
		if err != nil {
			return Trial{}, err
		}
		t.Edges = er.Gaps
	}
	return t, nil
}
