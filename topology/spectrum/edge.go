package spectrum

import (
	"cmp"
	"context"
	"errors"
	"fmt"
	"math"
	"slices"
	"strings"

	"phasonhull/pattern"
	"phasonhull/pattern/design"
)

// Sweep returns the pattern at phase offset s (in turns) along a loop in
// the hull; s and s+1 must give the same pattern.
type Sweep func(s float64) (*pattern.Pattern, error)

// PhaseSweep returns the sweep of a design through one turn of its phase:
// the parameter its family's entry names (design.Family.PhaseParam: φ of
// modulated and two-angle, ψ_0 of circle-map, the starting arc fraction of
// loop, the intercept of sturmian), advanced by s from the spec's own
// value. Families without a phase are refused.
func PhaseSweep(spec design.Spec) (Sweep, error) {
	if err := spec.Validate(); err != nil {
		return nil, fmt.Errorf("spectrum: %w", err)
	}
	if _, ok := spec.ShiftPhase(0); !ok {
		var with []string
		for _, f := range design.Families() {
			if f.PhaseParam() != "" {
				with = append(with, string(f))
			}
		}
		return nil, fmt.Errorf("spectrum: the %s family has no phase to sweep (%s and %s have one)",
			spec.Family, strings.Join(with[:len(with)-1], ", "), with[len(with)-1])
	}
	return func(s float64) (*pattern.Pattern, error) {
		c, _ := spec.ShiftPhase(s)
		return design.Generate(c)
	}, nil
}

// Defaults of EdgeOptions.
const (
	DefaultSamples   = 96
	DefaultEdgeGaps  = 6
	maxSweepRefine   = 8 // halvings of a sweep step that is not resolved
	edgeInnerDivisor = 8 // the inner band of a gap leaves out 1/8 at each edge
)

// EdgeOptions control EdgeModes.
type EdgeOptions struct {
	// Options find and label the gaps of the chain at the sweep's start.
	Options
	// Samples is the number of phases of the first pass over the turn;
	// steps whose changes cannot be told apart are halved again, up to
	// 8 times. 0 means DefaultSamples.
	Samples int
	// Gaps is the number of widest gaps followed; 0 means
	// DefaultEdgeGaps.
	Gaps int
}

// EdgeResult is what EdgeModes found.
type EdgeResult struct {
	// Start is the gap analysis of the chain at the sweep's start.
	Start *Result `json:"start"`
	// Phases is the number of phases evaluated.
	Phases int `json:"phases"`
	// Gaps are the followed gaps, widest first.
	Gaps []EdgeGap `json:"gaps"`
	// Flow holds every boundary state seen inside a followed gap at every
	// phase evaluated, for pictures; it is not part of the JSON form.
	Flow []FlowPoint `json:"-"`
}

// FlowPoint is one boundary state inside a followed gap at one phase.
type FlowPoint struct {
	// Phase is the sweep's phase in turns, Level the state's eigenvalue.
	Phase, Level float64
	// Gap indexes EdgeResult.Gaps; End is 0 for the first end of the
	// chain, 1 for the last.
	Gap, End int
}

// EdgeGap is the spectral flow across one gap over the sweep.
type EdgeGap struct {
	// Gap is the gap at the sweep's start.
	Gap Gap `json:"gap"`
	// First and Last are the signed crossings of the gap's middle by
	// states on the first and on the last end of the chain over one turn:
	// +1 for a level moving up through the middle, −1 down.
	First int `json:"first"`
	Last  int `json:"last"`
	// Agrees reports, for a labelled gap, whether First = +m and
	// Last = −m, m the label's (first) angle coefficient: the
	// bulk–boundary relation (see the package documentation).
	Agrees bool `json:"agrees"`
	// Jumps counts sweep steps still ambiguous after the last halving
	// that were read as a discontinuity of the sweep (a tile pattern's
	// levels jump as its intercept moves): levels paired in order however
	// far they moved, one level left over at most, the one nearest an
	// edge of the band.
	Jumps int `json:"jumps"`
	// Unresolved counts steps that could not be read even so; they add
	// nothing to First and Last.
	Unresolved int `json:"unresolved"`
}

// gapLevels are the boundary states in the inner band of one gap at one
// phase, by end (first, last), ascending, and the number of all levels
// below the gap's middle.
type gapLevels struct {
	ends  [2][]float64
	below int
}

// EdgeModes follows the levels inside the widest gaps of an open chain as
// the sweep moves the pattern through one turn, and counts the signed
// crossings of each gap's middle by states on each end.
//
// The gaps are those of the chain at s = 0, found and labelled by Analyze
// with opt.Options. At each phase, the boundary states inside a gap's
// inner band (the gap less an eighth of its width at each edge) are
// located, and each is put on the end that holds more of its weight.
// Between two phases the levels of each end pair up in order; a level
// moving from below the middle to above is +1 for its end, the reverse −1,
// and a level entering or leaving the inner band near its edges counts
// nothing. A step whose changes do not read as at most one such event per
// end, or disagree with the change of the count of all levels below the
// middle (bulk levels never cross it), is halved; one still ambiguous
// after the last halving is read as a jump of the sweep (see
// EdgeGap.Jumps).
func EdgeModes(sweep Sweep, m Model, opt EdgeOptions) (*EdgeResult, error) {
	return EdgeModesContext(context.Background(), sweep, m, opt)
}

// EdgeModesContext is EdgeModes under a context: it checks ctx before the
// chain of every phase is built and solved, and returns an error wrapping
// ctx.Err() once ctx is done.
func EdgeModesContext(ctx context.Context, sweep Sweep, m Model, opt EdgeOptions) (*EdgeResult, error) {
	if sweep == nil {
		return nil, errors.New("spectrum: no sweep")
	}
	if m.Ends == Periodic {
		return nil, errors.New("spectrum: edge modes live on the ends of an open chain; periodic ends have none")
	}
	if opt.Samples < 0 || opt.Gaps < 0 {
		return nil, fmt.Errorf("spectrum: samples %d and gaps %d must not be negative", opt.Samples, opt.Gaps)
	}
	if opt.Samples == 0 {
		opt.Samples = DefaultSamples
	}
	if opt.Gaps == 0 {
		opt.Gaps = DefaultEdgeGaps
	}
	build := func(s float64) (*Operator, error) {
		if err := ctx.Err(); err != nil {
			return nil, fmt.Errorf("spectrum: edge modes stopped at phase %.6g: %w", s, err)
		}
		p, err := sweep(s)
		if err != nil {
			return nil, fmt.Errorf("spectrum: phase %.6g: %w", s, err)
		}
		return New(p, m)
	}
	op0, err := build(0)
	if err != nil {
		return nil, err
	}
	start, err := AnalyzeContext(ctx, op0, opt.Options)
	if err != nil {
		return nil, err
	}
	// The widest gaps, widest first.
	order := make([]int, len(start.Gaps))
	for i := range order {
		order[i] = i
	}
	slices.SortStableFunc(order, func(a, b int) int {
		return cmp.Compare(start.Gaps[b].Width, start.Gaps[a].Width)
	})
	order = order[:min(opt.Gaps, len(order))]
	res := &EdgeResult{Start: start, Gaps: make([]EdgeGap, len(order))}
	for i, g := range order {
		res.Gaps[i].Gap = start.Gaps[g]
	}
	if len(order) == 0 {
		return res, nil
	}
	sample := func(s float64) ([]gapLevels, error) {
		op, err := build(s)
		if err != nil {
			return nil, err
		}
		if op.Len() != op0.Len() {
			return nil, fmt.Errorf("spectrum: phase %.6g: the sweep changed the number of sites from %d to %d", s, op0.Len(), op.Len())
		}
		res.Phases++
		lv, err := bandLevels(op, res.Gaps, opt.Method, opt.Workers)
		if err != nil {
			return nil, err
		}
		for g := range lv {
			for end := range 2 {
				for _, e := range lv[g].ends[end] {
					res.Flow = append(res.Flow, FlowPoint{Phase: s, Level: e, Gap: g, End: end})
				}
			}
		}
		return lv, nil
	}
	c0, err := sample(0)
	if err != nil {
		return nil, err
	}
	// step accumulates the crossings between phases s0 and s1 of the gaps
	// listed in which, halving the step for those where it is ambiguous.
	var step func(s0, s1 float64, a, b []gapLevels, which []int, depth int) error
	step = func(s0, s1 float64, a, b []gapLevels, which []int, depth int) error {
		var again []int
		for _, g := range which {
			lo, hi, mid := innerBand(res.Gaps[g].Gap)
			// Bulk levels never cross the middle of a gap: the change
			// of the count below it is minus the net upward flow.
			total := a[g].below - b[g].below
			f, ok := [2]int{}, true
			for end := range 2 {
				var okEnd bool
				f[end], okEnd = flowStep(a[g].ends[end], b[g].ends[end], lo, hi, mid)
				ok = ok && okEnd
			}
			ok = ok && f[0]+f[1] == total
			if !ok && depth >= maxSweepRefine {
				if f, ok = readJump(a[g], b[g], total, mid, hi-lo); ok {
					res.Gaps[g].Jumps++
				}
			}
			switch {
			case ok:
				res.Gaps[g].First += f[0]
				res.Gaps[g].Last += f[1]
			case depth < maxSweepRefine:
				again = append(again, g)
			default:
				res.Gaps[g].Unresolved++
			}
		}
		if len(again) == 0 {
			return nil
		}
		mid := s0 + (s1-s0)/2
		cm, err := sample(mid)
		if err != nil {
			return err
		}
		if err := step(s0, mid, a, cm, again, depth+1); err != nil {
			return err
		}
		return step(mid, s1, cm, b, again, depth+1)
	}
	all := make([]int, len(res.Gaps))
	for i := range all {
		all[i] = i
	}
	prev := c0
	for j := 1; j <= opt.Samples; j++ {
		s0, s1 := float64(j-1)/float64(opt.Samples), float64(j)/float64(opt.Samples)
		next := c0 // s = 1 is the start again
		if j < opt.Samples {
			if next, err = sample(s1); err != nil {
				return nil, err
			}
		}
		if err := step(s0, s1, prev, next, all, 0); err != nil {
			return nil, err
		}
		prev = next
	}
	for i := range res.Gaps {
		g := &res.Gaps[i]
		if l := g.Gap.Label; l != nil && len(l.Coeffs) > 1 {
			mm := l.Coeffs[1]
			g.Agrees = g.Unresolved == 0 && g.First == mm && g.Last == -mm
		}
	}
	return res, nil
}

// innerBand returns the part of a gap where levels are followed — the gap
// less an eighth of its width at each edge, where the finite chain's bulk
// edges wander with the phase — and the gap's middle.
func innerBand(g Gap) (lo, hi, mid float64) {
	inset := g.Width / edgeInnerDivisor
	return g.Lower + inset, g.Upper - inset, (g.Lower + g.Upper) / 2
}

// bandLevels returns, for each followed gap, the boundary states of op in
// the gap's inner band (levels with more than half their weight on the
// first and last tenth of the chain, as Analyze has them), each put on the
// end that holds more of its weight.
func bandLevels(op *Operator, gaps []EdgeGap, method Method, workers int) ([]gapLevels, error) {
	lv, err := newLevels(op, method, workers)
	if err != nil {
		return nil, err
	}
	out := make([]gapLevels, len(gaps))
	for i, eg := range gaps {
		lo, hi, mid := innerBand(eg.Gap)
		k0, k1 := lv.count(lo), lv.count(hi)
		out[i].below = lv.count(mid)
		for k := k0; k < k1; k++ {
			e := lv.level(k, lo, hi)
			x := op.eigenvector(e, uint64(k))
			f, l := endWeights(x)
			if f+l <= 0.5 {
				continue // a bulk level wandering into the band
			}
			end := 0
			if l > f {
				end = 1
			}
			out[i].ends[end] = append(out[i].ends[end], e)
		}
	}
	return out, nil
}

// readJump reads a step across a discontinuity of the sweep, where levels
// jump rather than move: the net flow through the middle is total (from
// the count of all levels below it) and belongs to the end whose boundary
// states changed. A jump of a tile pattern changes one tile, near one
// end; the states of the other end shift by no more than its exponentially
// small reach, which is taken as no change when below 1e-3 of the band.
// The step is read only when one end changed, the flow is one level, and
// that end's states show it: for an upward flow, no state gained below the
// middle and none lost above, one at least lost below or gained above (the
// mirror for a downward flow). A level that jumps across the whole band,
// or both ends changing, leaves the step unread.
func readJump(a, b gapLevels, total int, mid, band float64) ([2]int, bool) {
	var f [2]int
	if total == 0 {
		return f, true
	}
	var changed []int
	for end := range 2 {
		x, y := a.ends[end], b.ends[end]
		moved := len(x) != len(y)
		for i := 0; !moved && i < len(x); i++ {
			moved = math.Abs(x[i]-y[i]) > 1e-3*band
		}
		if moved {
			changed = append(changed, end)
		}
	}
	if len(changed) != 1 || abs(total) != 1 {
		return f, false
	}
	end := changed[0]
	below := func(v []float64) int {
		n := 0
		for _, e := range v {
			if e < mid {
				n++
			}
		}
		return n
	}
	dBelow := below(b.ends[end]) - below(a.ends[end])
	dAbove := (len(b.ends[end]) - below(b.ends[end])) - (len(a.ends[end]) - below(a.ends[end]))
	if total < 0 {
		dBelow, dAbove = -dBelow, -dAbove
	}
	if dBelow > 0 || dAbove < 0 || (dBelow == 0 && dAbove == 0) {
		return f, false
	}
	f[end] = total
	return f, true
}

// flowStep reads the signed crossings of mid between two phases from the
// ascending levels a (before) and b (after) of one end in the band
// [lo, hi]. The step reads unambiguously (ok) when the levels pair up in
// order, each moving less than a quarter of the band, with at most one
// level left over that sits within a quarter band of an edge: a level
// entering or leaving the band there. A pair on opposite sides of mid is a
// crossing: +1 upward, −1 downward.
func flowStep(a, b []float64, lo, hi, mid float64) (flow int, ok bool) {
	lim := (hi - lo) / 4
	pair := func(a, b []float64) (int, bool) {
		f := 0
		for i := range a {
			if math.Abs(a[i]-b[i]) >= lim {
				return 0, false
			}
			switch {
			case a[i] < mid && b[i] >= mid:
				f++
			case a[i] >= mid && b[i] < mid:
				f--
			}
		}
		return f, true
	}
	switch len(a) - len(b) {
	case 0:
		return pair(a, b)
	case 1, -1:
		long, short, sign := a, b, 1
		if len(b) > len(a) {
			long, short, sign = b, a, -1
		}
		for r, e := range long {
			if e-lo >= lim && hi-e >= lim {
				continue // not at an edge: it cannot have entered or left here
			}
			rest := append(append([]float64(nil), long[:r]...), long[r+1:]...)
			if f, ok := pair(rest, short); ok {
				return sign * f, true
			}
		}
	}
	return 0, false
}

func abs(v int) int {
	if v < 0 {
		return -v
	}
	return v
}
