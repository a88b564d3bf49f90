package picture

import (
	"errors"
	"fmt"
	"image/color"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"phasonhull/topology/spectrum"
)

// Spectrum draws the integrated density of states of a spectrum — the
// staircase IDS(E) = (levels ≤ E)/N — with each reported gap shaded and
// marked with its label (n, m…) where it has one. levels names the axis of
// the eigenvalues with their unit, such as "energy (units of t0)".
func Spectrum(r *spectrum.Result, source, levels string) (*Picture, error) {
	if r == nil || len(r.Values) == 0 || r.Sites == 0 {
		return nil, errors.New("spectrum picture: the result holds no levels (computed by counting)")
	}
	p := newPanel("", levels, "integrated density of states")
	// The gaps first, so that the staircase lies over them.
	for _, g := range r.Gaps {
		band, err := plotter.NewPolygon(plotter.XYs{{X: g.Lower, Y: 0}, {X: g.Upper, Y: 0}, {X: g.Upper, Y: 1}, {X: g.Lower, Y: 1}})
		if err != nil {
			return nil, fmt.Errorf("spectrum picture: %w", err)
		}
		band.Color = faded(Tidewater.Amber, 0.3)
		band.LineStyle.Width = 0
		p.Add(band)
	}
	n := float64(r.Sites)
	stairs := make(plotter.XYs, 0, 2*len(r.Values))
	for k, e := range r.Values {
		stairs = append(stairs, plotter.XY{X: e, Y: float64(k) / n}, plotter.XY{X: e, Y: float64(k+1) / n})
	}
	line, err := plotter.NewLine(stairs)
	if err != nil {
		return nil, fmt.Errorf("spectrum picture: %w", err)
	}
	line.Color, line.Width = Tidewater.Blue, vg.Points(1.2)
	p.Add(line)
	p.Legend.Add("IDS", line)
	var marks plotter.XYs
	var names []string
	for _, g := range r.Gaps {
		if g.Label == nil {
			continue
		}
		marks = append(marks, plotter.XY{X: (g.Lower + g.Upper) / 2, Y: g.IDS})
		names = append(names, "("+strings.Trim(strings.ReplaceAll(fmt.Sprint(g.Label.Coeffs), " ", ", "), "[]")+")")
	}
	if len(marks) > 0 {
		labels, err := plotter.NewLabels(plotter.XYLabels{XYs: marks, Labels: names})
		if err != nil {
			return nil, fmt.Errorf("spectrum picture: %w", err)
		}
		for i := range labels.TextStyle {
			labels.TextStyle[i].Color = Tidewater.Rust
			labels.TextStyle[i].Font.Size = 7
			labels.TextStyle[i].XAlign = draw.XCenter
			labels.TextStyle[i].YAlign = draw.YBottom
		}
		p.Add(labels)
	}
	p.Legend.Top, p.Legend.Left = true, true
	p.Y.Min, p.Y.Max = 0, 1.05
	return &Picture{
		Name:   "spectrum",
		Width:  6 * vg.Inch,
		Height: 4 * vg.Inch,
		title:  fmt.Sprintf("%s — integrated density of states, %d levels, %d gaps", source, r.Sites, len(r.Gaps)),
		panels: [][]*plot.Plot{{p}},
		Caption: "The integrated density of states (levels at or below E, over the number of sites) against the level; shaded bands are the " +
			"reported gaps, each marked with its gap label (coefficients of 1 and the angle(s)) at its IDS.",
	}, nil
}

// ThetaScan draws the spectrum of a design family against its angle: one
// dot per level at each θ of the scan, so that the gaps show as the empty
// regions between bands. thetas[i] is the angle of values[i]; levels
// names the level axis with its unit.
func ThetaScan(thetas []float64, values [][]float64, source, levels string) (*Picture, error) {
	if len(thetas) == 0 || len(thetas) != len(values) {
		return nil, errors.New("spectrum-against-angle picture: no spectra to draw")
	}
	var pts plotter.XYs
	for i, th := range thetas {
		for _, e := range values[i] {
			pts = append(pts, plotter.XY{X: th, Y: e})
		}
	}
	p := newPanel("", "θ (turns)", levels)
	sc, err := plotter.NewScatter(pts)
	if err != nil {
		return nil, fmt.Errorf("spectrum-against-angle picture: %w", err)
	}
	sc.GlyphStyle.Color = Tidewater.Blue
	sc.GlyphStyle.Radius = vg.Points(0.35)
	sc.GlyphStyle.Shape = draw.CircleGlyph{}
	p.Add(sc)
	return &Picture{
		Name:    "spectrum-theta",
		Width:   6 * vg.Inch,
		Height:  4 * vg.Inch,
		title:   fmt.Sprintf("%s — spectrum against the angle, %d angles", source, len(thetas)),
		panels:  [][]*plot.Plot{{p}},
		Caption: "Every level of the design's operator at each angle θ of the scan; gaps are the empty regions between the bands.",
	}, nil
}

// EdgeFlow draws the spectral flow of an edge-mode sweep: the boundary
// states inside each followed gap against the phason's phase, one colour
// per end of the chain, over the gaps shaded at the sweep's start. A gap
// of label n + mθ is crossed m times upward by the first end's states and
// m times downward by the last end's over one turn.
func EdgeFlow(r *spectrum.EdgeResult, source, levels string) (*Picture, error) {
	if r == nil || len(r.Gaps) == 0 {
		return nil, errors.New("edge-mode picture: no gap was followed")
	}
	p := newPanel("", "phason phase (turns)", levels)
	for _, g := range r.Gaps {
		band, err := plotter.NewPolygon(plotter.XYs{{X: 0, Y: g.Gap.Lower}, {X: 1, Y: g.Gap.Lower}, {X: 1, Y: g.Gap.Upper}, {X: 0, Y: g.Gap.Upper}})
		if err != nil {
			return nil, fmt.Errorf("edge-mode picture: %w", err)
		}
		band.Color = faded(Tidewater.Amber, 0.3)
		band.LineStyle.Width = 0
		p.Add(band)
	}
	var ends [2]plotter.XYs
	for _, f := range r.Flow {
		ends[f.End] = append(ends[f.End], plotter.XY{X: f.Phase, Y: f.Level})
	}
	for end, name := range []string{"first end", "last end"} {
		if len(ends[end]) == 0 {
			continue
		}
		sc, err := plotter.NewScatter(ends[end])
		if err != nil {
			return nil, fmt.Errorf("edge-mode picture: %w", err)
		}
		sc.GlyphStyle.Color = []color.Color{Tidewater.Blue, Tidewater.Rust}[end]
		sc.GlyphStyle.Radius = vg.Points(1)
		sc.GlyphStyle.Shape = draw.CircleGlyph{}
		p.Add(sc)
		p.Legend.Add(name, sc)
	}
	p.X.Min, p.X.Max = 0, 1
	p.Legend.Top = true
	return &Picture{
		Name:    "edge-modes",
		Width:   6 * vg.Inch,
		Height:  4 * vg.Inch,
		title:   fmt.Sprintf("%s — states inside the gaps over one turn of the phason, %d gaps", source, len(r.Gaps)),
		panels:  [][]*plot.Plot{{p}},
		Caption: "Boundary states inside the followed gaps (shaded at the start of the sweep) against the phase, coloured by the end of the chain they sit on.",
	}, nil
}
