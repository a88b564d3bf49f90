package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"phasonhull/cmd/phasonhull/internal/outfile"
	"phasonhull/cmd/phasonhull/internal/picture"
	"phasonhull/cmd/phasonhull/internal/report"
	"phasonhull/pattern"
	"phasonhull/pattern/lattice"
	"phasonhull/topology/audit"
	"phasonhull/topology/budget"
	"phasonhull/topology/hull"
	"phasonhull/topology/spectrum"
)

// plotFlags are the flags of the commands that can draw their result.
type plotFlags struct {
	dir    string
	format string
	// list, when not nil, is told each file written (standard error,
	// unless --quiet).
	list io.Writer
}

// register adds --plot and --plot-format to fs (--format names the input
// format on these commands).
func (f *plotFlags) register(fs *pflag.FlagSet) {
	fs.StringVar(&f.dir, "plot", "", "write the figures of the result into `DIR` (created if missing)")
	fs.StringVar(&f.format, "plot-format", string(picture.PNG), "encoding of the figures: png or svg")
	outfile.Mark(fs, outfile.OutputDir, "plot")
}

// validate refuses a bad --plot-format before any analysis runs.
func (f *plotFlags) validate() error {
	_, err := picture.ParseFormat(f.format)
	return err
}

// writeSpectrum writes the IDS staircase of a spectrum, when --plot is
// set; a spectrum found by counting holds no levels to draw, which is said
// on stderr.
func (f *plotFlags) writeSpectrum(stderr io.Writer, r *spectrum.Result, source, levels string) error {
	if f.dir == "" || r == nil {
		return nil
	}
	p, err := picture.Spectrum(r, source, levels)
	if err != nil {
		fmt.Fprintf(stderr, "phasonhull: --plot: no figure written: %v\n", err)
		return nil
	}
	return f.write([]*picture.Picture{p})
}

// writeAnalysis writes the figures of a hull result (picture.Figures:
// of a plate when plane is not nil), when --plot is set. A result with
// nothing to draw is said so on stderr, not refused: the analysis itself
// succeeded.
func (f *plotFlags) writeAnalysis(stderr io.Writer, r *hull.Result, plane *pattern.Plane, l *lattice.Lattice) error {
	if f.dir == "" {
		return nil
	}
	pics, err := picture.Figures(r, plane, l)
	if errors.Is(err, picture.ErrNoTrace) {
		fmt.Fprintf(stderr, "phasonhull: --plot: no figure written: %v\n", err)
		return nil
	}
	if err != nil {
		return fmt.Errorf("--plot: %w", err)
	}
	return f.write(pics)
}

// writeAudit writes the audit figure and the measured sample's hull
// figures, when --plot is set.
func (f *plotFlags) writeAudit(rep *audit.Report) error {
	if f.dir == "" {
		return nil
	}
	var pics []*picture.Picture
	if a, ok := picture.AuditSitesOf(rep); ok {
		p, err := picture.Audit(a)
		if err != nil {
			return fmt.Errorf("--plot: %w", err)
		}
		pics = append(pics, p)
	}
	if rep.Hull.Measured != nil {
		more, err := picture.Analysis(rep.Hull.Measured)
		if err == nil {
			pics = append(pics, more...)
		}
	}
	return f.write(pics)
}

// write encodes the pictures into the plot folder, all or none
// (outfile.WriteFiles): a missing folder appears with all of them.
func (f *plotFlags) write(pics []*picture.Picture) error {
	format, err := picture.ParseFormat(f.format)
	if err != nil {
		return err
	}
	files := make([]outfile.File, len(pics))
	for i, p := range pics {
		files[i] = outfile.File{Name: p.Name + "." + string(format), Write: func(w io.Writer) error { return p.Encode(w, format) }}
	}
	if err := outfile.WriteFiles(f.dir, files); err != nil {
		return fmt.Errorf("--plot %s: %w", f.dir, err)
	}
	if f.list != nil {
		for _, file := range files {
			fmt.Fprintf(f.list, "phasonhull: wrote %s\n", filepath.Join(f.dir, file.Name))
		}
	}
	return nil
}

// reportFlags holds the flags of "phasonhull report".
type reportFlags struct {
	in     inputFlags
	audit  auditFlags
	out    string
	budget string
}

// newReportCmd builds "phasonhull report".
func newReportCmd() *cobra.Command {
	var f reportFlags
	cmd := &cobra.Command{
		Use:   "report FILE [--design DESIGN] --out DIR",
		Short: "Write a self-contained HTML report of a pattern's hull (and audit) with its figures and JSON",
		Long: `report analyses FILE as analyze does (and audits it against DESIGN as audit
does, when --design is given) and writes into DIR:

  report.html    one page that needs nothing else to be read: summary table,
                 hull class with its confidence, angle(s) with uncertainty,
                 gap labels, disorder, the audit verdict, the figures (PNG,
                 embedded in the page) and notes on reading the figures
  analysis.json  the analysis, as analyze --json prints it
  audit.json     the audit, as audit --json prints it (with --design only)

With --budget FILE (what budget --json printed for the design) the page
also shows the fabrication error budget.

DIR is created; it must not hold an input file. Either every file is
written or none: they are staged out of sight and put in place in one short
step at the end (a new DIR appears whole). Into the folder of an earlier
report, the files of ours that this run does not write (audit.json of an
earlier audit, say) are removed in the same step; files of your own in DIR
are left alone. A failing audit verdict is reported in the page and
does not change the exit status.`,
		Example: `  phasonhull report testdata/demo/lw0412_cmm.csv --out lw0412-report
  phasonhull report sample.csv --design design.json --tolerance 0.02mm --out sample-report`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			return runReport(cmd, args[0], &f)
		},
	}
	fs := cmd.Flags()
	f.in.register(fs)
	f.audit.register(fs)
	fs.StringVarP(&f.out, "out", "o", "", "write the report into `DIR` (required)")
	fs.StringVar(&f.budget, "budget", "", "add the fabrication error budget in `FILE` (the output of budget --json) to the page")
	outfile.FileArgs(cmd)
	outfile.Mark(cmd.Flags(), outfile.Input, "design")
	outfile.Mark(cmd.Flags(), outfile.Input, "budget")
	outfile.Mark(cmd.Flags(), outfile.OutputDir, "out")
	return cmd
}

func runReport(cmd *cobra.Command, path string, f *reportFlags) error {
	if f.out == "" {
		return fmt.Errorf("--out DIR is required")
	}
	opt, err := f.audit.options()
	if err != nil {
		return err
	}
	sites, err := f.in.loadSites(path, cmd.InOrStdin())
	if err != nil {
		return err
	}
	if sites.Plane != nil && f.audit.designPath != "" {
		return fmt.Errorf("--design: %s is a plate; report audits chains only, analyse the plate without --design", sites.Plane.Source)
	}
	progress := progressOf(cmd)
	defer progress.Close()
	d, err := f.audit.loadDesign(cmd.Context(), progress, opt.Hull)
	if err != nil {
		return err
	}
	var page report.Page
	if page.Budget, err = readBudget(f.budget); err != nil {
		return err
	}
	progress.Stage("analysing " + sitesName(sites))
	var res *hull.Result
	var l *lattice.Lattice
	if d == nil {
		if res, l, err = hull.AnalyzeSites(cmd.Context(), sites, lattice.Options{}, opt.Hull); err != nil {
			return err
		}
	} else {
		p := sites.Chain
		rep, err := audit.Run(cmd.Context(), d, p, opt)
		if err != nil {
			return err
		}
		if rep.Hull.Measured == nil {
			return fmt.Errorf("%s: %s", p.Source, rep.Reasons[0])
		}
		res = rep.Hull.Measured
		js, err := indentJSON(rep)
		if err != nil {
			return internalErr(err)
		}
		page.Audit = report.AuditOf(rep)
		page.Files = append(page.Files, report.File{Name: report.AuditFile, Data: js})
		if a, ok := picture.AuditSitesOf(rep); ok {
			pic, err := picture.Audit(a)
			if err != nil {
				return internalErr(err)
			}
			if err := page.AddFigure(pic); err != nil {
				return internalErr(err)
			}
		}
	}
	js, err := indentJSON(res)
	if err != nil {
		return internalErr(err)
	}
	page.Analysis = res
	page.Files = append([]report.File{{Name: report.AnalysisFile, Data: js}}, page.Files...)
	progress.Stage("drawing the figures")
	if pics, err := picture.Figures(res, sites.Plane, l); err == nil {
		figs := page.Figures
		page.Figures = nil
		for _, pic := range pics {
			if err := page.AddFigure(pic); err != nil {
				return internalErr(err)
			}
		}
		page.Figures = append(page.Figures, figs...)
	}
	progress.Stage("writing " + f.out)
	if err := report.Write(f.out, &page); err != nil {
		return err
	}
	progress.Close()
	fmt.Fprintf(cmd.OutOrStdout(), "wrote %s\n", filepath.Join(f.out, report.PageFile))
	for _, file := range page.Files {
		fmt.Fprintf(cmd.OutOrStdout(), "wrote %s\n", filepath.Join(f.out, file.Name))
	}
	return nil
}

// readBudget reads the budget --json output at path for the page; nil
// without a path.
func readBudget(path string) (*report.Budget, error) {
	if path == "" {
		return nil, nil
	}
	fh, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("--budget: %w", err)
	}
	defer fh.Close()
	res, err := budget.ReadJSON(fh)
	if err != nil {
		return nil, fmt.Errorf("--budget %s: %w", path, err)
	}
	var b strings.Builder
	if err := res.WriteText(&b); err != nil {
		return nil, internalErr(err)
	}
	return &report.Budget{Design: res.Source, Text: b.String()}, nil
}
