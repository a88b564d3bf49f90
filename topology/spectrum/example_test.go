package spectrum_test

import (
	"context"
	"fmt"
	"log"
	"math"
	"os"

	"phasonhull/pattern"
	"phasonhull/pattern/design"
	"phasonhull/topology/spectrum"
)

// The almost-Mathieu operator at the golden angle: its gaps wider than 5%
// of the spectrum carry the labels m = ±1 and ±2 of Z + Zθ.
func ExampleAnalyze() {
	x := make([]float64, 1000)
	for i := range x {
		x[i] = float64(i)
	}
	p, err := pattern.New(x, "", "lattice")
	if err != nil {
		log.Fatal(err)
	}
	theta := (math.Sqrt(5) - 1) / 2
	op, err := spectrum.New(p, spectrum.Model{
		OnSite: spectrum.OnSite{Lambda: 1, Theta: theta, Phase: 0.1},
	})
	if err != nil {
		log.Fatal(err)
	}
	res, err := spectrum.Analyze(op, spectrum.Options{Angles: []float64{theta}, MinGap: 0.05})
	if err != nil {
		log.Fatal(err)
	}
	for _, g := range res.Gaps {
		fmt.Printf("IDS %.3f  width %.3f  label (n, m) = %s\n", g.IDS, g.RelWidth, g.Label.CoeffString())
	}
	// Output:
	// IDS 0.235  width 0.064  label (n, m) = (-1, 2)
	// IDS 0.382  width 0.324  label (n, m) = (1, -1)
	// IDS 0.618  width 0.324  label (n, m) = (0, 1)
	// IDS 0.763  width 0.064  label (n, m) = (2, -2)
}

// Sweeping the phase of a modulated design through one turn: the states
// on the first end of the open chain cross each wide gap m times, those
// on the last end −m times.
func ExampleEdgeModes() {
	s := design.NewSpec("modulated")
	s.Sites, s.Theta, s.Amp, s.Phase = 300, 0.4142136, 0.15, 0.1
	sweep, err := spectrum.PhaseSweep(s)
	if err != nil {
		log.Fatal(err)
	}
	res, err := spectrum.EdgeModes(sweep, spectrum.Model{Law: spectrum.Exp{T0: 1, Decay: 4}},
		spectrum.EdgeOptions{Options: spectrum.Options{Angles: []float64{s.Theta}}, Gaps: 4})
	if err != nil {
		log.Fatal(err)
	}
	for _, g := range res.Gaps {
		fmt.Printf("IDS %.3f  m %+d  first end %+d  last end %+d  agrees %v\n",
			g.Gap.IDS, g.Gap.Label.Coeffs[1], g.First, g.Last, g.Agrees)
	}
	// Output:
	// IDS 0.413  m +1  first end +1  last end -1  agrees true
	// IDS 0.587  m -1  first end -1  last end +1  agrees true
	// IDS 0.170  m -2  first end -2  last end +2  agrees true
	// IDS 0.830  m +2  first end +2  last end -2  agrees true
}

// Measured resonances of a five-site cell repeated: the gaps sit at the
// IDS k/5.
func ExampleAnalyzeMeasured() {
	// The levels of a ring of 20 cells of the periodic design, as a
	// measurement would list them.
	s := design.NewSpec("periodic")
	s.Sites, s.Cell = 100, []float64{1, 1.4, 0.8, 1.2, 0.9}
	p, err := design.Generate(s)
	if err != nil {
		log.Fatal(err)
	}
	op, err := spectrum.New(p, spectrum.Model{Law: spectrum.Exp{T0: 1, Decay: 1.5}, Ends: spectrum.Periodic, Closing: 0.9})
	if err != nil {
		log.Fatal(err)
	}
	levels, err := op.Eigenvalues()
	if err != nil {
		log.Fatal(err)
	}
	res, err := spectrum.AnalyzeMeasured(levels, spectrum.Options{Period: 5, MinGap: 0.02})
	if err != nil {
		log.Fatal(err)
	}
	for _, g := range res.Gaps {
		fmt.Printf("IDS %.2f  label %s\n", g.IDS, g.Label.CoeffString())
	}
	// Output:
	// IDS 0.20  label (0, 1)
	// IDS 0.40  label (0, 2)
	// IDS 0.60  label (1, -2)
	// IDS 0.80  label (1, -1)
}

// A report of the almost-Mathieu operator's widest gaps at the golden
// angle, as "phasonhull spectrum" prints it.
func ExampleReport_WriteText() {
	x := make([]float64, 400)
	for i := range x {
		x[i] = float64(i)
	}
	p, err := pattern.New(x, "", "lattice")
	if err != nil {
		log.Fatal(err)
	}
	theta := (math.Sqrt(5) - 1) / 2
	m := spectrum.Model{OnSite: spectrum.OnSite{Lambda: 1, Theta: theta}}
	op, err := spectrum.New(p, m)
	if err != nil {
		log.Fatal(err)
	}
	rep := spectrum.NewReport(spectrum.DefaultMaxCoeff)
	rep.Source, rep.Sites, rep.Operator = p.Source, p.Len(), m.Info("")
	l, err := spectrum.ChooseLabels(context.Background(), spectrum.LabelSources{Angles: []float64{theta}})
	if err != nil {
		log.Fatal(err)
	}
	opt := rep.Label(l, spectrum.Options{MinGap: 0.1})
	if rep.Spectrum, err = spectrum.Analyze(op, opt); err != nil {
		log.Fatal(err)
	}
	if err := rep.WriteText(os.Stdout); err != nil {
		log.Fatal(err)
	}
	// Output:
	// chain       lattice: 400 sites, (no unit)
	// operator    hopping, t = 1 on every bond, nearest neighbours, ends open, on-site 0 + 2·1·cos 2π(nθ + 0)
	// spectrum    [-2.59751, 2.5975] by values; gaps wider than 0.52 (0.1 of the width)
	// labels      n + m·θ, θ = 0.618033989, |m| ≤ 6, given (--theta); matched within 0.0075 (3/N)
	// gaps        2, 2 labelled
	//     #       IDS    label  label IDS  width  relative  lower edge  upper edge  boundary states
	//     1  0.380000  (1, -1)   0.381966  1.685    0.3244    -1.87423   -0.189043                1
	//     2  0.617500   (0, 1)   0.618034  1.685    0.3244    0.189052     1.87422                0
	// caution     A label says which value the IDS takes in a gap of this operator: n + m·θ is the share of levels below the gap. Counts of a finite chain resolve an IDS to about 3/N, so a label is matched within that. An unlabelled gap can mean that the angle is off, that its coefficients exceed --max-coeff, or that the operator breaks the pattern's symmetry (an on-site term with another angle, couplings that do not follow the local configuration).
}
