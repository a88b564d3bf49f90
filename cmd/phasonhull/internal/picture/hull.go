package picture

import (
	"errors"
	"fmt"
	"path/filepath"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"phasonhull/topology/hull"
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

// landmarkGlyph rings the landmarks in the projections.
var landmarkGlyph = draw.GlyphStyle{Color: faded(Tidewater.Ink, 0.55), Radius: vg.Points(2.6), Shape: thinRing{}}

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
			return draw.GlyphStyle{Color: c, Radius: vg.Points(1.7), Shape: draw.CircleGlyph{}}
		}
		var row []*plot.Plot
		for _, pr := range pairs {
			xl := fmt.Sprintf("component %d", pr[0]+1)
			yl := fmt.Sprintf("component %d", pr[1]+1)
			if pr[1] < 0 {
				xl, yl = "vector index", "component 1"
			}
			title := ""
			if len(tr.Coordinates) > 1 {
				title = fmt.Sprintf("colour: φ%d", k+1)
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
				ls.GlyphStyle = landmarkGlyph
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
	var key []keyItem
	for k := range tr.Coordinates {
		key = append(key, wheel{label: fmt.Sprintf("colour: circular coordinate φ%d (turns)", k+1), colour: cyclic})
	}
	if len(tr.Coordinates) == 0 {
		dot := &plotter.Scatter{GlyphStyle: draw.GlyphStyle{Color: Tidewater.Blue, Radius: vg.Points(1.6), Shape: draw.CircleGlyph{}}}
		key = append(key, entry{label: "delay vector (no circular coordinate)", thumbs: []plot.Thumbnailer{dot}})
	}
	if len(tr.Landmarks) > 0 {
		key = append(key, entry{label: fmt.Sprintf("landmark (%d)", len(tr.Landmarks)), thumbs: []plot.Thumbnailer{&plotter.Scatter{GlyphStyle: landmarkGlyph}}})
	}
	h := vg.Length(len(rows)) * 2.2 * vg.Inch
	pic := &Picture{
		Name:   "hull-projections",
		Width:  6 * vg.Inch,
		Height: max(h, 2.6*vg.Inch) + 1.3*vg.Inch,
		title:  projectionsTitle(r),
		panels: rows,
		key:    key,
		Caption: "Pairwise projections of the first whitened delay components; colour is the circular coordinate, keyed by the colour wheel " +
			"(a closed loop of colours: a hull that is a circle shows the colours in order around it), rings mark the landmarks.",
	}
	return pic, nil
}

// projectionsTitle names the cloud drawn: delay vectors of a chain, patch
// vectors of a plate.
func projectionsTitle(r *hull.Result) string {
	w := r.Embedding.Window
	if r.Dimension == 2 {
		return fmt.Sprintf("%s — %s hull: %d patches of %d×%d lattice steps, axes in whitened units",
			filepath.Base(r.Source), r.Hull.Class, len(r.Trace.Cloud), w, w)
	}
	return fmt.Sprintf("%s — %s hull: %d delay vectors, window %d, axes in whitened units",
		filepath.Base(r.Source), r.Hull.Class, len(r.Trace.Cloud), w)
}
