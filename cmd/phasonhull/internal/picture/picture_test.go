package picture

import (
	"bytes"
	"image"
	"image/png"
	"math"
	"strings"
	"sync"
	"testing"

	"gonum.org/v1/plot"

	"phasonhull/pattern"
	"phasonhull/pattern/design"
	"phasonhull/topology/hull"
)

const demo = "../../../../testdata/demo/lw0412_cmm.csv"

var (
	demoOnce sync.Once
	demoRes  [2]*hull.Result
	demoErr  error
)

// demoResults analyses the demo sample twice with the same seed.
func demoResults(t testing.TB) [2]*hull.Result {
	t.Helper()
	demoOnce.Do(func() {
		for i := range demoRes {
			p, err := pattern.ReadFile(demo, pattern.ReadOptions{})
			if err != nil {
				demoErr = err
				return
			}
			if demoRes[i], err = hull.Analyze(p, hull.Options{Seed: 7}); err != nil {
				demoErr = err
				return
			}
		}
	})
	if demoErr != nil {
		t.Fatal(demoErr)
	}
	return demoRes
}

// auditOf builds the audit figure's input from a result's own-hull
// residuals, flagging sites beyond four robust sigmas.
func auditOf(r *hull.Result, positions []float64) AuditSites {
	a := AuditSites{Source: r.Source, Unit: r.Unit, Verdict: "pass"}
	var abs []float64
	for i, x := range r.SiteResiduals {
		if math.IsNaN(x) {
			a.Extra = append(a.Extra, positions[i])
			continue
		}
		a.Position = append(a.Position, positions[i])
		a.Residual = append(a.Residual, x)
		abs = append(abs, math.Abs(x))
	}
	// 1.4826 × median absolute deviation: the normal-consistent robust
	// sigma (common practice).
	med := median(abs)
	a.OutlierThreshold = 4 * 1.4826 * med
	a.Tolerance = 6 * 1.4826 * med
	for _, x := range a.Residual {
		a.Flagged = append(a.Flagged, math.Abs(x) > a.OutlierThreshold)
	}
	a.Missing = []float64{positions[len(positions)/2] + 0.5*r.MeanSpacing}
	return a
}

func median(v []float64) float64 {
	s := append([]float64(nil), v...)
	for i := 1; i < len(s); i++ {
		for j := i; j > 0 && s[j] < s[j-1]; j-- {
			s[j], s[j-1] = s[j-1], s[j]
		}
	}
	return s[len(s)/2]
}

// demoPictures draws every figure of result r.
func demoPictures(t *testing.T, r *hull.Result) []*Picture {
	t.Helper()
	pics, err := Analysis(r)
	if err != nil {
		t.Fatal(err)
	}
	p, err := pattern.ReadFile(demo, pattern.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	au, err := Audit(auditOf(r, p.Positions))
	if err != nil {
		t.Fatal(err)
	}
	return append(pics, au)
}

// luminanceVariance is the variance of the grey level over all pixels.
func luminanceVariance(img image.Image) float64 {
	b := img.Bounds()
	var s, s2, n float64
	for y := b.Min.Y; y < b.Max.Y; y++ {
		for x := b.Min.X; x < b.Max.X; x++ {
			r, g, bl, _ := img.At(x, y).RGBA()
			l := (0.299*float64(r) + 0.587*float64(g) + 0.114*float64(bl)) / 65535
			s += l
			s2 += l * l
			n++
		}
	}
	m := s / n
	return s2/n - m*m
}

func TestDemoPictures(t *testing.T) {
	res := demoResults(t)
	if res[0].Hull.Class != hull.Circle {
		t.Logf("demo hull is %s; the angle figure needs a circle", res[0].Hull.Class)
	}
	first, second := demoPictures(t, res[0]), demoPictures(t, res[1])
	names := map[string]bool{}
	for i, pic := range first {
		names[pic.Name] = true
		a, err := pic.Bytes(PNG)
		if err != nil {
			t.Fatal(err)
		}
		b, err := second[i].Bytes(PNG)
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(a, b) {
			t.Errorf("%s: two analyses with the same seed drew different PNGs", pic.Name)
		}
		img, err := png.Decode(bytes.NewReader(a))
		if err != nil {
			t.Fatalf("%s: %v", pic.Name, err)
		}
		w, h := pic.Pixels()
		if got := img.Bounds().Size(); got.X != w || got.Y != h {
			t.Errorf("%s: %v pixels, want %dx%d", pic.Name, got, w, h)
		}
		if w < 6*DPI {
			t.Errorf("%s: %d pixels wide, want at least 6 in at %d dpi", pic.Name, w, DPI)
		}
		// Not blank: at least twice the variance of the same page with
		// axes and text but no data.
		if v, e := luminanceVariance(img), emptyVariance(t, pic); v < 2*e {
			t.Errorf("%s: luminance variance %.4g, empty page %.4g: looks blank", pic.Name, v, e)
		} else {
			t.Logf("%s: luminance variance %.4g, empty page %.4g", pic.Name, v, e)
		}
		svg, err := pic.Bytes(SVG)
		if err != nil {
			t.Fatal(err)
		}
		if !strings.Contains(string(svg[:min(len(svg), 400)]), "<svg") {
			t.Errorf("%s: SVG output does not start an <svg> element", pic.Name)
		}
	}
	for _, want := range []string{"hull-projections", "persistence", "audit"} {
		if !names[want] {
			t.Errorf("no %s picture for the demo", want)
		}
	}
	if res[0].Hull.Class == hull.Circle && !names["angle"] {
		t.Error("no angle picture for a circle")
	}
}

// TestLiftClosedForm checks the unwrapping on an exact rotation φ_i =
// frac(c + θ·i) with a gap in the rows: the lift is a straight line of
// slope θ (folded into [−½, ½)), with zero residual.
func TestLiftClosedForm(t *testing.T) {
	for _, theta := range []float64{0.3183, 0.7071, -0.2, 0.05} {
		var rows []int
		var phi []float64
		for i := 0; i < 300; i++ {
			if i >= 100 && i < 104 { // four vectors left out
				continue
			}
			x := 0.37 + theta*float64(i)
			rows, phi = append(rows, i), append(phi, x-math.Floor(x))
		}
		l, err := LiftCoordinate(rows, phi)
		if err != nil {
			t.Fatal(err)
		}
		want := wrap(theta)
		if math.Abs(l.Slope-want) > 1e-9 {
			t.Errorf("θ = %g: slope %.12f, want %.12f", theta, l.Slope, want)
		}
		for i := range l.Site {
			if r := l.Turns[i] - l.Fit[i]; math.Abs(r) > 1e-9 {
				t.Fatalf("θ = %g: residual %g at site %g", theta, r, l.Site[i])
			}
		}
	}
}

func TestCyclicClosesTheLoop(t *testing.T) {
	if cyclic(0) != cyclic(1) || cyclic(0.25) != cyclic(1.25) {
		t.Error("the circular colour map is not periodic in turns")
	}
	if cyclic(0) == cyclic(0.5) {
		t.Error("opposite phases get the same colour")
	}
}

func TestParseFormat(t *testing.T) {
	for _, s := range []string{"png", "svg"} {
		if f, err := ParseFormat(s); err != nil || string(f) != s {
			t.Errorf("ParseFormat(%q) = %q, %v", s, f, err)
		}
	}
	if _, err := ParseFormat("gif"); err == nil {
		t.Error("ParseFormat accepted gif")
	}
}

// TestSpectrumPicture draws the almost-Mathieu chain at the golden mean
// (on-site 2λ·cos 2π(nθ + φ), λ = 1): its two widest gaps carry the labels
// (1, −1) and (−1, 2) — IDS 1 − θ ≈ 0.382 and 2θ − 1 ≈ 0.236 (closed form
// of the gap-labelling theorem for Z + Zθ).
func TestSpectrumPicture(t *testing.T) {
	res, _ := mathieu(t)
	labelled := 0
	for _, g := range res.Gaps {
		if g.Label != nil {
			labelled++
		}
	}
	if labelled < 2 {
		t.Fatalf("%d labelled gaps, want the two widest at least", labelled)
	}
	pic, err := Spectrum(res, "almost-Mathieu chain", "energy (units of the hopping)")
	if err != nil {
		t.Fatal(err)
	}
	a, err := pic.Bytes(PNG)
	if err != nil {
		t.Fatal(err)
	}
	b, _ := pic.Bytes(PNG)
	if !bytes.Equal(a, b) {
		t.Error("the spectrum picture is not deterministic")
	}
	img, err := png.Decode(bytes.NewReader(a))
	if err != nil {
		t.Fatal(err)
	}
	if w, h := pic.Pixels(); img.Bounds().Dx() != w || img.Bounds().Dy() != h {
		t.Errorf("%v pixels, want %dx%d", img.Bounds().Size(), w, h)
	}
	if v, e := luminanceVariance(img), emptyVariance(t, pic); v < 2*e {
		t.Errorf("luminance variance %.4g, empty page %.4g: looks blank", v, e)
	} else {
		t.Logf("luminance variance %.4g, empty page %.4g", v, e)
	}
	res.Values = nil
	if _, err := Spectrum(res, "counted", "energy"); err == nil {
		t.Error("a spectrum without levels was drawn")
	}
}

// emptyVariance is the luminance variance of a page of the same size and
// title with one empty panel: axes and text only, no data.
func emptyVariance(t *testing.T, like *Picture) float64 {
	t.Helper()
	e := &Picture{Name: "empty", Width: like.Width, Height: like.Height, title: like.title,
		panels: [][]*plot.Plot{{newPanel("", "x", "y")}}}
	b, err := e.Bytes(PNG)
	if err != nil {
		t.Fatal(err)
	}
	img, err := png.Decode(bytes.NewReader(b))
	if err != nil {
		t.Fatal(err)
	}
	return luminanceVariance(img)
}

// TestTorusPictures: a two-angle chain gets a second grid of projections
// (coloured by its second circular coordinate) and two angle panels.
func TestTorusPictures(t *testing.T) {
	if testing.Short() {
		t.Skip("analyses 1500 sites")
	}
	s := design.NewSpec("two-angle")
	s.Sites, s.Theta, s.Amp, s.Theta2, s.Amp2 = 1500, 0.309, 0.1, 0.2071, 0.08
	p, err := design.Generate(s)
	if err != nil {
		t.Fatal(err)
	}
	r, err := hull.Analyze(p, hull.Options{Seed: 3})
	if err != nil {
		t.Fatal(err)
	}
	if r.Hull.Class != hull.Torus || len(r.Trace.Coordinates) != 2 {
		t.Fatalf("the analysis found %s %v with %d coordinates, want a torus with 2 (%s)", r.Hull.Class, r.Hull.Betti, len(r.Trace.Coordinates), r.Hull.Reason)
	}
	pj, err := Projections(r)
	if err != nil {
		t.Fatal(err)
	}
	circle, err := Projections(demoResults(t)[0])
	if err != nil {
		t.Fatal(err)
	}
	if len(pj.panels) != 2*len(circle.panels) {
		t.Errorf("torus projections: %d rows of panels, want twice the circle's %d", len(pj.panels), len(circle.panels))
	}
	an, err := Angle(r)
	if err != nil {
		t.Fatal(err)
	}
	if len(an.panels) != 2 || len(an.panels[0]) != 2 {
		t.Errorf("torus angle figure: %d×%d panels, want 2×2", len(an.panels), len(an.panels[0]))
	}
	b, err := pj.Bytes(PNG)
	if err != nil {
		t.Fatal(err)
	}
	img, err := png.Decode(bytes.NewReader(b))
	if err != nil {
		t.Fatal(err)
	}
	if w, h := pj.Pixels(); img.Bounds().Dx() != w || img.Bounds().Dy() != h {
		t.Errorf("%v pixels, want %dx%d", img.Bounds().Size(), w, h)
	}
}
