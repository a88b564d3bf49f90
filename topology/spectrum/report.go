package spectrum

import (
	"bufio"
	"fmt"
	"io"
	"strconv"
	"strings"
	"text/tabwriter"

	"phasonhull/topology"
)

// ReportSchema names the layout of Report in JSON.
const ReportSchema = "phasonhull.spectrum/1"

// Caution is printed with every gap table.
const Caution = "A label says which value the IDS takes in a gap of this operator: n + m·θ is the share of levels below the gap. " +
	"Counts of a finite chain resolve an IDS to about 3/N, so a label is matched within that. " +
	"An unlabelled gap can mean that the angle is off, that its coefficients exceed --max-coeff, or that the operator breaks the pattern's symmetry " +
	"(an on-site term with another angle, couplings that do not follow the local configuration)."

// Report is a spectrum's gaps with what they were computed on and what
// labelled them, as "phasonhull spectrum" prints it in text or JSON.
type Report struct {
	Schema string `json:"schema"`
	Source string `json:"source"`
	Sites  int    `json:"sites"`
	Unit   string `json:"unit"`

	// Operator describes the operator; nil for measured levels.
	Operator *OperatorInfo `json:"operator"`

	// Angles and Period are what labelled the gaps; LabelSource says
	// where they came from.
	Angles []float64 `json:"angles"`
	Period int       `json:"period,omitempty"`
	// Generators of the label group when it is neither Z + Zθ nor
	// Z + Z/p (a hull's own label list labelled the gaps).
	Generators  []float64 `json:"generators,omitempty"`
	LabelSource string    `json:"label_source"`
	MaxCoeff    int       `json:"max_coeff"`

	Spectrum  *Result     `json:"spectrum"`
	EdgeModes *EdgeResult `json:"edge_modes,omitempty"`

	// Out names the file the levels were written to; the caller that
	// wrote it sets it.
	Out      string   `json:"out,omitempty"`
	Notes    []string `json:"notes"`
	Warnings []string `json:"warnings"`
	Caution  string   `json:"caution"`
}

// OperatorInfo describes the operator of a report.
type OperatorInfo struct {
	Model   string  `json:"model"`
	Law     string  `json:"law"`
	NNN     float64 `json:"nnn"`
	Ends    string  `json:"ends"`
	Closing float64 `json:"closing,omitempty"`
	OnSite  string  `json:"onsite"`
}

// Info describes m, its defaults filled in, for a report; valuesFrom
// names where the per-site on-site terms came from (when m has them).
func (m Model) Info(valuesFrom string) *OperatorInfo {
	m = m.withDefaults()
	onsite := fmt.Sprintf("%g", m.OnSite.Constant)
	if m.OnSite.Values != nil {
		onsite += " + values from " + valuesFrom
	}
	if m.OnSite.Lambda != 0 {
		onsite += fmt.Sprintf(" + 2·%g·cos 2π(nθ + %g)", m.OnSite.Lambda, m.OnSite.Phase)
	}
	return &OperatorInfo{Model: string(m.Kind), Law: m.Law.String(), NNN: m.NNN, Ends: string(m.Ends), Closing: m.Closing, OnSite: onsite}
}

// Axis names the quantity of the model's levels, for the level axis of a
// picture.
func (k Kind) Axis() string {
	if k == Springs {
		return "ω² (squared frequency)"
	}
	return "energy (units of t0)"
}

// NewReport returns an empty report whose labels are tried up to
// |m| ≤ maxCoeff.
func NewReport(maxCoeff int) *Report {
	return &Report{Schema: ReportSchema, Notes: []string{}, Warnings: []string{}, Caution: Caution, MaxCoeff: maxCoeff, Angles: []float64{}}
}

// Label records in the report what labels its gaps: the choice l, with
// its notes and warnings, and returns opt labelled by it (Labelling.Apply).
func (r *Report) Label(l Labelling, opt Options) Options {
	opt = l.Apply(opt)
	switch l.Source {
	case GivenAngles:
		r.LabelSource = "given (--theta)"
	case GivenPeriod:
		r.LabelSource = "given (--period)"
	case DesignAngles:
		r.LabelSource = "the design's θ"
	case DesignCell:
		r.LabelSource = "the design's cell"
	case HullAnalysis:
		r.LabelSource = fmt.Sprintf("recovered by the hull analysis (%s hull)", l.Class)
	}
	r.Generators = l.Generators
	r.Notes = append(r.Notes, l.Notes...)
	if l.Unresolved != "" {
		r.Warnings = append(r.Warnings, "the hull analysis could not decide the class ("+l.Unresolved+"); the gaps are not labelled — give --theta or --period")
	}
	r.Warnings = append(r.Warnings, l.Warnings...)
	r.Angles, r.Period = opt.Angles, opt.Period
	if r.Angles == nil {
		r.Angles = []float64{}
	}
	return opt
}

// MinGapFor is the smallest gap worth reporting on a chain of n sites,
// relative to the spectrum's width: DefaultMinGap, and not narrower than 4
// mean level spacings, so that the spacing of a finite chain's levels is
// not read as gaps.
func MinGapFor(n int) float64 {
	return max(DefaultMinGap, 4/float64(n))
}

// WriteLevels writes the report's levels as CSV: every level with the IDS
// just above it, or, when the levels were counted rather than computed,
// op's counting staircase on an energy grid reaching a thousandth of the
// width past the extreme levels (so that it starts at 0 and ends at 1).
// op may be nil when the report holds every level.
func (r *Report) WriteLevels(out io.Writer, op *Operator) error {
	w := bufio.NewWriter(out)
	s := r.Spectrum
	var buf []byte
	row := func(x, ids float64) {
		buf = strconv.AppendFloat(buf[:0], x, 'g', -1, 64)
		buf = append(buf, ',')
		buf = strconv.AppendFloat(buf, ids, 'g', -1, 64)
		buf = append(buf, '\n')
		w.Write(buf)
	}
	if s.Values != nil {
		fmt.Fprintf(w, "# phasonhull spectrum: the %d levels of %s; ids = (index + 1)/N, the IDS just above each level\n", len(s.Values), r.Source)
		w.WriteString("eigenvalue,ids\n")
		for k, e := range s.Values {
			row(e, float64(k+1)/float64(len(s.Values)))
		}
		return w.Flush()
	}
	const points = 2001
	fmt.Fprintf(w, "# phasonhull spectrum: the counting staircase of %s (%d sites) at %d energies; ids = levels below the energy / N\n", r.Source, s.Sites, points)
	w.WriteString("energy,ids\n")
	pad := 1e-3 * (s.Highest - s.Lowest)
	lo, hi := s.Lowest-pad, s.Highest+pad
	for i := range points {
		e := lo + (hi-lo)*float64(i)/(points-1)
		c, err := op.Count(e)
		if err != nil {
			return err
		}
		row(e, float64(c)/float64(s.Sites))
	}
	return w.Flush()
}

// chanceCover bounds the share of (0, 1) that the match windows of the
// labels tried by LargerBound may cover: beyond it an IDS would fall in
// some label's window by chance too often for a match to mean anything.
const chanceCover = 0.1

// LargerBound tells whether a larger bound on the angle coefficients
// would label many more of the report's gaps: when at least a quarter of
// the gaps (and three or more) are unlabelled, it tries every bound above
// MaxCoeff whose labels cover at most a tenth of (0, 1) with their match
// windows (labels × 2 × Resolution), matching each gap's IDS as the
// spectrum does (topology.MatchLabel within its Resolution), and returns
// the smallest bound that labels the most gaps and how many it labels.
// ok is false when no such bound labels more gaps than MaxCoeff does, and
// for labels that are not n + m·θ (a period, a hull's own list).
func (r *Report) LargerBound() (maxCoeff, labelled int, ok bool) {
	s := r.Spectrum
	if s == nil || len(r.Angles) == 0 || r.Period > 0 || len(s.Gaps) == 0 || !(s.Resolution > 0) {
		return 0, 0, false
	}
	now := 0
	for _, g := range s.Gaps {
		if g.Label != nil {
			now++
		}
	}
	if un := len(s.Gaps) - now; un < 3 || 4*un < len(s.Gaps) {
		return 0, 0, false
	}
	labelled = now
	for mc := max(r.MaxCoeff, 1) + 1; mc <= 1000; mc++ {
		labels := topology.Labels(r.Angles, mc)
		if float64(len(labels))*2*s.Resolution > chanceCover {
			break
		}
		n := 0
		for _, g := range s.Gaps {
			if _, ok := topology.MatchLabel(g.IDS, labels, s.Resolution); ok {
				n++
			}
		}
		if n > labelled {
			maxCoeff, labelled = mc, n
		}
	}
	return maxCoeff, labelled, maxCoeff > 0
}

// WriteText writes the report for a reader, as "phasonhull spectrum"
// prints it: the chain and operator (or the measured levels), the
// spectrum, the label group, the gap table, the edge-mode counts, the
// caution, the notes and the warnings.
func (r *Report) WriteText(out io.Writer) error {
	var b strings.Builder
	s := r.Spectrum
	unit := r.Unit
	if unit == "" {
		unit = "(no unit)"
	}
	if o := r.Operator; o != nil {
		bonds := "nearest neighbours"
		if o.NNN != 0 {
			bonds = fmt.Sprintf("next-nearest ratio %g", o.NNN)
		}
		ends := o.Ends
		if o.Ends == string(Periodic) {
			ends = "periodic (closing spacing: the mean)"
			if o.Closing != 0 {
				ends = fmt.Sprintf("periodic (closing spacing %g %s)", o.Closing, unit)
			}
		}
		fmt.Fprintf(&b, "chain       %s: %d sites, %s\n", r.Source, r.Sites, unit)
		fmt.Fprintf(&b, "operator    %s, %s, %s, ends %s, on-site %s\n", o.Model, o.Law, bonds, ends, o.OnSite)
	} else {
		fmt.Fprintf(&b, "levels      %s: %d measured levels\n", r.Source, r.Sites)
	}
	fmt.Fprintf(&b, "spectrum    [%.6g, %.6g] by %s; gaps wider than %.3g (%.3g of the width)\n", s.Lowest, s.Highest, s.Method, s.MinGap, s.MinGap/(s.Highest-s.Lowest))
	within := fmt.Sprintf("matched within %.3g (%.3g/N)", s.Resolution, s.Resolution*float64(s.Sites))
	switch {
	case len(r.Angles) == 1:
		fmt.Fprintf(&b, "labels      n + m·θ, θ = %.9g, |m| ≤ %d, %s; %s\n", r.Angles[0], r.MaxCoeff, r.LabelSource, within)
	case len(r.Angles) == 2:
		fmt.Fprintf(&b, "labels      n + m1·θ1 + m2·θ2, θ = %.9g, %.9g, |m| ≤ %d, %s; %s\n", r.Angles[0], r.Angles[1], r.MaxCoeff, r.LabelSource, within)
	case r.Period > 0:
		fmt.Fprintf(&b, "labels      k/%d, %s; %s\n", r.Period, r.LabelSource, within)
	case len(r.Generators) > 0:
		gen := make([]string, len(r.Generators))
		for i, g := range r.Generators {
			gen[i] = strconv.FormatFloat(g, 'g', 10, 64)
		}
		fmt.Fprintf(&b, "labels      the %d labels of the group generated by %s, %s; %s\n", s.Labels, strings.Join(gen, ", "), r.LabelSource, within)
	default:
		fmt.Fprintf(&b, "labels      none (%s)\n", r.LabelSource)
	}
	labelled := 0
	for _, g := range s.Gaps {
		if g.Label != nil {
			labelled++
		}
	}
	fmt.Fprintf(&b, "gaps        %d, %d labelled\n", len(s.Gaps), labelled)
	if mc, n, ok := r.LargerBound(); ok {
		fmt.Fprintf(&b, "            --max-coeff %d would label %d of them, each within the chain's resolution and unambiguously\n", mc, n)
	}
	if len(s.Gaps) > 0 {
		tw := tabwriter.NewWriter(&b, 0, 0, 2, ' ', tabwriter.AlignRight)
		fmt.Fprintf(tw, "\t#\tIDS\tlabel\tlabel IDS\twidth\trelative\tlower edge\tupper edge\tboundary states\t\n")
		for i, g := range s.Gaps {
			lab, lids := "unlabelled", "-"
			if g.Label != nil {
				lab, lids = g.Label.CoeffString(), fmt.Sprintf("%.6f", g.Label.IDS)
			}
			fmt.Fprintf(tw, "\t%d\t%.6f\t%s\t%s\t%.4g\t%.4f\t%.6g\t%.6g\t%d\t\n", i+1, g.IDS, lab, lids, g.Width, g.RelWidth, g.Lower, g.Upper, len(g.Boundary))
		}
		tw.Flush()
	}
	if er := r.EdgeModes; er != nil {
		fmt.Fprintf(&b, "edge modes  %d phases over one turn; signed crossings of each gap's middle (+1 upward), first end and last end; expected +m and −m\n", er.Phases)
		tw := tabwriter.NewWriter(&b, 0, 0, 2, ' ', tabwriter.AlignRight)
		fmt.Fprintf(tw, "\tIDS\tlabel\tm\tfirst end\tlast end\tjumps\tunresolved\tagrees\t\n")
		for _, g := range er.Gaps {
			lab, m := "unlabelled", "-"
			if l := g.Gap.Label; l != nil {
				lab, m = l.CoeffString(), fmt.Sprintf("%+d", l.Coeffs[1])
			}
			fmt.Fprintf(tw, "\t%.6f\t%s\t%s\t%+d\t%+d\t%d\t%d\t%v\t\n", g.Gap.IDS, lab, m, g.First, g.Last, g.Jumps, g.Unresolved, g.Agrees)
		}
		tw.Flush()
	}
	if r.Out != "" {
		fmt.Fprintf(&b, "written     %s\n", r.Out)
	}
	fmt.Fprintf(&b, "caution     %s\n", r.Caution)
	for _, n := range r.Notes {
		fmt.Fprintf(&b, "note        %s\n", n)
	}
	for _, n := range r.Warnings {
		fmt.Fprintf(&b, "warning     %s\n", n)
	}
	_, err := io.WriteString(out, b.String())
	return err
}
