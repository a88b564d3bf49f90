package picture

import (
	"cmp"
	"errors"
	"fmt"
	"math"
	"path/filepath"
	"slices"
	"strconv"

	"gonum.org/v1/gonum/stat/distuv"
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

// auditTicks are the usual ticks over the residuals' range, and the row
// of defects below it.
type auditTicks struct{ lo, hi, defects float64 }

// Ticks implements plot.Ticker.
func (t auditTicks) Ticks(lo, hi float64) []plot.Tick {
	var out []plot.Tick
	for _, k := range (plot.DefaultTicks{}).Ticks(t.lo, t.hi) {
		if k.Value >= t.lo && k.Value <= t.hi {
			out = append(out, k)
		}
	}
	if t.defects != 0 {
		out = append(out, plot.Tick{Value: t.defects, Label: "defects"})
	}
	return out
}

// countTicks are the usual ticks of a count axis, whole numbers only.
type countTicks struct{}

// Ticks implements plot.Ticker.
func (countTicks) Ticks(lo, hi float64) []plot.Tick {
	var out []plot.Tick
	for _, k := range (plot.DefaultTicks{}).Ticks(lo, hi) {
		if k.Value == math.Trunc(k.Value) {
			if k.Label != "" {
				k.Label = strconv.FormatFloat(k.Value, 'f', -1, 64)
			}
			out = append(out, k)
		}
	}
	return out
}

// Audit draws the residual of every matched site along the chain with the
// tolerance and outlier lines, flagged sites crossed and the missing and
// extra sites on a row of their own below; under it, the distribution of
// the residuals (histogram) and their normal quantile plot, where a
// Gaussian scatter lies on the line and outliers leave it.
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
	rlo, rhi := slices.Min(a.Residual), slices.Max(a.Residual)
	for _, v := range []float64{a.Tolerance, a.OutlierThreshold} {
		if v > 0 {
			rlo, rhi = math.Min(rlo, -v), math.Max(rhi, v)
		}
	}
	if rhi <= rlo {
		rlo, rhi = rlo-1, rhi+1
	}
	span := rhi - rlo
	pad := 0.04 * span
	defects := rlo - pad - 0.12*span

	dot := draw.GlyphStyle{Color: Tidewater.Blue, Radius: vg.Points(1.6), Shape: draw.CircleGlyph{}}
	cross := draw.GlyphStyle{Color: Tidewater.Rust, Radius: vg.Points(3), Shape: draw.CrossGlyph{}}
	missing := draw.GlyphStyle{Color: Tidewater.Plum, Radius: vg.Points(3.2), Shape: diamondGlyph{}}
	extra := draw.GlyphStyle{Color: Tidewater.Amber, Radius: vg.Points(3), Shape: hexagonGlyph{}}
	tolStyle := draw.LineStyle{Color: Tidewater.Ink, Width: vg.Points(1.2)}
	outStyle := draw.LineStyle{Color: Tidewater.Plum, Width: vg.Points(1), Dashes: dashed}

	res := newPanel("residual per site along the chain", "position ("+u+")", "residual ("+u+")")
	var ok, bad plotter.XYs
	for i := range a.Position {
		pt := plotter.XY{X: a.Position[i], Y: a.Residual[i]}
		if a.Flagged != nil && a.Flagged[i] {
			bad = append(bad, pt)
		} else {
			ok = append(ok, pt)
		}
	}
	hline := func(p *plot.Plot, y, x0, x1 float64, sty draw.LineStyle) {
		l, _ := plotter.NewLine(plotter.XYs{{X: x0, Y: y}, {X: x1, Y: y}})
		l.LineStyle = sty
		p.Add(l)
	}
	hline(res, 0, lo, hi, draw.LineStyle{Color: Tidewater.Ink, Width: vg.Points(0.5)})
	hline(res, (defects+rlo-pad)/2, lo, hi, draw.LineStyle{Color: faded(Tidewater.Ink, 0.35), Width: vg.Points(0.5), Dashes: []vg.Length{vg.Points(1), vg.Points(2)}})
	var key []keyItem
	key = append(key, entry{label: fmt.Sprintf("matched site (%d)", n-len(bad)), thumbs: []plot.Thumbnailer{&plotter.Scatter{GlyphStyle: dot}}})
	if len(bad) > 0 {
		key = append(key, entry{label: fmt.Sprintf("flagged (%d)", len(bad)), thumbs: []plot.Thumbnailer{&plotter.Scatter{GlyphStyle: cross}}})
	}
	if a.Tolerance > 0 {
		hline(res, a.Tolerance, lo, hi, tolStyle)
		hline(res, -a.Tolerance, lo, hi, tolStyle)
		key = append(key, entry{label: fmt.Sprintf("tolerance ±%.3g %s", a.Tolerance, a.Unit), thumbs: []plot.Thumbnailer{&plotter.Line{LineStyle: tolStyle}}})
	}
	if a.OutlierThreshold > 0 {
		hline(res, a.OutlierThreshold, lo, hi, outStyle)
		hline(res, -a.OutlierThreshold, lo, hi, outStyle)
		key = append(key, entry{label: fmt.Sprintf("outlier line ±%.3g %s", a.OutlierThreshold, a.Unit), thumbs: []plot.Thumbnailer{&plotter.Line{LineStyle: outStyle}}})
	}
	add := func(p *plot.Plot, xy plotter.XYs, g draw.GlyphStyle) error {
		if len(xy) == 0 {
			return nil
		}
		s, err := plotter.NewScatter(xy)
		if err != nil {
			return fmt.Errorf("audit picture: %w", err)
		}
		s.GlyphStyle = g
		p.Add(s)
		return nil
	}
	rowOf := func(xs []float64, y float64) plotter.XYs {
		out := make(plotter.XYs, len(xs))
		for i, x := range xs {
			out[i] = plotter.XY{X: x, Y: y}
		}
		return out
	}
	for _, set := range []struct {
		xy plotter.XYs
		g  draw.GlyphStyle
	}{{ok, dot}, {bad, cross}, {rowOf(a.Missing, defects), missing}, {rowOf(a.Extra, defects), extra}} {
		if err := add(res, set.xy, set.g); err != nil {
			return nil, err
		}
	}
	key = append(key,
		entry{label: fmt.Sprintf("missing (%d)", len(a.Missing)), thumbs: []plot.Thumbnailer{&plotter.Scatter{GlyphStyle: missing}}},
		entry{label: fmt.Sprintf("extra (%d)", len(a.Extra)), thumbs: []plot.Thumbnailer{&plotter.Scatter{GlyphStyle: extra}}})
	res.X.Min, res.X.Max = lo, hi
	res.Y.Min, res.Y.Max = defects-0.06*span, rhi+pad
	res.Y.Tick.Marker = auditTicks{rlo, rhi, defects}

	// The distribution of the residuals.
	hist := newPanel("distribution of the residuals", "residual ("+u+")", "sites")
	h, err := plotter.NewHist(plotter.Values(a.Residual), min(max(int(math.Sqrt(float64(n))), 8), 40))
	if err != nil {
		return nil, fmt.Errorf("audit picture: %w", err)
	}
	h.FillColor, h.LineStyle.Color, h.LineStyle.Width = faded(Tidewater.Blue, 0.55), Tidewater.Blue, vg.Points(0.5)
	hist.Add(h)
	hmax := 0.0
	for _, b := range h.Bins {
		hmax = max(hmax, b.Weight)
	}
	vline := func(p *plot.Plot, x, y0, y1 float64, sty draw.LineStyle) {
		l, _ := plotter.NewLine(plotter.XYs{{X: x, Y: y0}, {X: x, Y: y1}})
		l.LineStyle = sty
		p.Add(l)
	}
	for _, v := range []struct {
		x   float64
		sty draw.LineStyle
	}{{a.Tolerance, tolStyle}, {a.OutlierThreshold, outStyle}} {
		if v.x > 0 {
			vline(hist, v.x, 0, hmax*1.05, v.sty)
			vline(hist, -v.x, 0, hmax*1.05, v.sty)
		}
	}
	hist.X.Min, hist.X.Max = rlo-pad, rhi+pad
	hist.Y.Min, hist.Y.Max = 0, hmax*1.08
	hist.Y.Tick.Marker = countTicks{}

	// Normal quantile plot: sorted residuals against the quantiles of a
	// unit normal at (k + ½)/n, with the line of the robust centre and
	// spread (median, interquartile range / 1.349: common practice).
	qq := newPanel("normal quantile plot", "unit normal quantile", "residual ("+u+")")
	type site struct {
		r       float64
		flagged bool
	}
	sorted := make([]site, n)
	for i, r := range a.Residual {
		sorted[i] = site{r, a.Flagged != nil && a.Flagged[i]}
	}
	slices.SortFunc(sorted, func(x, y site) int { return cmp.Compare(x.r, y.r) })
	var qok, qbad plotter.XYs
	for k, s := range sorted {
		q := distuv.UnitNormal.Quantile((float64(k) + 0.5) / float64(n))
		if s.flagged {
			qbad = append(qbad, plotter.XY{X: q, Y: s.r})
		} else {
			qok = append(qok, plotter.XY{X: q, Y: s.r})
		}
	}
	at := func(f float64) float64 { return sorted[min(int(f*float64(n)), n-1)].r }
	centre, spread := at(0.5), (at(0.75)-at(0.25))/1.349
	qlo, qhi := distuv.UnitNormal.Quantile(0.5/float64(n)), distuv.UnitNormal.Quantile(1-0.5/float64(n))
	ref, _ := plotter.NewLine(plotter.XYs{{X: qlo, Y: centre + spread*qlo}, {X: qhi, Y: centre + spread*qhi}})
	ref.LineStyle = draw.LineStyle{Color: Tidewater.Pine, Width: vg.Points(1)}
	qq.Add(ref)
	for _, set := range []struct {
		xy plotter.XYs
		g  draw.GlyphStyle
	}{{qok, dot}, {qbad, cross}} {
		if err := add(qq, set.xy, set.g); err != nil {
			return nil, err
		}
	}
	for _, v := range []struct {
		y   float64
		sty draw.LineStyle
	}{{a.Tolerance, tolStyle}, {a.OutlierThreshold, outStyle}} {
		if v.y > 0 {
			hline(qq, v.y, qlo, qhi, v.sty)
			hline(qq, -v.y, qlo, qhi, v.sty)
		}
	}
	qq.Y.Min, qq.Y.Max = rlo-pad, rhi+pad
	key = append(key, entry{label: "normal line: median, spread from the quartiles", thumbs: []plot.Thumbnailer{&plotter.Line{LineStyle: ref.LineStyle}}})

	verdict := ""
	if a.Verdict != "" {
		verdict = ": " + a.Verdict
	}
	return &Picture{
		Name:    "audit",
		Width:   6 * vg.Inch,
		Height:  5.2 * vg.Inch,
		title:   fmt.Sprintf("%s — audit%s", filepath.Base(a.Source), verdict),
		panels:  [][]*plot.Plot{{res}, {hist, qq}},
		weights: []float64{1.15, 1},
		key:     key,
		Caption: "Residual of every matched site (measured minus calibrated design position) along the chain with the tolerance and outlier lines, " +
			"flagged sites crossed, and on the row below the design sites that were not found and the measured sites that match none; " +
			"under it the distribution of the residuals and their normal quantile plot (a Gaussian scatter follows the line, outliers leave it).",
	}, nil
}
