package picture

import (
	"image/color"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Tidewater is the house palette every figure draws from: six colours
// chosen to stay apart in lightness as well as hue, so that they remain
// distinct under the common colour-vision deficiencies (red–green and
// blue–yellow) and in greyscale print. Ink is for text, axes and
// reference lines. The HTML report uses the same colours.
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

// The Tidewater text sizes, in points. A figure is 6 inches wide at 150
// dpi; shown 800 pixels wide, a point is 1.8 pixels, so the smallest text
// (tick labels, 8 pt) stands about 14 pixels tall.
const (
	sizeTitle = 11
	sizePanel = 9.5
	sizeAxis  = 9
	sizeTick  = 8
	sizeKey   = 8.5
	sizeNote  = 8
)

// houseFont is the one face of every text: Liberation Sans, the
// sans-serif family of the font collection the plotting library embeds.
func houseFont(size vg.Length) font.Font {
	return font.Font{Typeface: "Liberation", Variant: "Sans", Size: size}
}

// textStyle is a house text style of the given size and colour.
func textStyle(size vg.Length, c color.Color) text.Style {
	return text.Style{Color: c, Font: houseFont(size), Handler: plot.DefaultTextHandler}
}

// Mark is how one homology dimension is drawn in barcodes and persistence
// diagrams: its colour and its glyph.
type Mark struct {
	Colour color.RGBA
	Shape  draw.GlyphDrawer
	// Name is the glyph's name, for captions and the key.
	Name string
}

// TidewaterMarks are the marks of the homology dimensions in every
// barcode and persistence diagram: H0 blue squares, H1 rust diamonds, H2
// pine hexagons, higher dimensions plum squares set on a corner… each a
// filled shape of its own colour, so that a dimension reads from its
// colour and, in greyscale, from its outline.
func TidewaterMarks(d int) Mark {
	switch d {
	case 0:
		return Mark{Tidewater.Blue, draw.BoxGlyph{}, "square"}
	case 1:
		return Mark{Tidewater.Rust, diamondGlyph{}, "diamond"}
	case 2:
		return Mark{Tidewater.Pine, hexagonGlyph{}, "hexagon"}
	}
	return Mark{Tidewater.Plum, diamondGlyph{}, "diamond"}
}

// diamondGlyph is a filled square standing on a corner.
type diamondGlyph struct{}

// DrawGlyph implements draw.GlyphDrawer.
func (diamondGlyph) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	fillPolygon(c, sty, pt, 4, math.Pi/2, 1.3)
}

// hexagonGlyph is a filled regular hexagon with a flat top.
type hexagonGlyph struct{}

// DrawGlyph implements draw.GlyphDrawer.
func (hexagonGlyph) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	fillPolygon(c, sty, pt, 6, 0, 1.1)
}

// fillPolygon fills the regular n-gon about pt with its first corner at
// angle a0 and its corners at scale × the glyph radius.
func fillPolygon(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point, n int, a0, scale float64) {
	c.SetColor(sty.Color)
	r := float64(sty.Radius) * scale
	var p vg.Path
	for k := 0; k < n; k++ {
		a := a0 + 2*math.Pi*float64(k)/float64(n)
		q := vg.Point{X: pt.X + vg.Length(r*math.Cos(a)), Y: pt.Y + vg.Length(r*math.Sin(a))}
		if k == 0 {
			p.Move(q)
		} else {
			p.Line(q)
		}
	}
	p.Close()
	c.Fill(p)
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

// dashed is the dash pattern of reference lines.
var dashed = []vg.Length{vg.Points(4), vg.Points(2.5)}

// newPanel returns an empty panel in the house style. Panels never carry
// a legend of their own: what a mark means goes in the picture's key.
func newPanel(title, x, y string) *plot.Plot {
	p := plot.New()
	p.Title.Text = title
	p.Title.TextStyle = textStyle(sizePanel, Tidewater.Ink)
	p.Title.TextStyle.XAlign, p.Title.TextStyle.YAlign = draw.XCenter, draw.YTop
	p.Title.Padding = vg.Points(4)
	for _, a := range []*plot.Axis{&p.X, &p.Y} {
		rot := a.Label.TextStyle.Rotation
		a.Label.TextStyle = textStyle(sizeAxis, Tidewater.Ink)
		a.Label.TextStyle.Rotation = rot
		a.Label.TextStyle.XAlign, a.Label.TextStyle.YAlign = draw.XCenter, draw.YBottom
		xa, ya := a.Tick.Label.XAlign, a.Tick.Label.YAlign
		a.Tick.Label = textStyle(sizeTick, Tidewater.Ink)
		a.Tick.Label.XAlign, a.Tick.Label.YAlign = xa, ya
		a.LineStyle.Color = Tidewater.Ink
		a.Tick.LineStyle.Color = Tidewater.Ink
		a.Tick.Length = vg.Points(5)
	}
	p.X.Label.Text, p.Y.Label.Text = x, y
	p.Legend.TextStyle = textStyle(sizeKey, Tidewater.Ink)
	return p
}

// thinRing is an open circle drawn with a hairline, for marks that sit
// over coloured points without hiding them.
type thinRing struct{}

// DrawGlyph implements draw.GlyphDrawer.
func (thinRing) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	c.SetLineStyle(draw.LineStyle{Color: sty.Color, Width: vg.Points(0.45)})
	var p vg.Path
	p.Move(vg.Point{X: pt.X + sty.Radius, Y: pt.Y})
	p.Arc(pt, sty.Radius, 0, 2*math.Pi)
	p.Close()
	c.Stroke(p)
}
