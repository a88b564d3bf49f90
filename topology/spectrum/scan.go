package spectrum

import (
	"bufio"
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"

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

// ParseGrid reads START:STOP:COUNT into COUNT evenly spaced values from
// START to STOP inclusive (START alone when COUNT is 1); COUNT must lie in
// 1..100000.
func ParseGrid(s string) ([]float64, error) {
	parts := strings.Split(s, ":")
	if len(parts) != 3 {
		return nil, fmt.Errorf("%q: want START:STOP:COUNT, e.g. 0.01:0.99:99", s)
	}
	a, err1 := strconv.ParseFloat(parts[0], 64)
	b, err2 := strconv.ParseFloat(parts[1], 64)
	n, err3 := strconv.Atoi(parts[2])
	if err1 != nil || err2 != nil || err3 != nil || math.IsNaN(a) || math.IsNaN(b) || math.IsInf(a, 0) || math.IsInf(b, 0) {
		return nil, fmt.Errorf("%q: START and STOP must be numbers and COUNT an integer", s)
	}
	if n < 1 || n > 100_000 {
		return nil, fmt.Errorf("%q: COUNT must lie in 1..100000", s)
	}
	if n == 1 {
		return []float64{a}, nil
	}
	v := make([]float64, n)
	for i := range v {
		v[i] = a + (b-a)*float64(i)/float64(n-1)
	}
	return v, nil
}

// WriteScan writes the spectra of ScanTheta as CSV rows
// theta,eigenvalue,ids (ids = (index + 1)/N), after a comment line naming
// the design's source, and hands each spectrum to each as well when it is
// not nil (each may keep the values).
func WriteScan(ctx context.Context, w io.Writer, spec design.Spec, m Model, thetas []float64, source string, each func(theta float64, values []float64)) error {
	bw := bufio.NewWriter(w)
	fmt.Fprintf(bw, "# phasonhull spectrum: every level of %s over %d values of θ; ids = (index + 1)/N\n", source, len(thetas))
	bw.WriteString("theta,eigenvalue,ids\n")
	var buf []byte
	err := ScanThetaContext(ctx, spec, m, thetas, func(theta float64, v []float64) error {
		if each != nil {
			each(theta, slices.Clone(v))
		}
		for k, e := range v {
			buf = strconv.AppendFloat(buf[:0], theta, 'g', -1, 64)
			buf = append(buf, ',')
			buf = strconv.AppendFloat(buf, e, 'g', -1, 64)
			buf = append(buf, ',')
			buf = strconv.AppendFloat(buf, float64(k+1)/float64(len(v)), 'g', -1, 64)
			buf = append(buf, '\n')
			if _, err := bw.Write(buf); err != nil {
				return err
			}
		}
		return nil
	})
	if err != nil {
		return err
	}
	return bw.Flush()
}
