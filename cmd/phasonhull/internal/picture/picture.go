package picture

import (
	"bytes"
	"fmt"
	"image/color"
	"io"
	"math"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"
)

// Format is an image encoding of a picture.
type Format string

// The encodings Encode writes.
const (
	PNG Format = "png"
	SVG Format = "svg"
)

// ParseFormat reads a format name.
func ParseFormat(s string) (Format, error) {
	switch Format(s) {
	case PNG, SVG:
		return Format(s), nil
	}
	return "", fmt.Errorf("picture format %q: want png or svg", s)
}

// DPI is the resolution of PNG pictures.
const DPI = 150

// Picture is one figure: a title, rows of panels, and a key below them
// that says what every mark and colour means.
type Picture struct {
	// Name is the file name stem, such as "hull-projections".
	Name string
	// Caption says in one sentence what the figure shows.
	Caption string
	// Width and Height are the page size.
	Width, Height vg.Length

	title  string
	panels [][]*plot.Plot // rows of panels; nil entries are left blank
	// weights are the relative heights of the rows (nil: equal rows,
	// whose panels are aligned in columns across rows).
	weights []float64
	key     []keyItem
}

// Pixels returns the size of the PNG encoding in pixels.
func (p *Picture) Pixels() (w, h int) {
	return int(p.Width.Dots(DPI) + 0.5), int(p.Height.Dots(DPI) + 0.5)
}

// Encode writes the picture to w in format f.
func (p *Picture) Encode(w io.Writer, f Format) error {
	c, err := p.canvas(f)
	if err != nil {
		return err
	}
	p.render(c, false)
	if _, err := c.WriteTo(w); err != nil {
		return fmt.Errorf("picture %s: %w", p.Name, err)
	}
	return nil
}

// canvas returns a blank white page in format f.
func (p *Picture) canvas(f Format) (vg.CanvasWriterTo, error) {
	switch f {
	case PNG:
		return vgimg.PngCanvas{Canvas: vgimg.NewWith(vgimg.UseWH(p.Width, p.Height), vgimg.UseDPI(DPI),
			vgimg.UseBackgroundColor(color.White))}, nil
	case SVG:
		s := vgsvg.New(p.Width, p.Height)
		s.SetColor(color.White)
		s.Fill(rectPath(vg.Rectangle{Max: vg.Point{X: p.Width, Y: p.Height}}))
		return s, nil
	}
	return nil, fmt.Errorf("picture %s: unknown format %q", p.Name, f)
}

// Bytes returns the picture encoded in format f.
func (p *Picture) Bytes(f Format) ([]byte, error) {
	var b bytes.Buffer
	if err := p.Encode(&b, f); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}

// Spacing of the page, in points.
const (
	pageMargin = 6  // around everything
	keyGap     = 16 // between key items on a line
	keyLead    = 5  // between key lines, and above the key
)

// layout is where render put things: the data area of every panel and the
// key strip.
type layout struct {
	data []vg.Rectangle
	key  vg.Rectangle
}

// render draws the picture on c. With bare, the key strip is left empty
// and no panel draws a legend of its own: what differs from the full
// rendering is what the keys drew.
func (p *Picture) render(c vg.CanvasSizer, bare bool) layout {
	dc := draw.New(c)
	dc.Min.X += pageMargin
	dc.Max.X -= pageMargin
	dc.Min.Y += pageMargin
	dc.Max.Y -= pageMargin / 2
	if p.title != "" {
		sty := textStyle(sizeTitle, Tidewater.Ink)
		sty.XAlign, sty.YAlign = draw.XCenter, draw.YTop
		t := wrapText(sty, p.title, dc.Max.X-dc.Min.X)
		dc.FillText(sty, vg.Point{X: dc.Center().X, Y: dc.Max.Y}, t)
		dc.Max.Y -= sty.Height(t) + vg.Points(6)
	}
	var out layout
	if len(p.key) > 0 {
		lines := flowKey(p.key, dc.Max.X-dc.Min.X)
		h := keyHeight(lines)
		out.key = vg.Rectangle{Min: dc.Min, Max: vg.Point{X: dc.Max.X, Y: dc.Min.Y + h}}
		if !bare {
			drawKey(dc, lines, out.key)
		}
		dc.Min.Y += h + keyLead
	}

	rows := p.panels
	cols := 0
	for _, r := range rows {
		cols = max(cols, len(r))
	}
	// Panel titles wrap to the width of their tile.
	for _, r := range rows {
		tile := (dc.Max.X - dc.Min.X) / vg.Length(max(len(r), 1))
		if p.weights == nil {
			tile = (dc.Max.X - dc.Min.X) / vg.Length(max(cols, 1))
		}
		for _, pl := range r {
			if pl == nil {
				continue
			}
			old, legend := pl.Title.Text, pl.Legend
			pl.Title.Text = wrapText(pl.Title.TextStyle, old, tile-vg.Points(8))
			defer func() { pl.Title.Text, pl.Legend = old, legend }()
			if bare {
				pl.Legend = plot.NewLegend()
			}
		}
	}
	tiles := func(r, c int) draw.Tiles {
		return draw.Tiles{Rows: r, Cols: c, PadX: vg.Points(10), PadY: vg.Points(8), PadRight: vg.Points(4)}
	}
	var grids [][][]*plot.Plot
	var areas []draw.Canvas
	if p.weights == nil {
		grid := make([][]*plot.Plot, len(rows))
		for i, r := range rows {
			grid[i] = make([]*plot.Plot, cols)
			copy(grid[i], r)
		}
		grids, areas = append(grids, grid), append(areas, dc)
	} else {
		var total float64
		for _, w := range p.weights {
			total += w
		}
		top := dc.Max.Y
		for i, r := range rows {
			h := vg.Length(p.weights[i]/total) * (dc.Max.Y - dc.Min.Y)
			a := dc
			a.Max.Y, a.Min.Y = top, top-h
			top -= h
			grids, areas = append(grids, [][]*plot.Plot{r}), append(areas, a)
		}
	}
	for k, grid := range grids {
		canvases := plot.Align(grid, tiles(len(grid), len(grid[0])), areas[k])
		for i := range grid {
			for j, pl := range grid[i] {
				if pl == nil {
					continue
				}
				pl.Draw(canvases[i][j])
				out.data = append(out.data, pl.DataCanvas(canvases[i][j]).Rectangle)
			}
		}
	}
	return out
}

// wrapText breaks s into lines no wider than w at spaces, keeping its own line
// breaks.
func wrapText(sty text.Style, s string, w vg.Length) string {
	var lines []string
	for _, para := range strings.Split(s, "\n") {
		line := ""
		for _, word := range strings.Fields(para) {
			if line != "" && sty.Width(line+" "+word) > w {
				lines = append(lines, line)
				line = word
				continue
			}
			if line != "" {
				line += " "
			}
			line += word
		}
		lines = append(lines, line)
	}
	return strings.Join(lines, "\n")
}

func rectPath(r vg.Rectangle) vg.Path {
	var p vg.Path
	p.Move(r.Min)
	p.Line(vg.Point{X: r.Max.X, Y: r.Min.Y})
	p.Line(r.Max)
	p.Line(vg.Point{X: r.Min.X, Y: r.Max.Y})
	p.Close()
	return p
}

// keyItem is one thing in a picture's key.
type keyItem interface {
	size() (w, h vg.Length)
	// draw draws the item in c with its lower left corner at at.
	draw(c draw.Canvas, at vg.Point)
}

// flowKey lays the items out left to right in lines no wider than w.
func flowKey(items []keyItem, w vg.Length) [][]keyItem {
	var lines [][]keyItem
	var line []keyItem
	var used vg.Length
	for _, it := range items {
		iw, _ := it.size()
		if len(line) > 0 && used+keyGap+iw > w {
			lines = append(lines, line)
			line, used = nil, 0
		}
		if len(line) > 0 {
			used += keyGap
		}
		line, used = append(line, it), used+iw
	}
	if len(line) > 0 {
		lines = append(lines, line)
	}
	return lines
}

func lineSize(line []keyItem) (w, h vg.Length) {
	for i, it := range line {
		iw, ih := it.size()
		w, h = w+iw, max(h, ih)
		if i > 0 {
			w += keyGap
		}
	}
	return w, h
}

func keyHeight(lines [][]keyItem) vg.Length {
	var h vg.Length
	for i, l := range lines {
		_, lh := lineSize(l)
		h += lh
		if i > 0 {
			h += keyLead
		}
	}
	return h
}

// drawKey draws the lines of the key centred in r, top line first.
func drawKey(c draw.Canvas, lines [][]keyItem, r vg.Rectangle) {
	y := r.Max.Y
	for _, l := range lines {
		lw, lh := lineSize(l)
		x := (r.Min.X+r.Max.X)/2 - lw/2
		y -= lh
		for _, it := range l {
			iw, ih := it.size()
			it.draw(c, vg.Point{X: x, Y: y + (lh-ih)/2})
			x += iw + keyGap
		}
		y -= keyLead
	}
}

// entry is a key line: a thumbnail of how something is drawn and what it
// means.
type entry struct {
	label  string
	thumbs []plot.Thumbnailer
}

const thumbWidth = 20

func (e entry) style() text.Style { return textStyle(sizeKey, Tidewater.Ink) }

func (e entry) size() (w, h vg.Length) {
	sty := e.style()
	return vg.Points(thumbWidth+4) + sty.Width(e.label), max(sty.Height(e.label), vg.Points(10))
}

func (e entry) draw(c draw.Canvas, at vg.Point) {
	_, h := e.size()
	icon := draw.Canvas{Canvas: c.Canvas, Rectangle: vg.Rectangle{Min: at, Max: vg.Point{X: at.X + vg.Points(thumbWidth), Y: at.Y + h}}}
	for _, t := range e.thumbs {
		t.Thumbnail(&icon)
	}
	sty := e.style()
	sty.YAlign = draw.YCenter
	c.FillText(sty, vg.Point{X: at.X + vg.Points(thumbWidth+4), Y: at.Y + h/2}, e.label)
}

// wheel is the key of a circular coordinate: a ring painted with the
// colour of every phase, labelled in turns (0 at the right, increasing
// counter-clockwise), with the coordinate's name beside it.
type wheel struct {
	label  string
	colour func(turns float64) color.RGBA
}

const (
	wheelOuter = 19 // points
	wheelInner = 10
	wheelPad   = 3
)

var wheelTicks = [4]string{"0", "0.25", "0.5", "0.75"}

func (wh wheel) style() text.Style { return textStyle(sizeNote, Tidewater.Ink) }

// parts returns the widths of the left tick label and of the ring with
// its right tick label, and the height of a tick label.
func (wh wheel) parts() (left, ring, th vg.Length) {
	sty := wh.style()
	left = sty.Width(wheelTicks[2]) + vg.Points(wheelPad)
	ring = vg.Points(2*wheelOuter+wheelPad) + sty.Width(wheelTicks[0])
	return left, ring, sty.Height("0")
}

func (wh wheel) size() (w, h vg.Length) {
	left, ring, th := wh.parts()
	lab := textStyle(sizeKey, Tidewater.Ink)
	return left + ring + vg.Points(6) + lab.Width(wh.label), vg.Points(2*wheelOuter+2*wheelPad) + 2*th
}

func (wh wheel) draw(c draw.Canvas, at vg.Point) {
	left, ring, _ := wh.parts()
	_, h := wh.size()
	ctr := vg.Point{X: at.X + left + vg.Points(wheelOuter), Y: at.Y + h/2}
	const n = 144
	for k := 0; k < n; k++ {
		a0 := 2 * math.Pi * float64(k) / n
		a1 := 2 * math.Pi * (float64(k) + 1.6) / n // overlap: no seams
		var p vg.Path
		pt := func(r, a float64) vg.Point {
			return vg.Point{X: ctr.X + vg.Length(r*math.Cos(a)), Y: ctr.Y + vg.Length(r*math.Sin(a))}
		}
		p.Move(pt(wheelInner, a0))
		p.Line(pt(wheelOuter, a0))
		p.Line(pt(wheelOuter, a1))
		p.Line(pt(wheelInner, a1))
		p.Close()
		c.SetColor(wh.colour((float64(k) + 0.5) / n))
		c.Fill(p)
	}
	sty := wh.style()
	r := vg.Points(wheelOuter + wheelPad)
	for k, s := range wheelTicks {
		st := sty
		var q vg.Point
		switch k {
		case 0:
			st.XAlign, st.YAlign, q = draw.XLeft, draw.YCenter, vg.Point{X: ctr.X + r, Y: ctr.Y}
		case 1:
			st.XAlign, st.YAlign, q = draw.XCenter, draw.YBottom, vg.Point{X: ctr.X, Y: ctr.Y + r}
		case 2:
			st.XAlign, st.YAlign, q = draw.XRight, draw.YCenter, vg.Point{X: ctr.X - r, Y: ctr.Y}
		case 3:
			st.XAlign, st.YAlign, q = draw.XCenter, draw.YTop, vg.Point{X: ctr.X, Y: ctr.Y - r}
		}
		c.FillText(st, q, s)
	}
	lab := textStyle(sizeKey, Tidewater.Ink)
	lab.YAlign = draw.YCenter
	c.FillText(lab, vg.Point{X: at.X + left + ring + vg.Points(6), Y: ctr.Y}, wh.label)
}
