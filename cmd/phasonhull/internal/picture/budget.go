package picture

import (
	"errors"
	"fmt"
	"image/color"
	"path/filepath"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"phasonhull/topology/budget"
)

// Budget draws an error budget: above, the survival probability of each
// labelled gap against the position error σ, its 95% Wilson interval
// shaded, with the confidence asked for and the budget's σ dashed; below,
// the median width of each gap against σ with its 5–95% range shaded. One
// colour per gap, keyed by its label below the panels.
func Budget(r *budget.Result) (*Picture, error) {
	if r == nil || len(r.Levels) == 0 || len(r.Design.Gaps) == 0 {
		return nil, errors.New("budget picture: no level or no gap to draw")
	}
	unit := ""
	if r.Unit != "" {
		unit = " (" + r.Unit + ")"
	}
	surv := newPanel("", "position error σ"+unit, "probability the gap stays open")
	width := newPanel("", "position error σ"+unit, "gap width")
	colours := []color.RGBA{Tidewater.Blue, Tidewater.Rust, Tidewater.Pine, Tidewater.Amber, Tidewater.Plum, Tidewater.Sky}
	var key []keyItem
	for gi, g := range r.Design.Gaps {
		c := colours[gi%len(colours)]
		// Gaps beyond the palette are dashed, so that no two share a look.
		var dashes []vg.Length
		if gi >= len(colours) {
			dashes = dashed
		}
		var p, plo, phi, w, wlo, whi plotter.XYs
		for _, l := range r.Levels {
			s := l.Gaps[gi]
			p = append(p, plotter.XY{X: l.Sigma, Y: s.Open.Estimate})
			plo, phi = append(plo, plotter.XY{X: l.Sigma, Y: s.Open.Low}), append(phi, plotter.XY{X: l.Sigma, Y: s.Open.High})
			w = append(w, plotter.XY{X: l.Sigma, Y: s.Width.Median})
			wlo, whi = append(wlo, plotter.XY{X: l.Sigma, Y: s.Width.P05}), append(whi, plotter.XY{X: l.Sigma, Y: s.Width.P95})
		}
		style := draw.LineStyle{Color: c, Width: vg.Points(1.3), Dashes: dashes}
		for _, panel := range []struct {
			plt         *plot.Plot
			mid, lo, hi plotter.XYs
		}{{surv, p, plo, phi}, {width, w, wlo, whi}} {
			if err := addBand(panel.plt, panel.mid, panel.lo, panel.hi, style, c); err != nil {
				return nil, err
			}
		}
		key = append(key, entry{label: "gap " + g.Label.CoeffString(), thumbs: []plot.Thumbnailer{&plotter.Line{LineStyle: style}}})
	}
	ref := draw.LineStyle{Color: Tidewater.Ink, Width: vg.Points(0.8), Dashes: dashed}
	lo, hi := r.Levels[0].Sigma, r.Levels[0].Sigma
	for _, l := range r.Levels {
		lo, hi = min(lo, l.Sigma), max(hi, l.Sigma)
	}
	if b := r.Budget; b != nil {
		h, err := plotter.NewLine(plotter.XYs{{X: lo, Y: b.Confidence}, {X: hi, Y: b.Confidence}})
		if err != nil {
			return nil, fmt.Errorf("budget picture: %w", err)
		}
		h.LineStyle = ref
		surv.Add(h)
		if b.Bracketed && b.Sigma <= hi {
			v, err := plotter.NewLine(plotter.XYs{{X: b.Sigma, Y: 0}, {X: b.Sigma, Y: 1}})
			if err != nil {
				return nil, fmt.Errorf("budget picture: %w", err)
			}
			v.LineStyle = ref
			surv.Add(v)
		}
		key = append(key, entry{label: fmt.Sprintf("confidence %g and the budget σ of gap %s", b.Confidence, b.Gap.Label.CoeffString()),
			thumbs: []plot.Thumbnailer{&plotter.Line{LineStyle: ref}}})
	}
	band := faded(Tidewater.Ink, 0.15)
	key = append(key,
		entry{label: "shaded in each gap's colour, above: its 95% Wilson interval; below: 5–95% of its widths", thumbs: []plot.Thumbnailer{&plotter.Polygon{Color: band}}})
	surv.Y.Min, surv.Y.Max = 0, 1.02
	width.Y.Min = 0
	return &Picture{
		Name:   "budget",
		Width:  6 * vg.Inch,
		Height: 6.4 * vg.Inch,
		title:  fmt.Sprintf("%s — error budget, %d trials per level", filepath.Base(r.Source), r.Trials),
		panels: [][]*plot.Plot{{surv}, {width}},
		key:    key,
		Caption: "Above, the share of simulated samples in which each labelled gap stays open against the Gaussian position error σ, " +
			"its 95% Wilson interval shaded; below, the median width of each gap (0 where it closed) with the 5–95% range of the samples shaded. " +
			"Gaps that behave alike (such as the mirror images of a symmetric spectrum) draw over each other.",
	}, nil
}

// addBand adds a line through mid over the region between lo and hi,
// shaded in the line's colour.
func addBand(p *plot.Plot, mid, lo, hi plotter.XYs, style draw.LineStyle, c color.RGBA) error {
	poly := append(plotter.XYs{}, lo...)
	for i := len(hi) - 1; i >= 0; i-- {
		poly = append(poly, hi[i])
	}
	if len(mid) > 1 {
		shade, err := plotter.NewPolygon(poly)
		if err != nil {
			return fmt.Errorf("budget picture: %w", err)
		}
		shade.Color, shade.LineStyle.Width = faded(c, 0.15), 0
		p.Add(shade)
	}
	line, points, err := plotter.NewLinePoints(mid)
	if err != nil {
		return fmt.Errorf("budget picture: %w", err)
	}
	line.LineStyle = style
	points.GlyphStyle = draw.GlyphStyle{Color: c, Radius: vg.Points(2), Shape: draw.CircleGlyph{}}
	p.Add(line, points)
	return nil
}
