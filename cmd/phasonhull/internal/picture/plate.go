package picture

import (
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

	"phasonhull/pattern"
	"phasonhull/pattern/lattice"
	"phasonhull/topology/hull"
)

// Plate is what the figures of a plate draw: its sites, the average
// lattice recovered from them, and the matrix A of the hull's torus
// coordinates (d × 2, turns per lattice step; nil when the hull has none).
type Plate struct {
	Plane    *pattern.Plane
	Lattice  *lattice.Lattice
	Rotation [][]float64
	// Class is the hull class, for the titles.
	Class string
}

// Limits of the plate figures: the sites window drawn (lattice steps per
// side) and the sites the structure factor sums over.
const (
	plateWindow    = 20
	structureSites = 2500
	structureCells = 181 // grid points per side of the structure-factor map
)

// Figures returns the figures of an analysis: of a chain (Analysis) when
// plane is nil, of a plate (PlateAnalysis) on the lattice l (nil for a
// plate with none) otherwise.
func Figures(r *hull.Result, plane *pattern.Plane, l *lattice.Lattice) ([]*Picture, error) {
	if plane == nil {
		return Analysis(r)
	}
	return PlateAnalysis(r, Plate{Plane: plane, Lattice: l, Rotation: r.Rotation, Class: string(r.Hull.Class)})
}

// PlateAnalysis returns every figure of a plate's analysis: the sites
// with their displacements and the structure factor when the plate has a
// lattice, the projections of the patch cloud and its barcodes when the
// analysis built one. It fails only when there is nothing to draw.
func PlateAnalysis(r *hull.Result, p Plate) ([]*Picture, error) {
	var out []*Picture
	if p.Lattice != nil {
		s, err := PlateSites(p)
		if err != nil {
			return nil, err
		}
		f, err := PlateStructure(p)
		if err != nil {
			return nil, err
		}
		out = append(out, s, f)
	}
	if pj, err := Projections(r); err == nil {
		out = append(out, pj)
	}
	if ps, err := Persistence(r); err == nil {
		out = append(out, ps)
	}
	if len(out) == 0 {
		return nil, fmt.Errorf("plate: %w", ErrNoTrace)
	}
	return out, nil
}

// window returns the sites drawn: those whose lattice index lies within
// plateWindow/2 steps of the median index (all of them on a small
// plate), the off-lattice ones inside the same box, and whether the plate
// was cut.
func (p Plate) window() (on, off []int, cut bool) {
	l := p.Lattice
	var n1, n2 []int
	for i, ok := range l.OnLattice {
		if ok {
			n1, n2 = append(n1, l.Index[i][0]), append(n2, l.Index[i][1])
		}
	}
	if len(n1) == 0 {
		return nil, nil, false
	}
	slices.Sort(n1)
	slices.Sort(n2)
	c1, c2 := n1[len(n1)/2], n2[len(n2)/2]
	lo1, lo2 := c1-plateWindow/2, c2-plateWindow/2
	hi1, hi2 := lo1+plateWindow, lo2+plateWindow
	cut = n1[0] < lo1 || n1[len(n1)-1] >= hi1 || n2[0] < lo2 || n2[len(n2)-1] >= hi2
	// The box in real space, for the off-lattice sites.
	recip := l.Reciprocal()
	for i, ok := range l.OnLattice {
		if ok {
			n := l.Index[i]
			if n[0] >= lo1 && n[0] < hi1 && n[1] >= lo2 && n[1] < hi2 {
				on = append(on, i)
			}
			continue
		}
		x := p.Plane.Points[i]
		d := [2]float64{x[0] - l.Origin[0], x[1] - l.Origin[1]}
		t1, t2 := recip[0][0]*d[0]+recip[0][1]*d[1], recip[1][0]*d[0]+recip[1][1]*d[1]
		if t1 >= float64(lo1)-0.5 && t1 < float64(hi1)-0.5 && t2 >= float64(lo2)-0.5 && t2 < float64(hi2)-0.5 {
			off = append(off, i)
		}
	}
	return on, off, cut
}

// torus returns the torus coordinate ψ_k = A_k·n mod 1 of a lattice index
// (its origin ψ0 left out: a shift of every colour by the same turn).
func (p Plate) torus(k int, n [2]int) float64 {
	a := p.Rotation[k]
	v := a[0]*float64(n[0]) + a[1]*float64(n[1])
	return v - math.Floor(v)
}

// arrows draws the displacement of each site as an arrow from its lattice
// point, Scale times its length.
type arrows struct {
	from, by [][2]float64
	scale    float64
	style    draw.LineStyle
}

// Plot implements plot.Plotter.
func (a arrows) Plot(c draw.Canvas, plt *plot.Plot) {
	trX, trY := plt.Transforms(&c)
	c.SetLineStyle(a.style)
	for i, f := range a.from {
		u := a.by[i]
		x0, y0 := trX(f[0]), trY(f[1])
		x1, y1 := trX(f[0]+a.scale*u[0]), trY(f[1]+a.scale*u[1])
		dx, dy := float64(x1-x0), float64(y1-y0)
		l := math.Hypot(dx, dy)
		if l < 0.5 {
			continue
		}
		var path vg.Path
		path.Move(vg.Point{X: x0, Y: y0})
		path.Line(vg.Point{X: x1, Y: y1})
		// A head of two short strokes, 30° off the shaft.
		h := math.Min(2.2, 0.45*l)
		for _, s := range []float64{1, -1} {
			ang := math.Atan2(dy, dx) + math.Pi - s*math.Pi/6
			path.Move(vg.Point{X: x1, Y: y1})
			path.Line(vg.Point{X: x1 + vg.Length(h*math.Cos(ang)), Y: y1 + vg.Length(h*math.Sin(ang))})
		}
		c.Stroke(path)
	}
}

// Thumbnail implements plot.Thumbnailer.
func (a arrows) Thumbnail(c *draw.Canvas) {
	y := (c.Min.Y + c.Max.Y) / 2
	c.SetLineStyle(a.style)
	var path vg.Path
	x0, x1 := c.Min.X+vg.Points(2), c.Max.X-vg.Points(2)
	path.Move(vg.Point{X: x0, Y: y})
	path.Line(vg.Point{X: x1, Y: y})
	for _, s := range []float64{1, -1} {
		path.Move(vg.Point{X: x1, Y: y})
		path.Line(vg.Point{X: x1 - vg.Points(2.2*math.Cos(math.Pi/6)), Y: y + vg.Length(s*2.2*math.Sin(math.Pi/6))})
	}
	c.Stroke(path)
}

// PlateSites draws the sites of a plate (a window of at most 20 × 20
// lattice steps about its middle) at their lattice points, each with an
// arrow to where the site sits — its displacement, scaled so that the
// larger displacements span about half a lattice step, the scale stated —
// and coloured by each torus coordinate A_k·n mod 1 (one panel per row of
// A), so that a hull that is a circle or torus shows its stripes; sites on
// no lattice point are ringed.
func PlateSites(p Plate) (*Picture, error) {
	if p.Plane == nil || p.Lattice == nil {
		return nil, errors.New("plate sites: no lattice to draw on")
	}
	l := p.Lattice
	on, off, cut := p.window()
	if len(on) == 0 {
		return nil, errors.New("plate sites: no site on the lattice")
	}
	step := math.Min(math.Hypot(l.Basis[0][0], l.Basis[0][1]), math.Hypot(l.Basis[1][0], l.Basis[1][1]))
	from := make([][2]float64, len(on))
	by := make([][2]float64, len(on))
	size := make([]float64, len(on))
	for j, i := range on {
		n := l.Index[i]
		from[j] = [2]float64{
			l.Origin[0] + float64(n[0])*l.Basis[0][0] + float64(n[1])*l.Basis[1][0],
			l.Origin[1] + float64(n[0])*l.Basis[0][1] + float64(n[1])*l.Basis[1][1],
		}
		by[j] = l.Displacement[i]
		size[j] = math.Hypot(by[j][0], by[j][1])
	}
	slices.Sort(size)
	big := size[len(size)*95/100]
	scale := 1.0
	if big > 0 {
		scale = niceBelow(0.5 * step / big)
	}
	unit := p.Plane.Unit
	if unit == "" {
		unit = "input units"
	}
	arrowStyle := draw.LineStyle{Color: Tidewater.Ink, Width: vg.Points(0.7)}
	offGlyph := draw.GlyphStyle{Color: Tidewater.Rust, Radius: vg.Points(2.6), Shape: thinRing{}}
	colourings := max(len(p.Rotation), 1)
	var row []*plot.Plot
	for k := range colourings {
		title := "sites at their lattice points"
		if k < len(p.Rotation) {
			title = fmt.Sprintf("colour: ψ%d = A%d·n mod 1", k+1, k+1)
		}
		pl := newPanel(title, "x ("+unit+")", "y ("+unit+")")
		xy := make(plotter.XYs, len(on))
		for j := range on {
			xy[j] = plotter.XY{X: from[j][0], Y: from[j][1]}
		}
		s, err := plotter.NewScatter(xy)
		if err != nil {
			return nil, fmt.Errorf("plate sites: %w", err)
		}
		s.GlyphStyleFunc = func(j int) draw.GlyphStyle {
			c := Tidewater.Blue
			if k < len(p.Rotation) {
				c = cyclic(p.torus(k, l.Index[on[j]]))
			}
			return draw.GlyphStyle{Color: c, Radius: vg.Points(1.5), Shape: draw.CircleGlyph{}}
		}
		pl.Add(s, arrows{from: from, by: by, scale: scale, style: arrowStyle})
		if len(off) > 0 {
			oxy := make(plotter.XYs, len(off))
			for j, i := range off {
				oxy[j] = plotter.XY{X: p.Plane.Points[i][0], Y: p.Plane.Points[i][1]}
			}
			os, err := plotter.NewScatter(oxy)
			if err != nil {
				return nil, fmt.Errorf("plate sites: %w", err)
			}
			os.GlyphStyle = offGlyph
			pl.Add(os)
		}
		equalAspect(pl)
		row = append(row, pl)
	}
	var key []keyItem
	for k := range p.Rotation {
		key = append(key, wheel{label: fmt.Sprintf("colour: torus coordinate ψ%d (turns)", k+1), colour: cyclic})
	}
	if len(p.Rotation) == 0 {
		key = append(key, entry{label: "lattice point with a site", thumbs: []plot.Thumbnailer{&plotter.Scatter{GlyphStyle: draw.GlyphStyle{Color: Tidewater.Blue, Radius: vg.Points(1.5), Shape: draw.CircleGlyph{}}}}})
	}
	key = append(key, entry{label: fmt.Sprintf("displacement u × %s (an arrow of one lattice step is u = %.3g %s)", trimFloat(scale), step/scale, unit),
		thumbs: []plot.Thumbnailer{arrows{style: arrowStyle}}})
	if len(off) > 0 {
		key = append(key, entry{label: fmt.Sprintf("site on no lattice point (%d shown)", len(off)), thumbs: []plot.Thumbnailer{&plotter.Scatter{GlyphStyle: offGlyph}}})
	}
	shown := fmt.Sprintf("%d sites", len(on))
	if cut {
		shown = fmt.Sprintf("the central %d × %d lattice steps, %d of %d sites", plateWindow, plateWindow, len(on), p.Plane.Len())
	}
	width := 6 * vg.Inch
	panel := (width - vg.Points(20)) / vg.Length(len(row))
	return &Picture{
		Name:   "plate-sites",
		Width:  width,
		Height: panel + 1.6*vg.Inch,
		title:  fmt.Sprintf("%s — %s hull: %s, %d lattice points missing", filepath.Base(p.Plane.Source), p.Class, shown, l.Missing),
		panels: [][]*plot.Plot{row},
		key:    key,
		Caption: "Each site drawn at its lattice point n = (n1, n2) of the recovered average lattice, coloured by the torus coordinate ψ = A·n mod 1 " +
			"of the reported matrix A (keyed by the colour wheel; its origin ψ0 is left out, which turns every colour by the same amount), with an arrow " +
			"to where the site sits: its displacement, magnified by the stated factor. On a modulated plate, equal colours carry equal displacements.",
	}, nil
}

// equalAspect widens the shorter axis of pl so that one unit spans the
// same length on both (the panels are square).
func equalAspect(pl *plot.Plot) {
	w, h := pl.X.Max-pl.X.Min, pl.Y.Max-pl.Y.Min
	if w > h {
		c := (pl.Y.Min + pl.Y.Max) / 2
		pl.Y.Min, pl.Y.Max = c-w/2, c+w/2
	} else {
		c := (pl.X.Min + pl.X.Max) / 2
		pl.X.Min, pl.X.Max = c-h/2, c+h/2
	}
}

// niceBelow returns the largest of 1, 2 or 5 times a power of ten that is
// at most x.
func niceBelow(x float64) float64 {
	e := math.Pow(10, math.Floor(math.Log10(x)))
	for _, m := range []float64{5, 2, 1} {
		if m*e <= x {
			return m * e
		}
	}
	return e
}

func trimFloat(x float64) string { return fmt.Sprintf("%g", x) }

// grid is a structure-factor map on a square grid of reduced wave vectors
// (h, k), k = h·b1 + k·b2.
type grid struct {
	lo, step float64
	n        int
	v        []float64 // log10 S, row k, column h
}

func (g grid) Dims() (c, r int)   { return g.n, g.n }
func (g grid) Z(c, r int) float64 { return g.v[r*g.n+c] }
func (g grid) X(c int) float64    { return g.lo + float64(c)*g.step }
func (g grid) Y(r int) float64    { return g.lo + float64(r)*g.step }

// ramp is the sequential palette of the structure factor: white through
// sky and blue to ink.
type ramp struct{}

var rampStops = []color.RGBA{{0xff, 0xff, 0xff, 0xff}, Tidewater.Sky, Tidewater.Blue, Tidewater.Ink}

func rampAt(t float64) color.RGBA {
	t = math.Max(0, math.Min(1, t))
	n := float64(len(rampStops) - 1)
	k := min(int(t*n), len(rampStops)-2)
	f := t*n - float64(k)
	a, b := rampStops[k], rampStops[k+1]
	mix := func(x, y uint8) uint8 { return uint8(math.Round(float64(x)*(1-f) + float64(y)*f)) }
	return color.RGBA{mix(a.R, b.R), mix(a.G, b.G), mix(a.B, b.B), 0xff}
}

// Colors implements palette.Palette.
func (ramp) Colors() []color.Color {
	out := make([]color.Color, 64)
	for i := range out {
		out[i] = rampAt(float64(i) / 63)
	}
	return out
}

// bar is the key of the ramp: a strip of its colours between two labels.
type bar struct{ lo, hi, label string }

func (b bar) size() (w, h vg.Length) {
	sty := textStyle(sizeKey, Tidewater.Ink)
	return sty.Width(b.lo) + sty.Width(b.hi) + sty.Width(b.label) + vg.Points(80+12), max(sty.Height(b.label), vg.Points(10))
}

func (b bar) draw(c draw.Canvas, at vg.Point) {
	sty := textStyle(sizeKey, Tidewater.Ink)
	sty.YAlign = draw.YCenter
	_, h := b.size()
	y := at.Y + h/2
	c.FillText(sty, vg.Point{X: at.X, Y: y}, b.lo)
	x := at.X + sty.Width(b.lo) + vg.Points(3)
	const n = 40
	for i := range n {
		r := vg.Rectangle{Min: vg.Point{X: x + vg.Points(80*float64(i)/n), Y: y - vg.Points(4)}, Max: vg.Point{X: x + vg.Points(80*float64(i+1)/n+0.5), Y: y + vg.Points(4)}}
		c.SetColor(rampAt((float64(i) + 0.5) / n))
		c.Fill(rectPath(r))
	}
	x += vg.Points(83)
	c.FillText(sty, vg.Point{X: x, Y: y}, b.hi)
	c.FillText(sty, vg.Point{X: x + sty.Width(b.hi) + vg.Points(6), Y: y}, b.label)
}

// PlateStructure draws the structure factor S(k) = |Σ exp(−2πi k·x)|²/N
// of the sites (at most 2500, the central ones) over one reciprocal cell
// and its borders, in the reduced coordinates (h, k) of k = h·b1 + k·b2,
// on a logarithmic scale, with the Bragg peaks of the recovered lattice
// (integer h, k) and the first-order satellites G ± A_j of each torus
// coordinate marked and indexed.
func PlateStructure(p Plate) (*Picture, error) {
	if p.Plane == nil || p.Lattice == nil {
		return nil, errors.New("structure factor: no lattice")
	}
	l := p.Lattice
	pts := centralSites(p.Plane.Points, l.Origin, structureSites)
	b := l.Reciprocal()
	const lo, hi = -0.25, 1.25
	g := grid{lo: lo, step: (hi - lo) / (structureCells - 1), n: structureCells}
	ks := make([][2]float64, 0, g.n*g.n)
	for r := range g.n {
		for c := range g.n {
			h, k := g.X(c), g.Y(r)
			ks = append(ks, [2]float64{h*b[0][0] + k*b[1][0], h*b[0][1] + k*b[1][1]})
		}
	}
	s := lattice.StructureFactor(pts, ks)
	g.v = make([]float64, len(s))
	top := 0.0
	for i, v := range s {
		g.v[i] = math.Log10(math.Max(v, 1e-3))
		top = max(top, g.v[i])
	}
	hm := plotter.NewHeatMap(g, ramp{})
	hm.Min, hm.Max, hm.Rasterized = -1, math.Max(top, 1), true
	hm.Underflow, hm.Overflow = rampAt(0), rampAt(1)
	pl := newPanel("", "h (reciprocal basis b1)", "k (reciprocal basis b2)")
	pl.Add(hm)
	// Bragg peaks and satellites, each ringed and indexed.
	bragg := draw.GlyphStyle{Color: Tidewater.Amber, Radius: vg.Points(5), Shape: thinRing{}}
	sat := draw.GlyphStyle{Color: Tidewater.Rust, Radius: vg.Points(3.5), Shape: thinRing{}}
	var bxy, sxy plotter.XYs
	var labels []string
	var lxy plotter.XYs
	in := func(x, y float64) bool { return x >= lo && x <= hi && y >= lo && y <= hi }
	for h := 0; h <= 1; h++ {
		for k := 0; k <= 1; k++ {
			bxy = append(bxy, plotter.XY{X: float64(h), Y: float64(k)})
			lxy = append(lxy, plotter.XY{X: float64(h), Y: float64(k)})
			labels = append(labels, fmt.Sprintf("(%d,%d)", h, k))
		}
	}
	for j, a := range p.Rotation {
		for _, sg := range []float64{1, -1} {
			// The satellite of G = 0, reduced into the first cell, is
			// indexed; its copies at the other G are ringed.
			x, y := sg*a[0], sg*a[1]
			x, y = x-math.Floor(x-lo), y-math.Floor(y-lo)
			lxy = append(lxy, plotter.XY{X: x, Y: y})
			sign := "+"
			if sg < 0 {
				sign = "−"
			}
			labels = append(labels, fmt.Sprintf("%sA%d", sign, j+1))
			for h := -1; h <= 2; h++ {
				for k := -1; k <= 2; k++ {
					if in(x+float64(h), y+float64(k)) {
						sxy = append(sxy, plotter.XY{X: x + float64(h), Y: y + float64(k)})
					}
				}
			}
		}
	}
	bs, _ := plotter.NewScatter(bxy)
	bs.GlyphStyle = bragg
	pl.Add(bs)
	if len(sxy) > 0 {
		ss, _ := plotter.NewScatter(sxy)
		ss.GlyphStyle = sat
		pl.Add(ss)
	}
	lab, err := plotter.NewLabels(plotter.XYLabels{XYs: lxy, Labels: labels})
	if err != nil {
		return nil, fmt.Errorf("structure factor: %w", err)
	}
	for i := range lab.TextStyle {
		lab.TextStyle[i] = textStyle(sizeNote, Tidewater.Rust)
	}
	lab.Offset = vg.Point{X: vg.Points(5), Y: vg.Points(4)}
	pl.Add(lab)
	pl.X.Min, pl.X.Max, pl.Y.Min, pl.Y.Max = lo, hi, lo, hi
	key := []keyItem{
		bar{lo: "0.1", hi: fmt.Sprintf("%.3g", math.Pow(10, hm.Max)), label: "S(k), logarithmic"},
		entry{label: "Bragg peak G = (h, k)", thumbs: []plot.Thumbnailer{&plotter.Scatter{GlyphStyle: bragg}}},
	}
	if len(p.Rotation) > 0 {
		key = append(key, entry{label: "first-order satellite G ± A_j (row j of A)", thumbs: []plot.Thumbnailer{&plotter.Scatter{GlyphStyle: sat}}})
	}
	return &Picture{
		Name:   "structure-factor",
		Width:  5 * vg.Inch,
		Height: 5.6 * vg.Inch,
		title:  fmt.Sprintf("%s — structure factor of %d sites, one reciprocal cell", filepath.Base(p.Plane.Source), len(pts)),
		panels: [][]*plot.Plot{{pl}},
		key:    key,
		Caption: "S(k) = |Σ exp(−2πi k·x)|²/N of the sites over one cell of the reciprocal lattice of the recovered basis (b_i·a_j = δ_ij), " +
			"on a logarithmic scale: the Bragg peaks of the average lattice sit at integer (h, k); a displacement wave ψ_j = A_j·n puts satellites " +
			"at G ± A_j (and weaker ones at G + Aᵀm for larger m), with weights given by Bessel functions of the amplitude (Jacobi–Anger).",
	}, nil
}

// centralSites returns the at most max points nearest to c (all of them
// when there are fewer), in their order.
func centralSites(pts [][2]float64, c [2]float64, most int) [][2]float64 {
	if len(pts) <= most {
		return pts
	}
	d := make([]float64, len(pts))
	for i, x := range pts {
		d[i] = math.Hypot(x[0]-c[0], x[1]-c[1])
	}
	sorted := slices.Clone(d)
	slices.Sort(sorted)
	cut := sorted[most-1]
	out := make([][2]float64, 0, most)
	for i, x := range pts {
		if d[i] <= cut && len(out) < most {
			out = append(out, x)
		}
	}
	return out
}
