package picture

import (
	"errors"
	"fmt"
	"path/filepath"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"phasonhull/topology/notation"
	"phasonhull/topology/spectrum/plate"
)

// PlateSpectrum draws the spectrum of a plate: the integrated density of
// states against the level (the staircase of every level, or the kernel
// polynomial estimate) above the density of states, each reported gap
// shaded and marked with its label (n, m…) where it has one.
func PlateSpectrum(r *plate.Result, source, levels string) (*Picture, error) {
	if r == nil || (len(r.Values) == 0 && r.Density == nil) {
		return nil, errors.New("plate spectrum picture: no levels and no density")
	}
	ids := newPanel("", levels, "integrated density of states")
	dos := newPanel("", levels, "density of states (per site and unit)")
	gapFill := faded(Tidewater.Amber, 0.3)
	for _, g := range r.Gaps {
		for _, p := range []*plot.Plot{ids, dos} {
			band, err := plotter.NewPolygon(plotter.XYs{{X: g.Lower, Y: 0}, {X: g.Upper, Y: 0}, {X: g.Upper, Y: 1}, {X: g.Lower, Y: 1}})
			if err != nil {
				return nil, fmt.Errorf("plate spectrum picture: %w", err)
			}
			band.Color, band.LineStyle.Width = gapFill, 0
			p.Add(band)
		}
	}
	var curve, density plotter.XYs
	n := float64(r.Sites)
	if len(r.Values) > 0 {
		for k, e := range r.Values {
			curve = append(curve, plotter.XY{X: e, Y: float64(k) / n}, plotter.XY{X: e, Y: float64(k+1) / n})
		}
		// A histogram of the levels, 100 bins over the spectrum.
		lo, hi := r.Values[0], r.Values[len(r.Values)-1]
		w := (hi - lo) / 100
		counts := make([]float64, 101)
		for _, e := range r.Values {
			counts[int((e-lo)/max(w, 1e-300))]++
		}
		for b, c := range counts {
			density = append(density, plotter.XY{X: lo + (float64(b)+0.5)*w, Y: c / n / max(w, 1e-300)})
		}
	} else {
		d := r.Density
		lo, hi := r.Lowest-2*r.Resolution, r.Highest+2*r.Resolution
		for k := 0; k <= 800; k++ {
			e := lo + (hi-lo)*float64(k)/800
			v, _ := d.IDS(e)
			curve = append(curve, plotter.XY{X: e, Y: v})
			density = append(density, plotter.XY{X: e, Y: d.DOS(e)})
		}
	}
	line, err := plotter.NewLine(curve)
	if err != nil {
		return nil, fmt.Errorf("plate spectrum picture: %w", err)
	}
	line.Color, line.Width = Tidewater.Blue, vg.Points(1.2)
	ids.Add(line)
	dline, err := plotter.NewLine(density)
	if err != nil {
		return nil, fmt.Errorf("plate spectrum picture: %w", err)
	}
	dline.Color, dline.Width = Tidewater.Pine, vg.Points(1)
	dos.Add(dline)
	top := 0.0
	for _, p := range density {
		top = max(top, p.Y)
	}
	dos.Y.Min, dos.Y.Max = 0, 1.05*top
	marks := make([]gapMark, 0, len(r.Gaps))
	for _, g := range r.Gaps {
		marks = append(marks, gapMark{g.Lower, g.Upper, g.IDS, g.Label})
	}
	labels := labelGaps(marks, curve)
	if len(labels.texts) > 0 {
		ids.Add(labels)
	}
	ids.Y.Min, ids.Y.Max = 0, 1.08
	how := "every level"
	if r.Method == plate.KPM {
		how = fmt.Sprintf("kernel polynomial method, %d moments, %d vectors, resolution %.2g", r.Moments, r.Vectors, r.Resolution)
	}
	return &Picture{
		Name:   "spectrum",
		Width:  6 * vg.Inch,
		Height: 6.4 * vg.Inch,
		title:  fmt.Sprintf("%s — plate spectrum, %d sites (%s), %d gaps (%d labelled)", filepath.Base(source), r.Sites, how, len(r.Gaps), len(labels.texts)),
		panels: [][]*plot.Plot{{ids}, {dos}},
		key: []keyItem{
			entry{label: "IDS: share of levels ≤ E", thumbs: []plot.Thumbnailer{&plotter.Line{LineStyle: line.LineStyle}}},
			entry{label: "density of states", thumbs: []plot.Thumbnailer{&plotter.Line{LineStyle: dline.LineStyle}}},
			entry{label: "gap", thumbs: []plot.Thumbnailer{&plotter.Polygon{Color: gapFill}}},
			entry{label: "(n, m…): gap label, IDS = n + Σ m_i·g_i over the label group's generators"},
		},
		Caption: "Above, the integrated density of states against the level; below, the density of states. Shaded bands are the reported gaps, " +
			"each marked with its label (coefficients of 1 and of the generators of the plate's label group) at its IDS.",
	}, nil
}

// PlateSweep draws a sweep: each followed gap's IDS against the swept
// parameter (dots, one colour per gap), and the integer line fitted to it
// (solid when the sweep confirms it, dashed when not), labelled with its
// coefficients at its right end.
func PlateSweep(s *plate.SweepResult, source string) (*Picture, error) {
	if s == nil || len(s.Tracks) == 0 {
		return nil, errors.New("sweep picture: no gap was followed")
	}
	p := newPanel("", s.Param, "integrated density of states")
	colours := []Mark{TidewaterMarks(0), TidewaterMarks(1), TidewaterMarks(2), TidewaterMarks(3)}
	labels := &labelSet{style: textStyle(sizeNote, Tidewater.Ink)}
	drawn := 0
	var dotStyle draw.GlyphStyle
	var solid, dashed draw.LineStyle
	for _, t := range s.Tracks {
		mk := colours[drawn%len(colours)]
		drawn++
		var dots, line plotter.XYs
		for k, st := range t.Steps {
			dots = append(dots, plotter.XY{X: s.Values[st], Y: t.Gaps[k].IDS})
			if t.Coeffs != nil {
				line = append(line, plotter.XY{X: s.Values[st], Y: s.LabelValue(t, st)})
			}
		}
		sc, err := plotter.NewScatter(dots)
		if err != nil {
			return nil, fmt.Errorf("sweep picture: %w", err)
		}
		sc.GlyphStyle = draw.GlyphStyle{Color: mk.Colour, Shape: mk.Shape, Radius: vg.Points(2.5)}
		dotStyle = sc.GlyphStyle
		dotStyle.Color = Tidewater.Ink
		p.Add(sc)
		if len(line) == 0 {
			continue
		}
		l, err := plotter.NewLine(line)
		if err != nil {
			return nil, fmt.Errorf("sweep picture: %w", err)
		}
		l.Color, l.Width = mk.Colour, vg.Points(1)
		text := notation.Tuple(t.Coeffs)
		if !t.Confirmed {
			l.Dashes = []vg.Length{vg.Points(4), vg.Points(3)}
			text += "?"
			dashed = l.LineStyle
		} else {
			solid = l.LineStyle
		}
		p.Add(l)
		labels.texts = append(labels.texts, text)
		labels.anchors = append(labels.anchors, line[len(line)-1])
		labels.curves = append(labels.curves, line)
	}
	gap := vg.Points(3)
	labels.candidates = func(i int, at func(plotter.XY) vg.Point, w, h vg.Length) []vg.Rectangle {
		a := at(labels.anchors[i])
		var out []vg.Rectangle
		for k := range 8 {
			step := vg.Length(k) * (h + gap) / 2
			out = append(out, boxAt(a.X-w-gap, a.Y+gap+step, w, h), boxAt(a.X-w-gap, a.Y-gap-h-step, w, h))
		}
		return out
	}
	if len(labels.texts) > 0 {
		p.Add(labels)
	}
	key := []keyItem{entry{label: "a gap's IDS at that value (one mark per gap)", thumbs: []plot.Thumbnailer{&plotter.Scatter{GlyphStyle: dotStyle}}}}
	if solid.Width > 0 {
		key = append(key, entry{label: "integer line the sweep confirms", thumbs: []plot.Thumbnailer{&plotter.Line{LineStyle: solid}}})
	}
	if dashed.Width > 0 {
		key = append(key, entry{label: "integer line not confirmed (marked ?)", thumbs: []plot.Thumbnailer{&plotter.Line{LineStyle: dashed}}})
	}
	key = append(key, entry{label: fmt.Sprintf("(n, m…): IDS = n + Σ m_i·g_i, g = (%s)", strings.Join(s.Names, ", "))})
	return &Picture{
		Name:   "sweep",
		Width:  6 * vg.Inch,
		Height: 4.4 * vg.Inch,
		title:  fmt.Sprintf("%s — gap IDS against %s, %d values, %d gaps followed", filepath.Base(source), s.Param, len(s.Values), drawn),
		panels: [][]*plot.Plot{{p}},
		key:    key,
		Caption: "Each gap followed through the sweep: its integrated density of states at each value of the parameter, and the straight line " +
			"in the label group's generators with integer coefficients fitted to it.",
	}, nil
}

// PlateSpectra draws the figures of a plate's spectrum report: the spectrum, and
// the sweep when there is one.
func PlateSpectra(r *plate.Report, levels string) ([]*Picture, error) {
	p, err := PlateSpectrum(r.Result, r.Source, levels)
	if err != nil {
		return nil, err
	}
	pics := []*Picture{p}
	if r.Sweep != nil {
		if p, err = PlateSweep(r.Sweep, r.Source); err != nil {
			return nil, err
		}
		pics = append(pics, p)
	}
	return pics, nil
}
