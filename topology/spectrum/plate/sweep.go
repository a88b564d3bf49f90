package plate

import (
	"cmp"
	"context"
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"

	"phasonhull/pattern/design"
)

// A sweep moves one parameter through a list of values, computes the
// spectrum at each, follows each gap from one value to the next and fits
// its IDS as a straight line in the generators of the label group:
//
//	IDS(x) = n + Σ_i m_i·g_i(x),  n, m_i integers,
//
// g_i(x) the generators at the parameter value x. The generators of a
// sweep are the raw entries of A, its 2×2 minors and the flux α, named
// (A11, A12, …, det A, α), less those that the sweep shows to be ±
// another one or an integer at every value (a rotation's A22 = A11, a
// determinant that stays 1): a label must keep one meaning across the
// sweep, which the reduced generators of one spectrum (PlaneGenerators)
// need not.
//
// The fit: every integer vector m of order Σ|m_i| ≤ MaxOrder, with n the
// integer nearest IDS − m·g at the gap's first value, is tried; it holds
// when |IDS − n − m·g| is within the gap's label tolerance at every value
// the gap was followed through. The label is the holding vector of least
// order (least χ² with σ = tolerance/3 among equals). It is confirmed when
// it holds at three values or more, no other vector of order ≤ MaxOrder
// holds, and the sweep moves some generator by more than twice the largest
// tolerance: a generator the sweep leaves in place cannot tell vectors
// apart, and a sweep that moves none is one spectrum seen several times.
// A label whose value stays put while the generators move (a coefficient
// 0 on each moving one) is confirmed too: the sweep pins those
// coefficients to 0.

// Sweepable parameters besides a design's numeric ones.
const (
	ParamFlux   = "flux"
	ParamHarper = "harper"
)

// SweepResult is a followed sweep.
type SweepResult struct {
	Param  string    `json:"param"`
	Values []float64 `json:"values"`
	// Names and Generators: the generators of the sweep's label group
	// besides 1, and their value at each parameter value
	// (Generators[k][i] is generator i at Values[k]).
	Names      []string    `json:"generator_names"`
	Generators [][]float64 `json:"generators"`
	Tracks     []Track     `json:"gaps"`
	Warnings   []string    `json:"warnings"`
	// Results are the spectra, one per value.
	Results []*Result `json:"-"`
}

// Track is one gap followed through a sweep.
type Track struct {
	// Steps are the indices into SweepResult.Values where the gap was
	// found, and the gap there.
	Steps []int `json:"steps"`
	Gaps  []Gap `json:"-"`
	// Coeffs is the fitted label (n, m_1, …) over 1 and the sweep's
	// generators, nil when no vector holds; Holds says whether it holds at
	// every step, Ambiguous that another vector of the same order holds
	// too.
	Coeffs    []int   `json:"coeffs"`
	Ambiguous bool    `json:"ambiguous"`
	ChiSquare float64 `json:"chi_square"`
	// Moves is how far the label's IDS moves across the track.
	Moves     float64 `json:"moves"`
	Confirmed bool    `json:"confirmed"`
	// Reason says why a label is not confirmed ("" when it is).
	Reason string `json:"reason,omitempty"`
}

// SweepOptions control Sweep.
type SweepOptions struct {
	// MaxOrder bounds the order Σ|m_i| of the fitted labels; 0 means
	// DefaultMaxOrder.
	MaxOrder int
	// Progress, when not nil, is called after each value.
	Progress func(done, total int)
}

// Sweep computes the spectrum of c at each value of param — ParamFlux, ParamHarper or
// a numeric parameter of the design (twist, scale, amp, …; the plate is
// generated anew at each value) — on the design spec, or on the fixed
// sample s when spec is nil (flux and harper only), and follows the gaps.
func Sweep(ctx context.Context, spec *design.Spec, s *Sample, c Config, param string, values []float64, opt SweepOptions) (*SweepResult, error) {
	if len(values) < 2 {
		return nil, fmt.Errorf("plate: a sweep needs at least 2 values, got %d", len(values))
	}
	if spec == nil && param != ParamFlux && param != ParamHarper {
		return nil, fmt.Errorf("plate: sweeping %q moves a design parameter: give a design", param)
	}
	out := &SweepResult{Param: param, Values: values, Warnings: []string{}}
	var raw [][]float64
	for k, x := range values {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		ck, sk := c, s
		switch param {
		case ParamFlux:
			ck.Model.Flux = Flux{Value: x}
		case ParamHarper:
			ck.Harper = x
		default:
			sp, err := WithParam(*spec, param, x)
			if err != nil {
				return nil, fmt.Errorf("plate: %w", err)
			}
			if sk, err = DesignSample(ctx, sp); err != nil {
				return nil, fmt.Errorf("plate: %s = %g: %w", param, x, err)
			}
		}
		if sk == nil {
			var err error
			if sk, err = DesignSample(ctx, *spec); err != nil {
				return nil, err
			}
			s = sk
		}
		res, _, err := ck.Run(ctx, sk)
		if err != nil {
			return nil, fmt.Errorf("plate: %s = %g: %w", param, x, err)
		}
		out.Results = append(out.Results, res)
		g, names := rawGenerators(sk.Rotation, ck.Model.Flux.Float())
		if k > 0 && !slices.Equal(names, out.Names) {
			return nil, fmt.Errorf("plate: %s = %g: the label group changes shape (%v, then %v)", param, x, out.Names, names)
		}
		out.Names = names
		raw = append(raw, g)
		if opt.Progress != nil {
			opt.Progress(k+1, len(values))
		}
	}
	keep := independentAcross(raw)
	names := make([]string, 0, len(keep))
	for _, i := range keep {
		names = append(names, out.Names[i])
	}
	out.Names = names
	for _, g := range raw {
		row := make([]float64, len(keep))
		for j, i := range keep {
			row[j] = g[i]
		}
		out.Generators = append(out.Generators, row)
	}
	out.Tracks = follow(out.Results)
	order := opt.MaxOrder
	if order == 0 {
		order = DefaultMaxOrder
	}
	for i := range out.Tracks {
		out.Tracks[i].fit(out.Generators, order)
	}
	if len(out.Tracks) == 0 {
		out.Warnings = append(out.Warnings, "no gap was found at any value of the sweep")
	}
	return out, nil
}

// rawGenerators returns the entries of A, its 2×2 minors and α (when not
// 0), with their names.
func rawGenerators(A [][]float64, alpha float64) ([]float64, []string) {
	var g []float64
	var names []string
	for i, row := range A {
		for j, v := range row {
			g = append(g, v)
			names = append(names, fmt.Sprintf("A%d%d", i+1, j+1))
		}
	}
	for i := range A {
		for j := i + 1; j < len(A); j++ {
			g = append(g, A[i][0]*A[j][1]-A[i][1]*A[j][0])
			if len(A) == 2 {
				names = append(names, "det A")
			} else {
				names = append(names, fmt.Sprintf("minor %d%d", i+1, j+1))
			}
		}
	}
	if alpha != 0 {
		g, names = append(g, alpha), append(names, "α")
	}
	return g, names
}

// sameTol is how close two generators must stay, at every value of a
// sweep, to count as one.
const sameTol = 1e-9

// independentAcross returns the indices of the generators to keep: those
// not an integer at every value, and not ± an earlier kept one at every
// value.
func independentAcross(raw [][]float64) []int {
	var keep []int
	for i := range raw[0] {
		integer := true
		for _, g := range raw {
			integer = integer && math.Abs(g[i]-math.Round(g[i])) < sameTol
		}
		if integer {
			continue
		}
		dup := false
		for _, j := range keep {
			plus, minus := true, true
			for _, g := range raw {
				plus = plus && math.Abs(g[i]-g[j]) < sameTol
				minus = minus && math.Abs(g[i]+g[j]) < sameTol
			}
			dup = dup || plus || minus
		}
		if !dup {
			keep = append(keep, i)
		}
	}
	return keep
}

// follow links the gaps of consecutive spectra: a gap continues the track
// whose gap at the previous value overlaps it in energy, the nearest in
// IDS when several do; a gap that continues none starts a track.
func follow(results []*Result) []Track {
	var tracks []Track
	var open []int // tracks with a gap at the previous value
	for k, r := range results {
		var next []int
		taken := map[int]bool{}
		for _, g := range r.Gaps {
			best, bestD := -1, math.Inf(1)
			for _, t := range open {
				if taken[t] {
					continue
				}
				last := tracks[t].Gaps[len(tracks[t].Gaps)-1]
				if g.Lower > last.Upper || g.Upper < last.Lower {
					continue
				}
				if d := math.Abs(g.IDS - last.IDS); d < bestD {
					best, bestD = t, d
				}
			}
			if best < 0 {
				tracks = append(tracks, Track{})
				best = len(tracks) - 1
			}
			taken[best] = true
			tracks[best].Steps = append(tracks[best].Steps, k)
			tracks[best].Gaps = append(tracks[best].Gaps, g)
			next = append(next, best)
		}
		open = next
	}
	return tracks
}

// fit fits the track's IDS as n + m·g over the sweep's generators (see
// the comment at the top of the file).
func (t *Track) fit(gens [][]float64, maxOrder int) {
	first := t.Gaps[0]
	g0 := gens[t.Steps[0]]
	type cand struct {
		c     []int
		order int
		chi2  float64
	}
	var holding []cand
	m := make([]int, len(g0))
	for order := 0; order <= maxOrder; order++ {
		forOrderAll(m, order, func(m []int) {
			v := first.IDS
			for i, c := range m {
				v -= float64(c) * g0[i]
			}
			n := math.Round(v)
			chi2 := 0.0
			for k, s := range t.Steps {
				r := t.Gaps[k].IDS - labelValue(n, m, gens[s])
				tol := t.Gaps[k].Tolerance
				if math.Abs(r) > tol {
					return
				}
				sigma := tol / 3
				chi2 += r * r / (sigma * sigma)
			}
			holding = append(holding, cand{append([]int{int(n)}, m...), order, chi2})
		})
	}
	if len(holding) == 0 {
		t.Reason = fmt.Sprintf("no integer line of order ≤ %d holds at every value", maxOrder)
		return
	}
	slices.SortStableFunc(holding, func(a, b cand) int {
		if a.order != b.order {
			return a.order - b.order
		}
		return cmp.Compare(a.chi2, b.chi2)
	})
	best := holding[0]
	t.Coeffs, t.ChiSquare = best.c, best.chi2
	t.Ambiguous = len(holding) > 1
	lo, hi, tolMax := math.Inf(1), math.Inf(-1), 0.0
	moved := 0.0
	for i := range g0 {
		glo, ghi := math.Inf(1), math.Inf(-1)
		for _, s := range t.Steps {
			glo, ghi = min(glo, gens[s][i]), max(ghi, gens[s][i])
		}
		moved = max(moved, ghi-glo)
	}
	for k, s := range t.Steps {
		v := labelValue(float64(best.c[0]), best.c[1:], gens[s])
		lo, hi = min(lo, v), max(hi, v)
		tolMax = max(tolMax, t.Gaps[k].Tolerance)
	}
	t.Moves = hi - lo
	switch {
	case len(t.Steps) < 3:
		t.Reason = fmt.Sprintf("followed through %d values; a line needs 3 or more", len(t.Steps))
	case t.Ambiguous:
		t.Reason = fmt.Sprintf("%d integer lines of order ≤ %d hold; the sweep does not tell them apart", len(holding), maxOrder)
	case moved <= 2*tolMax:
		t.Reason = fmt.Sprintf("the sweep moves no generator by more than twice the tolerance %.2g, so it tests the integers no better than one spectrum", tolMax)
	default:
		t.Confirmed = true
	}
}

func labelValue(n float64, m []int, g []float64) float64 {
	v := n
	for i, c := range m {
		v += float64(c) * g[i]
	}
	return v
}

// forOrderAll calls f with every m of Σ|m_i| = order (m all zero for
// order 0).
func forOrderAll(m []int, order int, f func([]int)) {
	if len(m) == 0 {
		if order == 0 {
			f(m)
		}
		return
	}
	forOrder(m, 0, order, f)
}

// WriteCSV writes the sweep as rows param,gap,ids,ids_error,lower,upper,
// label_ids,coeffs,confirmed: one row per gap and value, gap numbering the
// tracks from 1, label_ids the fitted line's value there (empty without
// one), coeffs the line's integers separated by spaces.
func (s *SweepResult) WriteCSV(w io.Writer) error {
	cw := csv.NewWriter(w)
	if err := cw.Write([]string{"param", "gap", "ids", "ids_error", "lower", "upper", "label_ids", "coeffs", "confirmed"}); err != nil {
		return err
	}
	f := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	for i, t := range s.Tracks {
		coeffs := make([]string, len(t.Coeffs))
		for j, c := range t.Coeffs {
			coeffs[j] = strconv.Itoa(c)
		}
		for k, st := range t.Steps {
			g, label := t.Gaps[k], ""
			if t.Coeffs != nil {
				label = f(labelValue(float64(t.Coeffs[0]), t.Coeffs[1:], s.Generators[st]))
			}
			row := []string{f(s.Values[st]), strconv.Itoa(i + 1), f(g.IDS), f(g.IDSError), f(g.Lower), f(g.Upper), label, strings.Join(coeffs, " "), strconv.FormatBool(t.Confirmed)}
			if err := cw.Write(row); err != nil {
				return err
			}
		}
	}
	cw.Flush()
	return cw.Error()
}

// LabelValue is the value of the track's fitted line at step k of the
// sweep (NaN without a line).
func (s *SweepResult) LabelValue(t Track, k int) float64 {
	if t.Coeffs == nil {
		return math.NaN()
	}
	return labelValue(float64(t.Coeffs[0]), t.Coeffs[1:], s.Generators[k])
}
