// Package picture draws the figures of a hull analysis and of an audit:
// projections of the delay cloud, barcodes and persistence diagrams, the
// lifted circular coordinate against site index, and residuals along the
// chain. It is presentation only: every number it draws was computed by
// the analysis packages.
package picture

import (
	"bytes"
	"fmt"
	"image/color"
	"io"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"
)

// Tidewater is the palette every figure draws from: six colours chosen to
// stay apart in lightness as well as hue, so that they remain distinct
// under the common colour-vision deficiencies (red–green and blue–yellow)
// and in greyscale print. Ink is for text, axes and reference lines.
var Tidewater = struct {
	Ink, Blue, Amber, Sky, Rust, Pine, Plum color.RGBA
}{
	Ink:   color.RGBA{0x22, 0x22, 0x28, 0xff},
	Blue:  color.RGBA{0x1d, 0x4f, 0x91, 0xff},
	Amber: color.RGBA{0xe3, 0x9b, 0x24, 0xff},
	Sky:   color.RGBA{0x62, 0xb6, 0xde, 0xff},
	Rust:  color.RGBA{0xb8, 0x3f, 0x1c, 0xff},
	Pine:  color.RGBA{0x1f, 0x8a, 0x6d, 0xff},
	Plum:  color.RGBA{0xa0, 0x4e, 0x96, 0xff},
}

// dimColour is the colour of homology dimension d in barcodes and diagrams.
func dimColour(d int) color.RGBA {
	switch d {
	case 0:
		return Tidewater.Ink
	case 1:
		return Tidewater.Blue
	case 2:
		return Tidewater.Amber
	}
	return Tidewater.Plum
}

// cyclicStops is the closed loop of palette colours the circular
// coordinate is painted with: turn 0 and turn 1 get the same colour.
var cyclicStops = []color.RGBA{Tidewater.Blue, Tidewater.Sky, Tidewater.Pine, Tidewater.Amber, Tidewater.Rust, Tidewater.Plum}

// cyclic maps a circular coordinate in turns to a colour of the loop,
// interpolating linearly in RGB between neighbouring stops.
func cyclic(turns float64) color.RGBA {
	t := turns - math.Floor(turns)
	n := float64(len(cyclicStops))
	k := int(t * n)
	f := t*n - float64(k)
	a, b := cyclicStops[k%len(cyclicStops)], cyclicStops[(k+1)%len(cyclicStops)]
	mix := func(x, y uint8) uint8 { return uint8(math.Round(float64(x)*(1-f) + float64(y)*f)) }
	return color.RGBA{mix(a.R, b.R), mix(a.G, b.G), mix(a.B, b.B), 0xff}
}

// faded returns c with its alpha scaled to a (0..1), premultiplied.
func faded(c color.RGBA, a float64) color.RGBA {
	m := func(x uint8) uint8 { return uint8(math.Round(float64(x) * a)) }
	return color.RGBA{m(c.R), m(c.G), m(c.B), m(c.A)}
}

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

// Picture is one figure: a grid of panels drawn on one page.
type Picture struct {
	// Name is the file name stem, such as "hull-projections".
	Name string
	// Caption says in one sentence what the figure shows.
	Caption string
	// Width and Height are the page size.
	Width, Height vg.Length

	title  string
	panels [][]*plot.Plot // rows of panels; nil entries are left blank
}

// Pixels returns the size of the PNG encoding in pixels.
func (p *Picture) Pixels() (w, h int) {
	return int(p.Width.Dots(DPI) + 0.5), int(p.Height.Dots(DPI) + 0.5)
}

// Encode writes the picture to w in format f.
func (p *Picture) Encode(w io.Writer, f Format) error {
	var c vg.CanvasWriterTo
	switch f {
	case PNG:
		c = vgimg.PngCanvas{Canvas: vgimg.NewWith(vgimg.UseWH(p.Width, p.Height), vgimg.UseDPI(DPI),
			vgimg.UseBackgroundColor(color.White))}
	case SVG:
		s := vgsvg.New(p.Width, p.Height)
		s.SetColor(color.White)
		s.Fill(rectPath(p.Width, p.Height))
		c = s
	default:
		return fmt.Errorf("picture %s: unknown format %q", p.Name, f)
	}
	dc := draw.New(c)
	if p.title != "" {
		sty := draw.TextStyle{Color: Tidewater.Ink, Font: font.From(plot.DefaultFont, 11), XAlign: draw.XCenter, YAlign: draw.YTop, Handler: plot.DefaultTextHandler}
		dc.FillText(sty, vg.Point{X: dc.Center().X, Y: dc.Max.Y - vg.Points(4)}, p.title)
		dc.Max.Y -= sty.Height(p.title) + vg.Points(8)
	}
	rows, cols := len(p.panels), 0
	for _, r := range p.panels {
		cols = max(cols, len(r))
	}
	grid := make([][]*plot.Plot, rows)
	for i, r := range p.panels {
		grid[i] = make([]*plot.Plot, cols)
		copy(grid[i], r)
	}
	tiles := draw.Tiles{Rows: rows, Cols: cols, PadX: vg.Points(6), PadY: vg.Points(6),
		PadTop: vg.Points(2), PadBottom: vg.Points(2), PadLeft: vg.Points(2), PadRight: vg.Points(6)}
	canvases := plot.Align(grid, tiles, dc)
	for i := range grid {
		for j, pl := range grid[i] {
			if pl != nil {
				pl.Draw(canvases[i][j])
			}
		}
	}
	if _, err := c.WriteTo(w); err != nil {
		return fmt.Errorf("picture %s: %w", p.Name, err)
	}
	return nil
}

// Bytes returns the picture encoded in format f.
func (p *Picture) Bytes(f Format) ([]byte, error) {
	var b bytes.Buffer
	if err := p.Encode(&b, f); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}

func rectPath(w, h vg.Length) vg.Path {
	var r vg.Path
	r.Move(vg.Point{})
	r.Line(vg.Point{X: w})
	r.Line(vg.Point{X: w, Y: h})
	r.Line(vg.Point{Y: h})
	r.Close()
	return r
}

// newPanel returns an empty panel in the house style.
func newPanel(title, x, y string) *plot.Plot {
	p := plot.New()
	p.Title.Text = title
	p.Title.TextStyle.Font.Size = 9
	p.Title.TextStyle.Color = Tidewater.Ink
	for _, a := range []*plot.Axis{&p.X, &p.Y} {
		a.Label.TextStyle.Font.Size = 8
		a.Label.TextStyle.Color = Tidewater.Ink
		a.Tick.Label.Font.Size = 7
		a.Tick.Label.Color = Tidewater.Ink
		a.LineStyle.Color = Tidewater.Ink
		a.Tick.LineStyle.Color = Tidewater.Ink
	}
	p.X.Label.Text, p.Y.Label.Text = x, y
	p.Legend.TextStyle.Font.Size = 7
	p.Legend.Top = true
	return p
}
