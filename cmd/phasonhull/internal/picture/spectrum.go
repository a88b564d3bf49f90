package picture

import (
	"cmp"
	"errors"
	"fmt"
	"image/color"
	"math"
	"path/filepath"
	"slices"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"phasonhull/topology"
	"phasonhull/topology/spectrum"
)

// Spectrum draws the integrated density of states of a spectrum — the
// staircase IDS(E) = (levels ≤ E)/N — with each reported gap shaded and
// marked with its label (n, m…) where it has one. A label sits above and
// left of the flat step of its gap, or below and right of it, where the
// rising staircase cannot pass, stepped away (with a leader line) from a
// label already there. levels names the axis of the eigenvalues with its
// unit, such as "energy (units of t0)".
func Spectrum(r *spectrum.Result, source, levels string) (*Picture, error) {
	if r == nil || len(r.Values) == 0 || r.Sites == 0 {
		return nil, errors.New("spectrum picture: the result holds no levels (computed by counting)")
	}
	p := newPanel("", levels, "integrated density of states")
	gapFill := faded(Tidewater.Amber, 0.3)
	// The gaps first, so that the staircase lies over them.
	for _, g := range r.Gaps {
		band, err := plotter.NewPolygon(plotter.XYs{{X: g.Lower, Y: 0}, {X: g.Upper, Y: 0}, {X: g.Upper, Y: 1}, {X: g.Lower, Y: 1}})
		if err != nil {
			return nil, fmt.Errorf("spectrum picture: %w", err)
		}
		band.Color = gapFill
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
	labels := gapLabels(r.Gaps, stairs)
	if len(labels.texts) > 0 {
		p.Add(labels)
	}
	p.Y.Min, p.Y.Max = 0, 1.08
	return &Picture{
		Name:   "spectrum",
		Width:  6 * vg.Inch,
		Height: 4.4 * vg.Inch,
		title: fmt.Sprintf("%s — integrated density of states, %d levels, %d gaps (%d labelled)",
			filepath.Base(source), r.Sites, len(r.Gaps), len(labels.texts)),
		panels: [][]*plot.Plot{{p}},
		key: []keyItem{
			entry{label: "IDS: levels ≤ E over the number of sites", thumbs: []plot.Thumbnailer{&plotter.Line{LineStyle: line.LineStyle}}},
			entry{label: "gap", thumbs: []plot.Thumbnailer{&plotter.Polygon{Color: gapFill}}},
			entry{label: "(n, m…): gap label, IDS = n + m·θ…"},
		},
		Caption: "The integrated density of states (levels at or below E, over the number of sites) against the level; shaded bands are the " +
			"reported gaps, each marked with its gap label (coefficients of 1 and the angle(s)) at its IDS.",
	}, nil
}

// gapLabels places the labels of the labelled gaps clear of the
// staircase: the staircase rises, so the box left of a gap's lower edge
// and above its IDS, and the box right of its upper edge and below its
// IDS, are empty of it.
func gapLabels(gaps []spectrum.Gap, stairs plotter.XYs) *labelSet {
	marks := make([]gapMark, 0, len(gaps))
	for _, g := range gaps {
		marks = append(marks, gapMark{g.Lower, g.Upper, g.IDS, g.Label})
	}
	return labelGaps(marks, stairs)
}

// gapMark is what a gap's label on a staircase needs: its edges, its IDS
// and its label (nil: not drawn).
type gapMark struct {
	lower, upper, ids float64
	label             *topology.Label
}

// labelGaps places the labels of the gaps marks on the curve stairs (see
// gapLabels).
func labelGaps(marks []gapMark, stairs plotter.XYs) *labelSet {
	l := &labelSet{curves: []plotter.XYs{stairs}, style: textStyle(sizeNote, Tidewater.Rust)}
	var uppers plotter.XYs
	for _, g := range marks {
		if g.label == nil {
			continue
		}
		l.texts = append(l.texts, g.label.CoeffString())
		l.anchors = append(l.anchors, plotter.XY{X: g.lower, Y: g.ids})
		uppers = append(uppers, plotter.XY{X: g.upper, Y: g.ids})
	}
	gap := vg.Points(2)
	l.candidates = func(i int, at func(plotter.XY) vg.Point, w, h vg.Length) []vg.Rectangle {
		a, b := at(l.anchors[i]), at(uppers[i])
		var out []vg.Rectangle
		for k := 0; k < 8; k++ {
			step := vg.Length(k) * (h + gap)
			out = append(out,
				boxAt(a.X-gap-w-step/2, a.Y+gap+step, w, h), // above left
				boxAt(b.X+gap+step/2, b.Y-gap-h-step, w, h)) // below right
		}
		return out
	}
	return l
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
		Name:   "spectrum-theta",
		Width:  6 * vg.Inch,
		Height: 4 * vg.Inch,
		title:  fmt.Sprintf("%s — spectrum against the angle, %d angles", filepath.Base(source), len(thetas)),
		panels: [][]*plot.Plot{{p}},
		key: []keyItem{entry{label: "a level of the operator at that angle; gaps are the empty regions",
			thumbs: []plot.Thumbnailer{&plotter.Scatter{GlyphStyle: sc.GlyphStyle}}}},
		Caption: "Every level of the design's operator at each angle θ of the scan; gaps are the empty regions between the bands.",
	}, nil
}

// EdgeFlow draws the spectral flow of an edge-mode sweep: the boundary
// states inside each followed gap against the phason's phase, one colour
// per end of the chain, over the bulk bands of the sweep's start (shaded)
// and its gaps, each gap labelled where no state passes. A gap of label
// n + mθ is crossed m times upward by the first end's states and m times
// downward by the last end's over one turn.
func EdgeFlow(r *spectrum.EdgeResult, source, levels string) (*Picture, error) {
	if r == nil || len(r.Gaps) == 0 {
		return nil, errors.New("edge-mode picture: no gap was followed")
	}
	p := newPanel("", "phason phase (turns)", levels)
	// The bulk bands: the spectrum's range less every gap of the start.
	lo, hi := math.Inf(1), math.Inf(-1)
	var gaps []spectrum.Gap
	if r.Start != nil {
		gaps = r.Start.Gaps
		for _, v := range r.Start.Values {
			lo, hi = min(lo, v), max(hi, v)
		}
	}
	if len(gaps) == 0 {
		for _, g := range r.Gaps {
			gaps = append(gaps, g.Gap)
		}
	}
	for _, g := range gaps {
		lo, hi = min(lo, g.Lower), max(hi, g.Upper)
	}
	for _, f := range r.Flow {
		lo, hi = min(lo, f.Level), max(hi, f.Level)
	}
	sorted := slices.Clone(gaps)
	slices.SortFunc(sorted, func(a, b spectrum.Gap) int { return cmp.Compare(a.Lower, b.Lower) })
	bulk := faded(Tidewater.Sky, 0.35)
	gapFill := faded(Tidewater.Amber, 0.12)
	rect := func(y0, y1 float64, c color.RGBA) error {
		if y1 <= y0 {
			return nil
		}
		band, err := plotter.NewPolygon(plotter.XYs{{X: 0, Y: y0}, {X: 1, Y: y0}, {X: 1, Y: y1}, {X: 0, Y: y1}})
		if err != nil {
			return fmt.Errorf("edge-mode picture: %w", err)
		}
		band.Color, band.LineStyle.Width = c, 0
		p.Add(band)
		return nil
	}
	from := lo
	for _, g := range sorted {
		if err := rect(from, g.Lower, bulk); err != nil {
			return nil, err
		}
		from = max(from, g.Upper)
	}
	if err := rect(from, hi, bulk); err != nil {
		return nil, err
	}
	for _, g := range r.Gaps {
		if err := rect(g.Gap.Lower, g.Gap.Upper, gapFill); err != nil {
			return nil, err
		}
	}
	var ends [2]plotter.XYs
	var all plotter.XYs
	for _, f := range r.Flow {
		ends[f.End] = append(ends[f.End], plotter.XY{X: f.Phase, Y: f.Level})
		all = append(all, plotter.XY{X: f.Phase, Y: f.Level})
	}
	glyphs := [2]draw.GlyphStyle{
		{Color: Tidewater.Blue, Radius: vg.Points(1.4), Shape: draw.CircleGlyph{}},
		{Color: Tidewater.Rust, Radius: vg.Points(1.4), Shape: draw.CircleGlyph{}},
	}
	for end := range ends {
		if len(ends[end]) == 0 {
			continue
		}
		sc, err := plotter.NewScatter(ends[end])
		if err != nil {
			return nil, fmt.Errorf("edge-mode picture: %w", err)
		}
		sc.GlyphStyle = glyphs[end]
		p.Add(sc)
	}
	// Each followed gap's label and crossings, where no state passes.
	lab := &labelSet{points: all, radius: vg.Points(2), style: textStyle(sizeNote, Tidewater.Ink), noLeader: true}
	var uppers, lowers []float64
	for _, g := range r.Gaps {
		name := "no label"
		if g.Gap.Label != nil {
			name = g.Gap.Label.CoeffString()
		}
		lab.texts = append(lab.texts, fmt.Sprintf("%s: %+d / %+d", name, g.First, g.Last))
		lab.anchors = append(lab.anchors, plotter.XY{X: 0, Y: (g.Gap.Lower + g.Gap.Upper) / 2})
		uppers, lowers = append(uppers, g.Gap.Upper), append(lowers, g.Gap.Lower)
	}
	lab.candidates = func(i int, at func(plotter.XY) vg.Point, w, h vg.Length) []vg.Rectangle {
		a := at(lab.anchors[i])
		up, dn := at(plotter.XY{Y: uppers[i]}).Y, at(plotter.XY{Y: lowers[i]}).Y
		var out []vg.Rectangle
		// Inside the gap, else just above or below it, across the phase.
		for _, y := range []vg.Length{a.Y - h/2, up + vg.Points(1), dn - h - vg.Points(1)} {
			for k := 0; k <= 60; k++ {
				out = append(out, boxAt(a.X+vg.Points(4)+vg.Length(k)*vg.Points(8), y, w, h))
			}
		}
		return out
	}
	p.Add(lab)
	p.X.Min, p.X.Max = 0, 1
	p.Y.Min, p.Y.Max = lo-0.02*(hi-lo), hi+0.02*(hi-lo)
	return &Picture{
		Name:   "edge-modes",
		Width:  6 * vg.Inch,
		Height: 4.4 * vg.Inch,
		title:  fmt.Sprintf("%s — states inside the gaps over one turn of the phason, %d gaps", filepath.Base(source), len(r.Gaps)),
		panels: [][]*plot.Plot{{p}},
		key: []keyItem{
			entry{label: "state on the first end", thumbs: []plot.Thumbnailer{&plotter.Scatter{GlyphStyle: glyphs[0]}}},
			entry{label: "state on the last end", thumbs: []plot.Thumbnailer{&plotter.Scatter{GlyphStyle: glyphs[1]}}},
			entry{label: "bulk band", thumbs: []plot.Thumbnailer{&plotter.Polygon{Color: bulk}}},
			entry{label: "followed gap — (n, m): crossings by the first / last end's states",
				thumbs: []plot.Thumbnailer{&plotter.Polygon{Color: gapFill, LineStyle: draw.LineStyle{Color: faded(Tidewater.Amber, 0.6), Width: vg.Points(0.5)}}}},
		},
		Caption: "Boundary states inside the followed gaps against the phase, coloured by the end of the chain they sit on, over the bulk bands " +
			"(shaded) and gaps at the start of the sweep; each gap is labelled with its gap label and the signed crossings of its middle by each end's states.",
	}, nil
}
