package picture

import (
	"bytes"
	"fmt"
	"image"
	"image/color"
	"image/png"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/vgimg"

	"phasonhull/pattern"
	"phasonhull/topology/spectrum"
)

// recorder is a canvas that remembers where every string was drawn, on
// the page, after every transform, and in which face.
type recorder struct {
	vg.CanvasSizer
	m     [6]float64 // x' = m0 x + m2 y + m4, y' = m1 x + m3 y + m5
	stack [][6]float64
	texts []drawnText
}

type drawnText struct {
	s    string
	face string
	box  vg.Rectangle
}

func newRecorder(w, h vg.Length) *recorder {
	return &recorder{CanvasSizer: vgimg.New(w, h), m: [6]float64{1, 0, 0, 1, 0, 0}}
}

func (r *recorder) Push() { r.stack = append(r.stack, r.m); r.CanvasSizer.Push() }
func (r *recorder) Pop() {
	r.m, r.stack = r.stack[len(r.stack)-1], r.stack[:len(r.stack)-1]
	r.CanvasSizer.Pop()
}
func (r *recorder) Translate(p vg.Point) {
	x, y := float64(p.X), float64(p.Y)
	r.m[4] += r.m[0]*x + r.m[2]*y
	r.m[5] += r.m[1]*x + r.m[3]*y
	r.CanvasSizer.Translate(p)
}
func (r *recorder) Rotate(a float64) {
	s, c := math.Sincos(a)
	m := r.m
	r.m[0], r.m[1] = m[0]*c+m[2]*s, m[1]*c+m[3]*s
	r.m[2], r.m[3] = -m[0]*s+m[2]*c, -m[1]*s+m[3]*c
	r.CanvasSizer.Rotate(a)
}
func (r *recorder) Scale(x, y float64) {
	r.m[0], r.m[1], r.m[2], r.m[3] = r.m[0]*x, r.m[1]*x, r.m[2]*y, r.m[3]*y
	r.CanvasSizer.Scale(x, y)
}
func (r *recorder) apply(x, y vg.Length) vg.Point {
	return vg.Point{X: vg.Length(r.m[0]*float64(x) + r.m[2]*float64(y) + r.m[4]), Y: vg.Length(r.m[1]*float64(x) + r.m[3]*float64(y) + r.m[5])}
}
func (r *recorder) FillString(f font.Face, pt vg.Point, s string) {
	e := f.Extents()
	w := f.Width(s)
	box := vg.Rectangle{Min: vg.Point{X: vg.Length(math.Inf(1)), Y: vg.Length(math.Inf(1))}, Max: vg.Point{X: vg.Length(math.Inf(-1)), Y: vg.Length(math.Inf(-1))}}
	for _, c := range [4]vg.Point{{X: pt.X, Y: pt.Y - e.Descent}, {X: pt.X + w, Y: pt.Y - e.Descent}, {X: pt.X, Y: pt.Y + e.Ascent}, {X: pt.X + w, Y: pt.Y + e.Ascent}} {
		q := r.apply(c.X, c.Y)
		box.Min.X, box.Min.Y = min(box.Min.X, q.X), min(box.Min.Y, q.Y)
		box.Max.X, box.Max.Y = max(box.Max.X, q.X), max(box.Max.Y, q.Y)
	}
	r.texts = append(r.texts, drawnText{s: s, face: f.Name(), box: box})
	r.CanvasSizer.FillString(f, pt, s)
}

// allFigures draws every kind of figure: the demo's analysis and audit,
// the almost-Mathieu spectrum, an edge-mode flow and a θ scan.
func allFigures(t *testing.T) []*Picture {
	t.Helper()
	pics := demoPictures(t, demoResults(t)[0])
	res, _ := mathieu(t)
	sp, err := Spectrum(res, "almost-Mathieu chain", "energy (units of the hopping)")
	if err != nil {
		t.Fatal(err)
	}
	pics = append(pics, sp)
	// An edge-mode flow drawn from its closed form: one state per end
	// crossing each of two gaps once per turn, in opposite directions.
	er := &spectrum.EdgeResult{Start: res}
	for k, g := range res.Gaps[:2] {
		er.Gaps = append(er.Gaps, spectrum.EdgeGap{Gap: g, First: 1, Last: -1})
		for i := 0; i < 100; i++ {
			ph := float64(i) / 100
			er.Flow = append(er.Flow,
				spectrum.FlowPoint{Phase: ph, Level: g.Lower + ph*(g.Upper-g.Lower), Gap: k, End: 0},
				spectrum.FlowPoint{Phase: ph, Level: g.Upper - ph*(g.Upper-g.Lower), Gap: k, End: 1})
		}
	}
	ef, err := EdgeFlow(er, "almost-Mathieu chain", "energy")
	if err != nil {
		t.Fatal(err)
	}
	var thetas []float64
	var values [][]float64
	for i := 0; i <= 20; i++ {
		var v []float64
		for k := i % 10; k < len(res.Values); k += 10 {
			v = append(v, res.Values[k])
		}
		thetas, values = append(thetas, float64(i)/20), append(values, v)
	}
	ts, err := ThetaScan(thetas, values, "almost-Mathieu chain", "energy")
	if err != nil {
		t.Fatal(err)
	}
	return append(pics, ef, ts)
}

// mathieu analyses the almost-Mathieu chain at the golden mean (on-site
// 2λ·cos 2π(nθ + φ), λ = 1, 400 sites).
func mathieu(t *testing.T) (*spectrum.Result, float64) {
	t.Helper()
	x := make([]float64, 400)
	for i := range x {
		x[i] = float64(i)
	}
	p, err := pattern.New(x, "", "lattice")
	if err != nil {
		t.Fatal(err)
	}
	theta := (math.Sqrt(5) - 1) / 2
	op, err := spectrum.New(p, spectrum.Model{OnSite: spectrum.OnSite{Lambda: 1, Theta: theta, Phase: 0.1}})
	if err != nil {
		t.Fatal(err)
	}
	res, err := spectrum.Analyze(op, spectrum.Options{Angles: []float64{theta}, MinGap: 0.05, Method: spectrum.Values})
	if err != nil {
		t.Fatal(err)
	}
	return res, theta
}

// TestTextInsideInHouseFace renders every figure on a canvas that records
// each string: every one lies inside the page and is set in the house
// sans-serif face.
func TestTextInsideInHouseFace(t *testing.T) {
	for _, pic := range allFigures(t) {
		rec := newRecorder(pic.Width, pic.Height)
		pic.render(rec, false)
		if len(rec.texts) == 0 {
			t.Errorf("%s: no text drawn", pic.Name)
		}
		page := vg.Rectangle{Max: vg.Point{X: pic.Width, Y: pic.Height}}
		for _, tx := range rec.texts {
			if !contains(page, tx.box) {
				t.Errorf("%s: %q at %v leaves the %v page", pic.Name, tx.s, tx.box, page.Max)
			}
			if !strings.Contains(tx.face, "Sans") {
				t.Errorf("%s: %q set in %s, want the house sans-serif", pic.Name, tx.s, tx.face)
			}
		}
	}
}

// TestKeysOutsideTheData renders every figure with its key and bare (no
// key, no panel legend): the pixels that differ all lie in the key strip,
// the key strip meets no panel's data area, and the key drew something.
func TestKeysOutsideTheData(t *testing.T) {
	for _, pic := range allFigures(t) {
		full, lay := rendered(t, pic, false)
		bare, _ := rendered(t, pic, true)
		if len(pic.key) == 0 {
			t.Errorf("%s: no key", pic.Name)
			continue
		}
		for _, d := range lay.data {
			if overlap(d, lay.key) {
				t.Errorf("%s: key %v overlaps the data area %v", pic.Name, lay.key, d)
			}
		}
		// The key strip in pixels, one pixel of antialiasing around it.
		px := func(l vg.Length) float64 { return l.Dots(DPI) }
		h := float64(full.Bounds().Dy())
		kx0, kx1 := px(lay.key.Min.X)-1, px(lay.key.Max.X)+1
		ky0, ky1 := h-px(lay.key.Max.Y)-1, h-px(lay.key.Min.Y)+1
		differ, outside := 0, 0
		b := full.Bounds()
		for y := b.Min.Y; y < b.Max.Y; y++ {
			for x := b.Min.X; x < b.Max.X; x++ {
				if full.At(x, y) == bare.At(x, y) {
					continue
				}
				differ++
				if float64(x) < kx0 || float64(x) > kx1 || float64(y) < ky0 || float64(y) > ky1 {
					outside++
				}
			}
		}
		if differ == 0 {
			t.Errorf("%s: the key drew nothing", pic.Name)
		}
		if outside > 0 {
			t.Errorf("%s: %d of the %d pixels the key and legends drew lie outside the key strip", pic.Name, outside, differ)
		}
	}
}

// rendered draws pic as an image, with or without its keys.
func rendered(t *testing.T, pic *Picture, bare bool) (image.Image, layout) {
	t.Helper()
	c := vgimg.NewWith(vgimg.UseWH(pic.Width, pic.Height), vgimg.UseDPI(DPI), vgimg.UseBackgroundColor(color.White))
	lay := pic.render(c, bare)
	var b bytes.Buffer
	if _, err := (vgimg.PngCanvas{Canvas: c}).WriteTo(&b); err != nil {
		t.Fatal(err)
	}
	img, err := png.Decode(&b)
	if err != nil {
		t.Fatal(err)
	}
	return img, lay
}

// TestGapLabelsClearOfTheStaircase places the gap labels of the
// almost-Mathieu staircase and checks, on a dense sampling of the
// staircase mapped through the panel's own axes, that no label box holds
// a point of it, and that no two labels overlap.
func TestGapLabelsClearOfTheStaircase(t *testing.T) {
	res, _ := mathieu(t)
	n := float64(res.Sites)
	stairs := make(plotter.XYs, 0, 2*len(res.Values))
	for k, e := range res.Values {
		stairs = append(stairs, plotter.XY{X: e, Y: float64(k) / n}, plotter.XY{X: e, Y: float64(k+1) / n})
	}
	p := newPanel("", "energy", "IDS")
	line, _ := plotter.NewLine(stairs)
	p.Add(line)
	labels := gapLabels(res.Gaps, stairs)
	if len(labels.texts) < 2 {
		t.Fatalf("%d labels, want the two widest gaps' at least", len(labels.texts))
	}
	p.Add(labels)
	p.Y.Min, p.Y.Max = 0, 1.08
	pic := &Picture{Name: "staircase", Width: 6 * vg.Inch, Height: 4 * vg.Inch, panels: [][]*plot.Plot{{p}}}
	lay := pic.render(newRecorder(pic.Width, pic.Height), false)
	d := lay.data[0]
	at := func(q plotter.XY) vg.Point {
		return vg.Point{X: d.Min.X + vg.Length(p.X.Norm(q.X))*(d.Max.X-d.Min.X), Y: d.Min.Y + vg.Length(p.Y.Norm(q.Y))*(d.Max.Y-d.Min.Y)}
	}
	for i, r := range labels.placed {
		if !labels.clear[i] {
			t.Errorf("label %q: no clear place found", labels.texts[i])
		}
		for k := 1; k < len(stairs); k++ {
			for s := 0.0; s <= 1; s += 1.0 / 64 {
				q := plotter.XY{X: stairs[k-1].X + s*(stairs[k].X-stairs[k-1].X), Y: stairs[k-1].Y + s*(stairs[k].Y-stairs[k-1].Y)}
				if c := at(q); inside(r, c) {
					t.Fatalf("label %q at %v covers the staircase at %v", labels.texts[i], r, q)
				}
			}
		}
		for j := 0; j < i; j++ {
			if overlap(r, labels.placed[j]) {
				t.Errorf("labels %q and %q overlap", labels.texts[i], labels.texts[j])
			}
		}
	}
}

// TestEssentialClassesDrawn: the demo's essential H0 class is drawn at the
// ∞ column of the barcode and the ∞ row of the diagram, both labelled.
func TestEssentialClassesDrawn(t *testing.T) {
	r := demoResults(t)[0]
	essential := 0
	for _, b := range bars(r) {
		if b.Essential() {
			essential++
		}
	}
	if essential == 0 {
		t.Fatal("the demo's barcode has no essential class")
	}
	pic, err := Persistence(r)
	if err != nil {
		t.Fatal(err)
	}
	rec := newRecorder(pic.Width, pic.Height)
	lay := pic.render(rec, false)
	if len(lay.data) != 2 {
		t.Fatalf("%d panels, want barcode and diagram", len(lay.data))
	}
	var inf []vg.Rectangle
	for _, tx := range rec.texts {
		if tx.s == "∞" {
			inf = append(inf, tx.box)
		}
	}
	if len(inf) != 2 {
		t.Fatalf("%d ∞ tick labels, want one on each panel", len(inf))
	}
	// Compare with the same figure without its essential classes: the
	// pixels at the ∞ column and row must differ.
	with, _ := rendered(t, pic, false)
	saved := r.Trace.Bars
	var finite = saved[:0:0]
	for _, b := range saved {
		if !b.Essential() {
			finite = append(finite, b)
		}
	}
	r.Trace.Bars = finite
	without, err := Persistence(r)
	r.Trace.Bars = saved
	if err != nil {
		t.Fatal(err)
	}
	wo, _ := rendered(t, without, false)
	h := float64(with.Bounds().Dy())
	for k, d := range lay.data {
		changed := 0
		for y := int(h - d.Max.Y.Dots(DPI)); y < int(h-d.Min.Y.Dots(DPI)); y++ {
			for x := int(d.Min.X.Dots(DPI)); x < int(d.Max.X.Dots(DPI)); x++ {
				if with.At(x, y) != wo.At(x, y) {
					changed++
				}
			}
		}
		if changed == 0 {
			t.Errorf("panel %d draws nothing for the essential classes", k)
		}
	}
	if !strings.Contains(pic.Caption, "∞") {
		t.Error("the caption does not say where essential classes are drawn")
	}
}

// TestMarksOfOurOwn: the homology dimensions get distinct colours and
// distinct shapes, and none is the plain dot or triangle.
func TestMarksOfOurOwn(t *testing.T) {
	seen := map[color.RGBA]bool{}
	shapes := map[string]bool{}
	for d := 0; d < 3; d++ {
		m := TidewaterMarks(d)
		if seen[m.Colour] || shapes[m.Name] {
			t.Errorf("H%d repeats a colour or shape: %+v", d, m)
		}
		seen[m.Colour], shapes[m.Name] = true, true
		if n := fmt.Sprintf("%T", m.Shape); strings.Contains(n, "Circle") || strings.Contains(n, "Triangle") || strings.Contains(n, "Pyramid") {
			t.Errorf("H%d drawn as %s", d, n)
		}
	}
}
