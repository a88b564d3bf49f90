package spectrum

import (
	"context"
	"errors"
	"fmt"

	"phasonhull/pattern/design"
)

// ScanTheta computes the whole spectrum of model m on the design spec for
// each angle in thetas, in order, and hands each to f (the values
// ascending; f must not keep the slice). The angle replaces the design's
// θ when its family has one (modulated, two-angle, sturmian) and the
// almost-Mathieu on-site θ when m has that term; one of the two must
// apply. Each design must have at most DenseLimit sites. An error from f
// stops the scan and is returned.
func ScanTheta(spec design.Spec, m Model, thetas []float64, f func(theta float64, values []float64) error) error {
	return ScanThetaContext(context.Background(), spec, m, thetas, f)
}

// ScanThetaContext is ScanTheta under a context: it checks ctx before each
// angle and returns an error wrapping ctx.Err() once ctx is done.
func ScanThetaContext(ctx context.Context, spec design.Spec, m Model, thetas []float64, f func(theta float64, values []float64) error) error {
	if err := spec.Validate(); err != nil {
		return fmt.Errorf("spectrum: %w", err)
	}
	// A valid spec has θ ≠ 0 exactly when its family takes θ.
	designTheta := spec.Theta != 0
	if !designTheta && m.OnSite.Lambda == 0 {
		return fmt.Errorf("spectrum: nothing to scan: the %s family has no θ and the model has no almost-Mathieu on-site term", spec.Family)
	}
	if spec.Sites > DenseLimit {
		return fmt.Errorf("spectrum: %d sites: a θ scan computes every level, for at most %d sites", spec.Sites, DenseLimit)
	}
	if f == nil {
		return errors.New("spectrum: no function to receive the spectra")
	}
	for _, th := range thetas {
		if err := ctx.Err(); err != nil {
			return fmt.Errorf("spectrum: θ scan stopped at θ = %g: %w", th, err)
		}
		s, mm := spec, m
		if designTheta {
			s.Theta = th
		}
		if mm.OnSite.Lambda != 0 {
			mm.OnSite.Theta = th
		}
		p, err := design.Generate(s)
		if err != nil {
			return fmt.Errorf("spectrum: θ = %g: %w", th, err)
		}
		op, err := New(p, mm)
		if err != nil {
			return fmt.Errorf("spectrum: θ = %g: %w", th, err)
		}
		v, err := op.eigenvalues(0)
		if err != nil {
			return fmt.Errorf("spectrum: θ = %g: %w", th, err)
		}
		if err := f(th, v); err != nil {
			return err
		}
	}
	return nil
}
