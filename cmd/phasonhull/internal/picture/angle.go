package picture

import (
	"errors"
	"fmt"
	"math"
	"path/filepath"
	"slices"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"phasonhull/topology/hull"
	"phasonhull/topology/notation"
)

// Lift is a circular coordinate unwrapped along the chain, with the
// straight lines fitted to it.
type Lift struct {
	// Site and Turns are the lifted coordinate of each vector against the
	// index of its first spacing.
	Site, Turns []float64
	// Fit is the fitted line at each vector: one common Slope (the step
	// angle in turns per site, unfolded) and one intercept per run of
	// consecutive vectors. A run ends where vectors were left out (a
	// missing or spurious site shifts the phase there).
	Fit   []float64
	Slope float64
	// Runs is the number of runs of consecutive vectors.
	Runs int
}

// wrap returns x folded into [−½, ½).
func wrap(x float64) float64 { return x - math.Floor(x+0.5) }

// LiftCoordinate unwraps the circular coordinate phi (turns, one per
// vector) along the chain. Invariant: between vectors r rows apart the
// lift advances by the predicted r·s plus the wrapped remainder, where s is
// the median wrapped step between neighbouring vectors, so that a gap in
// the rows does not slip a turn. The slope is the least-squares slope
// common to all runs of consecutive vectors, each with its own intercept
// (a defect in a gap shifts the phase by a step; it must not tilt the line).
func LiftCoordinate(rows []int, phi []float64) (Lift, error) {
	n := len(phi)
	if n < 3 || len(rows) != n {
		return Lift{}, errors.New("lifting a circular coordinate: need at least 3 vectors with their rows")
	}
	var steps []float64
	for i := 1; i < n; i++ {
		if rows[i]-rows[i-1] == 1 {
			steps = append(steps, wrap(phi[i]-phi[i-1]))
		}
	}
	if len(steps) == 0 {
		return Lift{}, errors.New("lifting a circular coordinate: no two neighbouring vectors")
	}
	slices.Sort(steps)
	s := steps[len(steps)/2]
	l := Lift{Site: make([]float64, n), Turns: make([]float64, n), Fit: make([]float64, n)}
	l.Site[0], l.Turns[0] = float64(rows[0]), phi[0]
	starts := []int{0}
	for i := 1; i < n; i++ {
		r := float64(rows[i] - rows[i-1])
		pred := l.Turns[i-1] + r*s
		l.Site[i] = float64(rows[i])
		l.Turns[i] = pred + wrap(phi[i]-pred)
		if rows[i]-rows[i-1] != 1 {
			starts = append(starts, i)
		}
	}
	starts = append(starts, n)
	l.Runs = len(starts) - 1
	// Least squares with a common slope: centre each run on its own means.
	mx, my := make([]float64, l.Runs), make([]float64, l.Runs)
	var sxx, sxy float64
	for k := 0; k < l.Runs; k++ {
		a, b := starts[k], starts[k+1]
		for i := a; i < b; i++ {
			mx[k] += l.Site[i]
			my[k] += l.Turns[i]
		}
		mx[k] /= float64(b - a)
		my[k] /= float64(b - a)
		for i := a; i < b; i++ {
			dx := l.Site[i] - mx[k]
			sxx += dx * dx
			sxy += dx * (l.Turns[i] - my[k])
		}
	}
	if sxx == 0 {
		return Lift{}, errors.New("lifting a circular coordinate: no run of two vectors")
	}
	l.Slope = sxy / sxx
	for k := 0; k < l.Runs; k++ {
		for i := starts[k]; i < starts[k+1]; i++ {
			l.Fit[i] = my[k] + l.Slope*(l.Site[i]-mx[k])
		}
	}
	return l, nil
}

// Angle draws, for each circular coordinate of a circle or torus, the
// coordinate lifted along the chain against site index with its fitted
// line (its slope is the step angle before folding), and below it the
// residual from the line.
func Angle(r *hull.Result) (*Picture, error) {
	tr := r.Trace
	if tr == nil || len(tr.Coordinates) == 0 {
		return nil, errors.New("angle: the result has no circular coordinate")
	}
	top := make([]*plot.Plot, 0, len(tr.Coordinates))
	vec := draw.GlyphStyle{Color: Tidewater.Blue, Radius: vg.Points(1.4), Shape: draw.CircleGlyph{}}
	resid := draw.GlyphStyle{Color: Tidewater.Pine, Radius: vg.Points(1.4), Shape: draw.CircleGlyph{}}
	fitStyle := draw.LineStyle{Color: Tidewater.Rust, Width: vg.Points(1.2)}
	runs := 0
	bottom := make([]*plot.Plot, 0, len(tr.Coordinates))
	for k, phi := range tr.Coordinates {
		l, err := LiftCoordinate(tr.Rows, phi)
		if err != nil {
			return nil, fmt.Errorf("angle %d: %w", k+1, err)
		}
		reported := ""
		if k < len(r.Angles) {
			reported = fmt.Sprintf("\nreported θ%d = %s (folded)", k+1, notation.PlusMinus(r.Angles[k], r.AngleUncertainty[k]))
		}
		runs = max(runs, l.Runs)
		p := newPanel(fmt.Sprintf("φ%d lifted: slope %.6f turns/site%s", k+1, l.Slope, reported), "site index", fmt.Sprintf("lifted φ%d (turns)", k+1))
		xy := make(plotter.XYs, len(l.Site))
		res := make(plotter.XYs, len(l.Site))
		for i := range l.Site {
			xy[i] = plotter.XY{X: l.Site[i], Y: l.Turns[i]}
			res[i] = plotter.XY{X: l.Site[i], Y: l.Turns[i] - l.Fit[i]}
		}
		s, err := plotter.NewScatter(xy)
		if err != nil {
			return nil, fmt.Errorf("angle %d: %w", k+1, err)
		}
		s.GlyphStyle = vec
		p.Add(s)
		x0, x1 := l.Site[0], l.Site[len(l.Site)-1]
		for i, j := 0, 0; i < len(l.Site); i = j {
			for j = i + 1; j < len(l.Site) && l.Site[j]-l.Site[j-1] == 1; j++ {
			}
			fit, _ := plotter.NewLine(plotter.XYs{{X: l.Site[i], Y: l.Fit[i]}, {X: l.Site[j-1], Y: l.Fit[j-1]}})
			fit.LineStyle = fitStyle
			p.Add(fit)
		}
		top = append(top, p)

		q := newPanel("residual from the line", "site index", "residual (turns)")
		rs, err := plotter.NewScatter(res)
		if err != nil {
			return nil, fmt.Errorf("angle %d: %w", k+1, err)
		}
		rs.GlyphStyle = resid
		q.Add(rs)
		zero, _ := plotter.NewLine(plotter.XYs{{X: x0, Y: 0}, {X: x1, Y: 0}})
		zero.Color, zero.Width = Tidewater.Ink, vg.Points(0.6)
		q.Add(zero)
		bottom = append(bottom, q)
	}
	return &Picture{
		Name:   "angle",
		Width:  6 * vg.Inch,
		Height: 4.6 * vg.Inch,
		title:  fmt.Sprintf("%s — step angle from the circular coordinate", filepath.Base(r.Source)),
		panels: [][]*plot.Plot{top, bottom},
		key: []keyItem{
			entry{label: "delay vector", thumbs: []plot.Thumbnailer{&plotter.Scatter{GlyphStyle: vec}}},
			entry{label: fmt.Sprintf("least squares: one slope, one intercept per run (%d runs)", runs), thumbs: []plot.Thumbnailer{&plotter.Line{LineStyle: fitStyle}}},
			entry{label: "residual", thumbs: []plot.Thumbnailer{&plotter.Scatter{GlyphStyle: resid}}},
		},
		Caption: "The circular coordinate of each delay vector, unwrapped along the chain, against site index; the slope of the " +
			"least-squares lines (one slope, one intercept per run of consecutive vectors) is the step angle before folding into [0, ½] (the reported angle is refined on the positions). " +
			"The residual panel shows what the line does not explain.",
	}, nil
}
