package audit

import (
	"cmp"
	"context"
	"errors"
	"fmt"
	"math"
	"slices"

	"phasonhull/pattern"
	"phasonhull/pattern/design"
	"phasonhull/pattern/register"
	"phasonhull/topology/hull"
)

// Schema names the layout of the Report's JSON form.
const Schema = "phasonhull.audit/1"

// Options control an audit. The zero value asks for the defaults: nothing
// missing or extra allowed, no tolerance, no drift, either direction, the
// default match gate and hull analysis.
type Options struct {
	// Tolerance is the largest residual allowed per site; the zero Length
	// sets none. A tolerance without a unit is in the sample's unit.
	Tolerance pattern.Length
	// AllowMissing and AllowExtra are the numbers of missing design sites
	// and extra measured sites allowed.
	AllowMissing, AllowExtra int
	// Drift fits a linear drift of the scale as well as offset and scale.
	Drift bool
	// Direction says which way the sample may run against the design.
	Direction register.Direction
	// Gate is the match gate, a fraction in (0, 1) of the smaller design
	// spacing next to a site; 0 means register.DefaultGate.
	Gate float64
	// MaxScaleError is the largest relative error of the registration
	// scale allowed, a fraction: the audit fails when the magnitude of
	// the fitted scale is outside 1 ± MaxScaleError (a design and a sample
	// in different units, say). 0 means DefaultMaxScaleError; +Inf turns
	// the check off.
	MaxScaleError float64
	// Hull controls the hull analysis of the sample.
	Hull hull.Options
}

// Validate refuses options no audit can use.
func (o Options) Validate() error {
	if !(o.Gate >= 0 && o.Gate < 1) {
		return fmt.Errorf("audit: gate %g: must lie in (0, 1)", o.Gate)
	}
	if !(o.MaxScaleError >= 0) {
		return fmt.Errorf("audit: max scale error %g: must be a positive fraction", o.MaxScaleError)
	}
	if o.AllowMissing < 0 || o.AllowExtra < 0 {
		return errors.New("audit: the numbers of missing and extra sites allowed must not be negative")
	}
	if !(o.Tolerance.Value >= 0) || math.IsInf(o.Tolerance.Value, 0) {
		return fmt.Errorf("audit: tolerance %v: must be a positive length", o.Tolerance)
	}
	return nil
}

// Design is a design made ready for audits: its sites and its hull
// analysed once. Audits only read it, so one Design serves many audits at
// once.
type Design struct {
	File *design.File
	// Reference is what a spec fixes of the hull in closed form; nil for
	// a positions file.
	Reference *hull.Reference
	// Hull is the design's hull analysis, or HullErr why it failed.
	Hull    *hull.Result
	HullErr error
}

// NewDesign analyses the hull of the design read into f.
func NewDesign(ctx context.Context, f *design.File, opt hull.Options) *Design {
	d := &Design{File: f}
	if f.Plane != nil {
		if f.Spec != nil {
			d.Reference = &hull.Reference{Family: f.Spec.Family, Rotation: f.Spec.Rotation()}
		}
		d.Hull, d.HullErr = analyzePlane(ctx, f.Plane, opt)
		return d
	}
	if f.Spec != nil {
		ref := hull.SpecReference(*f.Spec)
		d.Reference = &ref
	}
	d.Hull, d.HullErr = hull.AnalyzeContext(ctx, f.Pattern, opt)
	return d
}

// Verdict is the outcome of an audit.
type Verdict string

// The verdicts.
const (
	Pass Verdict = "pass"
	Fail Verdict = "fail"
)

// Report is the result of one audit. Its JSON form is the schema named
// Schema; lengths are in the sample's unit (Unit).
type Report struct {
	Schema string `json:"schema"`
	// Dimension is 2 for a plate (RunPlane); absent for a chain.
	Dimension     int      `json:"dimension,omitempty"`
	Verdict       Verdict  `json:"verdict"`
	Reasons       []string `json:"reasons"`
	Measured      string   `json:"measured"`
	Design        string   `json:"design,omitempty"`
	DesignKind    string   `json:"design_kind,omitempty"`
	Unit          string   `json:"unit"`
	MeasuredSites int      `json:"measured_sites"`
	DesignSites   int      `json:"design_sites,omitempty"`
	// MeasuredOrder says what measured indices count: "file", the file's
	// row order (0-based data rows, comments and header not counted).
	MeasuredOrder string `json:"measured_order"`
	// Matched counts the sites registered on the design, or, without a
	// design, those in the hull model.
	Matched int `json:"matched"`

	// The calibration x = offset + scale·d (+ scale·drift·(d − d0)²/span)
	// and its standard errors; absent without a design.
	Offset    *float64 `json:"offset,omitempty"`
	OffsetErr *float64 `json:"offset_uncertainty,omitempty"`
	Scale     *float64 `json:"scale,omitempty"`
	ScaleErr  *float64 `json:"scale_uncertainty,omitempty"`
	Drift     *float64 `json:"drift,omitempty"`
	DriftErr  *float64 `json:"drift_uncertainty,omitempty"`
	// Transform is the registration of a plate (offset, rotation, scale);
	// absent for a chain. Scale and ScaleErr repeat its scale.
	Transform *Transform `json:"transform,omitempty"`
	// MaxScaleError is the largest relative scale error allowed (a
	// fraction; Options.MaxScaleError); absent without a design.
	MaxScaleError *float64 `json:"max_scale_error,omitempty"`
	// Alignment is the cost of the registration's matching and the
	// alignments that tie with it; absent without a registration.
	Alignment *Alignment `json:"alignment,omitempty"`

	Sigma            float64  `json:"sigma"`
	OutlierThreshold float64  `json:"outlier_threshold"`
	Tolerance        *float64 `json:"tolerance,omitempty"`
	RMS              float64  `json:"rms"`
	Max              float64  `json:"max"`

	Missing  []int   `json:"missing"`
	Extra    []int   `json:"extra"`
	Merged   []Merge `json:"merged"`
	Swapped  []Swap  `json:"swapped"`
	Outliers []int   `json:"outliers"`
	Sites    []Site  `json:"sites"`

	Hull  Hulls    `json:"hull"`
	Notes []string `json:"notes"`

	designPos, measuredPos []float64
	reg                    *register.Result
	// A plate's: design points in the sample's unit, measured points by
	// file row, and the registration.
	designPts, measuredPts [][2]float64
	reg2                   *register.PlaneResult
}

// Alignment is the cost of the matching of the registration
// (register.Result.Cost: one per unmatched site plus (residual/gate)² per
// matched pair) with its standard uncertainty, and the other alignments
// whose cost ties with it (register.Result.Ties); Ties is empty when the
// matching is unambiguous.
type Alignment struct {
	Cost    float64 `json:"cost"`
	CostErr float64 `json:"cost_uncertainty"`
	Ties    []Tie   `json:"ties"`
}

// Tie is an alignment the data cannot tell from the one reported: the
// whole matching shifted by Shift sites along the sample (sorted
// ascending), leaving as many sites unmatched, at a cost within
// register.TieFactor combined uncertainties.
//
// For a plate, LatticeShift (in steps of the design's lattice basis),
// Turn (degrees) and Mirrored say how the tie moves the design
// (register.PlaneTie), and Shift is 0.
type Tie struct {
	Shift        int      `json:"shift"`
	LatticeShift *[2]int  `json:"lattice_shift,omitempty"`
	Turn         *float64 `json:"turn,omitempty"`
	Mirrored     bool     `json:"mirrored,omitempty"`
	Cost         float64  `json:"cost"`
	CostErr      float64  `json:"cost_uncertainty"`
	Missing      int      `json:"missing"`
	Extra        int      `json:"extra"`
}

// Merge is one measured site midway between two missing design sites.
type Merge struct {
	Design   [2]int  `json:"design"`
	Measured int     `json:"measured"`
	Position float64 `json:"position"`
}

// Swap is two consecutive rows of the file that match neighbouring design
// sites in the order opposite to the rows around them.
type Swap struct {
	Measured [2]int `json:"measured"`
	Design   [2]int `json:"design"`
}

// Site is one site of the per-site report. Design is absent without a
// design; WithinTolerance without a tolerance. For a plate, Point is the
// measured point, ResidualXY the residual vector, Residual its length and
// Position 0.
type Site struct {
	Design          *int        `json:"design,omitempty"`
	Measured        int         `json:"measured"`
	Position        float64     `json:"position"`
	Point           *[2]float64 `json:"point,omitempty"`
	ResidualXY      *[2]float64 `json:"residual_xy,omitempty"`
	Residual        float64     `json:"residual"`
	Outlier         bool        `json:"outlier"`
	WithinTolerance *bool       `json:"within_tolerance,omitempty"`
}

// Flagged reports whether the site is a robust outlier or beyond the
// tolerance.
func (s Site) Flagged() bool {
	return s.Outlier || (s.WithinTolerance != nil && !*s.WithinTolerance)
}

// Hulls are the hull analyses of an audit and their comparison.
type Hulls struct {
	Design     *hull.Result     `json:"design,omitempty"`
	Measured   *hull.Result     `json:"measured"`
	Comparison *hull.Comparison `json:"comparison,omitempty"`
	Reference  *hull.Reference  `json:"reference,omitempty"`
}

// Passed reports whether the verdict is Pass.
func (r *Report) Passed() bool { return r.Verdict == Pass }

// MissingAt returns where the calibration puts each missing design site
// in the sample, in the order of Missing; nil without a registration.
func (r *Report) MissingAt() []float64 {
	if r.reg == nil {
		return nil
	}
	out := make([]float64, len(r.Missing))
	for i, j := range r.Missing {
		out[i] = r.reg.Predict(r.designPos[j])
	}
	return out
}

// ExtraAt returns the positions of the extra sites, in the order of Extra.
func (r *Report) ExtraAt() []float64 {
	out := make([]float64, 0, len(r.Extra))
	for _, k := range r.Extra {
		if k >= 0 && k < len(r.measuredPos) {
			out = append(out, r.measuredPos[k])
		}
	}
	return out
}

// Run audits the sample against the design d, or, when d is nil, against
// the sample's own hull. Its errors are the caller's to fix (options, or a
// design and sample whose units cannot be compared); a sample that fails
// is a Report with the verdict Fail and its reasons.
func Run(ctx context.Context, d *Design, sample *pattern.Pattern, opt Options) (*Report, error) {
	if err := opt.Validate(); err != nil {
		return nil, err
	}
	if d != nil && d.File.Plane != nil {
		return nil, fmt.Errorf("%w: the sample %s is a chain, the design %s a plate of sites in the plane; audit a chain against a chain design", ErrDimensions, sample.Source, d.File.Path)
	}
	rep := &Report{
		Schema: Schema, Measured: sample.Source, Unit: sample.Unit, MeasuredSites: sample.Len(),
		MeasuredOrder: "file", Reasons: []string{}, Missing: []int{}, Extra: []int{},
		Merged: []Merge{}, Swapped: []Swap{}, Outliers: []int{}, Sites: []Site{},
		Notes: []string{}, measuredPos: fileOrder(sample),
	}
	a := &audit{rep: rep, opt: opt, design: d}
	if err := a.setTolerance(sample.Unit); err != nil {
		return nil, err
	}
	rep.Hull.Measured, a.measuredErr = hull.AnalyzeContext(ctx, sample, opt.Hull)
	if d == nil {
		a.screenOwnHull(sample)
	} else if err := a.registerOnDesign(sample); err != nil {
		return nil, err
	}
	a.decide()
	return rep, nil
}

// decide applies the verdict rules in order.
func (a *audit) decide() {
	rep := a.rep
	rep.Verdict = Pass
	for _, r := range rules {
		if reason := r.check(a); reason != "" {
			rep.Reasons = append(rep.Reasons, reason)
		}
	}
	if len(rep.Reasons) > 0 {
		rep.Verdict = Fail
	}
}

// audit is one audit in progress: the report it fills and what the
// verdict rules read beyond it.
type audit struct {
	rep    *Report
	opt    Options
	tol    float64 // the tolerance in the sample's unit; 0 for none
	design *Design

	// designUnit and sampleUnit are the units the design and the sample
	// came with ("" for none), for the scale rule's hint.
	designUnit, sampleUnit string

	registered  bool                // the sample was registered on the design
	measuredErr error               // why the sample's hull could not be analysed
	registerErr error               // why the sample could not be registered
	noModel     bool                // the sample's hull has no model to screen against
	screenErr   error               // why the screening failed
	screen      *register.Screening // the screening against the sample's own hull
}

// registerOnDesign registers the sample on the design and compares their
// hulls.
func (a *audit) registerOnDesign(p *pattern.Pattern) error {
	rep, d := a.rep, a.design
	dp := d.File.Pattern
	rep.Design, rep.DesignKind, rep.DesignSites = d.File.Path, string(d.File.Kind), dp.Len()
	rep.Notes = append(rep.Notes, d.File.Notes...)
	factor, err := a.units(dp.Unit, p.Unit, p.Source)
	if err != nil {
		return err
	}
	rep.designPos = make([]float64, dp.Len())
	for i, x := range dp.Positions {
		rep.designPos[i] = x * factor
	}

	reg, err := register.Register(rep.designPos, rep.measuredPos, register.Options{Drift: a.opt.Drift, Gate: a.opt.Gate, Direction: a.opt.Direction})
	if err != nil {
		a.registerErr = err
	} else {
		a.fillRegistration(reg)
	}
	if d.HullErr == nil && rep.Hull.Measured != nil {
		c := hull.CompareWith(d.Hull, rep.Hull.Measured, d.Reference)
		rep.Hull.Comparison = &c
	}
	rep.Hull.Design, rep.Hull.Reference = d.Hull, d.Reference
	return nil
}

// units notes how the design's unit relates to the sample's and returns
// the factor that converts design lengths to the sample's unit; an error
// for units that cannot be compared.
func (a *audit) units(designUnit, sampleUnit, source string) (float64, error) {
	rep := a.rep
	a.designUnit, a.sampleUnit = designUnit, sampleUnit
	maxErr := cmp.Or(a.opt.MaxScaleError, DefaultMaxScaleError)
	rep.MaxScaleError = &maxErr
	factor := 1.0
	switch {
	case designUnit == sampleUnit:
	case designUnit == "" || sampleUnit == "":
		known := designUnit + sampleUnit
		rep.Notes = append(rep.Notes, fmt.Sprintf("only one of design and sample names a unit (%s): both are taken to be in it", known))
		if rep.Unit == "" {
			rep.Unit = known
		}
	default:
		var err error
		if factor, err = pattern.UnitFactor(designUnit, sampleUnit); err != nil {
			return 0, fmt.Errorf("design %s against sample %s: %w", a.design.File.Path, source, err)
		}
		rep.Notes = append(rep.Notes, fmt.Sprintf("the design is in %s and the sample in %s: design positions are multiplied by %g", designUnit, sampleUnit, factor))
	}
	return factor, nil
}

// fillRegistration copies a registration into the report.
func (a *audit) fillRegistration(reg *register.Result) {
	rep := a.rep
	rep.reg, a.registered = reg, true
	rep.Matched = len(reg.Matches)
	rep.Offset, rep.OffsetErr = &reg.Offset, &reg.OffsetErr
	rep.Scale, rep.ScaleErr = &reg.Scale, &reg.ScaleErr
	if reg.DriftFitted {
		rep.Drift, rep.DriftErr = &reg.Drift, &reg.DriftErr
	}
	rep.Alignment = &Alignment{Cost: reg.Cost, CostErr: reg.CostErr, Ties: []Tie{}}
	for _, t := range reg.Ties {
		rep.Alignment.Ties = append(rep.Alignment.Ties, Tie{Shift: t.Shift, Cost: t.Cost, CostErr: t.CostErr, Missing: t.Missing, Extra: t.Extra})
	}
	if n := len(reg.Ties); n > 0 {
		rep.Notes = append(rep.Notes, fmt.Sprintf("the matching is ambiguous: %d other alignment(s), the whole matching shifted by %s site(s), leave as many sites unmatched at a cost within the uncertainty (alignment.ties); the one reported was the registration's own or the cheapest", n, shiftList(reg.Ties)))
	}
	rep.Sigma, rep.OutlierThreshold = reg.Sigma, register.OutlierFactor*reg.Sigma
	rep.RMS, rep.Max = reg.RMS, reg.Max
	rep.Missing, rep.Extra = reg.Missing, reg.Extra
	for _, m := range reg.Merged {
		rep.Merged = append(rep.Merged, Merge{Design: m.Design, Measured: m.Measured, Position: rep.measuredPos[m.Measured]})
	}
	for _, s := range reg.Swapped {
		rep.Swapped = append(rep.Swapped, Swap{Measured: s.Measured, Design: s.Design})
	}
	outliers := slices.Clone(reg.Outliers)
	for _, m := range reg.Matches {
		site := Site{Design: &m.Design, Measured: m.Measured, Position: rep.measuredPos[m.Measured],
			Residual: m.Residual, Outlier: math.Abs(m.Residual) > rep.OutlierThreshold}
		outliers = a.record(site, math.Abs(m.Residual), outliers)
	}
	slices.Sort(outliers)
	rep.Outliers = slices.Compact(outliers)
}

// screenOwnHull screens the sites against the sample's own hull model.
func (a *audit) screenOwnHull(p *pattern.Pattern) {
	rep, mres := a.rep, a.rep.Hull.Measured
	if mres == nil {
		return // the sample hull rule says why
	}
	if mres.SiteResiduals == nil {
		a.noModel = true
		return
	}
	rep.Notes = append(rep.Notes, "no design given: sites are screened against the sample's own hull model; missing sites are reported by the analysis' warnings only")
	s, err := register.Screen(mres.SiteResiduals, 1e-9*p.MeanSpacing())
	if err != nil {
		a.screenErr = err
		return
	}
	a.screen = &s
	rep.Sigma, rep.OutlierThreshold, rep.RMS, rep.Max = s.Sigma, s.Threshold, s.RMS, s.Max
	rep.Extra = rowsOf(p, s.NotFitted)
	rep.Matched = p.Len() - len(s.NotFitted)
	outliers := rowsOf(p, s.Flagged)
	for i, r := range mres.SiteResiduals {
		if math.IsNaN(r) {
			continue
		}
		site := Site{Measured: p.Rows[i], Position: p.Positions[i], Residual: r, Outlier: math.Abs(r) > s.Threshold}
		if a.tol > 0 {
			ok := math.Abs(r) <= a.tol
			site.WithinTolerance = &ok
			if !ok {
				outliers = append(outliers, p.Rows[i])
			}
		}
		rep.Sites = append(rep.Sites, site)
	}
	slices.Sort(outliers)
	rep.Outliers = slices.Compact(outliers)
}

// fileOrder returns the sample's positions in the order its file lists
// them, so that measured indices name file rows.
func fileOrder(p *pattern.Pattern) []float64 {
	if len(p.Rows) != p.Len() {
		return p.Positions
	}
	out := make([]float64, p.Len())
	for i, r := range p.Rows {
		out[r] = p.Positions[i]
	}
	return out
}

// rowsOf maps indices of sites in ascending order to file rows, sorted.
func rowsOf(p *pattern.Pattern, idx []int) []int {
	out := make([]int, len(idx))
	for k, i := range idx {
		out[k] = i
		if len(p.Rows) == p.Len() {
			out[k] = p.Rows[i]
		}
	}
	slices.Sort(out)
	return out
}

// shiftList writes the shifts of ties as "+1, −2".
func shiftList(ties []register.Tie) string {
	s := ""
	for i, t := range ties {
		if i > 0 {
			s += ", "
		}
		s += fmt.Sprintf("%+d", t.Shift)
	}
	return s
}

// setTolerance converts the tolerance of the options, if any, into the
// sample's unit and records it in the report.
func (a *audit) setTolerance(unit string) error {
	t := a.opt.Tolerance
	if t.Value <= 0 {
		return nil
	}
	if t.Unit != "" && unit == "" {
		return fmt.Errorf("tolerance %v: the sample has no unit; give it one, or the tolerance without one", t)
	}
	tol, err := t.In(unit)
	if err != nil {
		return fmt.Errorf("tolerance %v: %w", t, err)
	}
	a.tol, a.rep.Tolerance = tol, &tol
	return nil
}

// record adds a matched site to the report, judged against the tolerance
// (if any) by the size res of its residual; a design site out of
// tolerance joins outliers, which record returns.
func (a *audit) record(site Site, res float64, outliers []int) []int {
	if a.tol > 0 {
		ok := res <= a.tol
		site.WithinTolerance = &ok
		if !ok {
			outliers = append(outliers, *site.Design)
		}
	}
	a.rep.Sites = append(a.rep.Sites, site)
	return outliers
}
