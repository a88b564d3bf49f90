package batch

import (
	"context"
	"fmt"
	"runtime"
	"sync"
	"sync/atomic"

	"phasonhull/pattern"
	"phasonhull/topology/audit"
	"phasonhull/topology/hull"
)

// Schema names the layout of Summary in JSON.
const Schema = "phasonhull.batch/1"

// Error is the verdict of a row whose file could not be read or
// processed.
const Error = "error"

// Row sums up one file. Without a design Verdict is empty and the audit's
// fields are nil.
type Row struct {
	File             string    `json:"file"`
	Sites            int       `json:"sites"`
	Unit             string    `json:"unit"`
	Class            string    `json:"class"`
	Period           int       `json:"period"`
	Angles           []float64 `json:"angles"`
	Uncertainty      []float64 `json:"uncertainty"`
	Disorder         *float64  `json:"disorder"`
	DisorderRelative *float64  `json:"disorder_relative"`
	// Verdict is the audit's ("pass" or "fail"), Error for a file that
	// failed, empty for an analysis.
	Verdict string   `json:"verdict"`
	Missing *int     `json:"missing,omitempty"`
	Extra   *int     `json:"extra,omitempty"`
	RMS     *float64 `json:"rms,omitempty"`
	Max     *float64 `json:"max,omitempty"`
	Offset  *float64 `json:"offset,omitempty"`
	Scale   *float64 `json:"scale,omitempty"`
	Reasons []string `json:"reasons"`
	Error   string   `json:"error"`
}

// Summary is the rows of a batch, in the order of its files, with their
// counts.
type Summary struct {
	Schema string `json:"schema"`
	// Design is the path of the design audited against, empty for
	// analyses.
	Design string `json:"design,omitempty"`
	Files  int    `json:"files"`
	// Errors counts the rows whose file failed, Failed the audits that
	// failed.
	Errors int   `json:"errors"`
	Failed int   `json:"failed"`
	Rows   []Row `json:"rows"`
}

// Loader reads the pattern of a file.
type Loader func(path string) (*pattern.Pattern, error)

// Run processes files with at most jobs at once (0: one per core): each
// is read by load and analysed with opt.Hull, or, when d is not nil,
// audited against d with opt. The cores are shared among the workers'
// persistence computations. The rows come in the order of files. done,
// when not nil, is told after each file how many of all are done.
func Run(ctx context.Context, files []string, load Loader, d *audit.Design, opt audit.Options, jobs int, done func(n, total int)) *Summary {
	if jobs <= 0 {
		jobs = runtime.GOMAXPROCS(0)
	}
	jobs = max(1, min(jobs, len(files)))
	opt.Hull.Workers = max(1, runtime.GOMAXPROCS(0)/jobs)

	rows := make([]Row, len(files))
	next := make(chan int)
	var wg sync.WaitGroup
	var finished atomic.Int64
	for range jobs {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range next {
				rows[i] = One(ctx, files[i], load, d, opt)
				if n := finished.Add(1); done != nil {
					done(int(n), len(files))
				}
			}
		}()
	}
	for i := range files {
		next <- i
	}
	close(next)
	wg.Wait()

	s := &Summary{Schema: Schema, Files: len(rows), Rows: rows}
	if d != nil {
		s.Design = d.File.Path
	}
	for _, r := range rows {
		switch r.Verdict {
		case Error:
			s.Errors++
		case string(audit.Fail):
			s.Failed++
		}
	}
	return s
}

// One reads the file at path with load and analyses it with opt.Hull, or,
// when d is not nil, audits it against d with opt, and sums it up. An
// error, or a panic (a bug), is reported in the row, so that one file
// cannot stop a batch.
func One(ctx context.Context, path string, load Loader, d *audit.Design, opt audit.Options) (row Row) {
	row = Row{File: path, Angles: []float64{}, Uncertainty: []float64{}, Reasons: []string{}}
	defer func() {
		if r := recover(); r != nil {
			row.Verdict, row.Error = Error, fmt.Sprintf("%s: internal error (a bug in phasonhull): %v", path, r)
		}
	}()
	p, err := load(path)
	if err != nil {
		row.Verdict, row.Error = Error, err.Error()
		return row
	}
	row.Sites, row.Unit = p.Len(), p.Unit
	var res *hull.Result
	if d == nil {
		if res, err = hull.AnalyzeContext(ctx, p, opt.Hull); err != nil {
			row.Verdict, row.Error = Error, fmt.Sprintf("%s: %v", path, err)
			return row
		}
	} else {
		rep, err := audit.Run(ctx, d, p, opt)
		if err != nil {
			row.Verdict, row.Error = Error, fmt.Sprintf("%s: %v", path, err)
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
