package hull_test

import (
	"fmt"
	"log"
	"os"
	"strings"
	"testing"

	"phasonhull/pattern/design"
	"phasonhull/topology/hull"
)

// The text lists the first labels and says how many more there are;
// asked for all, it lists every label and no such line.
func TestWriteTextLabels(t *testing.T) {
	p, err := design.Generate(design.Spec{Family: design.Modulated, Sites: 600, Theta: 0.2763, Sin: []float64{0.1}})
	if err != nil {
		t.Fatal(err)
	}
	r, err := hull.Analyze(p, hull.Options{MaxCoeff: 10})
	if err != nil {
		t.Fatal(err)
	}
	n := len(r.GapLabels.Labels)
	if n <= 12 {
		t.Fatalf("%d labels: the test needs more than 12", n)
	}
	rows := func(text string) int {
		c := 0
		for _, line := range strings.Split(text, "\n") {
			for _, l := range r.GapLabels.Labels {
				f := strings.Fields(line)
				if len(f) >= 2 && f[0] == fmt.Sprintf("%.6f", l.IDS) && strings.Join(f[1:], " ") == l.CoeffString() {
					c++
				}
			}
		}
		return c
	}
	var short, all strings.Builder
	if err := r.WriteText(&short, false); err != nil {
		t.Fatal(err)
	}
	if err := r.WriteText(&all, true); err != nil {
		t.Fatal(err)
	}
	if got := rows(short.String()); got != 12 {
		t.Errorf("short text lists %d labels, want 12", got)
	}
	if want := fmt.Sprintf("(%d more; --all-labels or --json)", n-12); !strings.Contains(short.String(), want) {
		t.Errorf("short text lacks %q:\n%s", want, short.String())
	}
	if got := rows(all.String()); got != n {
		t.Errorf("full text lists %d labels, want %d", got, n)
	}
	if strings.Contains(all.String(), "more;") {
		t.Errorf("full text says labels were left out:\n%s", all.String())
	}
	for _, want := range []string{"hull        circle (Betti (1, 1, 0)", "gap labels  Z + Zθ: IDS = n + m·θ in (0, 1), |m| ≤ 10"} {
		if !strings.Contains(all.String(), want) {
			t.Errorf("text lacks %q:\n%s", want, all.String())
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
	// gap labels  Z + Z/3: IDS = k/3, k = 1..2
	//                      IDS  coefficients
	//                 0.333333        (0, 1)
	//                 0.666667       (1, -1)
	// embedding   window 12, 2 component(s), 288 vectors, 3 landmarks, cover radius 2.88e-14
	// note        generated from the periodic family, a repeated cell of spacings, with sites = 300, cell = 1,1.5,0.7, noise = 0, missing = 0, extra = 0, drift = 0, seed = 0
}
