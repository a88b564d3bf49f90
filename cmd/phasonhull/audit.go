package main

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"phasonhull/pattern"
	"phasonhull/pattern/design"
	"phasonhull/pattern/register"
	"phasonhull/topology/hull"
)

// auditSchema names the layout of the audit report in JSON.
const auditSchema = "phasonhull.audit/1"

// auditFlags holds the flags of "phasonhull audit" (batch shares them).
type auditFlags struct {
	in           inputFlags
	designPath   string
	designUnit   string
	drift        bool
	direction    string
	tolerance    string
	allowMissing int
	allowExtra   int
	gate         float64
	landmarks    int
	seed         uint64
	json         bool
	out          string
	plot         plotFlags // analyze's --plot; batch leaves it empty
}

// registerAudit adds the flags that decide an audit (not the input or
// output flags).
func (f *auditFlags) registerAudit(fs *pflag.FlagSet) {
	fs.StringVar(&f.designPath, "design", "", "the design: a positions `FILE` (any input format) or a JSON design spec")
	fs.StringVar(&f.designUnit, "design-unit", "", "length unit of the design, overriding the one in its file or spec")
	fs.BoolVar(&f.drift, "drift", false, "fit a linear drift of the scale along the chain as well as offset and scale")
	fs.StringVar(&f.direction, "direction", "auto", "which way the sample runs against the design: auto, forward or reversed")
	fs.StringVar(&f.tolerance, "tolerance", "", "largest residual allowed per site, `VALUE[unit]` like 0.02mm or 20um (default: none)")
	fs.IntVar(&f.allowMissing, "allow-missing", 0, "number of missing design sites allowed")
	fs.IntVar(&f.allowExtra, "allow-extra", 0, "number of extra measured sites allowed")
	fs.Float64Var(&f.gate, "gate", register.DefaultGate, "match gate, as a fraction of the smaller design spacing next to a site")
	fs.IntVar(&f.landmarks, "landmarks", hull.DefaultLandmarks, "landmarks for the hull analyses")
	fs.Uint64Var(&f.seed, "seed", hull.DefaultSeed, "seed of every random choice of the hull analyses")
}

// newAuditCmd builds "phasonhull audit".
func newAuditCmd() *cobra.Command {
	var f auditFlags
	cmd := &cobra.Command{
		Use:   "audit [--design DESIGN] MEASURED",
		Short: "Check a fabricated sample against its design: calibration, defects, hull and angle",
		Long: `audit checks a measured sample (MEASURED: any format the readers take, - for
standard input) against its design before it is used: does it have the
intended hull and angle, which sites are missing, extra or out of tolerance,
and is what deviates calibration (offset, scale, drift) or real defects?

DESIGN is a positions file (any format the readers take) or a JSON design
spec, told apart by content: a JSON object with a "family" key is a spec
(its fields are the flags of generate; "phasonhull generate FAMILY ...
--print-spec" writes one). A spec's fabrication perturbations (noise,
missing, extra, drift) are left out: the design is the unperturbed layout.
Units: the design is converted to the sample's unit (nm, um, mm, cm, m);
a design without a unit is taken to be in the sample's.

Registration. Measured sites are matched one to one, in chain order, to
design sites by a dynamic-programming alignment of the two sorted chains
(a skipped design site is missing, a skipped measured site is extra); a site
may match only within --gate of the smaller design spacing next to it. The
calibration x = offset + scale·d (+ scale·drift·(d − d0)²/span with --drift,
so that the local scale grows from scale at the first design site to
scale·(1 + 2·drift) at the last) is fitted to the matched pairs by
iteratively reweighted least squares with Tukey's biweight, alternating
with the matching until it settles; the uncertainties are standard errors
of that fit. A sample that runs from the design's last site has a negative
scale; --direction auto keeps the forward fit unless the reversed one is
clearly better, which for a design that is nearly its own mirror image it
never is: say --direction reversed for such a sample.

Reported: residual of every matched site (measured minus calibrated design
position, in the sample's unit), RMS and max; outliers, sites beyond 4
robust sigmas (sigma = 1.4826 × median absolute deviation); merged sites
(one measured site midway between two missing design sites); swapped
sites (two consecutive rows of the file that match neighbouring design
sites in the order opposite to the rows around them).

Hull. The hull of the design and of the sample are analysed as analyze does
and compared: same class, same period, and for a circle or torus the
angles (or frequency modules) within 3 combined standard uncertainties plus
the analysis's own error on the design. For a spec whose angle is fixed in
closed form, the sample is also compared with that exact value.

Without --design, the sites are screened against the sample's own hull:
sites whose residual from the fitted hull model exceeds 4 robust sigmas are
flagged, sites the model left out are counted as extra.

Verdict: pass when no more sites are missing (--allow-missing) or extra
(--allow-extra) than allowed, every matched site is within --tolerance
(when given), and the hulls agree; otherwise fail, with the reasons.
Outliers are reported but decide nothing unless --tolerance is given.

Indices are 0-based: design indices count design sites in ascending
position; measured indices count the data rows of the measured file in the
order the file lists them (comments and header not counted), whatever the
scan order, so a flagged site can be found in the file. Swapped neighbours
show only when the file lists the sites in chain order.

--json prints one object (schema phasonhull.audit/1): verdict, reasons,
offset, scale, drift (with --drift) and their uncertainties, rms, max,
missing, extra, merged, outliers, sites, hull {design, measured,
comparison, reference}. --out writes the report to a file instead (nothing
is written on bad input).

Exit status: 0 when the verdict is pass, 3 when it is fail, 2 for bad input
or flags, 1 for a bug.`,
		Example: `  phasonhull audit --design testdata/demo/lw0412_design.json testdata/demo/lw0412_cmm.csv
  phasonhull audit --design design.csv sample.csv --tolerance 0.02mm --allow-missing 1
  phasonhull audit --design spec.json sample.csv --drift --json > audit.json
  phasonhull generate modulated --theta 0.3183 --sin 0.24,0.05 --spacing 3 --unit mm --print-spec > spec.json
  phasonhull audit sample.csv`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			return runAudit(cmd, args[0], &f)
		},
	}
	fs := cmd.Flags()
	f.in.register(fs)
	f.registerAudit(fs)
	fs.BoolVar(&f.json, "json", false, "print the report as one JSON object")
	fs.StringVarP(&f.out, "out", "o", "", "write the report to `FILE` instead of standard output (nothing is written on bad input)")
	f.plot.register(fs)
	return cmd
}

func (f *auditFlags) hullOptions() hull.Options {
	return hull.Options{Landmarks: f.landmarks, Seed: f.seed}
}

// validate refuses flag values no audit can use.
func (f *auditFlags) validate() error {
	if !(f.gate > 0 && f.gate < 1) {
		return fmt.Errorf("--gate %g: must lie in (0, 1)", f.gate)
	}
	if f.allowMissing < 0 || f.allowExtra < 0 {
		return errors.New("--allow-missing and --allow-extra must not be negative")
	}
	if _, err := f.registerDirection(); err != nil {
		return err
	}
	if f.tolerance != "" && lengthRE.FindStringSubmatch(f.tolerance) == nil {
		return fmt.Errorf("--tolerance %q: want a positive length like 0.02mm or 20um", f.tolerance)
	}
	return nil
}

// registerDirection reads --direction.
func (f *auditFlags) registerDirection() (register.Direction, error) {
	switch f.direction {
	case "auto", "":
		return register.Auto, nil
	case "forward":
		return register.Forward, nil
	case "reversed":
		return register.Reversed, nil
	}
	return 0, fmt.Errorf("--direction %q: want auto, forward or reversed", f.direction)
}

func runAudit(cmd *cobra.Command, path string, f *auditFlags) error {
	if err := f.validate(); err != nil {
		return err
	}
	if f.plot.format != "" {
		if err := f.plot.validate(); err != nil {
			return err
		}
	}
	if f.out != "" && f.out != "-" {
		if err := refuseOverwrite(f.out, []string{path, f.designPath}); err != nil {
			return err
		}
	}
	p, err := f.in.load(path, cmd.InOrStdin())
	if err != nil {
		return err
	}
	var d *loadedDesign
	if f.designPath != "" {
		if d, err = loadDesign(cmd.Context(), f.designPath, f.designUnit, f.hullOptions()); err != nil {
			return err
		}
	}
	rep, err := auditSample(cmd.Context(), d, p, f, f.hullOptions())
	if err != nil {
		return err
	}
	if err := f.plot.writeAudit(rep); err != nil {
		return err
	}
	var buf bytes.Buffer
	if f.json {
		enc := json.NewEncoder(&buf)
		enc.SetIndent("", "  ")
		if err := enc.Encode(rep); err != nil {
			return internalErr(err)
		}
	} else {
		printAudit(&buf, rep)
	}
	if f.out == "" || f.out == "-" {
		if _, err := cmd.OutOrStdout().Write(buf.Bytes()); err != nil {
			return err
		}
	} else if err := writeFileAtomic(f.out, func(file *os.File) error {
		_, err := file.Write(buf.Bytes())
		return err
	}); err != nil {
		return err
	}
	if rep.Verdict != "pass" {
		return &exitError{code: exitFail}
	}
	return nil
}

// loadedDesign is a design read and analysed once; batch shares it
// between audits, read-only.
type loadedDesign struct {
	path string
	kind string // "positions" or "spec"
	p    *pattern.Pattern
	ref  *hull.Reference // what a spec fixes; nil for positions
	// hull is the design's hull analysis, or hullErr why it failed.
	hull    *hull.Result
	hullErr error
	notes   []string
}

// loadDesign reads a design: a JSON object with a "family" key is a design
// spec, anything else a positions file for the readers. unit, when set,
// overrides the design's unit.
func loadDesign(ctx context.Context, path, unit string, opt hull.Options) (*loadedDesign, error) {
	d := &loadedDesign{path: path}
	spec, isSpec, err := readSpecIfSpec(path)
	if err != nil {
		return nil, err
	}
	if isSpec {
		d.kind = "spec"
		var left []string
		for _, v := range []struct {
			name string
			val  *float64
		}{{"noise", &spec.Noise}, {"missing", &spec.Missing}, {"extra", &spec.Extra}, {"drift", &spec.Drift}} {
			if *v.val != 0 {
				left = append(left, fmt.Sprintf("%s = %g", v.name, *v.val))
				*v.val = 0
			}
		}
		if len(left) > 0 {
			d.notes = append(d.notes, "the design spec's fabrication perturbations ("+strings.Join(left, ", ")+") are left out: the design is the unperturbed layout")
		}
		if d.p, err = design.Generate(spec); err != nil {
			return nil, fmt.Errorf("design %s: %w", path, err)
		}
		d.p.Source = path
		ref := hull.SpecReference(spec)
		d.ref = &ref
	} else {
		d.kind = "positions"
		if d.p, err = pattern.ReadFile(path, pattern.ReadOptions{Unit: strings.TrimSpace(unit)}); err != nil {
			return nil, fmt.Errorf("design: %w", err)
		}
	}
	if unit != "" {
		d.p.Unit = strings.TrimSpace(unit)
	}
	d.hull, d.hullErr = hull.AnalyzeContext(ctx, d.p, opt)
	return d, nil
}

// readSpecIfSpec reads path as a design spec when it is a JSON object
// with a "family" key; isSpec is false (and err nil) for anything else.
func readSpecIfSpec(path string) (spec design.Spec, isSpec bool, err error) {
	f, err := os.Open(path)
	if err != nil {
		return spec, false, fmt.Errorf("design: %w", err)
	}
	defer f.Close()
	data, err := io.ReadAll(io.LimitReader(f, design.MaxSpecBytes+1))
	if err != nil {
		return spec, false, fmt.Errorf("design: reading %s: %w", path, err)
	}
	trimmed := bytes.TrimLeft(bytes.TrimPrefix(data, []byte("\xef\xbb\xbf")), " \t\r\n")
	if len(data) > design.MaxSpecBytes || len(trimmed) == 0 || trimmed[0] != '{' {
		return spec, false, nil
	}
	var keys map[string]json.RawMessage
	if json.Unmarshal(trimmed, &keys) != nil {
		// Not one JSON object: a spec would have to be; let the readers
		// say what is wrong with it as a positions file, unless it names
		// a family.
		if !bytes.Contains(trimmed, []byte(`"family"`)) {
			return spec, false, nil
		}
	} else if _, ok := keys["family"]; !ok {
		return spec, false, nil
	}
	spec, err = design.ReadSpec(bytes.NewReader(trimmed), path)
	if err != nil {
		return spec, true, fmt.Errorf("design: %w", err)
	}
	return spec, true, nil
}

// refuseOverwrite refuses an output path that names one of the inputs.
func refuseOverwrite(out string, inputs []string) error {
	for _, in := range inputs {
		if in == "" || in == "-" {
			continue
		}
		if samePath(out, in) {
			return fmt.Errorf("output %s is also an input: refusing to write over it", out)
		}
	}
	return nil
}

// samePath reports whether two paths name the same file: the same clean
// absolute path, or the same existing file.
func samePath(a, b string) bool {
	aa, errA := filepath.Abs(a)
	bb, errB := filepath.Abs(b)
	if errA == nil && errB == nil && aa == bb {
		return true
	}
	sa, errA := os.Stat(a)
	sb, errB := os.Stat(b)
	return errA == nil && errB == nil && os.SameFile(sa, sb)
}

// lengthRE matches a tolerance: a positive number and an optional unit.
var lengthRE = regexp.MustCompile(`^\s*([0-9.]+(?:[eE][-+]?[0-9]+)?)\s*([A-Za-zµμ]*)\s*$`)

// parseTolerance reads VALUE[unit] and returns it in the sample's unit.
func parseTolerance(s, unit string) (float64, error) {
	m := lengthRE.FindStringSubmatch(s)
	if m == nil {
		return 0, fmt.Errorf("--tolerance %q: want a positive length like 0.02mm or 20um", s)
	}
	v, err := strconv.ParseFloat(m[1], 64)
	if err != nil || !(v > 0) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("--tolerance %q: want a positive length like 0.02mm or 20um", s)
	}
	if m[2] == "" {
		return v, nil
	}
	if unit == "" {
		return 0, fmt.Errorf("--tolerance %q: the sample has no unit; give --unit, or the tolerance without one", s)
	}
	k, err := register.UnitFactor(m[2], unit)
	if err != nil {
		return 0, fmt.Errorf("--tolerance %q: %w", s, err)
	}
	return v * k, nil
}

// auditReport is the result of one audit, printed as text or JSON.
type auditReport struct {
	Schema        string   `json:"schema"`
	Verdict       string   `json:"verdict"`
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
	Matched       int    `json:"matched"`

	Offset    *float64 `json:"offset,omitempty"`
	OffsetErr *float64 `json:"offset_uncertainty,omitempty"`
	Scale     *float64 `json:"scale,omitempty"`
	ScaleErr  *float64 `json:"scale_uncertainty,omitempty"`
	Drift     *float64 `json:"drift,omitempty"`
	DriftErr  *float64 `json:"drift_uncertainty,omitempty"`

	Sigma            float64  `json:"sigma"`
	OutlierThreshold float64  `json:"outlier_threshold"`
	Tolerance        *float64 `json:"tolerance,omitempty"`
	RMS              float64  `json:"rms"`
	Max              float64  `json:"max"`

	Missing  []int        `json:"missing"`
	Extra    []int        `json:"extra"`
	Merged   []auditMerge `json:"merged"`
	Swapped  []auditSwap  `json:"swapped"`
	Outliers []int        `json:"outliers"`
	Sites    []auditSite  `json:"sites"`

	Hull  auditHull `json:"hull"`
	Notes []string  `json:"notes"`

	// For the text report.
	designPos, measuredPos []float64
	reg                    *register.Result
}

type auditMerge struct {
	Design   [2]int  `json:"design"`
	Measured int     `json:"measured"`
	Position float64 `json:"position"`
}

type auditSwap struct {
	Measured [2]int `json:"measured"`
	Design   [2]int `json:"design"`
}

// auditSite is one site of the per-site report. Design is absent without
// a design.
type auditSite struct {
	Design          *int    `json:"design,omitempty"`
	Measured        int     `json:"measured"`
	Position        float64 `json:"position"`
	Residual        float64 `json:"residual"`
	Outlier         bool    `json:"outlier"`
	WithinTolerance *bool   `json:"within_tolerance,omitempty"`
}

type auditHull struct {
	Design     *hull.Result     `json:"design,omitempty"`
	Measured   *hull.Result     `json:"measured"`
	Comparison *hull.Comparison `json:"comparison,omitempty"`
	Reference  *hull.Reference  `json:"reference,omitempty"`
}

// auditSample audits p against the design d (nil: against its own hull).
// Its errors are the user's to fix (exit status 2); a sample that fails is
// a report with verdict "fail".
func auditSample(ctx context.Context, d *loadedDesign, p *pattern.Pattern, f *auditFlags, opt hull.Options) (*auditReport, error) {
	rep := &auditReport{
		Schema: auditSchema, Measured: p.Source, Unit: p.Unit, MeasuredSites: p.Len(),
		MeasuredOrder: "file", Reasons: []string{}, Missing: []int{}, Extra: []int{},
		Merged: []auditMerge{}, Swapped: []auditSwap{}, Outliers: []int{}, Sites: []auditSite{},
		Notes: []string{}, measuredPos: fileOrder(p),
	}
	tol := 0.0
	if f.tolerance != "" {
		var err error
		if tol, err = parseTolerance(f.tolerance, p.Unit); err != nil {
			return nil, err
		}
		rep.Tolerance = &tol
	}
	mres, merr := hull.AnalyzeContext(ctx, p, opt)
	if merr != nil {
		rep.Reasons = append(rep.Reasons, fmt.Sprintf("the sample's hull could not be analysed: %v", merr))
	} else {
		rep.Hull.Measured = mres
	}
	if d == nil {
		screenOwnHull(rep, p, mres, f, tol)
	} else if err := registerOnDesign(rep, d, p, f, tol); err != nil {
		return nil, err
	}
	if len(rep.Reasons) == 0 {
		rep.Verdict = "pass"
	} else {
		rep.Verdict = "fail"
	}
	return rep, nil
}

// registerOnDesign fills the report of an audit against a design.
func registerOnDesign(rep *auditReport, d *loadedDesign, p *pattern.Pattern, f *auditFlags, tol float64) error {
	rep.Design, rep.DesignKind, rep.DesignSites = d.path, d.kind, d.p.Len()
	rep.Notes = append(rep.Notes, d.notes...)
	factor := 1.0
	switch {
	case d.p.Unit == p.Unit:
	case d.p.Unit == "" || p.Unit == "":
		known := d.p.Unit + p.Unit
		rep.Notes = append(rep.Notes, fmt.Sprintf("only one of design and sample names a unit (%s): both are taken to be in it", known))
		if rep.Unit == "" {
			rep.Unit = known
		}
	default:
		var err error
		if factor, err = register.UnitFactor(d.p.Unit, p.Unit); err != nil {
			return fmt.Errorf("design %s against sample %s: %w", d.path, p.Source, err)
		}
		rep.Notes = append(rep.Notes, fmt.Sprintf("the design is in %s and the sample in %s: design positions are multiplied by %g", d.p.Unit, p.Unit, factor))
	}
	rep.designPos = make([]float64, d.p.Len())
	for i, x := range d.p.Positions {
		rep.designPos[i] = x * factor
	}

	dir, err := f.registerDirection()
	if err != nil {
		return err
	}
	reg, err := register.Register(rep.designPos, rep.measuredPos, register.Options{Drift: f.drift, Gate: f.gate, Direction: dir})
	if err != nil {
		rep.Reasons = append(rep.Reasons, fmt.Sprintf("the sample could not be registered on the design: %v", err))
	} else {
		fillRegistration(rep, reg, f, tol)
	}

	switch {
	case d.hullErr != nil:
		rep.Reasons = append(rep.Reasons, fmt.Sprintf("the design's hull could not be analysed: %v", d.hullErr))
	case rep.Hull.Measured != nil:
		cmp := hull.CompareWith(d.hull, rep.Hull.Measured, d.ref)
		rep.Hull.Comparison = &cmp
		if !cmp.Agree {
			rep.Reasons = append(rep.Reasons, "hull: "+cmp.Verdict)
		}
	}
	rep.Hull.Design, rep.Hull.Reference = d.hull, d.ref
	return nil
}

// fillRegistration copies a registration into the report and adds its
// failures to the reasons.
func fillRegistration(rep *auditReport, reg *register.Result, f *auditFlags, tol float64) {
	rep.reg = reg
	rep.Matched = len(reg.Matches)
	rep.Offset, rep.OffsetErr = &reg.Offset, &reg.OffsetErr
	rep.Scale, rep.ScaleErr = &reg.Scale, &reg.ScaleErr
	if reg.DriftFitted {
		rep.Drift, rep.DriftErr = &reg.Drift, &reg.DriftErr
	}
	rep.Sigma, rep.OutlierThreshold = reg.Sigma, register.OutlierFactor*reg.Sigma
	rep.RMS, rep.Max = reg.RMS, reg.Max
	rep.Missing, rep.Extra = reg.Missing, reg.Extra
	for _, m := range reg.Merged {
		rep.Merged = append(rep.Merged, auditMerge{Design: m.Design, Measured: m.Measured, Position: rep.measuredPos[m.Measured]})
	}
	for _, s := range reg.Swapped {
		rep.Swapped = append(rep.Swapped, auditSwap{Measured: s.Measured, Design: s.Design})
	}
	outliers := slices.Clone(reg.Outliers)
	for _, m := range reg.Matches {
		site := auditSite{Design: &m.Design, Measured: m.Measured, Position: rep.measuredPos[m.Measured],
			Residual: m.Residual, Outlier: math.Abs(m.Residual) > rep.OutlierThreshold}
		if tol > 0 {
			ok := math.Abs(m.Residual) <= tol
			site.WithinTolerance = &ok
			if !ok {
				outliers = append(outliers, m.Design)
			}
		}
		rep.Sites = append(rep.Sites, site)
	}
	slices.Sort(outliers)
	rep.Outliers = slices.Compact(outliers)
	rep.Reasons = append(rep.Reasons, reg.Failures(register.Limits{MaxMissing: f.allowMissing, MaxExtra: f.allowExtra, Tolerance: tol}, rep.Unit)...)
}

// screenOwnHull fills the report of an audit without a design: the sites
// are screened against the sample's own hull model.
func screenOwnHull(rep *auditReport, p *pattern.Pattern, mres *hull.Result, f *auditFlags, tol float64) {
	if mres == nil {
		return // the reason is given
	}
	if mres.SiteResiduals == nil {
		rep.Reasons = append(rep.Reasons, fmt.Sprintf("the sample's hull is %s: there is no model of it to screen the sites against (%s)", mres.Hull.Class, mres.Hull.Reason))
		return
	}
	rep.Notes = append(rep.Notes, "no design given: sites are screened against the sample's own hull model; missing sites are reported by the analysis' warnings only")
	s, err := register.Screen(mres.SiteResiduals, 1e-9*p.MeanSpacing())
	if err != nil {
		rep.Reasons = append(rep.Reasons, fmt.Sprintf("the hull model left no site to screen: %v", err))
		return
	}
	rep.Sigma, rep.OutlierThreshold, rep.RMS, rep.Max = s.Sigma, s.Threshold, s.RMS, s.Max
	rep.Extra = rowsOf(p, s.NotFitted)
	rep.Matched = p.Len() - len(s.NotFitted)
	outliers := rowsOf(p, s.Flagged)
	beyond := 0
	for i, r := range mres.SiteResiduals {
		if math.IsNaN(r) {
			continue
		}
		site := auditSite{Measured: p.Rows[i], Position: p.Positions[i], Residual: r, Outlier: math.Abs(r) > s.Threshold}
		if tol > 0 {
			ok := math.Abs(r) <= tol
			site.WithinTolerance = &ok
			if !ok {
				outliers = append(outliers, p.Rows[i])
				beyond++
			}
		}
		rep.Sites = append(rep.Sites, site)
	}
	slices.Sort(outliers)
	rep.Outliers = slices.Compact(outliers)
	if len(s.NotFitted) > f.allowExtra {
		rep.Reasons = append(rep.Reasons, fmt.Sprintf("%d site(s) look spurious to the hull analysis (left out of its model), %d allowed", len(s.NotFitted), f.allowExtra))
	}
	if beyond > 0 {
		rep.Reasons = append(rep.Reasons, fmt.Sprintf("%d site(s) beyond the tolerance of %g%s from the sample's own hull model (largest %.4g%s)", beyond, tol, spaced(rep.Unit), s.Max, spaced(rep.Unit)))
	}
}

func spaced(unit string) string {
	if unit == "" {
		return ""
	}
	return " " + unit
}

// maxListed bounds the entries of each defect list in the text report.
const maxListed = 20

// printAudit writes the human report of an audit.
func printAudit(w *bytes.Buffer, r *auditReport) {
	u := spaced(r.Unit)
	if r.Design != "" {
		fmt.Fprintf(w, "audit       %s against the design %s (%s)\n", r.Measured, r.Design, r.DesignKind)
		fmt.Fprintf(w, "sites       design %d, measured %d: %d matched, %d missing, %d extra\n", r.DesignSites, r.MeasuredSites, r.Matched, len(r.Missing), len(r.Extra))
	} else {
		fmt.Fprintf(w, "audit       %s against its own hull (no design given)\n", r.Measured)
		fmt.Fprintf(w, "sites       %d, %d in the hull model, %d left out as spurious\n", r.MeasuredSites, r.Matched, len(r.Extra))
	}
	if r.Scale != nil {
		fmt.Fprintf(w, "calibration offset %.6g ± %.2g%s, scale %.9g ± %.2g (%+.1f ± %.1f ppm)\n",
			*r.Offset, *r.OffsetErr, u, *r.Scale, *r.ScaleErr, (math.Abs(*r.Scale)-1)*1e6, *r.ScaleErr*1e6)
		if r.Drift != nil {
			fmt.Fprintf(w, "            drift %.4g ± %.2g: the local scale goes from %.9g at the first design site to %.9g at the last\n",
				*r.Drift, *r.DriftErr, *r.Scale, *r.Scale*(1+2**r.Drift))
			fmt.Fprintf(w, "            x = offset + scale·d + scale·drift·(d − d0)²/span\n")
		} else {
			fmt.Fprintf(w, "            x = offset + scale·d (--drift fits a drift of the scale too)\n")
		}
		if *r.Scale < 0 {
			fmt.Fprintf(w, "            the sample runs opposite to the design (negative scale)\n")
		}
	}
	if r.Matched > 0 {
		fmt.Fprintf(w, "residuals   RMS %.4g%s, max %.4g%s; robust sigma %.3g%s; outliers beyond 4 sigma = %.3g%s: %d\n",
			r.RMS, u, r.Max, u, r.Sigma, u, r.OutlierThreshold, u, countOutliers(r.Sites))
	}
	if r.Tolerance != nil {
		n := 0
		for _, s := range r.Sites {
			if s.WithinTolerance != nil && !*s.WithinTolerance {
				n++
			}
		}
		if n == 0 {
			fmt.Fprintf(w, "tolerance   %.4g%s: every site within\n", *r.Tolerance, u)
		} else {
			fmt.Fprintf(w, "tolerance   %.4g%s: %d site(s) beyond\n", *r.Tolerance, u, n)
		}
	}
	if r.reg != nil {
		list(w, "missing", len(r.Missing), func(i int) string {
			j := r.Missing[i]
			return fmt.Sprintf("design #%d at %.6g%s, expected at %.6g%s", j, r.designPos[j], u, r.reg.Predict(r.designPos[j]), u)
		})
	}
	list(w, "extra", len(r.Extra), func(i int) string {
		k := r.Extra[i]
		return fmt.Sprintf("measured #%d at %.6g%s", k, r.measuredPos[k], u)
	})
	list(w, "merged", len(r.Merged), func(i int) string {
		m := r.Merged[i]
		return fmt.Sprintf("design #%d and #%d as measured #%d at %.6g%s", m.Design[0], m.Design[1], m.Measured, m.Position, u)
	})
	list(w, "swapped", len(r.Swapped), func(i int) string {
		s := r.Swapped[i]
		return fmt.Sprintf("measured #%d and #%d (design #%d and #%d)", s.Measured[0], s.Measured[1], s.Design[0], s.Design[1])
	})
	var flagged []auditSite
	for _, s := range r.Sites {
		if s.Outlier || (s.WithinTolerance != nil && !*s.WithinTolerance) {
			flagged = append(flagged, s)
		}
	}
	name := "outliers"
	if r.Tolerance != nil {
		name = "flagged" // beyond 4 sigma or beyond the tolerance
	}
	list(w, name, len(flagged), func(i int) string {
		s := flagged[i]
		at := fmt.Sprintf("measured #%d", s.Measured)
		if s.Design != nil {
			at = fmt.Sprintf("design #%d (measured #%d)", *s.Design, s.Measured)
		}
		return fmt.Sprintf("%s at %.6g%s: residual %+.4g%s (%.1f sigma)", at, s.Position, u, s.Residual, u, math.Abs(s.Residual)/r.Sigma)
	})
	h := r.Hull
	label := "hull       "
	if h.Design != nil {
		fmt.Fprintf(w, "%s design: %s\n", label, hullLine(h.Design))
		label = "           "
	}
	if h.Measured != nil {
		fmt.Fprintf(w, "%s sample: %s\n", label, hullLine(h.Measured))
		for _, n := range h.Measured.Warnings {
			fmt.Fprintf(w, "            warning: %s\n", n)
		}
	}
	if h.Reference != nil && len(h.Reference.Angles) > 0 {
		fmt.Fprintf(w, "            spec:   angle(s) %s exactly (%s family)\n", floats(h.Reference.Angles), h.Reference.Family)
	}
	if c := h.Comparison; c != nil {
		fmt.Fprintf(w, "            %s\n", c.Verdict)
		for _, n := range c.Notes {
			fmt.Fprintf(w, "            note: %s\n", n)
		}
	}
	for _, n := range r.Notes {
		fmt.Fprintf(w, "note        %s\n", n)
	}
	if r.Verdict == "pass" {
		fmt.Fprintf(w, "verdict     PASS\n")
	} else {
		fmt.Fprintf(w, "verdict     FAIL: %s\n", strings.Join(r.Reasons, "; "))
	}
}

func countOutliers(sites []auditSite) int {
	n := 0
	for _, s := range sites {
		if s.Outlier {
			n++
		}
	}
	return n
}

// list prints up to maxListed entries of a defect list.
func list(w *bytes.Buffer, name string, n int, entry func(i int) string) {
	if n == 0 {
		return
	}
	fmt.Fprintf(w, "%-11s %d:\n", name, n)
	for i := 0; i < n; i++ {
		if i == maxListed {
			fmt.Fprintf(w, "            … %d more (--json lists all)\n", n-maxListed)
			break
		}
		fmt.Fprintf(w, "            %s\n", entry(i))
	}
}

// hullLine summarises a hull analysis on one line.
func hullLine(r *hull.Result) string {
	s := string(r.Hull.Class)
	if r.Hull.Period > 0 {
		s += fmt.Sprintf(", period %d", r.Hull.Period)
	}
	for i, a := range r.Angles {
		s += fmt.Sprintf(", θ%s = %.9f ± %.2g", sub(i, len(r.Angles)), a, r.AngleUncertainty[i])
	}
	if r.Disorder != nil {
		s += fmt.Sprintf(", disorder %.3g of the mean spacing", r.Disorder.Relative)
	}
	return s
}

func sub(i, n int) string {
	if n == 1 {
		return ""
	}
	return strconv.Itoa(i + 1)
}

func floats(v []float64) string {
	s := make([]string, len(v))
	for i, x := range v {
		s[i] = strconv.FormatFloat(x, 'g', 10, 64)
	}
	return strings.Join(s, ", ")
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
