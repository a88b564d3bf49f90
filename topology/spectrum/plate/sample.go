package plate

import (
	"context"
	"errors"
	"fmt"
	"math"
	"reflect"
	"strings"

	"phasonhull/pattern"
	"phasonhull/pattern/design"
	"phasonhull/pattern/lattice"
	"phasonhull/topology"
	"phasonhull/topology/hull"
)

// Sample is a plate to compute spectra on: its sites, their average
// lattice, and the rotation matrix A that labels its gaps — the design's
// own A for a design, the A that the hull analysis recovers for a file.
type Sample struct {
	Plane   *pattern.Plane
	Lattice *lattice.Lattice
	// Rotation is A (d rows of 2 numbers, turns per lattice step of the
	// lattice it was read on), RotationUncertainty one standard
	// uncertainty of each entry (zeros for a design's closed form).
	Rotation            [][]float64
	RotationUncertainty [][]float64
	// Class is the hull class the labels rest on ("" for a design, whose
	// A is known).
	Class string
	// Design is the spec the sample was generated from, nil for a file.
	Design *design.Spec
	// Warnings say what a reader should know about the labels.
	Warnings []string
}

// NewSample recovers the average lattice of a plane and reads A off its
// hull (hull.AnalyzePlane). A hull that gives no A (a point or an
// unresolved hull) leaves Rotation nil, with a warning: the gaps are then
// labelled in Z (and Zα with a flux) only.
func NewSample(ctx context.Context, p *pattern.Plane) (*Sample, error) {
	l, err := lattice.Recover(ctx, p, lattice.Options{})
	if err != nil {
		return nil, fmt.Errorf("plate: %w", err)
	}
	r, err := hull.AnalyzePlane(ctx, l, hull.Options{})
	if err != nil {
		return nil, fmt.Errorf("plate: %w", err)
	}
	s := &Sample{Plane: p, Lattice: l, Rotation: r.Rotation, RotationUncertainty: r.RotationUncertainty, Class: string(r.Hull.Class)}
	if len(r.Rotation) == 0 {
		s.Warnings = append(s.Warnings, fmt.Sprintf("the hull analysis gives no rotation matrix (hull %s): the gaps are labelled in Z (and Zα with a flux) only", r.Hull.Class))
	}
	return s, nil
}

// DesignSample generates the plate of a two-dimensional design, recovers
// its lattice and takes A from the design's closed form (Spec.Rotation).
func DesignSample(ctx context.Context, spec design.Spec) (*Sample, error) {
	p, err := design.GeneratePlane(spec)
	if err != nil {
		return nil, err
	}
	l, err := lattice.Recover(ctx, p, lattice.Options{})
	if err != nil {
		return nil, fmt.Errorf("plate: %w", err)
	}
	c := spec.WithDefaults()
	A := c.Rotation()
	unc := make([][]float64, len(A))
	for i := range unc {
		unc[i] = make([]float64, 2)
	}
	return &Sample{Plane: p, Lattice: l, Rotation: A, RotationUncertainty: unc, Design: &c}, nil
}

// Generators returns the generators g_i of the sample's gap-label group
// Z + Σ Z·g_i (topology.PlaneGenerators of A, within its uncertainty,
// without its leading 1), with the flux α appended when there is one: the
// Generators of Options.
func (s *Sample) Generators(flux Flux) ([]float64, error) {
	eps := 1e-9
	for _, row := range s.RotationUncertainty {
		for _, u := range row {
			eps = max(eps, 3*u)
		}
	}
	g, err := topology.PlaneGenerators(s.Rotation, eps)
	if err != nil {
		return nil, fmt.Errorf("plate: %w", err)
	}
	g = g[1:]
	if a := flux.Float(); a != 0 {
		g = append(g, a)
	}
	return g, nil
}

// PhasePotential returns the on-site term Σ_k 2λ·cos 2π(ψ_k + φ) of the
// design's phase field ψ_n = ψ0 + A·n at each site of the plane (in its
// order), n the design's lattice index of the lattice point nearest the
// site. It needs a design.
func (s *Sample) PhasePotential(lambda, phase float64) ([]float64, error) {
	if s.Design == nil {
		return nil, errors.New("plate: a potential of the phase needs the design's phase field: give a design, not a file")
	}
	c := *s.Design
	A := c.Rotation()
	if len(A) == 0 {
		return nil, fmt.Errorf("plate: the %s design has no phase field (no rotation)", c.Family)
	}
	b := designBasis(c)
	det := b[0][0]*b[1][1] - b[1][0]*b[0][1]
	v := make([]float64, s.Plane.Len())
	for i, x := range s.Plane.Points {
		// n = x·B⁻¹ (B's rows a1, a2), rounded to the nearest lattice point.
		n1 := math.Round((x[0]*b[1][1] - x[1]*b[1][0]) / det)
		n2 := math.Round((-x[0]*b[0][1] + x[1]*b[0][0]) / det)
		for k, row := range A {
			psi := row[0]*n1 + row[1]*n2 + phase
			if k < len(c.Phases) {
				psi += c.Phases[k]
			}
			v[i] += 2 * lambda * math.Cos(2*math.Pi*(psi-math.Floor(psi)))
		}
	}
	return v, nil
}

// designBasis is the basis a1, a2 of a two-dimensional design's lattice.
func designBasis(c design.Spec) [2][2]float64 {
	a := c.Spacing
	if c.Lattice == design.LatticeHex {
		return [2][2]float64{{a, 0}, {a / 2, a * math.Sqrt(3) / 2}}
	}
	return [2][2]float64{{a, 0}, {0, a}}
}

// WithParam returns a copy of spec with the numeric parameter name (its
// JSON name, as "phasonhull generate" takes it: twist, scale, amp,
// spacing, …) set to v.
func WithParam(spec design.Spec, name string, v float64) (design.Spec, error) {
	rv := reflect.ValueOf(&spec).Elem()
	for i := range rv.NumField() {
		f := rv.Type().Field(i)
		tag, _, _ := strings.Cut(f.Tag.Get("json"), ",")
		if tag != name {
			continue
		}
		if f.Type.Kind() != reflect.Float64 {
			return spec, fmt.Errorf("design parameter %q is not one number", name)
		}
		rv.Field(i).SetFloat(v)
		return spec, nil
	}
	return spec, fmt.Errorf("%q is not a numeric parameter of a design", name)
}
