package hull_test

import (
	"fmt"
	"log"
	"os"
	"slices"
	"strings"
	"testing"

	"phasonhull/pattern/design"
	"phasonhull/topology"
	"phasonhull/topology/hull"
	"phasonhull/topology/notation"
)

// The text lists the labels of lowest order first, each IDS to the digits
// its uncertainty justifies, and says how many more there are; asked for
// all, it lists every label and no such line.
func TestWriteTextLabels(t *testing.T) {
	p, err := design.Generate(design.Spec{Family: design.Modulated, Sites: 600, Theta: 0.2763, Sin: []float64{0.1},
		Noise: 0.01, Seed: 5})
	if err != nil {
		t.Fatal(err)
	}
	r, err := hull.Analyze(p, hull.Options{MaxCoeff: 10})
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Angles) != 1 || !(r.AngleUncertainty[0] > 1e-9) {
		t.Fatalf("angles %v ± %v: the test needs one measured angle", r.Angles, r.AngleUncertainty)
	}
	n := len(r.GapLabels.Labels)
	if n <= 12 {
		t.Fatalf("%d labels: the test needs more than 12", n)
	}
	// rows returns the labels the text lists, in the order it lists them.
	rows := func(text string) []topology.Listed {
		var got []topology.Listed
		for _, line := range strings.Split(text, "\n") {
			for _, l := range topology.List(r.GapLabels.Labels, r.AngleUncertainty) {
				want := "            " + notation.PlusMinus(l.IDS, l.Uncertainty)
				if c := l.CoeffString(); strings.HasPrefix(strings.TrimLeft(line, " "), strings.TrimLeft(want, " ")) && strings.Contains(line, c) &&
					strings.HasSuffix(strings.TrimSuffix(line, " ?"), c) {
					got = append(got, l)
				}
			}
		}
		return got
	}
	var short, all strings.Builder
	if err := r.WriteText(&short, false); err != nil {
		t.Fatal(err)
	}
	if err := r.WriteText(&all, true); err != nil {
		t.Fatal(err)
	}
	shown := rows(short.String())
	if len(shown) != 12 {
		t.Errorf("short text lists %d labels, want 12:\n%s", len(shown), short.String())
	}
	// The shown labels are those of lowest order, in order of order.
	for i, l := range shown {
		if i > 0 && l.Order() < shown[i-1].Order() {
			t.Errorf("row %d: %v of order %d after one of order %d", i, l.Label, l.Order(), shown[i-1].Order())
		}
		for _, o := range r.GapLabels.Labels {
			if o.Order() < l.Order() && !slices.ContainsFunc(shown, func(s topology.Listed) bool { return s.IDS == o.IDS }) {
				t.Errorf("%v of order %d left out while %v of order %d is shown", o, o.Order(), l.Label, l.Order())
			}
		}
	}
	if want := fmt.Sprintf("… %d more, of higher order (--all-labels or --json)", n-12); !strings.Contains(short.String(), want) {
		t.Errorf("short text lacks %q:\n%s", want, short.String())
	}
	if got := rows(all.String()); len(got) != n {
		t.Errorf("full text lists %d labels, want %d", len(got), n)
	}
	if strings.Contains(all.String(), "more, of higher order") {
		t.Errorf("full text says labels were left out:\n%s", all.String())
	}
	for _, want := range []string{
		"hull        circle (Betti (1, 1, 0)",
		"gap labels  Z + Zθ: IDS = n + m·θ in (0, 1), |m| ≤ 10",
		"angle       θ = " + notation.PlusMinus(r.Angles[0], r.AngleUncertainty[0]) + " turns",
		fmt.Sprintf("disorder    %.3g of the mean spacing", r.Disorder.Relative),
		"about the model: " + r.Disorder.Model,
	} {
		if !strings.Contains(all.String(), want) {
			t.Errorf("text lacks %q:\n%s", want, all.String())
		}
	}
}

// A label whose IDS is uncertain by more than half the distance to its
// nearest neighbour is marked, and a legend says what the mark means;
// without such a label there is neither.
func TestWriteTextBlurredLabels(t *testing.T) {
	// A circle whose angle is as uncertain as a 25-site chain's at 3%
	// noise (θ ± 0.0015): the labels of high order blur into each other.
	// The analysis no longer names a class on 25 sites, so the result is
	// built by hand; the text is what is under test.
	theta, sigma := 0.2763, 0.0015
	legend := "            ? uncertain by more than half the distance to the nearest label"
	for _, mc := range []int{2, 10} {
		r := &hull.Result{Source: "built", Sites: 25, MeanSpacing: 1,
			Hull:   hull.Hull{Class: hull.Circle, Betti: []int{1, 1, 0}, Confidence: 1, Components: 1, TorusDimension: 1},
			Angles: []float64{theta}, AngleUncertainty: []float64{sigma},
			GapLabels: hull.GapLabels{Generators: []float64{1, theta}, MaxCoeff: mc, Labels: topology.Labels([]float64{theta}, mc)}}
		var b strings.Builder
		if err := r.WriteText(&b, true); err != nil {
			t.Fatal(err)
		}
		marked := 0
		for _, line := range strings.Split(b.String(), "\n") {
			if strings.HasSuffix(line, ") ?") {
				marked++
			}
		}
		want := 0
		for _, l := range topology.List(r.GapLabels.Labels, r.AngleUncertainty) {
			if l.Blurred {
				want++
			}
		}
		if marked != want {
			t.Errorf("|m| ≤ %d: %d labels marked, want %d:\n%s", mc, marked, want, b.String())
		}
		if got := strings.Contains(b.String(), legend); got != (want > 0) {
			t.Errorf("|m| ≤ %d: legend shown %v with %d marked labels:\n%s", mc, got, want, b.String())
		}
		if mc == 10 && want == 0 {
			t.Errorf("|m| ≤ 10 at θ ± %.2g: no label marked; the test needs some", r.AngleUncertainty[0])
		}
	}
}

// Classes not read off barcodes print no Betti numbers; a tiling prints
// its tiles and the class of its word; a chain without a hull model prints
// the spread of its spacings as its disorder.
func TestWriteTextCantorAndDisordered(t *testing.T) {
	for _, c := range []struct {
		spec  design.Spec
		class hull.Class
		want  []string
	}{
		{design.Spec{Family: design.Substitution, Sites: 1000, Rule: "fibonacci"}, hull.Cantor,
			[]string{"hull        cantor\n", "tiles       A = 1 (", "word sturmian, complexity p(", "about the model: ideal tiling of the word"}},
		{design.Spec{Family: design.Random, Sites: 500, Seed: 7}, hull.Disordered,
			[]string{"hull        disordered\n", ": no model of the hull, the spread of the spacings; mutual information of consecutive spacings"}},
	} {
		p, err := design.Generate(c.spec)
		if err != nil {
			t.Fatal(err)
		}
		r, err := hull.Analyze(p, hull.Options{})
		if err != nil {
			t.Fatal(err)
		}
		if r.Hull.Class != c.class || len(r.Hull.Betti) != 0 {
			t.Fatalf("%s: class %s, Betti %v; the test needs %s without Betti numbers", c.spec.Family, r.Hull.Class, r.Hull.Betti, c.class)
		}
		var b strings.Builder
		if err := r.WriteText(&b, false); err != nil {
			t.Fatal(err)
		}
		text := b.String()
		if strings.Contains(text, "Betti") {
			t.Errorf("%s: text names Betti numbers it does not have:\n%s", c.class, text)
		}
		for _, w := range c.want {
			if !strings.Contains(text, w) {
				t.Errorf("%s: text lacks %q:\n%s", c.class, w, text)
			}
		}
	}
}

// The text form of an analysis, as "phasonhull analyze" prints it.
func ExampleResult_WriteText() {
	p, err := design.Generate(design.Spec{Family: design.Periodic, Sites: 300, Cell: []float64{1, 1.5, 0.7}})
	if err != nil {
		log.Fatal(err)
	}
	r, err := hull.Analyze(p, hull.Options{})
	if err != nil {
		log.Fatal(err)
	}
	if err := r.WriteText(os.Stdout, false); err != nil {
		log.Fatal(err)
	}
	// Output:
	// pattern     generated: 300 sites, mean spacing 1.06789 (no unit)
	// hull        finite, period 3 (Betti (3, 0, 0), confidence 1.00)
	//             the spacings repeat with period 3 up to the measured noise (mean squared difference 1.59e-08 times its noise expectation)
	// disorder    7.11e-14 of the mean spacing (RMS 7.59e-14) about the model: periodic cell of the lattice
	// gap labels  Z + Z/3: IDS = k/3, k = 1..2
	//             IDS  coefficients
	//             1/3        (0, 1)
	//             2/3       (1, -1)
	// embedding   window 12, 2 component(s), 288 vectors, 3 landmarks, cover radius 2.88e-14
	// note        generated from the periodic family, a repeated cell of spacings, with sites = 300, cell = 1,1.5,0.7, noise = 0, missing = 0, extra = 0, drift = 0, seed = 0
}
