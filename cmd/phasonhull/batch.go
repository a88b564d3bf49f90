package main

import (
	"context"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"slices"
	"sort"
	"strconv"
	"strings"
	"sync"

	"github.com/spf13/cobra"

	"phasonhull/cmd/phasonhull/internal/outfile"
	"phasonhull/topology/audit"
	"phasonhull/topology/hull"
)

// batchSchema names the layout of the JSON summary of a batch.
const batchSchema = "phasonhull.batch/1"

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
		Use:   "batch FILES...|DIR --out SUMMARY.csv [--design DESIGN] [--json SUMMARY.json]",
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
  phasonhull batch a.csv b.csv c.csv --out summary.csv --json summary.json
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
	fs.StringVar(&f.jsonOut, "json", "", "also write the summary as JSON to `FILE`")
	fs.IntVarP(&f.jobs, "jobs", "j", 0, "files processed at once (0: one per core)")
	fileArgs(cmd)
	outfile.Mark(cmd.Flags(), outfile.Input, "design")
	outfile.Mark(cmd.Flags(), outfile.OutputFile, "out", "json")
	return cmd
}

// batchRow is one row of the summary.
type batchRow struct {
	File             string    `json:"file"`
	Sites            int       `json:"sites"`
	Unit             string    `json:"unit"`
	Class            string    `json:"class"`
	Period           int       `json:"period"`
	Angles           []float64 `json:"angles"`
	Uncertainty      []float64 `json:"uncertainty"`
	Disorder         *float64  `json:"disorder"`
	DisorderRelative *float64  `json:"disorder_relative"`
	Verdict          string    `json:"verdict"`
	Missing          *int      `json:"missing,omitempty"`
	Extra            *int      `json:"extra,omitempty"`
	RMS              *float64  `json:"rms,omitempty"`
	Max              *float64  `json:"max,omitempty"`
	Offset           *float64  `json:"offset,omitempty"`
	Scale            *float64  `json:"scale,omitempty"`
	Reasons          []string  `json:"reasons"`
	Error            string    `json:"error"`
}

// batchSummary is the JSON summary.
type batchSummary struct {
	Schema string     `json:"schema"`
	Design string     `json:"design,omitempty"`
	Files  int        `json:"files"`
	Errors int        `json:"errors"`
	Failed int        `json:"failed"`
	Rows   []batchRow `json:"rows"`
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
	// them were refused before the run started (bindOutputCheck).
	files, err := batchFiles(args, []string{f.audit.designPath})
	if err != nil {
		return err
	}

	jobs := f.jobs
	if jobs == 0 {
		jobs = runtime.GOMAXPROCS(0)
	}
	jobs = min(jobs, len(files))
	// The design is analysed once, with every core.
	d, err := f.audit.loadDesign(cmd.Context(), opt.Hull)
	if err != nil {
		return err
	}
	// Each worker's persistence computations share the cores.
	opt.Hull.Workers = max(1, runtime.GOMAXPROCS(0)/jobs)

	rows := make([]batchRow, len(files))
	next := make(chan int)
	var wg sync.WaitGroup
	for range jobs {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range next {
				rows[i] = batchOne(cmd.Context(), files[i], &f.in, d, opt)
			}
		}()
	}
	for i := range files {
		next <- i
	}
	close(next)
	wg.Wait()

	sum := batchSummary{Schema: batchSchema, Files: len(rows), Rows: rows}
	if d != nil {
		sum.Design = d.File.Path
	}
	for _, r := range rows {
		switch r.Verdict {
		case "error":
			sum.Errors++
		case "fail":
			sum.Failed++
		}
	}
	if err := writeFileAtomic(f.out, func(file io.Writer) error { return writeBatchCSV(file, rows) }); err != nil {
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
	for _, r := range rows {
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

// batchFiles expands the arguments: a folder stands for its regular,
// non-hidden files in name order, except those in skip; a file stands for
// itself.
func batchFiles(args, skip []string) ([]string, error) {
	var files []string
	for _, a := range args {
		if a == "-" {
			return nil, errors.New("batch reads files, not standard input")
		}
		st, err := os.Stat(a)
		if err != nil {
			// A missing file gets a row of its own, like any bad file.
			files = append(files, a)
			continue
		}
		if !st.IsDir() {
			files = append(files, a)
			continue
		}
		entries, err := os.ReadDir(a)
		if err != nil {
			return nil, fmt.Errorf("reading folder %s: %w", a, err)
		}
		var names []string
		for _, e := range entries {
			if strings.HasPrefix(e.Name(), ".") || !e.Type().IsRegular() {
				continue
			}
			names = append(names, e.Name())
		}
		sort.Strings(names)
		for _, n := range names {
			path := filepath.Join(a, n)
			if !slices.ContainsFunc(skip, func(s string) bool { return s != "" && samePath(s, path) }) {
				files = append(files, path)
			}
		}
	}
	if len(files) == 0 {
		return nil, errors.New("no input files: the folders given hold none")
	}
	return files, nil
}

// batchOne analyses or audits one file. A panic is caught and reported in
// the row as a bug, so that one file cannot stop the batch.
func batchOne(ctx context.Context, path string, in *inputFlags, d *audit.Design, opt audit.Options) (row batchRow) {
	row = batchRow{File: path, Angles: []float64{}, Uncertainty: []float64{}, Reasons: []string{}}
	defer func() {
		if r := recover(); r != nil {
			row.Verdict, row.Error = "error", fmt.Sprintf("%s: internal error (a bug in phasonhull): %v", path, r)
		}
	}()
	p, err := in.load(path, nil)
	if err != nil {
		row.Verdict, row.Error = "error", err.Error()
		return row
	}
	row.Sites, row.Unit = p.Len(), p.Unit
	var res *hull.Result
	if d == nil {
		if res, err = hull.AnalyzeContext(ctx, p, opt.Hull); err != nil {
			row.Verdict, row.Error = "error", fmt.Sprintf("%s: %v", path, err)
			return row
		}
	} else {
		rep, err := audit.Run(ctx, d, p, opt)
		if err != nil {
			row.Verdict, row.Error = "error", fmt.Sprintf("%s: %v", path, err)
			return row
		}
		res = rep.Hull.Measured
		row.Verdict, row.Reasons = string(rep.Verdict), rep.Reasons
		nm, ne := len(rep.Missing), len(rep.Extra)
		row.Missing, row.Extra = &nm, &ne
		if rep.Matched > 0 {
			row.RMS, row.Max = &rep.RMS, &rep.Max
		}
		row.Offset, row.Scale = rep.Offset, rep.Scale
	}
	if res != nil {
		row.Class, row.Period = string(res.Hull.Class), res.Hull.Period
		row.Angles, row.Uncertainty = res.Angles, res.AngleUncertainty
		if res.Disorder != nil {
			row.Disorder, row.DisorderRelative = &res.Disorder.RMS, &res.Disorder.Relative
		}
	}
	return row
}

// writeBatchCSV writes the summary table.
func writeBatchCSV(file io.Writer, rows []batchRow) error {
	w := csv.NewWriter(file)
	w.Write([]string{"file", "sites", "unit", "class", "period", "angles", "uncertainty", "disorder", "disorder_relative",
		"verdict", "missing", "extra", "rms", "max", "offset", "scale", "reasons", "error"})
	num := func(v *float64) string {
		if v == nil {
			return ""
		}
		return strconv.FormatFloat(*v, 'g', -1, 64)
	}
	count := func(v *int) string {
		if v == nil {
			return ""
		}
		return strconv.Itoa(*v)
	}
	list := func(v []float64) string {
		s := make([]string, len(v))
		for i, x := range v {
			s[i] = strconv.FormatFloat(x, 'g', -1, 64)
		}
		return strings.Join(s, ";")
	}
	for _, r := range rows {
		sites, period := "", ""
		if r.Sites > 0 {
			sites = strconv.Itoa(r.Sites)
		}
		if r.Period > 0 {
			period = strconv.Itoa(r.Period)
		}
		w.Write([]string{r.File, sites, r.Unit, r.Class, period, list(r.Angles), list(r.Uncertainty),
			num(r.Disorder), num(r.DisorderRelative), r.Verdict, count(r.Missing), count(r.Extra),
			num(r.RMS), num(r.Max), num(r.Offset), num(r.Scale), strings.Join(r.Reasons, "; "), r.Error})
	}
	w.Flush()
	return w.Error()
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
