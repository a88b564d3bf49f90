// Package report writes the HTML report of a hull analysis: one
// self-contained page (inline style, figures embedded as data URIs, no
// network needed to read it) with the JSON of every analysis beside it.
package report

import (
	"bytes"
	"encoding/base64"
	"errors"
	"fmt"
	"html/template"
	"io"
	"slices"
	"strconv"
	"strings"

	"phasonhull/cmd/phasonhull/internal/outfile"
	"phasonhull/cmd/phasonhull/internal/picture"
	"phasonhull/topology/audit"
	"phasonhull/topology/hull"
	"phasonhull/topology/notation"
)

// Page is everything one report shows.
type Page struct {
	// Analysis is the hull result of the sample.
	Analysis *hull.Result
	// Audit is the audit against a design; nil without one.
	Audit *Audit
	// Budget is the fabrication error budget of a design, as its text
	// form; nil without one.
	Budget *Budget
	// Figures are drawn in this order.
	Figures []Figure
	// Files are written next to report.html and linked from it.
	Files []File
}

// Budget is a fabrication error budget as the page shows it: the design
// it was run on and its text form (the table, the budget and its Monte
// Carlo error, the notes on what the figure means).
type Budget struct {
	Design string
	Text   string
}

// Audit is the part of an audit the page shows.
type Audit struct {
	Design  string
	Verdict string
	Reasons []string
	// Rows are label–value pairs of the audit table.
	Rows [][2]string
	// Unit is the unit of the positions and residuals of Sites.
	Unit string
	// Sites are the flagged sites, listed one a row.
	Sites []Site
}

// Site is one flagged site of an audit, as the page lists it.
type Site struct {
	Kind     string // missing, extra, merged, swapped, outlier, out of tolerance
	Design   []int  // design indices
	Rows     []int  // 0-based data rows of the measured file
	Position float64
	Residual float64 // 0 when the kind has none
}

// The names of the files a report writes. A folder written before by
// report holds no other names of ours, so Write removes those of them the
// new page does not write.
const (
	PageFile     = "report.html"
	AnalysisFile = "analysis.json"
	AuditFile    = "audit.json"
)

// ourNames lists every name a report may write.
func ourNames() []string { return []string{PageFile, AnalysisFile, AuditFile} }

// Figure is one picture of the page, as PNG.
type Figure struct {
	Name, Caption string
	PNG           []byte
}

// File is a file written beside the page.
type File struct {
	Name string
	Data []byte
}

// AddFigure encodes pic as PNG and appends it to the page.
func (p *Page) AddFigure(pic *picture.Picture) error {
	b, err := pic.Bytes(picture.PNG)
	if err != nil {
		return err
	}
	p.Figures = append(p.Figures, Figure{Name: pic.Name, Caption: pic.Caption, PNG: b})
	return nil
}

// Render writes the HTML page to w.
func Render(w io.Writer, p *Page) error {
	if p.Analysis == nil {
		return errors.New("report: no analysis to show")
	}
	if err := page.Execute(w, view(p)); err != nil {
		return fmt.Errorf("report: %w", err)
	}
	return nil
}

// Write writes dir/report.html and the page's files through
// outfile.WriteFiles: all of them or none, and a missing dir appears whole.
// Files of an earlier report in dir that this one does not write (an
// audit.json when this page has no audit) are removed in the same commit,
// so that no file of an earlier run survives; files not named by a report
// are left alone. The caller has checked (outfile.Check) that dir holds no
// input.
func Write(dir string, p *Page) error {
	var html bytes.Buffer
	if err := Render(&html, p); err != nil {
		return err
	}
	files := append([]File{{Name: PageFile, Data: html.Bytes()}}, p.Files...)
	out := make([]outfile.File, len(files))
	var stale []string
	for _, n := range ourNames() {
		if !slices.ContainsFunc(files, func(f File) bool { return f.Name == n }) {
			stale = append(stale, n)
		}
	}
	for i, f := range files {
		out[i] = outfile.File{Name: f.Name, Write: func(w io.Writer) error {
			_, err := w.Write(f.Data)
			return err
		}}
	}
	if err := outfile.WriteFiles(dir, out, stale...); err != nil {
		return fmt.Errorf("writing report %s: %w", dir, err)
	}
	return nil
}

// viewModel is what the template reads.
type viewModel struct {
	R        *hull.Result
	Audit    *Audit
	Budget   *Budget
	Summary  [][2]string
	Labels   []labelRow
	Blurred  bool
	More     int
	Figures  []figureView
	Files    []string
	Cautions []string
}

type labelRow struct {
	IDS, Coeffs string
	// Blurred marks an IDS uncertain by more than half the distance to
	// the nearest label.
	Blurred bool
}

type figureView struct {
	Name, Caption string
	Src           template.URL
}

// maxLabels bounds the gap labels listed on the page (all are in the JSON).
const maxLabels = 16

func view(p *Page) viewModel {
	r := p.Analysis
	v := viewModel{R: r, Audit: p.Audit, Budget: p.Budget}
	add := func(k, val string) { v.Summary = append(v.Summary, [2]string{k, val}) }
	unit := r.Unit
	if unit == "" {
		unit = "(no unit)"
	}
	plate := r.Dimension == 2
	switch {
	case plate && r.Lattice == nil:
		add("sample", fmt.Sprintf("%s: %d sites on a plane (%s), no average lattice", r.Source, r.Sites, unit))
	case plate:
		l := r.Lattice
		vec := func(i int) string {
			return fmt.Sprintf("(%s, %s)", notation.PlusMinus(l.Basis[i][0], l.BasisUncertainty[i][0]), notation.PlusMinus(l.Basis[i][1], l.BasisUncertainty[i][1]))
		}
		add("sample", fmt.Sprintf("%s: %d sites on a plane", r.Source, r.Sites))
		add("lattice", fmt.Sprintf("a1 = %s, a2 = %s %s (one standard uncertainty); %d sites on it, %d lattice points missing, %d sites off it",
			vec(0), vec(1), unit, l.Sites, l.Missing, l.OffLattice))
	default:
		add("sample", fmt.Sprintf("%s: %d sites, mean spacing %.6g %s", r.Source, r.Sites, r.MeanSpacing, unit))
	}
	class := string(r.Hull.Class)
	if r.Hull.Period > 0 {
		class += fmt.Sprintf(", period %d", r.Hull.Period)
	}
	add("hull", class)
	if len(r.Hull.Betti) > 0 {
		// Classes not read off barcodes (cantor, disordered) have none.
		add("Betti numbers", notation.Tuple(r.Hull.Betti))
		add("confidence", fmt.Sprintf("%.2f (share of landmark subsamples with the same Betti numbers)", r.Hull.Confidence))
	}
	if len(r.Hull.ScaleBand) == 2 {
		add("scale band", fmt.Sprintf("[%.3g, %.3g) whitened units", r.Hull.ScaleBand[0], r.Hull.ScaleBand[1]))
	}
	add("reason", r.Hull.Reason)
	if t := r.Tiles; t != nil {
		tiles := make([]string, len(t.Lengths))
		for i, l := range t.Lengths {
			tiles[i] = fmt.Sprintf("%c = %.6g %s (%d)", []rune(t.Letters)[i], l, r.Unit, t.Counts[i])
		}
		add("tiles", fmt.Sprintf("%s; word %s", strings.Join(tiles, ", "), t.WordClass))
	}
	for i, a := range r.Angles {
		name := "angle θ"
		if len(r.Angles) > 1 {
			name = fmt.Sprintf("angle θ%d", i+1)
		}
		add(name, fmt.Sprintf("%s turns (one standard uncertainty; folded into [0, ½])", notation.PlusMinus(a, r.AngleUncertainty[i])))
	}
	if len(r.Rotation) > 0 {
		rows := make([]string, len(r.Rotation))
		for k, row := range r.Rotation {
			cells := make([]string, len(row))
			for j, a := range row {
				u := 0.0
				if k < len(r.RotationUncertainty) && j < len(r.RotationUncertainty[k]) {
					u = r.RotationUncertainty[k][j]
				}
				cells[j] = notation.PlusMinus(a, u)
			}
			rows[k] = "(" + strings.Join(cells, ", ") + ")"
		}
		add("rotation A", fmt.Sprintf("%s turns per lattice step (rows: torus coordinates; columns: a1, a2; one standard uncertainty), reduced: any V·A·U + N with V, U invertible over Z and N integer is the same hull", strings.Join(rows, "; ")))
	}
	if plate && len(r.Rotation) > 0 {
		gens := "not resolved (see the warnings)"
		if len(r.GapLabels.Generators) > 1 {
			gens = floatList(r.GapLabels.Generators) + ", reduced over Z"
		}
		add("gap-label group", fmt.Sprintf("Z + Σ Z·A_ij%s; generators %s", detNote(len(r.Rotation)), gens))
	}
	if r.AngleMethod != "" {
		add("angle method", r.AngleMethod)
	}
	if d := r.Disorder; d != nil {
		model := "about the model: " + d.Model
		if rest, ok := strings.CutPrefix(d.Model, "none: "); ok {
			model = "no model of the hull, " + rest
		}
		line := fmt.Sprintf("%.3g of the mean spacing (rms %.3g %s), %s", d.Relative, d.RMS, r.Unit, model)
		if d.IntrinsicDimension > 0 {
			line += fmt.Sprintf("; mutual information of consecutive spacings %.2g nats, dimension of the delay cloud %.2g", d.MutualInformation, d.IntrinsicDimension)
		}
		add("disorder", line)
	}
	e := r.Embedding
	switch {
	case plate && r.Lattice == nil:
	case plate:
		add("embedding", fmt.Sprintf("patches of %d×%d lattice steps, %d component(s), %d vectors, %d landmarks", e.Window, e.Window, e.Components, e.Vectors, e.Landmarks))
	default:
		add("embedding", fmt.Sprintf("window %d (chosen %d), %d component(s), %d vectors, %d landmarks", e.Window, e.ChosenWindow, e.Components, e.Vectors, e.Landmarks))
	}
	if !plate || r.Lattice != nil {
		add("threshold τ", fmt.Sprintf("%.3g whitened units (cover radius %.3g, sampling gap %.3g, noise scale %.3g)",
			r.Persistence.Threshold, r.Persistence.CoverRadius, r.Persistence.SamplingGap, r.Persistence.NoiseScale))
	}
	// Lowest order first, each IDS to the digits its uncertainty
	// justifies, as the text lists them.
	for i, l := range r.ListLabels() {
		if i == maxLabels {
			v.More = len(r.GapLabels.Labels) - maxLabels
			break
		}
		ids, u := r.LabelIDS(l)
		if u != "" {
			ids += " ± " + u
		}
		v.Labels = append(v.Labels, labelRow{IDS: ids, Coeffs: l.CoeffString(), Blurred: l.Blurred})
		v.Blurred = v.Blurred || l.Blurred
	}
	for _, f := range p.Figures {
		v.Figures = append(v.Figures, figureView{Name: f.Name, Caption: f.Caption,
			Src: template.URL("data:image/png;base64," + base64.StdEncoding.EncodeToString(f.PNG))})
	}
	for _, f := range p.Files {
		v.Files = append(v.Files, f.Name)
	}
	v.Cautions = cautions
	return v
}

// floatList writes numbers as "1, 0.25, 0.3819660".
func floatList(v []float64) string {
	parts := make([]string, len(v))
	for i, x := range v {
		parts[i] = strconv.FormatFloat(x, 'g', 10, 64)
	}
	return strings.Join(parts, ", ")
}

// detNote writes the terms of a plate's label group beyond the entries of A.
func detNote(d int) string {
	switch d {
	case 2:
		return " + Z·det A (the coefficient of det A in a label is a second Chern number)"
	case 3:
		return " + Σ Z·(2×2 minors of A)"
	}
	return ""
}

// cautions are the notes on reading the statistical figures of the page.
var cautions = []string{
	"The class is a decision rule on the barcodes, not a probability: bars longer than τ are counted, and τ is set from the sampling of the cloud and the noise the data show.",
	"The confidence is the share of landmark subsamples that gave the same Betti numbers. It measures stability under resampling of this data set; it is not the probability that the class is right, and it says nothing about a different sample of the same design.",
	"The angle's uncertainty is one standard error of a least-squares fit, computed as if the position noise were white. It leaves out systematic errors — a drift of the metrology scale, a wrong unit, correlated fabrication errors — which only an audit against the design can expose.",
	"Gap labels say where gaps of an operator that respects the pattern may open, not that they open or how wide they are.",
	"The disorder figure is the scatter the fitted hull model does not explain: metrology noise and fabrication error together, not either alone.",
}

var page = template.Must(template.New("report").Funcs(template.FuncMap{"ints": intList}).Parse(`<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<title>Hull report — {{.R.Source}}</title>
<style>
body { font: 15px/1.45 "Liberation Sans", Arimo, Arial, Helvetica, sans-serif; color: #222228; margin: 2em auto; max-width: 62em; padding: 0 1em; }
h1 { font-size: 1.5em; border-bottom: 3px solid #1d4f91; padding-bottom: .2em; }
h2 { font-size: 1.15em; color: #1d4f91; margin-top: 1.6em; }
table { border-collapse: collapse; margin: .5em 0; }
th, td { text-align: left; padding: .25em .8em .25em 0; vertical-align: top; border-bottom: 1px solid #ddd; }
th { font-weight: 600; white-space: nowrap; }
.pass { color: #1f8a6d; font-weight: 700; }
.fail { color: #b83f1c; font-weight: 700; }
.warn { background: #fdf3df; border-left: 4px solid #e39b24; padding: .3em .7em; }
figure { margin: 1.2em 0; }
figure img { max-width: 100%; border: 1px solid #ddd; }
figcaption { font-size: .9em; color: #444; }
code { font-size: .92em; }
</style>
</head>
<body>
<h1>Hull report: {{.R.Source}}</h1>
<h2>Summary</h2>
<table>
{{range .Summary}}<tr><th>{{index . 0}}</th><td>{{index . 1}}</td></tr>
{{end}}</table>
{{range .R.Warnings}}<p class="warn">{{.}}</p>
{{end}}
{{with .Audit}}<h2>Audit against {{.Design}}</h2>
<p>Verdict: <span class="{{.Verdict}}">{{.Verdict}}</span></p>
{{if .Reasons}}<ul>{{range .Reasons}}<li>{{.}}</li>{{end}}</ul>{{end}}
<table>
{{range .Rows}}<tr><th>{{index . 0}}</th><td>{{index . 1}}</td></tr>
{{end}}</table>
{{if .Sites}}<h3>Flagged sites</h3>
<p>Design indices count the design's sites from 0; rows count the data rows of the measured file from 0, in the order the file lists them; positions and residuals{{if .Unit}} (in {{.Unit}}){{end}} are in the measured sample's frame (a missing site is shown where the calibration puts its design site).</p>
<table>
<tr><th>site</th><th>design</th><th>row</th><th>position</th><th>residual</th></tr>
{{range .Sites}}<tr><td>{{.Kind}}</td><td>{{ints .Design}}</td><td>{{ints .Rows}}</td><td>{{printf "%.6g" .Position}}</td><td>{{if .Residual}}{{printf "%+.3g" .Residual}}{{end}}</td></tr>
{{end}}</table>
{{else}}<p>No site is missing, extra, merged, swapped, an outlier or out of tolerance.</p>{{end}}
{{end}}
{{with .Budget}}<h2>Fabrication error budget of {{.Design}}</h2>
<p>Simulated fabrications of the design (budget --json): for each position error, the share of samples in which each labelled gap stays open, with its 95% interval; the budget is the largest error keeping the target gap open with the probability asked for, with its Monte Carlo bracket. It holds for the error model and coupling law it was run with.</p>
<pre>{{.Text}}</pre>
{{end}}<h2>Gap labels</h2>
{{if .Labels}}<table>
<tr><th>IDS</th><th>coefficients</th></tr>
{{range .Labels}}<tr><td>{{.IDS}}</td><td>{{.Coeffs}}{{if .Blurred}} ?{{end}}</td></tr>
{{end}}</table>
{{if .Blurred}}<p>? uncertain by more than half the distance to the nearest label: a gap there may carry either.</p>{{end}}
{{if .More}}<p>{{.More}} more, of higher order, in <code>analysis.json</code>.</p>{{end}}
{{else}}<p>None: the group is Z, no gap inside the spectrum is forced to a label.</p>{{end}}
<h2>Figures</h2>
{{range .Figures}}<figure><img src="{{.Src}}" alt="{{.Name}}"><figcaption>{{.Caption}}</figcaption></figure>
{{end}}
<h2>Reading these figures</h2>
<ul>{{range .Cautions}}<li>{{.}}</li>{{end}}</ul>
{{with .R.Notes}}<h2>Notes</h2><ul>{{range .}}<li>{{.}}</li>{{end}}</ul>{{end}}
<h2>Files</h2>
<ul>{{range .Files}}<li><a href="{{.}}">{{.}}</a></li>{{end}}</ul>
</body>
</html>
`))

// intList writes indices as "12" or "12, 13", and "—" for none.
func intList(v []int) string {
	if len(v) == 0 {
		return "—"
	}
	parts := make([]string, len(v))
	for i, x := range v {
		parts[i] = strconv.Itoa(x)
	}
	return strings.Join(parts, ", ")
}

// AuditOf is the part of an audit report the page shows: the verdict
// with its reasons and a table of the sites, calibration, residuals,
// tolerance, outliers and hull comparison.
func AuditOf(rep *audit.Report) *Audit {
	a := &Audit{Verdict: string(rep.Verdict), Reasons: rep.Reasons, Design: rep.Design}
	u := notation.Unit(rep.Unit)
	add := func(k, v string) { a.Rows = append(a.Rows, [2]string{k, v}) }
	add("sites", fmt.Sprintf("design %d, measured %d: %d matched, %d missing, %d extra", rep.DesignSites, rep.MeasuredSites, rep.Matched, len(rep.Missing), len(rep.Extra)))
	if rep.Scale != nil {
		add("calibration", fmt.Sprintf("offset %s%s, scale %s", notation.PlusMinus(*rep.Offset, *rep.OffsetErr), u, notation.PlusMinus(*rep.Scale, *rep.ScaleErr)))
	}
	add("residuals", fmt.Sprintf("rms %.4g%s, max %.4g%s, robust sigma %.3g%s", rep.RMS, u, rep.Max, u, rep.Sigma, u))
	if rep.Tolerance != nil {
		add("tolerance", fmt.Sprintf("%.4g%s", *rep.Tolerance, u))
	}
	add("outliers", fmt.Sprintf("%d", len(rep.Outliers)))
	if c := rep.Hull.Comparison; c != nil {
		add("hull comparison", c.Verdict)
	}
	a.Unit = rep.Unit
	for _, d := range rep.Defects() {
		a.Sites = append(a.Sites, Site{Kind: d.Kind, Design: d.Design, Rows: d.Measured, Position: d.Position, Residual: d.Residual})
	}
	return a
}
