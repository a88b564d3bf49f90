package picture

import (
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Labels inside a panel are placed at draw time, when the panel's
// data-to-canvas transform is known: each label tries its candidate boxes
// in order and takes the first that lies inside the data area and clear of
// the panel's points, curves and the labels placed before it.

// obstacles are what a label must not cover, in canvas coordinates.
type obstacles struct {
	points []vg.Point
	radius vg.Length // of each point's glyph
	curves [][]vg.Point
	boxes  []vg.Rectangle
}

// hits reports whether box r covers any obstacle.
func (o *obstacles) hits(r vg.Rectangle) bool {
	g := grow(r, o.radius)
	for _, p := range o.points {
		if inside(g, p) {
			return true
		}
	}
	for _, c := range o.curves {
		for i := 1; i < len(c); i++ {
			if segmentHits(r, c[i-1], c[i]) {
				return true
			}
		}
		if len(c) == 1 && inside(r, c[0]) {
			return true
		}
	}
	for _, b := range o.boxes {
		if overlap(r, b) {
			return true
		}
	}
	return false
}

// place returns the first candidate inside bounds that hits no obstacle,
// and adds it to the obstacles; false (and the first candidate inside
// bounds, or the first at all) when every candidate hits something.
func (o *obstacles) place(cands []vg.Rectangle, bounds vg.Rectangle) (vg.Rectangle, bool) {
	first, found := vg.Rectangle{}, false
	for _, r := range cands {
		if !contains(bounds, r) {
			continue
		}
		if !found {
			first, found = r, true
		}
		if !o.hits(r) {
			o.boxes = append(o.boxes, r)
			return r, true
		}
	}
	if !found && len(cands) > 0 {
		first = cands[0]
	}
	o.boxes = append(o.boxes, first)
	return first, false
}

func grow(r vg.Rectangle, d vg.Length) vg.Rectangle {
	return vg.Rectangle{Min: vg.Point{X: r.Min.X - d, Y: r.Min.Y - d}, Max: vg.Point{X: r.Max.X + d, Y: r.Max.Y + d}}
}

func inside(r vg.Rectangle, p vg.Point) bool {
	return p.X >= r.Min.X && p.X <= r.Max.X && p.Y >= r.Min.Y && p.Y <= r.Max.Y
}

func contains(outer, r vg.Rectangle) bool { return inside(outer, r.Min) && inside(outer, r.Max) }

func overlap(a, b vg.Rectangle) bool {
	return a.Min.X < b.Max.X && b.Min.X < a.Max.X && a.Min.Y < b.Max.Y && b.Min.Y < a.Max.Y
}

// segmentHits reports whether the segment a–b meets box r (Liang–Barsky
// clipping).
func segmentHits(r vg.Rectangle, a, b vg.Point) bool {
	t0, t1 := 0.0, 1.0
	dx, dy := float64(b.X-a.X), float64(b.Y-a.Y)
	for _, e := range [4][2]float64{
		{-dx, float64(a.X - r.Min.X)}, {dx, float64(r.Max.X - a.X)},
		{-dy, float64(a.Y - r.Min.Y)}, {dy, float64(r.Max.Y - a.Y)},
	} {
		p, q := e[0], e[1]
		if p == 0 {
			if q < 0 {
				return false
			}
			continue
		}
		t := q / p
		if p < 0 {
			t0 = max(t0, t)
		} else {
			t1 = min(t1, t)
		}
		if t0 > t1 {
			return false
		}
	}
	return true
}

// labelSet is a plotter of labels placed clear of a panel's data.
type labelSet struct {
	texts []string
	// anchors are the data points the labels name; a label set away from
	// its anchor gets a leader line to it.
	anchors plotter.XYs
	// candidates returns, in order of preference, the boxes label i of
	// size w×h may take (canvas coordinates; at maps data coordinates to
	// the canvas).
	candidates func(i int, at func(plotter.XY) vg.Point, w, h vg.Length) []vg.Rectangle
	// points and curves (data coordinates) are what the labels avoid.
	points plotter.XYs
	radius vg.Length
	curves []plotter.XYs
	style  text.Style
	// noLeader leaves out the leader lines.
	noLeader bool
	// placed and clear are the boxes taken and whether each is clear of
	// everything, set by Plot.
	placed []vg.Rectangle
	clear  []bool
}

// Plot implements plot.Plotter.
func (l *labelSet) Plot(c draw.Canvas, plt *plot.Plot) {
	tx, ty := plt.Transforms(&c)
	at := func(p plotter.XY) vg.Point { return vg.Point{X: tx(p.X), Y: ty(p.Y)} }
	o := obstacles{radius: l.radius}
	for _, p := range l.points {
		o.points = append(o.points, at(p))
	}
	for _, cv := range l.curves {
		pts := make([]vg.Point, len(cv))
		for i, p := range cv {
			pts[i] = at(p)
		}
		o.curves = append(o.curves, pts)
	}
	l.placed, l.clear = l.placed[:0], l.clear[:0]
	for i, s := range l.texts {
		a := at(l.anchors[i])
		w, h := l.style.Width(s), l.style.Height(s)
		r, ok := o.place(l.candidates(i, at, w, h), c.Rectangle)
		l.placed, l.clear = append(l.placed, r), append(l.clear, ok)
		if !l.noLeader && !inside(grow(r, vg.Points(4)), a) {
			// A leader from the box's nearest corner to the anchor.
			q := vg.Point{X: min(max(a.X, r.Min.X), r.Max.X), Y: min(max(a.Y, r.Min.Y), r.Max.Y)}
			c.StrokeLine2(draw.LineStyle{Color: l.style.Color, Width: vg.Points(0.5)}, q.X, q.Y, a.X, a.Y)
		}
		sty := l.style
		sty.XAlign, sty.YAlign = draw.XLeft, draw.YBottom
		c.FillText(sty, r.Min, s)
	}
}

// boxAt is the w×h box with its lower left corner at (x, y).
func boxAt(x, y, w, h vg.Length) vg.Rectangle {
	return vg.Rectangle{Min: vg.Point{X: x, Y: y}, Max: vg.Point{X: x + w, Y: y + h}}
}
