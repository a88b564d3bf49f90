package main

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"phasonhull/cmd/phasonhull/internal/outfile"
	"phasonhull/cmd/phasonhull/internal/progress"
	"phasonhull/pattern"
	"phasonhull/pattern/design"
	"phasonhull/pattern/register"
	"phasonhull/topology/audit"
	"phasonhull/topology/hull"
)

// auditFlags are the flags that decide an audit (not the input or output
// flags); audit, batch and report register them and turn them into
// audit.Options and a design.
type auditFlags struct {
	designPath   string
	designUnit   string
	drift        bool
	direction    string
	tolerance    string
	allowMissing int
	allowExtra   int
	gate         float64
	maxScaleErr  float64
	landmarks    int
	seed         uint64
}

// register adds the flags that decide an audit to fs.
func (f *auditFlags) register(fs *pflag.FlagSet) {
	fs.StringVar(&f.designPath, "design", "", "the design: a positions `FILE` (any input format) or a JSON design spec")
	fs.StringVar(&f.designUnit, "design-unit", "", "length unit of the design, overriding the one in its file or spec")
	fs.BoolVar(&f.drift, "fit-drift", false, "fit a linear drift of the scale along the chain as well as offset and scale")
	fs.StringVar(&f.direction, "direction", "auto", "which way the sample runs against the design: auto, forward or reversed")
	fs.StringVar(&f.tolerance, "tolerance", "", "largest residual allowed per site, `VALUE[unit]` like 0.02mm or 20um (default: none)")
	fs.IntVar(&f.allowMissing, "allow-missing", 0, "number of missing design sites allowed")
	fs.IntVar(&f.allowExtra, "allow-extra", 0, "number of extra measured sites allowed")
	fs.Float64Var(&f.gate, "gate", register.DefaultGate, "match gate, as a fraction of the smaller design spacing next to a site")
	fs.Float64Var(&f.maxScaleErr, "max-scale-error", audit.DefaultMaxScaleError, "largest relative error of the registration scale allowed, a `FRACTION` (0.02 = 2%): a scale outside 1 ± it fails the audit, and one near a ratio of units (1000, 25.4, …) is named as a unit mismatch; inf turns the check off")
	fs.IntVar(&f.landmarks, "landmarks", hull.DefaultLandmarks, "landmarks for the hull analyses")
	fs.Uint64Var(&f.seed, "seed", hull.DefaultSeed, "seed of every random choice of the hull analyses")
}

// auditCmdFlags holds the flags of "phasonhull audit".
type auditCmdFlags struct {
	in    inputFlags
	audit auditFlags
	json  bool
	out   string
	plot  plotFlags
}

// newAuditCmd builds "phasonhull audit".
func newAuditCmd() *cobra.Command {
	var f auditCmdFlags
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
a design without a unit is taken to be in the sample's, and a sample
without one in the design's. The fitted scale checks that: outside
1 ± --max-scale-error (default 0.02, a fraction: 2%) the audit fails, and
a scale near a ratio of units (1000, 10^6, 25.4, …) is named as a unit
mismatch with the flag that fixes it (--unit for the sample,
--design-unit for the design).

Registration. Measured sites are matched one to one, in chain order, to
design sites by a dynamic-programming alignment of the two sorted chains
(a skipped design site is missing, a skipped measured site is extra); a site
may match only within --gate of the smaller design spacing next to it. The
calibration x = offset + scale·d (+ scale·drift·(d − d0)²/span with --fit-drift,
so that the local scale grows from scale at the first design site to
scale·(1 + 2·drift) at the last) is fitted to the matched pairs by
iteratively reweighted least squares with Tukey's biweight, alternating
with the matching until it settles; the uncertainties are standard errors
of that fit. The whole matching shifted by one site, two, … either way is
then settled again and the costs of the alignments compared: a missing
and an extra site that such a shift explains are not reported, and
alignments that still tie (alignment.ties in --json) are named in a note. A sample that runs from the design's last site has a negative
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

Verdict: pass when the scale is within 1 ± --max-scale-error, no more
sites are missing (--allow-missing) or extra (--allow-extra) than allowed, every matched site is within --tolerance
(when given), and the hulls agree; otherwise fail, with the reasons.
Outliers are reported but decide nothing unless --tolerance is given.

Indices are 0-based: design indices count design sites in ascending
position; measured indices count the data rows of the measured file in the
order the file lists them (comments and header not counted), whatever the
scan order, so a flagged site can be found in the file. Swapped neighbours
show only when the file lists the sites in chain order.

--json prints one object (schema phasonhull.audit/1): verdict, reasons,
offset, scale, drift (with --fit-drift) and their uncertainties,
max_scale_error, alignment {cost, cost_uncertainty, ties}, rms, max,
missing, extra, merged, outliers, sites, hull {design, measured,
comparison, reference}. --out writes the report to a file instead (nothing
is written on bad input).

Plates. Sites in the plane are audited against a plate design (a chain
against a plate is refused): a similarity x = offset + scale·R(rotation)·d
(through a reflection for a mirror image) from both average lattices, the
offset searched over lattice vectors, ties by lattice symmetries listed;
hulls compared by rotation matrices as modules. --fit-drift and --plot do
not apply (see the README).

Exit status: 0 when the verdict is pass, 3 when it is fail, 2 for bad input
or flags, 1 for a bug.`,
		Example: `  phasonhull audit --design testdata/demo/lw0412_design.json testdata/demo/lw0412_cmm.csv
  phasonhull audit --design design.csv sample.csv --tolerance 0.02mm --allow-missing 1
  phasonhull audit --design spec.json sample.csv --fit-drift --json > audit.json
  phasonhull generate modulated --theta 0.3183 --sin 0.24,0.05 --spacing 3 --unit mm --print-spec > spec.json
  phasonhull audit sample.csv`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			return runAudit(cmd, args[0], &f)
		},
	}
	fs := cmd.Flags()
	f.in.register(fs)
	f.audit.register(fs)
	fs.BoolVar(&f.json, "json", false, "print the report as one JSON object")
	fs.StringVarP(&f.out, "out", "o", "", "write the report to `FILE` instead of standard output (nothing is written on bad input)")
	f.plot.register(fs)
	outfile.FileArgs(cmd)
	outfile.Mark(cmd.Flags(), outfile.Input, "design")
	outfile.Mark(cmd.Flags(), outfile.OutputFile, "out")
	return cmd
}

// options turns the flags that decide an audit into its options,
// refusing values no audit can use.
func (f *auditFlags) options() (audit.Options, error) {
	opt := audit.Options{AllowMissing: f.allowMissing, AllowExtra: f.allowExtra, Drift: f.drift, Gate: f.gate,
		MaxScaleError: f.maxScaleErr, Hull: hull.Options{Landmarks: f.landmarks, Seed: f.seed}}
	if !(f.maxScaleErr > 0) {
		return opt, fmt.Errorf("--max-scale-error %g: must be a positive fraction (0.02 = 2%%)", f.maxScaleErr)
	}
	if !(f.gate > 0 && f.gate < 1) {
		return opt, fmt.Errorf("--gate %g: must lie in (0, 1)", f.gate)
	}
	if f.allowMissing < 0 || f.allowExtra < 0 {
		return opt, errors.New("--allow-missing and --allow-extra must not be negative")
	}
	switch f.direction {
	case "auto", "":
		opt.Direction = register.Auto
	case "forward":
		opt.Direction = register.Forward
	case "reversed":
		opt.Direction = register.Reversed
	default:
		return opt, fmt.Errorf("--direction %q: want auto, forward or reversed", f.direction)
	}
	if f.tolerance != "" {
		var err error
		if opt.Tolerance, err = pattern.ParseLength(f.tolerance); err != nil {
			return opt, fmt.Errorf("--tolerance %w", err)
		}
	}
	return opt, opt.Validate()
}

// loadDesign reads the design of --design and analyses its hull, saying
// so on the progress line; nil without --design.
func (f *auditFlags) loadDesign(ctx context.Context, pl *progress.Line, opt hull.Options) (*audit.Design, error) {
	if f.designPath == "" {
		return nil, nil
	}
	pl.Stage("analysing the design " + f.designPath)
	file, err := design.ReadFile(f.designPath, f.designUnit)
	if err != nil {
		return nil, fmt.Errorf("design: %w", err)
	}
	return audit.NewDesign(ctx, file, opt), nil
}

func runAudit(cmd *cobra.Command, path string, f *auditCmdFlags) error {
	opt, err := f.audit.options()
	if err != nil {
		return err
	}
	if f.plot.format != "" {
		if err := f.plot.validate(); err != nil {
			return err
		}
	}
	sites, err := f.in.loadSites(path, cmd.InOrStdin())
	if err != nil {
		return err
	}
	if sites.Plane != nil && f.plot.dir != "" {
		return errors.New("--plot: the figures of a plate's audit are not drawn yet; leave --plot out")
	}
	progress := progressOf(cmd)
	defer progress.Close()
	d, err := f.audit.loadDesign(cmd.Context(), progress, opt.Hull)
	if err != nil {
		return err
	}
	var src string
	var n int
	if sites.Plane != nil {
		src, n = sites.Plane.Source, sites.Plane.Len()
	} else {
		src, n = sites.Chain.Source, sites.Chain.Len()
	}
	progress.Stage(fmt.Sprintf("auditing %s (%d sites)", src, n))
	rep, err := audit.Sites(cmd.Context(), d, sites, opt)
	if err != nil {
		return err // a design of the other dimension is the user's to fix
	}
	progress.Stage("drawing the figures")
	f.plot.list = listTo(cmd)
	if err := f.plot.writeAudit(rep); err != nil {
		return err
	}
	progress.Close()
	var buf bytes.Buffer
	if f.json {
		if err := writeJSON(&buf, rep); err != nil {
			return internalErr(err)
		}
	} else if err := rep.WriteText(&buf); err != nil {
		return internalErr(err)
	}
	if f.out == "" || f.out == "-" {
		if _, err := cmd.OutOrStdout().Write(buf.Bytes()); err != nil {
			return err
		}
	} else if err := writeFileAtomic(f.out, func(file io.Writer) error {
		_, err := file.Write(buf.Bytes())
		return err
	}); err != nil {
		return err
	}
	if !rep.Passed() {
		return &exitError{code: exitFail}
	}
	return nil
}
