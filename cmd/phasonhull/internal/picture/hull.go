package picture

import (
	"errors"
	"fmt"
	"path/filepath"
	"slices"
	"sort"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"phasonhull/topology/hull"
	"phasonhull/topology/rips"
)

// ErrNoTrace is returned for a result that carries no delay cloud to draw.
var ErrNoTrace = errors.New("the result carries no trace of its delay cloud")

// Analysis returns every figure a hull result supports: projections and
// persistence whenever the result has a trace, the angle fit when it has
// circular coordinates.
func Analysis(r *hull.Result) ([]*Picture, error) {
	var out []*Picture
	pj, err := Projections(r)
	if err != nil {
		return nil, err
	}
	out = append(out, pj)
	if ps, err := Persistence(r); err == nil {
		out = append(out, ps)
	}
	if an, err := Angle(r); err == nil {
		out = append(out, an)
	}
	return out, nil
}

// maxProjected is the number of whitened components drawn in projections.
const maxProjected = 4

// Projections draws the pairwise projections of the first three or four
// whitened delay components, each point coloured by its circular
// coordinate (a loop of the palette: equal colours, equal phase), with the
// landmarks ringed. A torus gets a second grid coloured by its second
// coordinate.
func Projections(r *hull.Result) (*Picture, error) {
	tr := r.Trace
	if tr == nil || len(tr.Cloud) == 0 {
		return nil, fmt.Errorf("hull projections: %w", ErrNoTrace)
	}
	dim := min(len(tr.Cloud[0]), maxProjected)
	if dim < 1 {
		return nil, fmt.Errorf("hull projections: %w", ErrNoTrace)
	}
	var pairs [][2]int
	for i := 0; i < dim; i++ {
		for j := i + 1; j < dim; j++ {
			pairs = append(pairs, [2]int{i, j})
		}
	}
	if dim == 1 {
		pairs = [][2]int{{0, -1}} // component against vector index
	}
	cols := min(len(pairs), 3)
	colourings := max(len(tr.Coordinates), 1)
	var rows [][]*plot.Plot
	for k := 0; k < colourings; k++ {
		paint := func(i int) draw.GlyphStyle {
			c := Tidewater.Blue
			if k < len(tr.Coordinates) {
				c = cyclic(tr.Coordinates[k][i])
			}
			return draw.GlyphStyle{Color: c, Radius: vg.Points(1.3), Shape: draw.CircleGlyph{}}
		}
		var row []*plot.Plot
		for _, pr := range pairs {
			xl := fmt.Sprintf("component %d (whitened units)", pr[0]+1)
			yl := fmt.Sprintf("component %d (whitened units)", pr[1]+1)
			if pr[1] < 0 {
				xl, yl = "vector index", "component 1 (whitened units)"
			}
			title := ""
			if k < len(tr.Coordinates) {
				title = fmt.Sprintf("colour: φ%d (turns)", k+1)
			}
			p := newPanel(title, xl, yl)
			xy := make(plotter.XYs, len(tr.Cloud))
			for i, v := range tr.Cloud {
				if pr[1] < 0 {
					xy[i] = plotter.XY{X: float64(i), Y: v[0]}
				} else {
					xy[i] = plotter.XY{X: v[pr[0]], Y: v[pr[1]]}
				}
			}
			s, err := plotter.NewScatter(xy)
			if err != nil {
				return nil, fmt.Errorf("hull projections: %w", err)
			}
			s.GlyphStyleFunc = paint
			p.Add(s)
			if len(tr.Landmarks) > 0 {
				lm := make(plotter.XYs, len(tr.Landmarks))
				for n, i := range tr.Landmarks {
					lm[n] = xy[i]
				}
				ls, err := plotter.NewScatter(lm)
				if err != nil {
					return nil, fmt.Errorf("hull projections: %w", err)
				}
				ls.GlyphStyle = draw.GlyphStyle{Color: Tidewater.Ink, Radius: vg.Points(2.4), Shape: draw.RingGlyph{}}
				p.Add(ls)
			}
			row = append(row, p)
			if len(row) == cols {
				rows = append(rows, row)
				row = nil
			}
		}
		if len(row) > 0 {
			rows = append(rows, row)
		}
	}
	h := vg.Length(len(rows)) * 2.1 * vg.Inch
	pic := &Picture{
		Name:   "hull-projections",
		Width:  6 * vg.Inch,
		Height: max(h, 2.6*vg.Inch) + 0.3*vg.Inch,
		title:  fmt.Sprintf("%s — %s hull: %d delay vectors, window %d (rings: landmarks)", filepath.Base(r.Source), r.Hull.Class, len(tr.Cloud), r.Embedding.Window),
		panels: rows,
		Caption: "Pairwise projections of the first whitened delay components; colour is the circular coordinate " +
			"(a closed loop of colours: a hull that is a circle shows the colours in order around it), rings mark the landmarks.",
	}
	return pic, nil
}

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

// Persistence draws the barcode (the longest finite H0 bars, then H1 and
// H2) and the persistence diagram, with the significance threshold τ: bars
// longer than τ are drawn full and thick, the others faint; on the diagram
// the band between the diagonal and death = birth + τ is shaded, so the
// points outside it are the significant classes.
func Persistence(r *hull.Result) (*Picture, error) {
	all := bars(r)
	if len(all) == 0 {
		return nil, errors.New("persistence: the result carries no barcode")
	}
	tau := r.Persistence.Threshold
	// The top of the drawing: essential bars end there.
	top := tau
	for _, b := range all {
		if !b.Essential() {
			top = max(top, b.Death)
		}
	}
	top *= 1.1
	if top <= 0 {
		top = 1
	}
	byDim := map[int][]rips.Bar{}
	for _, b := range all {
		if b.Dim == 0 && b.Essential() {
			continue // the one component that never dies says nothing
		}
		byDim[b.Dim] = append(byDim[b.Dim], b)
	}
	dims := make([]int, 0, len(byDim))
	for d := range byDim {
		dims = append(dims, d)
	}
	sort.Ints(dims)

	code := newPanel("barcode (longest bars per dimension)", "scale (whitened units)", "")
	code.Y.Tick.Marker = plot.ConstantTicks(nil)
	diag := newPanel("persistence diagram", "birth (whitened units)", "death (whitened units)")
	y := 0.0
	var ticks []plot.Tick
	for _, d := range dims {
		bs := slices.Clone(byDim[d])
		slices.SortStableFunc(bs, rips.ComparePersistence)
		limit := shownHk
		if d == 0 {
			limit = shownH0
		}
		if len(bs) > limit {
			bs = bs[:limit]
		}
		ticks = append(ticks, plot.Tick{Value: y + float64(len(bs)-1)/2, Label: fmt.Sprintf("H%d", d)})
		for _, b := range bs {
			end := b.Death
			if b.Essential() {
				end = top
			}
			ln, err := plotter.NewLine(plotter.XYs{{X: b.Birth, Y: y}, {X: end, Y: y}})
			if err != nil {
				return nil, fmt.Errorf("persistence: %w", err)
			}
			ln.Color = faded(dimColour(d), 0.35)
			ln.Width = vg.Points(1.2)
			if b.Persistence() > tau {
				ln.Color = dimColour(d)
				ln.Width = vg.Points(3)
			}
			code.Add(ln)
			y++
		}
		y += 1.5
	}
	code.Y.Tick.Marker = plot.ConstantTicks(ticks)
	long, _ := plotter.NewLine(plotter.XYs{{}, {X: 1}})
	long.Color, long.Width = Tidewater.Ink, vg.Points(3)
	short, _ := plotter.NewLine(plotter.XYs{{}, {X: 1}})
	short.Color, short.Width = faded(Tidewater.Ink, 0.35), vg.Points(1.2)
	code.Legend.Add(fmt.Sprintf("longer than τ = %.3g", tau), long)
	code.Legend.Add("shorter (not counted)", short)
	code.Y.Min, code.Y.Max = -1, y
	code.X.Min, code.X.Max = 0, top

	// Diagram: the noise band first, so that the points lie over it.
	band, err := plotter.NewPolygon(plotter.XYs{{X: 0, Y: 0}, {X: top, Y: top}, {X: top, Y: top + tau}, {X: 0, Y: tau}})
	if err != nil {
		return nil, fmt.Errorf("persistence: %w", err)
	}
	band.Color = faded(Tidewater.Sky, 0.25)
	band.LineStyle.Width = 0
	diag.Add(band)
	edge, _ := plotter.NewLine(plotter.XYs{{X: 0, Y: tau}, {X: top, Y: top + tau}})
	edge.Color, edge.Dashes = Tidewater.Ink, []vg.Length{vg.Points(3), vg.Points(2)}
	diag.Add(edge)
	diag.Legend.Add(fmt.Sprintf("death − birth = τ = %.3g", tau), edge)
	dl, _ := plotter.NewLine(plotter.XYs{{X: 0, Y: 0}, {X: top, Y: top}})
	dl.Color = Tidewater.Ink
	diag.Add(dl)
	for _, d := range dims {
		xy := make(plotter.XYs, 0, len(byDim[d]))
		for _, b := range byDim[d] {
			dy := b.Death
			if b.Essential() {
				dy = top
			}
			xy = append(xy, plotter.XY{X: b.Birth, Y: dy})
		}
		s, err := plotter.NewScatter(xy)
		if err != nil {
			return nil, fmt.Errorf("persistence: %w", err)
		}
		s.GlyphStyle = draw.GlyphStyle{Color: dimColour(d), Radius: vg.Points(2), Shape: shapeOf(d)}
		diag.Add(s)
		diag.Legend.Add(fmt.Sprintf("H%d", d), s)
	}
	diag.X.Min, diag.X.Max, diag.Y.Min, diag.Y.Max = 0, top, 0, top*1.05
	diag.Legend.Top = false

	return &Picture{
		Name:   "persistence",
		Width:  6 * vg.Inch,
		Height: 4 * vg.Inch,
		title: fmt.Sprintf("%s — Betti %v, class %s (confidence %.2f), τ = %.3g",
			r.Source, r.Hull.Betti, r.Hull.Class, r.Hull.Confidence, tau),
		panels: [][]*plot.Plot{{code, diag}},
		Caption: "Vietoris–Rips barcode of the landmarks and its persistence diagram. Bars longer than the significance threshold τ " +
			"are drawn thick; on the diagram the shaded band holds the classes shorter than τ, the points above it are the ones counted in the Betti numbers. " +
			"Essential classes are drawn up to the top edge.",
	}, nil
}

func shapeOf(d int) draw.GlyphDrawer {
	switch d {
	case 0:
		return draw.CircleGlyph{}
	case 1:
		return draw.TriangleGlyph{}
	}
	return draw.SquareGlyph{}
}
