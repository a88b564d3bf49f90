package main

import (
	"errors"
	"fmt"
	"io"

	"github.com/spf13/cobra"

	"phasonhull/cmd/phasonhull/internal/outfile"
	"phasonhull/pattern"
	"phasonhull/topology/batch"
)

// batchFlags holds the flags of "phasonhull batch".
type batchFlags struct {
	in      inputFlags
	audit   auditFlags
	out     string
	jsonOut string
	jobs    int
}

// newBatchCmd builds "phasonhull batch".
func newBatchCmd() *cobra.Command {
	var f batchFlags
	cmd := &cobra.Command{
		Use:   "batch FILES...|DIR --out SUMMARY.csv [--design DESIGN] [--out-json SUMMARY.json]",
		Short: "Analyse (or audit against one design) many files into one summary table",
		Long: `batch runs analyze over many files — or, with --design, audit against one
design — and writes one summary table with a row per file, in the order
the files were given (the files of a DIR in name order, leaving out hidden
files and the design). Files are processed on all
cores (--jobs bounds the workers); the summary is the same whatever the
number of workers.

A file that cannot be read or analysed does not stop the batch: its row
holds the error and the other files are finished.

Columns (CSV, and the same fields per row in the JSON summary): file, sites,
unit, class, period, angles and uncertainty (";"-separated, turns), disorder
(RMS distance of the sites from the hull model, in the file's unit) and
disorder_relative (over the mean spacing), verdict (pass or fail with
--design, empty without; "error" for a file that failed), missing, extra,
rms, max, offset, scale (audits only), reasons, error.

Both outputs are written atomically, after every file is done. An output
that is an input — a file given, the design, or a file already in a DIR
given (a summary of an earlier run there, say) — is refused before any
work starts; write the summary outside the folders you analyse. Nothing is
written on bad flags or a bad design.

Exit status: 2 when some file could not be processed (the summary is still
written), else 3 when some audit failed, else 0; 2 as well for bad flags,
and 1 for a bug.`,
		Example: `  phasonhull batch samples/ --out summary.csv
  phasonhull batch a.csv b.csv c.csv --out summary.csv --out-json summary.json
  phasonhull batch samples/ --design design.json --tolerance 20nm --out audit.csv`,
		Args: cobra.MinimumNArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			return runBatch(cmd, args, &f)
		},
	}
	fs := cmd.Flags()
	f.in.register(fs)
	f.audit.register(fs)
	fs.StringVarP(&f.out, "out", "o", "", "write the summary as CSV to `FILE` (required)")
	fs.StringVar(&f.jsonOut, "out-json", "", "also write the summary as JSON to `FILE`")
	fs.IntVarP(&f.jobs, "jobs", "j", 0, "files processed at once (0: one per core)")
	outfile.FileArgs(cmd)
	outfile.Mark(cmd.Flags(), outfile.Input, "design")
	outfile.Mark(cmd.Flags(), outfile.OutputFile, "out", "out-json")
	return cmd
}

func runBatch(cmd *cobra.Command, args []string, f *batchFlags) error {
	if f.out == "" {
		return errors.New("batch needs --out SUMMARY.csv")
	}
	if f.jobs < 0 {
		return fmt.Errorf("--jobs %d: must not be negative", f.jobs)
	}
	opt, err := f.audit.options()
	if err != nil {
		return err
	}
	// A folder's files leave out the design; outputs that would be among
	// them were refused before the run started (outfile.Bind).
	files, err := batch.Files(args, []string{f.audit.designPath})
	if err != nil {
		return err
	}
	// The design is analysed once, with every core.
	progress := progressOf(cmd)
	defer progress.Close()
	d, err := f.audit.loadDesign(cmd.Context(), progress, opt.Hull)
	if err != nil {
		return err
	}
	load := func(path string) (*pattern.Pattern, error) { return f.in.load(path, nil) }
	progress.Stage("files done")
	sum := batch.Run(cmd.Context(), files, load, d, opt, f.jobs, progress.Count)
	progress.Close()
	if err := writeFileAtomic(f.out, sum.WriteCSV); err != nil {
		return err
	}
	if f.jsonOut != "" {
		if err := writeFileAtomic(f.jsonOut, func(file io.Writer) error { return writeJSON(file, sum) }); err != nil {
			return err
		}
	}
	w := cmd.OutOrStdout()
	fmt.Fprintf(w, "batch: %d file(s), %d error(s)", sum.Files, sum.Errors)
	if d != nil {
		fmt.Fprintf(w, ", %d failed the audit", sum.Failed)
	}
	fmt.Fprintf(w, "; summary written to %s", f.out)
	if f.jsonOut != "" {
		fmt.Fprintf(w, " and %s", f.jsonOut)
	}
	fmt.Fprintln(w)
	for _, r := range sum.Rows {
		if r.Error != "" {
			fmt.Fprintf(cmd.ErrOrStderr(), "phasonhull: %s\n", r.Error)
		}
	}
	switch {
	case sum.Errors > 0:
		return &exitError{code: exitInput}
	case sum.Failed > 0:
		return &exitError{code: exitFail}
	}
	return nil
}
