package picture

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"phasonhull/topology/audit"
)

// AuditSites is what the audit figure draws: the residual of every
// matched site and the defects along the chain, all in the sample's unit.
type AuditSites struct {
	// Source names the sample; Unit is its length unit.
	Source, Unit string
	// Position and Residual of each matched site; Flagged marks outliers
	// and sites beyond the tolerance.
	Position, Residual []float64
	Flagged            []bool
	// Tolerance is the largest residual allowed (0: none given);
	// OutlierThreshold the residual beyond which a site is an outlier.
	Tolerance, OutlierThreshold float64
	// Missing holds the positions where design sites were expected but
	// not found; Extra those of measured sites that match nothing.
	Missing, Extra []float64
	// Verdict is "pass" or "fail".
	Verdict string
}

// AuditSitesOf gathers what the audit figure draws from an audit report;
// false when no site was matched.
func AuditSitesOf(rep *audit.Report) (AuditSites, bool) {
	a := AuditSites{Source: rep.Measured, Unit: rep.Unit, OutlierThreshold: rep.OutlierThreshold, Verdict: string(rep.Verdict),
		Missing: rep.MissingAt(), Extra: rep.ExtraAt()}
	if len(rep.Sites) == 0 {
		return a, false
	}
	if rep.Tolerance != nil {
		a.Tolerance = *rep.Tolerance
	}
	for _, s := range rep.Sites {
		a.Position = append(a.Position, s.Position)
		a.Residual = append(a.Residual, s.Residual)
		a.Flagged = append(a.Flagged, s.Flagged())
	}
	return a, true
}

// Audit draws the residual of every site along the chain with the
// tolerance and outlier lines, flagged sites marked, and below it the chain
// itself with its missing and extra sites.
func Audit(a AuditSites) (*Picture, error) {
	n := len(a.Position)
	if n == 0 || len(a.Residual) != n || (a.Flagged != nil && len(a.Flagged) != n) {
		return nil, errors.New("audit picture: need one residual per site")
	}
	u := a.Unit
	if u == "" {
		u = "unit of the sample"
	}
	lo, hi := a.Position[0], a.Position[0]
	for _, x := range append(append(append([]float64(nil), a.Position...), a.Missing...), a.Extra...) {
		lo, hi = math.Min(lo, x), math.Max(hi, x)
	}
	res := newPanel("residual per site", "position ("+u+")", "residual ("+u+")")
	var ok, bad plotter.XYs
	for i := range a.Position {
		pt := plotter.XY{X: a.Position[i], Y: a.Residual[i]}
		if a.Flagged != nil && a.Flagged[i] {
			bad = append(bad, pt)
		} else {
			ok = append(ok, pt)
		}
	}
	hline := func(p *plot.Plot, y float64, c vg.Length, name string, dash bool) {
		l, _ := plotter.NewLine(plotter.XYs{{X: lo, Y: y}, {X: hi, Y: y}})
		l.Color, l.Width = Tidewater.Ink, c
		if dash {
			l.Dashes = []vg.Length{vg.Points(3), vg.Points(2)}
			l.Color = Tidewater.Plum
		}
		p.Add(l)
		if name != "" {
			p.Legend.Add(name, l)
		}
	}
	hline(res, 0, vg.Points(0.5), "", false)
	if a.Tolerance > 0 {
		hline(res, a.Tolerance, vg.Points(1.2), fmt.Sprintf("tolerance ±%.3g %s", a.Tolerance, a.Unit), false)
		hline(res, -a.Tolerance, vg.Points(1.2), "", false)
	}
	if a.OutlierThreshold > 0 {
		hline(res, a.OutlierThreshold, vg.Points(1), fmt.Sprintf("outlier line ±%.3g %s", a.OutlierThreshold, a.Unit), true)
		hline(res, -a.OutlierThreshold, vg.Points(1), "", true)
	}
	if len(ok) > 0 {
		s, err := plotter.NewScatter(ok)
		if err != nil {
			return nil, fmt.Errorf("audit picture: %w", err)
		}
		s.GlyphStyle = draw.GlyphStyle{Color: Tidewater.Blue, Radius: vg.Points(1.4), Shape: draw.CircleGlyph{}}
		res.Add(s)
	}
	if len(bad) > 0 {
		s, err := plotter.NewScatter(bad)
		if err != nil {
			return nil, fmt.Errorf("audit picture: %w", err)
		}
		s.GlyphStyle = draw.GlyphStyle{Color: Tidewater.Rust, Radius: vg.Points(3), Shape: draw.CrossGlyph{}}
		res.Add(s)
		res.Legend.Add(fmt.Sprintf("flagged (%d)", len(bad)), s)
	}

	chain := newPanel("the chain: missing and extra sites", "position ("+u+")", "")
	chain.Y.Tick.Marker = plot.ConstantTicks([]plot.Tick{{Value: 0, Label: "matched"}, {Value: 1, Label: "missing"}, {Value: 2, Label: "extra"}})
	chain.Y.Min, chain.Y.Max = -0.6, 2.6
	rowOf := func(xs []float64, y float64) plotter.XYs {
		out := make(plotter.XYs, len(xs))
		for i, x := range xs {
			out[i] = plotter.XY{X: x, Y: y}
		}
		return out
	}
	add := func(xy plotter.XYs, g draw.GlyphStyle, name string) error {
		if len(xy) == 0 {
			return nil
		}
		s, err := plotter.NewScatter(xy)
		if err != nil {
			return fmt.Errorf("audit picture: %w", err)
		}
		s.GlyphStyle = g
		chain.Add(s)
		if name != "" {
			chain.Legend.Add(name, s)
		}
		return nil
	}
	if err := add(rowOf(a.Position, 0), draw.GlyphStyle{Color: faded(Tidewater.Blue, 0.6), Radius: vg.Points(1.2), Shape: draw.BoxGlyph{}}, ""); err != nil {
		return nil, err
	}
	if err := add(rowOf(a.Missing, 1), draw.GlyphStyle{Color: Tidewater.Rust, Radius: vg.Points(3), Shape: draw.PyramidGlyph{}}, fmt.Sprintf("missing (%d)", len(a.Missing))); err != nil {
		return nil, err
	}
	if err := add(rowOf(a.Extra, 2), draw.GlyphStyle{Color: Tidewater.Amber, Radius: vg.Points(3), Shape: draw.SquareGlyph{}}, fmt.Sprintf("extra (%d)", len(a.Extra))); err != nil {
		return nil, err
	}
	chain.X.Min, chain.X.Max = lo, hi
	res.X.Min, res.X.Max = lo, hi
	verdict := ""
	if a.Verdict != "" {
		verdict = ": " + a.Verdict
	}
	return &Picture{
		Name:   "audit",
		Width:  6 * vg.Inch,
		Height: 4 * vg.Inch,
		title:  fmt.Sprintf("%s — audit%s", a.Source, verdict),
		panels: [][]*plot.Plot{{res}, {chain}},
		Caption: "Residual of every matched site (measured minus calibrated design position) with the tolerance and outlier lines; " +
			"flagged sites are crossed. Below, the chain with the design sites that were not found and the measured sites that match none.",
	}, nil
}
