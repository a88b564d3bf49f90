package audit

import (
	"context"
	"errors"
	"fmt"
	"math"
	"slices"

	"phasonhull/pattern"
	"phasonhull/pattern/lattice"
	"phasonhull/pattern/register"
	"phasonhull/topology/hull"
)

// Transform is the registration of a plane: x = offset + scale·R(rotation)·d
// for a design point d, R the counter-clockwise rotation by rotation
// degrees, with standard uncertainties; lengths in the sample's unit.
type Transform struct {
	Offset      [2]float64 `json:"offset"`
	OffsetErr   [2]float64 `json:"offset_uncertainty"`
	Rotation    float64    `json:"rotation_degrees"`
	RotationErr float64    `json:"rotation_uncertainty"`
	Scale       float64    `json:"scale"`
	ScaleErr    float64    `json:"scale_uncertainty"`
	// Mirrored says the sample is the design's mirror image: x = offset +
	// scale·R(rotation)·F·d, F the reflection (x, y) → (x, −y).
	Mirrored bool `json:"mirrored"`
}

// ErrDimensions is wrapped by Sites' error for a design and a sample of
// different dimensions.
var ErrDimensions = errors.New("the design and the sample have different dimensions")

// Sites audits a chain or a plane (exactly one of s.Chain and s.Plane set)
// against a design of the same dimension (or against its own hull when d
// is nil and s is a chain): Run for a chain, RunPlane for a plane. A
// design and a sample of different dimensions are refused with
// ErrDimensions and the reason.
func Sites(ctx context.Context, d *Design, s pattern.Sites, opt Options) (*Report, error) {
	switch {
	case s.Plane != nil && d != nil && d.File.Plane == nil:
		return nil, fmt.Errorf("%w: the sample %s is a plate of sites in the plane, the design %s a chain; audit a plate against a plate design (a 2D spec such as the plate or twisted family, or x,y centroids)", ErrDimensions, s.Plane.Source, d.File.Path)
	case s.Plane != nil:
		return RunPlane(ctx, d, s.Plane, opt)
	}
	return Run(ctx, d, s.Chain, opt)
}

// analyzePlane analyses the hull of a plane: its average lattice, then
// hull.AnalyzePlane.
func analyzePlane(ctx context.Context, p *pattern.Plane, opt hull.Options) (*hull.Result, error) {
	l, err := lattice.Recover(ctx, p, lattice.Options{})
	if err != nil {
		return nil, err
	}
	res, err := hull.AnalyzePlane(ctx, l, opt)
	if err != nil {
		return nil, err
	}
	res.Source = p.Source
	return res, nil
}

// RunPlane audits a plane sample against a plane design by the verdict
// rules Run applies (rules.go): the registration is a similarity
// (register.RegisterPlane), lengths are the lengths of residual vectors,
// and the hulls are compared by their rotation matrices as modules
// (hull.CompareWith). Merged and swapped sites are a chain's and are not
// looked for. An audit of a plane needs a design.
func RunPlane(ctx context.Context, d *Design, sample *pattern.Plane, opt Options) (*Report, error) {
	if err := opt.Validate(); err != nil {
		return nil, err
	}
	if d == nil || d.File.Plane == nil {
		return nil, errors.New("audit: a plate is audited against a plate design (--design); screening a plate against its own hull is not supported")
	}
	gate := cmp0(opt.Gate, register.DefaultGate)
	if gate >= 0.5 {
		return nil, fmt.Errorf("audit: gate %g: must lie in (0, 0.5) for a plate, so that the gates of two design sites never overlap", gate)
	}
	rep := &Report{
		Schema: Schema, Dimension: 2, Measured: sample.Source, Unit: sample.Unit, MeasuredSites: sample.Len(),
		MeasuredOrder: "file", Reasons: []string{}, Missing: []int{}, Extra: []int{},
		Merged: []Merge{}, Swapped: []Swap{}, Outliers: []int{}, Sites: []Site{}, Notes: []string{},
	}
	a := &audit{rep: rep, opt: opt, design: d}
	if err := a.setTolerance(sample.Unit); err != nil {
		return nil, err
	}
	if opt.Drift {
		rep.Notes = append(rep.Notes, "a plate is registered by a similarity (offset, rotation, scale): no drift is fitted")
	}
	rep.Hull.Measured, a.measuredErr = analyzePlane(ctx, sample, opt.Hull)

	dp := d.File.Plane
	rep.Design, rep.DesignKind, rep.DesignSites = d.File.Path, string(d.File.Kind), dp.Len()
	rep.Notes = append(rep.Notes, d.File.Notes...)
	factor, err := a.units(dp.Unit, sample.Unit, sample.Source)
	if err != nil {
		return nil, err
	}
	design := make([][2]float64, dp.Len())
	for i, q := range dp.Points {
		design[i] = [2]float64{q[0] * factor, q[1] * factor}
	}
	rep.designPts = design
	rep.measuredPts = make([][2]float64, sample.Len())
	for i, q := range sample.Points {
		if len(sample.Rows) == sample.Len() {
			rep.measuredPts[sample.Rows[i]] = q
		} else {
			rep.measuredPts[i] = q
		}
	}
	reg, err := register.RegisterPlane(ctx, design, sample.Points, register.PlaneOptions{Gate: gate})
	if err != nil {
		if ctx.Err() != nil {
			return nil, err
		}
		a.registerErr = err
	} else {
		a.fillPlane(reg, sample)
	}
	if d.HullErr == nil && rep.Hull.Measured != nil {
		c := hull.CompareWith(d.Hull, rep.Hull.Measured, d.Reference)
		rep.Hull.Comparison = &c
	}
	rep.Hull.Design, rep.Hull.Reference = d.Hull, d.Reference
	a.decide()
	return rep, nil
}

// cmp0 returns v, or def when v is 0.
func cmp0(v, def float64) float64 {
	if v == 0 {
		return def
	}
	return v
}

// fillPlane copies a plane registration into the report; measured
// indices become the sample's file rows.
func (a *audit) fillPlane(reg *register.PlaneResult, p *pattern.Plane) {
	rep := a.rep
	rep.reg2, a.registered = reg, true
	row := func(k int) int {
		if len(p.Rows) == p.Len() {
			return p.Rows[k]
		}
		return k
	}
	rep.Matched = len(reg.Matches)
	rep.Transform = &Transform{Offset: reg.Offset, OffsetErr: reg.OffsetErr, Rotation: reg.Rotation,
		RotationErr: reg.RotationErr, Scale: reg.Scale, ScaleErr: reg.ScaleErr, Mirrored: reg.Mirrored}
	rep.Scale, rep.ScaleErr = &rep.Transform.Scale, &rep.Transform.ScaleErr
	rep.Alignment = &Alignment{Cost: reg.Cost, CostErr: reg.CostErr, Ties: []Tie{}}
	for _, t := range reg.Ties {
		rep.Alignment.Ties = append(rep.Alignment.Ties, Tie{LatticeShift: &t.Shift, Turn: &t.Turn, Mirrored: t.Mirrored, Cost: t.Cost, CostErr: t.CostErr, Missing: t.Missing, Extra: t.Extra})
	}
	if reg.Mirrored {
		rep.Notes = append(rep.Notes, "the sample is the design's mirror image (an image whose y axis points down, say): it is registered through the reflection (x, y) → (x, −y)")
	}
	if n := len(reg.Ties); n > 0 {
		rep.Notes = append(rep.Notes, fmt.Sprintf("the matching is ambiguous: %d other alignment(s), the design moved by a symmetry of its lattice, leave as many sites unmatched at a cost within the uncertainty (alignment.ties): the modulation cannot tell them apart", n))
	}
	rep.Sigma, rep.OutlierThreshold = reg.Sigma, register.OutlierFactor*reg.Sigma
	rep.RMS, rep.Max = reg.RMS, reg.Max
	rep.Missing = reg.Missing
	rep.Extra = make([]int, len(reg.Extra))
	for i, k := range reg.Extra {
		rep.Extra[i] = row(k)
	}
	slices.Sort(rep.Extra)
	outliers := slices.Clone(reg.Outliers)
	for _, m := range reg.Matches {
		res := math.Hypot(m.Residual[0], m.Residual[1])
		pt, rv := p.Points[m.Measured], m.Residual
		site := Site{Design: &m.Design, Measured: row(m.Measured), Point: &pt, ResidualXY: &rv,
			Residual: res, Outlier: res > rep.OutlierThreshold}
		outliers = a.record(site, res, outliers)
	}
	slices.Sort(outliers)
	rep.Outliers = slices.Compact(outliers)
}

// missingAtPlane returns where the calibration puts each missing design
// site of a plane, in the order of Missing.
func (r *Report) missingAtPlane() [][2]float64 {
	if r.reg2 == nil {
		return nil
	}
	out := make([][2]float64, len(r.Missing))
	for i, j := range r.Missing {
		out[i] = r.reg2.Predict(r.designPts[j])
	}
	return out
}
