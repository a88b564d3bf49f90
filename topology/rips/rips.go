package rips

import (
	"cmp"
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"runtime"
	"slices"
	"time"
)

// DefaultMemoryBudget is the memory budget used when Options.MemoryBudget
// is 0: room for large jobs on a 24 GiB machine.
const DefaultMemoryBudget = 8 << 30

// MaxDim is the highest homology dimension VietorisRips computes.
const MaxDim = 3

// ErrBudget is wrapped by the error VietorisRips returns when a
// computation would need more memory than Options.MemoryBudget.
var ErrBudget = errors.New("lower the threshold or the dimension, or use fewer points (landmarks), or raise the memory budget")

// Options configures VietorisRips.
type Options struct {
	// MaxDim is the highest homology dimension computed, 0 to 3.
	MaxDim int
	// Threshold is the largest edge length admitted in the complex; 0
	// means the radius of the cloud (see VietorisRips).
	Threshold float64
	// Prime is the characteristic p of the coefficient field Z/p; 0 means
	// 2. It must be a prime below 65536.
	Prime int
	// Cocycles asks for a representative cocycle of every H1 bar.
	Cocycles bool
	// MemoryBudget is the most memory, in bytes, the computation may hold;
	// 0 means DefaultMemoryBudget.
	MemoryBudget int64
	// Workers is the number of goroutines for the parallel stages; 0 means
	// runtime.GOMAXPROCS(0). Results do not depend on it.
	Workers int
	// Progress, when not nil, receives a progress line about once a second
	// once a computation has run for more than a second.
	Progress io.Writer
}

// Diagram is the result of VietorisRips.
type Diagram struct {
	// Bars holds every bar of positive persistence and every essential
	// class, sorted by dimension, then birth, then death.
	Bars []Bar
	// Cocycles holds a representative cocycle of each H1 bar when
	// Options.Cocycles is set, in the order of their bars.
	Cocycles []Cocycle
	// Threshold is the largest edge length in the complex: the requested
	// threshold, or the radius of the cloud when that is smaller or none was
	// requested.
	Threshold float64
	// Radius is the radius of the cloud, min_i max_j d(i, j): past it one
	// point is joined to every other and no bar changes.
	Radius float64
	// Prime is the coefficient field's characteristic.
	Prime int
	// Points is the number of points.
	Points int
	// Stats describes the work done.
	Stats Stats
}

// Stats counts the work of a computation. Each slice has one element per
// homology dimension 0 to MaxDim, index d for dimension d; the reduction
// counts leave index 0 unused, since H0 is computed by union–find.
type Stats struct {
	// Simplices counts the simplices of each dimension below the
	// threshold.
	Simplices []int64
	// Cleared counts the simplices skipped because they were pivots of the
	// dimension below: for edges, those that merge two components.
	Cleared []int64
	// Apparent counts the simplices skipped as members of apparent pairs
	// (index 0 unused).
	Apparent []int64
	// Columns counts the columns handed to the reduction (index 0 unused).
	Columns []int64
	// Emergent counts the columns paired without a reduction (index 0
	// unused).
	Emergent []int64
	// Reduced counts the columns that needed a working column (index 0
	// unused).
	Reduced []int64
	// Additions counts the column additions (index 0 unused).
	Additions []int64
}

// Betti returns the number of bars of each dimension 0..maxDim alive at
// scale t: born at or before t and dying after it.
func (d *Diagram) Betti(maxDim int, t float64) []int {
	b := make([]int, maxDim+1)
	for _, bar := range d.Bars {
		if bar.Dim <= maxDim && bar.Birth <= t && t < bar.Death {
			b[bar.Dim]++
		}
	}
	return b
}

// VietorisRips computes the persistent homology with coefficients in Z/p
// of the Vietoris–Rips filtration of a finite cloud of points in Euclidean
// space, in dimensions 0 to opt.MaxDim. Every point is one row of points;
// all rows have the same number of coordinates.
//
// A simplex enters the filtration at its diameter, the length of its
// longest edge. With opt.Threshold = 0 the complex is built up to the
// radius of the cloud r = min_i max_j d(i, j): there the point attaining
// it is joined to every other, so the complex contracts onto it, every class of positive dimension has died,
// and the bars are exactly those of the whole filtration, with a single
// essential H0 bar. A larger threshold is lowered to r, which changes
// nothing. A smaller threshold t cuts the filtration at t: a class still
// alive at t is reported with Death = +Inf.
//
// Bars of zero persistence (born and killed at the same length) are left
// out. Lengths are computed in float64 and reported exactly as computed.
func VietorisRips(points [][]float64, opt Options) (*Diagram, error) {
	return VietorisRipsContext(context.Background(), points, opt)
}

// VietorisRipsContext is VietorisRips under a context: the reduction checks
// ctx every 1024 columns and every 4096 steps of a long column, and returns
// an error wrapping ctx.Err() once ctx is done.
func VietorisRipsContext(ctx context.Context, points [][]float64, opt Options) (*Diagram, error) {
	start := time.Now()
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	e, err := newEngine(points, opt, start)
	if err != nil {
		return nil, err
	}
	e.ctx = ctx
	if err := e.run(); err != nil {
		return nil, err
	}
	return e.diagram(opt), nil
}

// checkOptions validates opt and fills in its defaults.
func checkOptions(opt Options) (Options, error) {
	if opt.MaxDim < 0 || opt.MaxDim > MaxDim {
		return opt, fmt.Errorf("homology dimension %d: must be between 0 and %d", opt.MaxDim, MaxDim)
	}
	if math.IsNaN(opt.Threshold) || opt.Threshold < 0 {
		return opt, fmt.Errorf("threshold %v: must be a non-negative length", opt.Threshold)
	}
	if opt.Prime == 0 {
		opt.Prime = 2
	}
	if opt.MemoryBudget < 0 {
		return opt, fmt.Errorf("memory budget %d: must not be negative", opt.MemoryBudget)
	}
	if opt.MemoryBudget == 0 {
		opt.MemoryBudget = DefaultMemoryBudget
	}
	if opt.Workers < 0 {
		return opt, fmt.Errorf("workers %d: must not be negative", opt.Workers)
	}
	if opt.Workers == 0 {
		opt.Workers = runtime.GOMAXPROCS(0)
	}
	return opt, nil
}

// newEngine validates the input, checks the budget and builds the metric.
func newEngine(points [][]float64, opt Options, start time.Time) (*engine, error) {
	opt, err := checkOptions(opt)
	if err != nil {
		return nil, err
	}
	f, err := newField(opt.Prime)
	if err != nil {
		return nil, err
	}
	flat, dim, err := flatten(points)
	if err != nil {
		return nil, err
	}
	n := len(points)
	if n > 1<<16 {
		return nil, fmt.Errorf("%d points: at most %d are supported: %w", n, 1<<16, ErrBudget)
	}
	if need := metricPeak(n); need > opt.MemoryBudget {
		return nil, fmt.Errorf("%d points need %s for their distances alone, over the memory budget of %s: %w",
			n, formatBytes(need), formatBytes(opt.MemoryBudget), ErrBudget)
	}
	b, err := newBinomials(n, opt.MaxDim+2)
	if err != nil {
		return nil, err
	}
	m := newMetric(flat, n, dim, opt.Threshold, opt.Workers)
	e := &engine{
		m: m, n: n, maxDim: opt.MaxDim, f: f, b: b,
		workers: opt.Workers, cocycles: opt.Cocycles, budget: opt.MemoryBudget,
		prog: newProgress(opt.Progress, start), ctx: context.Background(),
	}
	counts := make([]int64, 7*(opt.MaxDim+1))
	for i, c := range []*[]int64{&e.stats.Simplices, &e.stats.Cleared, &e.stats.Apparent, &e.stats.Columns,
		&e.stats.Emergent, &e.stats.Reduced, &e.stats.Additions} {
		*c = counts[i*(opt.MaxDim+1) : (i+1)*(opt.MaxDim+1) : (i+1)*(opt.MaxDim+1)]
	}
	if opt.MaxDim >= 1 {
		c := e.estimate()
		if c.Bytes > opt.MemoryBudget {
			return nil, fmt.Errorf("about %.3g simplices of dimension up to %d lie below the threshold %.6g; their reduction needs about %s, over the memory budget of %s: %w",
				c.total(), opt.MaxDim+1, m.threshold, formatBytes(c.Bytes), formatBytes(opt.MemoryBudget), ErrBudget)
		}
	}
	return e, nil
}

// run computes the bars dimension by dimension.
func (e *engine) run() error {
	cols := e.dim0()
	if e.maxDim >= 1 {
		e.nb = newNeighbours(e.m)
	}
	for dim := 1; dim <= e.maxDim; dim++ {
		if err := e.ctx.Err(); err != nil {
			return fmt.Errorf("dimension %d: %w", dim, err)
		}
		pivots, err := e.reduce(dim, cols)
		if err != nil {
			return err
		}
		if dim < e.maxDim {
			cols = nil
			cols = e.assemble(dim+1, pivots)
		}
	}
	e.prog.done()
	return nil
}

// diagram sorts the bars and assembles the result.
func (e *engine) diagram(opt Options) *Diagram {
	// Sort bars, carrying each cocycle's bar index along.
	perm := make([]int, len(e.bars))
	for i := range perm {
		perm[i] = i
	}
	slices.SortStableFunc(perm, func(a, b int) int { return compareBars(e.bars[a], e.bars[b]) })
	where := make([]int, len(perm))
	bars := make([]Bar, len(perm))
	for to, from := range perm {
		bars[to] = e.bars[from]
		where[from] = to
	}
	for i := range e.cocs {
		e.cocs[i].Bar = where[e.cocs[i].Bar]
	}
	slices.SortStableFunc(e.cocs, func(a, b Cocycle) int { return a.Bar - b.Bar })
	p := opt.Prime
	if p == 0 {
		p = 2
	}
	return &Diagram{
		Bars: bars, Cocycles: e.cocs, Threshold: e.m.threshold, Radius: e.m.radius,
		Prime: p, Points: e.n, Stats: e.stats,
	}
}

// compareBars orders bars by dimension, birth, then death.
func compareBars(a, b Bar) int {
	return cmp.Or(cmp.Compare(a.Dim, b.Dim), cmp.Compare(a.Birth, b.Birth), cmp.Compare(a.Death, b.Death))
}

// formatBytes writes a byte count with a binary unit.
func formatBytes(b int64) string {
	const unit = 1024
	if b < unit {
		return fmt.Sprintf("%d B", b)
	}
	v := float64(b)
	for _, u := range []string{"KiB", "MiB", "GiB", "TiB"} {
		v /= unit
		if v < unit {
			return fmt.Sprintf("%.1f %s", v, u)
		}
	}
	return fmt.Sprintf("%.1f PiB", v/unit)
}

// progress writes progress lines once a computation runs long.
type progress struct {
	w     io.Writer
	start time.Time
	last  time.Time
	shown bool
}

func newProgress(w io.Writer, start time.Time) *progress {
	return &progress{w: w, start: start, last: start}
}

// report writes a line when more than a second has passed since the start
// and since the last line.
func (p *progress) report(format string, args ...any) {
	if p == nil || p.w == nil {
		return
	}
	now := time.Now()
	if now.Sub(p.start) < time.Second || now.Sub(p.last) < time.Second {
		return
	}
	p.last = now
	p.shown = true
	fmt.Fprintf(p.w, "rips: %.0fs: "+format+"\n", append([]any{now.Sub(p.start).Seconds()}, args...)...)
}

// done writes a closing line when progress lines were shown.
func (p *progress) done() {
	if p != nil && p.w != nil && p.shown {
		fmt.Fprintf(p.w, "rips: done in %.1fs\n", time.Since(p.start).Seconds())
	}
}
