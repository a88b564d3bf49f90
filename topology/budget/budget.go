package budget

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"runtime"
	"slices"
	"strings"
	"sync"

	"phasonhull/topology"
	"phasonhull/topology/hull"
	"phasonhull/topology/spectrum"
)

// Schema names the layout of Result in JSON.
const Schema = "phasonhull.budget/1"

// edgeGapsMax bounds the gaps the phase sweeps follow; a trial follows
// twice as many as the design opens, since disorder reorders their widths.
const edgeGapsMax = 24

// Defaults of Options.
const (
	DefaultTrials     = 200
	DefaultHullTrials = 20
	DefaultEdgeTrials = 10
	DefaultConfidence = 0.95
	DefaultSeed       = 1
)

// DefaultSigmas are the position errors tried when none are given: 0 and
// 0.5%, 1%, 2% and 5% of the mean spacing d.
func DefaultSigmas(d float64) []float64 { return []float64{0, 0.005 * d, 0.01 * d, 0.02 * d, 0.05 * d} }

// Options control Run. The zero value runs DefaultTrials trials of the
// gaps alone at no error level.
type Options struct {
	// Sigmas are the position errors tried, in the design's unit, each a
	// Level with Missing and Drift.
	Sigmas []float64
	// Missing and Drift are held at every level (see Level).
	Missing, Drift float64
	// Trials is the number of samples drawn per level; 0 means
	// DefaultTrials.
	Trials int
	// HullTrials and EdgeTrials are how many of them (the first ones) are
	// also given the hull analysis and the phase sweep of the edge modes,
	// which cost about 30 and 40 spectra each; 0 measures none.
	HullTrials, EdgeTrials int
	// Seed seeds the trials (TrialSeed).
	Seed uint64
	// MinWidth is the width, in the levels' unit, above which a gap is
	// open; 0 means the smallest gap the design's spectrum resolves
	// (spectrum.Result.MinGap).
	MinWidth float64
	// Gap, when set, is the label coefficients of the gap whose budget is
	// found: the largest σ keeping it open with probability Confidence.
	Gap []int
	// Confidence is the survival probability the budget asks for; 0 means
	// DefaultConfidence.
	Confidence float64
	// Workers bounds the trials run at once; 0 means all cores.
	Workers int
	// Progress, when set, is told the stage and the trials done of it.
	Progress func(stage string, done, total int)
}

// Result is the error budget of a design.
type Result struct {
	Schema string `json:"schema"`
	// Source names the design; the caller sets it.
	Source string `json:"source"`
	Sites  int    `json:"sites"`
	Unit   string `json:"unit"`
	// Trials per level, and how many of them had the hull analysed and
	// the edge modes swept.
	Trials     int    `json:"trials"`
	HullTrials int    `json:"hull_trials"`
	EdgeTrials int    `json:"edge_trials"`
	Seed       uint64 `json:"seed"`
	// MinWidth is the width above which a gap counts as open.
	MinWidth float64 `json:"min_width"`
	// IntervalLevel is the coverage of every interval of the result.
	IntervalLevel float64 `json:"interval_level"`
	// Design is what the design itself shows, at zero error.
	Design Reference `json:"design"`
	// Levels are the error levels, in the order given.
	Levels []LevelResult `json:"levels"`
	// Budget is the largest position error for the target gap; nil
	// without one.
	Budget   *Budget  `json:"budget"`
	Notes    []string `json:"notes"`
	Warnings []string `json:"warnings"`
}

// Reference is the design at zero error: its hull class and angles (when
// the hull was analysed) and its labelled gaps open wider than MinWidth.
type Reference struct {
	Class  hull.Class  `json:"class,omitempty"`
	Angles []float64   `json:"angles"`
	Gaps   []DesignGap `json:"gaps"`
}

// DesignGap is a labelled gap of the design, with the boundary states
// that cross it per turn of the phase on the first end (m, when swept).
type DesignGap struct {
	Label  topology.Label `json:"label"`
	Lower  float64        `json:"lower"`
	Upper  float64        `json:"upper"`
	Width  float64        `json:"width"`
	Centre float64        `json:"centre"`
	// EdgeAgrees says whether the design's own edge modes count m; nil
	// when they were not swept or the sweep did not follow this gap.
	EdgeAgrees *bool `json:"edge_agrees"`
}

// LevelResult is what the trials at one error level showed.
type LevelResult struct {
	Level
	// Hull is the share of the hull-analysed trials whose class is the
	// design's, and the spread of their first angle; nil when no trial
	// was analysed.
	Hull *HullStat `json:"hull"`
	// Gaps follow Reference.Gaps, by label.
	Gaps []GapStat `json:"gaps"`
}

// HullStat is the hull's survival at one level.
type HullStat struct {
	Kept Proportion `json:"kept"`
	// Angle is the spread of the first recovered angle, in turns, over
	// the trials that kept the class; SD its standard deviation.
	Angle   *Spread `json:"angle"`
	AngleSD float64 `json:"angle_sd"`
}

// GapStat is one gap's survival at one level.
type GapStat struct {
	Label topology.Label `json:"label"`
	// Open is the share of trials where a gap of this label is wider than
	// MinWidth.
	Open Proportion `json:"open"`
	// Width is the spread of the gap's width over every trial (0 where no
	// gap of the label was found), Centre that of its middle over the
	// trials where it is open (nil when it never is).
	Width  Spread  `json:"width"`
	Centre *Spread `json:"centre"`
	// MeanLower and MeanUpper are the mean edges over the trials where
	// the gap is open (0 when it never is).
	MeanLower float64 `json:"mean_lower"`
	MeanUpper float64 `json:"mean_upper"`
	// Edges is the share of the swept trials whose boundary states cross
	// the gap m times on the first end and −m on the last; nil when none
	// was swept or the design's own sweep did not follow the gap.
	Edges *Proportion `json:"edge_modes"`
}

// Run draws the trials of every level of opt on s and, when opt.Gap is
// set, finds the budget of that gap. A target gap that the design itself
// does not open is refused with the list of those it does.
func Run(ctx context.Context, s Sampler, opt Options) (*Result, error) {
	opt, err := opt.withDefaults()
	if err != nil {
		return nil, err
	}
	// The design's sweep follows every gap it has, up to edgeGapsMax.
	ref, err := s.Sample(ctx, Level{}, 0, Measure{Hull: opt.HullTrials > 0, Edges: opt.EdgeTrials > 0, EdgeGaps: edgeGapsMax})
	if err != nil {
		return nil, fmt.Errorf("budget: the design: %w", err)
	}
	res := &Result{Schema: Schema, Trials: opt.Trials, HullTrials: opt.HullTrials, EdgeTrials: opt.EdgeTrials,
		Seed: opt.Seed, MinWidth: opt.MinWidth, IntervalLevel: IntervalLevel, Levels: []LevelResult{}, Notes: []string{}, Warnings: []string{}}
	var spacing float64
	res.Sites, res.Unit, spacing = s.Describe()
	if res.MinWidth < ref.Spectrum.MinGap {
		if res.MinWidth > 0 {
			res.Warnings = append(res.Warnings, fmt.Sprintf("minimum width %g is below the spectrum's resolution %g, the narrowest gap it reports; %g is used", res.MinWidth, ref.Spectrum.MinGap, ref.Spectrum.MinGap))
		}
		res.MinWidth = ref.Spectrum.MinGap
	}
	opt.MinWidth = res.MinWidth
	res.Design = reference(ref, res.MinWidth)
	if opt.EdgeTrials > 0 && ref.Edges == nil {
		res.EdgeTrials, opt.EdgeTrials = 0, 0
		res.Notes = append(res.Notes, "edge modes not counted: they need an open chain and a design with a phase to sweep")
	}
	if opt.HullTrials > 0 && ref.Class == hull.Unresolved {
		res.Warnings = append(res.Warnings, "the hull analysis of the design itself is unresolved: a trial keeps the class when it is unresolved too, which says little")
	}
	if len(res.Design.Gaps) == 0 {
		return nil, fmt.Errorf("budget: no labelled gap of the design is wider than %g; nothing to keep open", res.MinWidth)
	}
	var target *DesignGap
	if opt.Gap != nil {
		if target = res.Design.find(opt.Gap); target == nil {
			return nil, fmt.Errorf("budget: the design does not open the gap %s (wider than %g); it opens %s",
				topology.Label{Coeffs: opt.Gap}.CoeffString(), res.MinWidth, res.Design.labels())
		}
	}
	r := runner{s: s, opt: opt, ref: res.Design, spacing: spacing}
	for i, sigma := range opt.Sigmas {
		l := Level{Sigma: sigma, Missing: opt.Missing, Drift: opt.Drift}
		stage := fmt.Sprintf("level %d of %d: trials", i+1, len(opt.Sigmas))
		lr, err := r.level(ctx, l, res.Design.Gaps, stage)
		if err != nil {
			return nil, err
		}
		res.Levels = append(res.Levels, lr)
	}
	if target != nil {
		if res.Budget, err = r.budget(ctx, *target, res.Levels); err != nil {
			return nil, err
		}
	}
	if all := NewProportion(opt.Trials, opt.Trials); opt.Gap != nil && all.Low < opt.Confidence {
		res.Warnings = append(res.Warnings, fmt.Sprintf("%d trials cannot show a survival of %g even when every one survives: the Wilson interval of %d/%d reaches down to %.3f; the budget's low end is then 0 — ask for more trials",
			opt.Trials, opt.Confidence, opt.Trials, opt.Trials, all.Low))
	}
	if opt.HullTrials > 0 && opt.HullTrials < opt.Trials {
		res.Notes = append(res.Notes, fmt.Sprintf("the hull class and angle are measured on the first %d of the %d trials of each level (a hull analysis costs about 30 spectra)", opt.HullTrials, opt.Trials))
	}
	if opt.EdgeTrials > 0 && opt.EdgeTrials < opt.Trials {
		res.Notes = append(res.Notes, fmt.Sprintf("the edge modes are counted on the first %d of the %d trials of each level (a phase sweep costs about 100 spectra)", opt.EdgeTrials, opt.Trials))
	}
	return res, nil
}

func (o Options) withDefaults() (Options, error) {
	if o.Trials == 0 {
		o.Trials = DefaultTrials
	}
	if o.Confidence == 0 {
		o.Confidence = DefaultConfidence
	}
	if o.Workers <= 0 {
		o.Workers = runtime.GOMAXPROCS(0)
	}
	switch {
	case o.Trials < 1:
		return o, fmt.Errorf("budget: %d trials: need at least 1", o.Trials)
	case o.HullTrials < 0 || o.EdgeTrials < 0:
		return o, errors.New("budget: the trials with a hull analysis or a phase sweep must not be negative")
	case !(o.Confidence > 0 && o.Confidence < 1):
		return o, fmt.Errorf("budget: confidence %g: must lie strictly between 0 and 1", o.Confidence)
	case !(o.Missing >= 0 && o.Missing < 1):
		return o, fmt.Errorf("budget: missing-site rate %g: must lie in [0, 1)", o.Missing)
	case !(o.Drift > -0.5) || math.IsInf(o.Drift, 0):
		return o, fmt.Errorf("budget: drift %g: must be finite and above −1/2", o.Drift)
	case !(o.MinWidth >= 0) || math.IsInf(o.MinWidth, 0):
		return o, fmt.Errorf("budget: minimum width %g: must be finite and not negative", o.MinWidth)
	}
	for _, s := range o.Sigmas {
		if !(s >= 0) || math.IsInf(s, 0) {
			return o, fmt.Errorf("budget: position error %g: must be finite and not negative", s)
		}
	}
	o.HullTrials, o.EdgeTrials = min(o.HullTrials, o.Trials), min(o.EdgeTrials, o.Trials)
	return o, nil
}

// reference reads the design's labelled gaps wider than minWidth.
func reference(t Trial, minWidth float64) Reference {
	r := Reference{Class: t.Class, Angles: t.Angles, Gaps: []DesignGap{}}
	if r.Angles == nil {
		r.Angles = []float64{}
	}
	for _, g := range t.Spectrum.Gaps {
		if g.Label == nil || g.Width <= minWidth || r.find(g.Label.Coeffs) != nil {
			continue
		}
		d := DesignGap{Label: *g.Label, Lower: g.Lower, Upper: g.Upper, Width: g.Width, Centre: (g.Lower + g.Upper) / 2}
		if agrees, followed := edgeAgrees(t.Edges, g.Label.Coeffs); followed {
			d.EdgeAgrees = &agrees
		}
		r.Gaps = append(r.Gaps, d)
	}
	return r
}

func (r *Reference) find(coeffs []int) *DesignGap {
	for i := range r.Gaps {
		if slices.Equal(r.Gaps[i].Label.Coeffs, coeffs) {
			return &r.Gaps[i]
		}
	}
	return nil
}

// labels lists the design's open gaps, for an error message.
func (r *Reference) labels() string {
	var s []string
	for _, g := range r.Gaps {
		s = append(s, g.Label.CoeffString())
	}
	return strings.Join(s, ", ")
}

// widest returns the widest gap of t labelled coeffs; its width is 0
// when there is none.
func widest(t Trial, coeffs []int) spectrum.Gap {
	var w spectrum.Gap
	for _, g := range t.Spectrum.Gaps {
		if g.Label != nil && slices.Equal(g.Label.Coeffs, coeffs) && g.Width > w.Width {
			w = g
		}
	}
	return w
}

// edgeAgrees reports whether the sweep followed the gap labelled coeffs
// and whether it counts its m boundary states there.
func edgeAgrees(edges []spectrum.EdgeGap, coeffs []int) (agrees, followed bool) {
	for _, e := range edges {
		if e.Gap.Label != nil && slices.Equal(e.Gap.Label.Coeffs, coeffs) {
			return e.Agrees, true
		}
	}
	return false, false
}

// runner draws trials on the pool of workers.
type runner struct {
	s       Sampler
	opt     Options
	ref     Reference
	spacing float64 // the design's mean spacing
}

// trials runs n trials of level l, trial i measuring what want(i) says,
// in parallel; the result of trial i is out[i].
func (r runner) trials(ctx context.Context, l Level, n int, want func(i int) Measure, stage string) ([]Trial, error) {
	out := make([]Trial, n)
	ctx, cancel := context.WithCancel(ctx)
	defer cancel()
	var (
		mu    sync.Mutex
		first error
		done  int
		next  = make(chan int)
		wg    sync.WaitGroup
	)
	for range min(r.opt.Workers, n) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range next {
				t, err := r.s.Sample(ctx, l, TrialSeed(r.opt.Seed, i), want(i))
				mu.Lock()
				if err != nil && first == nil {
					first = err
					cancel()
				}
				out[i] = t
				done++
				if r.opt.Progress != nil {
					r.opt.Progress(stage, done, n)
				}
				mu.Unlock()
			}
		}()
	}
feed:
	for i := range n {
		select {
		case next <- i:
		case <-ctx.Done():
			break feed
		}
	}
	close(next)
	wg.Wait()
	if first != nil {
		return nil, first
	}
	if err := ctx.Err(); err != nil {
		return nil, fmt.Errorf("budget: stopped: %w", err)
	}
	return out, nil
}

// level runs the trials of one level and gathers their statistics.
func (r runner) level(ctx context.Context, l Level, gaps []DesignGap, stage string) (LevelResult, error) {
	want := func(i int) Measure {
		return Measure{Hull: i < r.opt.HullTrials, Edges: i < r.opt.EdgeTrials, EdgeGaps: min(2*len(gaps), edgeGapsMax)}
	}
	ts, err := r.trials(ctx, l, r.opt.Trials, want, stage)
	if err != nil {
		return LevelResult{}, err
	}
	lr := LevelResult{Level: l, Gaps: []GapStat{}}
	if r.opt.HullTrials > 0 {
		kept, angles := 0, []float64{}
		for _, t := range ts[:r.opt.HullTrials] {
			if t.Class == r.ref.Class {
				kept++
				if len(t.Angles) > 0 {
					angles = append(angles, t.Angles[0])
				}
			}
		}
		h := &HullStat{Kept: NewProportion(kept, r.opt.HullTrials)}
		if len(angles) > 1 {
			h.AngleSD = sd(angles)
		}
		h.Angle = spreadOf(angles)
		lr.Hull = h
	}
	for _, g := range gaps {
		st := GapStat{Label: g.Label}
		open, widths, centres := 0, make([]float64, len(ts)), []float64{}
		for i, t := range ts {
			w := widest(t, g.Label.Coeffs)
			widths[i] = w.Width
			if w.Width > r.opt.MinWidth {
				open++
				centres = append(centres, (w.Lower+w.Upper)/2)
				st.MeanLower += w.Lower
				st.MeanUpper += w.Upper
			}
		}
		if open > 0 {
			st.MeanLower /= float64(open)
			st.MeanUpper /= float64(open)
		}
		st.Open = NewProportion(open, len(ts))
		st.Width = *spreadOf(widths)
		st.Centre = spreadOf(centres)
		if r.opt.EdgeTrials > 0 && g.EdgeAgrees != nil {
			// A gap the trial's sweep did not follow (closed, or narrower
			// than those followed) does not count m.
			k := 0
			for _, t := range ts[:r.opt.EdgeTrials] {
				if agrees, _ := edgeAgrees(t.Edges, g.Label.Coeffs); agrees {
					k++
				}
			}
			p := NewProportion(k, r.opt.EdgeTrials)
			st.Edges = &p
		}
		lr.Gaps = append(lr.Gaps, st)
	}
	return lr, nil
}

// sd is the sample standard deviation of v.
func sd(v []float64) float64 {
	var m float64
	for _, x := range v {
		m += x
	}
	m /= float64(len(v))
	var s float64
	for _, x := range v {
		s += (x - m) * (x - m)
	}
	return math.Sqrt(s / float64(len(v)-1))
}

// ReadJSON reads a Result as "phasonhull budget --json" writes it,
// refusing another schema.
func ReadJSON(r io.Reader) (*Result, error) {
	var res Result
	dec := json.NewDecoder(r)
	if err := dec.Decode(&res); err != nil {
		return nil, fmt.Errorf("reading a budget: %w", err)
	}
	if res.Schema != Schema {
		return nil, fmt.Errorf("reading a budget: schema %q, want %q (the output of budget --json)", res.Schema, Schema)
	}
	return &res, nil
}
