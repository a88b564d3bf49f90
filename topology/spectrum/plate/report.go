package plate

import (
	"context"
	"fmt"
	"io"
	"math"
	"slices"
	"strings"

	"phasonhull/topology"
	"phasonhull/topology/hull"
	"phasonhull/topology/notation"
	"phasonhull/topology/spectrum"
)

// ReportSchema names the JSON form of Report.
const ReportSchema = "phasonhull.plate-spectrum/1"

// Report is the spectrum of a plate as "phasonhull spectrum" prints it:
// the sample (its lattice and the A that labels the gaps), the operator,
// and the Result (gaps, method, moments, vectors, resolution), with a
// sweep or the edge states of a strip when they were asked for.
type Report struct {
	Schema    string `json:"schema"`
	Source    string `json:"source"`
	Dimension int    `json:"dimension"`
	Unit      string `json:"unit"`
	// PlaneSites is the number of sites read; the Result's sites are the
	// on-lattice ones the operator has a row for.
	PlaneSites          int           `json:"plane_sites"`
	Basis               [2][2]float64 `json:"lattice_basis"`
	Rotation            [][]float64   `json:"rotation"`
	RotationUncertainty [][]float64   `json:"rotation_uncertainty"`
	// RotationSource says where A came from: "design" or "hull analysis
	// (CLASS hull)".
	RotationSource string `json:"rotation_source"`
	Operator       string `json:"operator"`
	Flux           string `json:"flux,omitempty"`
	*Result
	Sweep    *SweepResult `json:"sweep,omitempty"`
	Edges    *EdgeResult  `json:"edge_states,omitempty"`
	Warnings []string     `json:"warnings"`
}

// NewReport describes sample s under config c; source names the input.
func NewReport(s *Sample, c Config, source string) *Report {
	r := &Report{Schema: ReportSchema, Source: source, Dimension: 2, Unit: s.Plane.Unit, PlaneSites: s.Plane.Len(),
		Basis: s.Lattice.Basis, Rotation: s.Rotation, RotationUncertainty: s.RotationUncertainty, Warnings: []string{}}
	if r.Rotation == nil {
		r.Rotation, r.RotationUncertainty = [][]float64{}, [][]float64{}
	}
	r.RotationSource = "design"
	if s.Design == nil {
		r.RotationSource = fmt.Sprintf("hull analysis (%s hull)", s.Class)
	}
	m := c.Model.withDefaults()
	bonds := "nearest lattice neighbours"
	if m.Cutoff > 0 {
		bonds = fmt.Sprintf("all pairs closer than %.6g %s", m.Cutoff, s.Plane.Unit)
	}
	r.Operator = fmt.Sprintf("%s on %s, %s ends", m.Kind, bonds, m.Ends)
	if c.Harper != 0 {
		r.Operator += fmt.Sprintf(", potential Σ_k 2λ·cos 2π(ψ_k + φ) of the design's phase, λ = %g, φ = %g", c.Harper, c.HarperPhase)
	}
	if !m.Flux.IsZero() {
		r.Flux = m.Flux.String()
	}
	return r
}

// WriteText writes the report for a reader.
func (r *Report) WriteText(w io.Writer) error {
	var b strings.Builder
	fmt.Fprintf(&b, "source      %s (%d sites in a plane", r.Source, r.PlaneSites)
	if r.Unit != "" {
		fmt.Fprintf(&b, ", unit %s", r.Unit)
	}
	b.WriteString(")\n")
	fmt.Fprintf(&b, "lattice     a1 = (%.6g, %.6g), a2 = (%.6g, %.6g)\n", r.Basis[0][0], r.Basis[0][1], r.Basis[1][0], r.Basis[1][1])
	for i, row := range r.Rotation {
		head := "rotation A "
		if i > 0 {
			head = "           "
		}
		var cells []string
		for j, v := range row {
			u := 0.0
			if i < len(r.RotationUncertainty) && j < len(r.RotationUncertainty[i]) {
				u = r.RotationUncertainty[i][j]
			}
			if u > 0 {
				cells = append(cells, notation.PlusMinus(v, u))
			} else {
				cells = append(cells, fmt.Sprintf("%.6g", v))
			}
		}
		fmt.Fprintf(&b, "%s [%s]", head, strings.Join(cells, ", "))
		if i == 0 {
			fmt.Fprintf(&b, "  (from the %s)", r.RotationSource)
		}
		b.WriteString("\n")
	}
	fmt.Fprintf(&b, "operator    %s\n", r.Operator)
	if r.Flux != "" {
		fmt.Fprintf(&b, "flux        α = %s per cell\n", r.Flux)
	}
	if res := r.Result; res != nil {
		writeResultText(&b, res)
	}
	if r.Sweep != nil {
		r.Sweep.writeText(&b)
	}
	if r.Edges != nil {
		r.Edges.writeText(&b)
	}
	for _, s := range r.Warnings {
		fmt.Fprintf(&b, "warning     %s\n", s)
	}
	_, err := io.WriteString(w, b.String())
	return err
}

func writeResultText(b *strings.Builder, res *Result) {
	fmt.Fprintf(b, "levels      %d rows, by %s", res.Sites, res.Method)
	if res.Method == KPM {
		fmt.Fprintf(b, " (%d moments, %d vectors, resolution %.3g)", res.Moments, res.Vectors, res.Resolution)
	}
	fmt.Fprintf(b, ", spectrum [%.6g, %.6g]\n", res.Lowest, res.Highest)
	gens := make([]string, len(res.Generators))
	for i, g := range res.Generators {
		gens[i] = fmt.Sprintf("%.6g", g)
	}
	fmt.Fprintf(b, "label group Z + Z·g for g in (%s): a label (n, m…) is IDS = n + Σ m_i·g_i\n", strings.Join(gens, ", "))
	fmt.Fprintf(b, "gaps        %d\n", len(res.Gaps))
	if len(res.Gaps) > 0 {
		fmt.Fprintf(b, "  %-22s %-12s %-24s %s\n", "IDS", "width", "edges", "label")
	}
	for _, g := range res.Gaps {
		label := "unmatched"
		if g.Label != nil {
			label = fmt.Sprintf("%s (IDS %.6g, chance %.2g)", g.Label.CoeffString(), g.Label.IDS, g.Chance)
			if g.Confirmed {
				label += ", confirmed"
			}
		}
		ids := notation.PlusMinus(g.IDS, max(g.IDSError, 1e-12))
		if g.IDSError == 0 {
			ids = fmt.Sprintf("%.6g", g.IDS)
		}
		fmt.Fprintf(b, "  %-22s %-12.4g [%.5g, %.5g]%s %s\n", ids, g.Width, g.Lower, g.Upper, strings.Repeat(" ", max(0, 22-len(fmt.Sprintf("[%.5g, %.5g]", g.Lower, g.Upper)))), label)
	}
}

func (s *SweepResult) writeText(b *strings.Builder) {
	fmt.Fprintf(b, "sweep       %s over %d values from %g to %g; generators (%s)\n", s.Param, len(s.Values), s.Values[0], s.Values[len(s.Values)-1], strings.Join(s.Names, ", "))
	for _, t := range s.Tracks {
		if len(t.Steps) < 2 {
			continue
		}
		first := t.Gaps[0]
		label := "no integer line"
		if t.Coeffs != nil {
			label = notation.Tuple(t.Coeffs)
			if t.Confirmed {
				label += " confirmed"
			}
		}
		fmt.Fprintf(b, "  gap at IDS %.4f (%s = %g), followed through %d values: %s", first.IDS, s.Param, s.Values[t.Steps[0]], len(t.Steps), label)
		if t.Reason != "" {
			fmt.Fprintf(b, " — %s", t.Reason)
		}
		b.WriteString("\n")
	}
}

// MeasuredLabelling is the label group of a sample for measured levels
// (spectrum.AnalyzeMeasured through spectrum.Report.Label): the labels
// c_0 + Σ c_i·g_i of the group the sample's A generates, |c_i| ≤ maxCoeff.
func MeasuredLabelling(s *Sample, maxCoeff int) (spectrum.Labelling, error) {
	g, err := s.Generators(Flux{})
	if err != nil {
		return spectrum.Labelling{}, err
	}
	all := append([]float64{1}, g...)
	labels, _ := topology.PlaneLabels(all, maxCoeff)
	return spectrum.Labelling{Source: spectrum.HullAnalysis, Class: hull.Class(s.Class), Labels: labels, Generators: all, Warnings: s.Warnings}, nil
}

// context of a caller reaches the lattice recovery.

// Request is one run of the spectrum of a plate: the sample, the
// operator, and what to add to the spectrum.
type Request struct {
	Sample *Sample
	Config Config
	// Source names the input in the report.
	Source string
	// Edges asks for the edge states on a strip (EdgeStates) in the
	// spectrum's gaps.
	Edges       bool
	EdgeOptions EdgeOptions
	// Sweep, when not empty, is PARAM=START:STOP:COUNT (see Sweep).
	Sweep string
	// Stage and Count, when not nil, are told the progress.
	Stage func(string)
	Count func(done, total int)
}

// Run computes the report of the request: the spectrum with its labelled
// gaps, and the edge states and the sweep when asked for.
func (q Request) Run(ctx context.Context) (*Report, error) {
	s, c := q.Sample, q.Config
	stage := q.Stage
	if stage == nil {
		stage = func(string) {}
	}
	rep := NewReport(s, c, q.Source)
	stage(fmt.Sprintf("the spectrum of %d sites", s.Plane.Len()))
	var err error
	if rep.Result, _, err = c.Run(ctx, s); err != nil {
		return nil, err
	}
	rep.Warnings = append(rep.Warnings, rep.Result.Warnings...)
	if q.Edges {
		stage("edge states on a strip")
		fluxAt := -1
		if !c.Model.Flux.IsZero() {
			fluxAt = len(rep.Result.Generators) - 1
		}
		if rep.Edges, err = EdgeStates(ctx, s, c.Model, rep.Result.Gaps, fluxAt, q.EdgeOptions); err != nil {
			return nil, err
		}
	}
	if q.Sweep != "" {
		param, grid, ok := strings.Cut(q.Sweep, "=")
		values, err := spectrum.ParseGrid(grid)
		if !ok || err != nil {
			return nil, fmt.Errorf("sweep %q: want PARAM=START:STOP:COUNT (%v)", q.Sweep, err)
		}
		stage("values of " + param + " done")
		if rep.Sweep, err = Sweep(ctx, s.Design, s, c, param, values, SweepOptions{Progress: q.Count}); err != nil {
			return nil, err
		}
		rep.Warnings = append(rep.Warnings, rep.Sweep.Warnings...)
		rep.Sweep.confirm(rep.Result, s, c.Model.Flux)
	}
	return rep, nil
}

// ParseMethod reads a method name: auto, values or kpm.
func ParseMethod(s string) (Method, error) {
	switch s {
	case "auto", "":
		return Auto, nil
	case string(Values), string(KPM):
		return Method(s), nil
	}
	return Auto, fmt.Errorf("method %q: a plate takes auto, values or kpm", s)
}

// confirm marks the gaps of res (the spectrum of sample s) whose label
// has the value, at s's own generators, of a line the sweep confirmed
// and whose IDS that line matches within the gap's tolerance.
func (sw *SweepResult) confirm(res *Result, s *Sample, flux Flux) {
	raw, names := rawGenerators(s.Rotation, flux.Float())
	g := make([]float64, len(sw.Names))
	for i, name := range sw.Names {
		k := slices.Index(names, name)
		if k < 0 {
			return
		}
		g[i] = raw[k]
	}
	for i := range res.Gaps {
		gap := &res.Gaps[i]
		for _, t := range sw.Tracks {
			if !t.Confirmed || gap.Label == nil {
				continue
			}
			v := labelValue(float64(t.Coeffs[0]), t.Coeffs[1:], g)
			if math.Abs(v-gap.Label.IDS) < 1e-9 && math.Abs(v-gap.IDS) <= gap.Tolerance {
				gap.Confirmed = true
			}
		}
	}
}
