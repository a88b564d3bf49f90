package picture

import (
	"errors"
	"fmt"
	"path/filepath"
	"slices"
	"sort"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"phasonhull/topology/hull"
	"phasonhull/topology/notation"
	"phasonhull/topology/rips"
)

// bars returns the barcode to draw: the full landmark barcode of the
// trace when there is one, else the bars the result kept.
func bars(r *hull.Result) []rips.Bar {
	if r.Trace != nil && len(r.Trace.Bars) > 0 {
		return r.Trace.Bars
	}
	out := make([]rips.Bar, 0, len(r.Persistence.Bars))
	for _, b := range r.Persistence.Bars {
		out = append(out, b.Bar)
	}
	return out
}

// Shown bars per dimension in the barcode.
const (
	shownH0 = 12
	shownHk = 24
)

// infinityTicks marks the axis from 0 to top with the usual ticks and
// the position inf, beyond it, with "∞".
type infinityTicks struct{ top, inf float64 }

// Ticks implements plot.Ticker.
func (t infinityTicks) Ticks(lo, hi float64) []plot.Tick {
	var out []plot.Tick
	for _, k := range (plot.DefaultTicks{}).Ticks(lo, t.top) {
		if k.Value <= t.top {
			out = append(out, k)
		}
	}
	return append(out, plot.Tick{Value: t.inf, Label: "∞"})
}

// Persistence draws the barcode (the longest bars of each dimension,
// essential ones included) and the persistence diagram in the Tidewater
// marks. The significance threshold τ is drawn as what it is, a length:
// every bar is thin over its first τ and thick beyond, so the thick bars
// are the classes counted in the Betti numbers; on the diagram the line
// death = birth + τ separates them (above it, full colour) from the rest
// (below it, pale). Essential classes, which never die, are drawn at the
// "∞" column of the barcode and the "∞" row of the diagram.
func Persistence(r *hull.Result) (*Picture, error) {
	all := bars(r)
	if len(all) == 0 {
		return nil, errors.New("persistence: the result carries no barcode")
	}
	tau := r.Persistence.Threshold
	// The finite part of the scale ends at top; essential classes are
	// drawn at inf beyond it.
	top := tau
	for _, b := range all {
		if !b.Essential() {
			top = max(top, b.Death)
		}
	}
	top *= 1.05
	if top <= 0 {
		top = 1
	}
	inf := top * 1.12
	byDim := map[int][]rips.Bar{}
	for _, b := range all {
		byDim[b.Dim] = append(byDim[b.Dim], b)
	}
	dims := make([]int, 0, len(byDim))
	for d := range byDim {
		dims = append(dims, d)
	}
	sort.Ints(dims)
	end := func(b rips.Bar) float64 {
		if b.Essential() {
			return inf
		}
		return b.Death
	}
	counted := func(b rips.Bar) bool { return b.Essential() || b.Persistence() > tau }

	code := newPanel("barcode: longest bars of each dimension", "scale (whitened units)", "")
	diag := newPanel("persistence diagram", "birth (whitened units)", "death (whitened units)")
	// The ∞ column and row, and the break before them.
	brk := (top + inf) / 2
	for _, p := range []*plot.Plot{code, diag} {
		p.X.Min = 0
	}
	code.X.Max = inf + (inf-top)/2
	code.X.Tick.Marker = infinityTicks{top, inf}
	diag.X.Max = top
	diag.Y.Min, diag.Y.Max = 0, inf+(inf-top)/2
	diag.Y.Tick.Marker = infinityTicks{top, inf}

	y := 0.0
	var ticks []plot.Tick
	for _, d := range dims {
		bs := slices.Clone(byDim[d])
		slices.SortStableFunc(bs, func(a, b rips.Bar) int {
			if a.Essential() != b.Essential() {
				if a.Essential() {
					return -1
				}
				return 1
			}
			return rips.ComparePersistence(a, b)
		})
		limit := shownHk
		if d == 0 {
			limit = shownH0
		}
		label := fmt.Sprintf("H%d", d)
		if len(bs) > limit {
			label = fmt.Sprintf("H%d\n(%d of %d)", d, limit, len(bs))
			bs = bs[:limit]
		}
		ticks = append(ticks, plot.Tick{Value: y + float64(len(bs)-1)/2, Label: label})
		m := TidewaterMarks(d)
		for _, b := range bs {
			e := end(b)
			mid := min(e, b.Birth+tau)
			thin, err := plotter.NewLine(plotter.XYs{{X: b.Birth, Y: y}, {X: mid, Y: y}})
			if err != nil {
				return nil, fmt.Errorf("persistence: %w", err)
			}
			thin.Color, thin.Width = faded(m.Colour, 0.55), vg.Points(1)
			code.Add(thin)
			if e > mid {
				thick, _ := plotter.NewLine(plotter.XYs{{X: mid, Y: y}, {X: e, Y: y}})
				thick.Color, thick.Width = m.Colour, vg.Points(3.2)
				code.Add(thick)
			}
			if b.Essential() {
				s, _ := plotter.NewScatter(plotter.XYs{{X: inf, Y: y}})
				s.GlyphStyle = draw.GlyphStyle{Color: m.Colour, Radius: vg.Points(3), Shape: m.Shape}
				code.Add(s)
			}
			y++
		}
		y += 1.5
	}
	code.Y.Tick.Marker = plot.ConstantTicks(ticks)
	code.Y.Min, code.Y.Max = -1, y-1
	code.Y.Tick.Length = 0
	for _, p := range []*plot.Plot{code, diag} {
		// The break between the finite scale and ∞.
		var ln *plotter.Line
		if p == code {
			ln, _ = plotter.NewLine(plotter.XYs{{X: brk, Y: p.Y.Min}, {X: brk, Y: p.Y.Max}})
		} else {
			ln, _ = plotter.NewLine(plotter.XYs{{X: 0, Y: brk}, {X: top, Y: brk}})
		}
		ln.Color, ln.Width, ln.Dashes = faded(Tidewater.Ink, 0.35), vg.Points(0.5), []vg.Length{vg.Points(1), vg.Points(2)}
		p.Add(ln)
	}

	// Diagram: the diagonal, the significance line, then the points.
	dl, _ := plotter.NewLine(plotter.XYs{{X: 0, Y: 0}, {X: top, Y: top}})
	dl.Color, dl.Width = Tidewater.Ink, vg.Points(0.8)
	diag.Add(dl)
	sig, _ := plotter.NewLine(plotter.XYs{{X: 0, Y: tau}, {X: top - tau, Y: top}})
	sig.Color, sig.Width, sig.Dashes = Tidewater.Ink, vg.Points(1), dashed
	diag.Add(sig)
	var pts plotter.XYs
	for _, d := range dims {
		m := TidewaterMarks(d)
		var strong, weak plotter.XYs
		for _, b := range byDim[d] {
			p := plotter.XY{X: b.Birth, Y: end(b)}
			pts = append(pts, p)
			if counted(b) {
				strong = append(strong, p)
			} else {
				weak = append(weak, p)
			}
		}
		for _, set := range []struct {
			xy plotter.XYs
			g  draw.GlyphStyle
		}{
			{weak, draw.GlyphStyle{Color: faded(m.Colour, 0.45), Radius: vg.Points(2.2), Shape: m.Shape}},
			{strong, draw.GlyphStyle{Color: m.Colour, Radius: vg.Points(3.2), Shape: m.Shape}},
		} {
			if len(set.xy) == 0 {
				continue
			}
			s, err := plotter.NewScatter(set.xy)
			if err != nil {
				return nil, fmt.Errorf("persistence: %w", err)
			}
			s.GlyphStyle = set.g
			diag.Add(s)
		}
	}
	// The significance line's label, clear of the points and lines.
	lab := &labelSet{
		texts:   []string{"death = birth + τ"},
		anchors: plotter.XYs{{X: (top - tau) * 0.8, Y: (top-tau)*0.8 + tau}},
		points:  pts, radius: vg.Points(3.2),
		curves: []plotter.XYs{{{X: 0, Y: 0}, {X: top, Y: top}}, {{X: 0, Y: tau}, {X: top - tau, Y: top}}},
		style:  textStyle(sizeNote, Tidewater.Ink),
		candidates: func(_ int, at func(plotter.XY) vg.Point, w, h vg.Length) []vg.Rectangle {
			a := at(plotter.XY{X: (top - tau) * 0.8, Y: (top-tau)*0.8 + tau})
			var out []vg.Rectangle
			for k := 0; k < 12; k++ {
				// Walk down the line from the anchor; left of it, above.
				dx := vg.Points(float64(-k) * 12)
				out = append(out, boxAt(a.X+dx-w-vg.Points(3), a.Y+dx+vg.Points(3), w, h))
			}
			return out
		},
	}
	diag.Add(lab)

	var key []keyItem
	for _, d := range dims {
		m := TidewaterMarks(d)
		bar := &plotter.Line{LineStyle: draw.LineStyle{Color: m.Colour, Width: vg.Points(3.2)}}
		g := &plotter.Scatter{GlyphStyle: draw.GlyphStyle{Color: m.Colour, Radius: vg.Points(3.2), Shape: m.Shape}}
		key = append(key, entry{label: fmt.Sprintf("H%d", d), thumbs: []plot.Thumbnailer{bar, g}})
	}
	thin := &plotter.Line{LineStyle: draw.LineStyle{Color: faded(Tidewater.Ink, 0.55), Width: vg.Points(1)}}
	thick := &plotter.Line{LineStyle: draw.LineStyle{Color: Tidewater.Ink, Width: vg.Points(3.2)}}
	key = append(key,
		entry{label: fmt.Sprintf("thin: a bar's first τ = %.3g", tau), thumbs: []plot.Thumbnailer{thin}},
		entry{label: "thick: beyond τ, counted", thumbs: []plot.Thumbnailer{thick}},
		entry{label: "significance line", thumbs: []plot.Thumbnailer{&plotter.Line{LineStyle: sig.LineStyle}}},
		entry{label: "pale: below the line", thumbs: []plot.Thumbnailer{&plotter.Scatter{GlyphStyle: draw.GlyphStyle{Color: faded(Tidewater.Ink, 0.45), Radius: vg.Points(2.2), Shape: diamondGlyph{}}}}},
		entry{label: "∞: never dies"},
	)
	cls := fmt.Sprintf("%s hull", r.Hull.Class)
	if len(r.Hull.Betti) > 0 {
		cls += fmt.Sprintf(", Betti %s, confidence %.2f", notation.Tuple(r.Hull.Betti), r.Hull.Confidence)
	}
	var shapes []string
	for _, d := range dims {
		shapes = append(shapes, fmt.Sprintf("H%d %ss", d, TidewaterMarks(d).Name))
	}
	return &Picture{
		Name:   "persistence",
		Width:  6 * vg.Inch,
		Height: 4.6 * vg.Inch,
		title:  fmt.Sprintf("%s — %s, τ = %.3g", filepath.Base(r.Source), cls, tau),
		panels: [][]*plot.Plot{{code, diag}},
		key:    key,
		Caption: "Vietoris–Rips barcode of the landmarks and its persistence diagram (" + strings.Join(shapes, ", ") + "). " +
			"Each bar is thin over its first τ, the significance threshold, and thick beyond: the thick bars, and on the diagram the points above " +
			"the dashed line death = birth + τ, are the classes counted in the Betti numbers. Essential classes, which never die, are drawn at ∞.",
	}, nil
}
