package main

import (
	"encoding/csv"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"phasonhull/pattern/design"
	"phasonhull/topology/spectrum"
)

const goldenText = "0.6180339887498949"

// fracPart is the fractional part in [0, 1).
func spectrumFrac(x float64) float64 { return x - math.Floor(x) }

// The JSON report has the documented shape, and its gaps are those the
// library computes on the same design and operator.
func TestSpectrumCommandJSON(t *testing.T) {
	code, out, stderr := runCmd("spectrum", "--design", "../../testdata/spectrum/lattice.json", "--harper", "1", "--theta", goldenText, "--min-gap", "0.01", "--json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var raw map[string]any
	if err := json.Unmarshal([]byte(out), &raw); err != nil {
		t.Fatalf("%v in %q", err, out)
	}
	for _, key := range []string{"schema", "source", "sites", "unit", "operator", "angles", "label_source", "max_coeff", "spectrum", "notes", "warnings", "caution"} {
		if _, ok := raw[key]; !ok {
			t.Errorf("report lacks %q", key)
		}
	}
	var rep struct {
		Schema   string `json:"schema"`
		Sites    int    `json:"sites"`
		Operator struct {
			Model, Law, Ends string
		} `json:"operator"`
		Angles   []float64        `json:"angles"`
		Spectrum *spectrum.Result `json:"spectrum"`
	}
	if err := json.Unmarshal([]byte(out), &rep); err != nil {
		t.Fatal(err)
	}
	if rep.Schema != spectrum.ReportSchema || rep.Sites != 400 || rep.Operator.Model != "hopping" || rep.Operator.Ends != "open" || len(rep.Angles) != 1 {
		t.Errorf("report header %+v", rep)
	}
	gaps := raw["spectrum"].(map[string]any)["gaps"].([]any)
	g0 := gaps[0].(map[string]any)
	for _, key := range []string{"lower", "upper", "width", "relative_width", "below", "ids", "label", "boundary_states"} {
		if _, ok := g0[key]; !ok {
			t.Errorf("gap lacks %q", key)
		}
	}
	if l, ok := g0["label"].(map[string]any); !ok || l["ids"] == nil || l["coeffs"] == nil {
		t.Errorf("gap label %v, want {ids, coeffs}", g0["label"])
	}
	// The library on the same chain.
	f, err := os.Open("../../testdata/spectrum/lattice.json")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	s, err := design.ReadSpec(f, "lattice.json")
	if err != nil {
		t.Fatal(err)
	}
	p, err := design.Generate(s)
	if err != nil {
		t.Fatal(err)
	}
	theta := (math.Sqrt(5) - 1) / 2
	op, err := spectrum.New(p, spectrum.Model{OnSite: spectrum.OnSite{Lambda: 1, Theta: theta}})
	if err != nil {
		t.Fatal(err)
	}
	want, err := spectrum.Analyze(op, spectrum.Options{Angles: []float64{theta}, MinGap: 0.01})
	if err != nil {
		t.Fatal(err)
	}
	got := rep.Spectrum
	if len(got.Gaps) != len(want.Gaps) || len(got.Gaps) < 6 {
		t.Fatalf("command %d gaps, library %d", len(got.Gaps), len(want.Gaps))
	}
	for i := range want.Gaps {
		g, w := got.Gaps[i], want.Gaps[i]
		if g.Below != w.Below || g.Lower != w.Lower || g.Upper != w.Upper || g.Label == nil || !slices.Equal(g.Label.Coeffs, w.Label.Coeffs) {
			t.Errorf("gap %d: command %+v, library %+v", i, g, w)
		}
	}
}

// Measured levels (the almost-Mathieu ring of testdata/spectrum) labelled
// with the golden angle: gaps sit at IDS frac(mθ) for m = ±1 and ±2
// (Hofstadter, Phys. Rev. B 14, 1976; the labels by Johnson & Moser,
// Commun. Math. Phys. 84, 1982), computed here independently, and every
// gap wider than 2% carries a label. (The ring's seam holds a level that
// splits one gap in two; a list of levels cannot tell it from the bulk.)
func TestSpectrumCommandMeasured(t *testing.T) {
	code, out, stderr := runCmd("spectrum", "--eigenvalues", "../../testdata/spectrum/harper_levels.csv", "--theta", goldenText, "--min-gap", "0.02", "--json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var rep spectrum.Report
	if err := json.Unmarshal([]byte(out), &rep); err != nil {
		t.Fatal(err)
	}
	if rep.Operator != nil || rep.Sites != 400 || rep.Spectrum.Method != spectrum.Measured {
		t.Errorf("report %+v", rep)
	}
	theta := (math.Sqrt(5) - 1) / 2
	for _, m := range []int{1, -1, 2, -2} {
		found := false
		for _, g := range rep.Spectrum.Gaps {
			found = found || (math.Abs(g.IDS-spectrumFrac(float64(m)*theta)) <= 3.0/400 && g.Label != nil && g.Label.Coeffs[1] == m)
		}
		if !found {
			t.Errorf("no gap at IDS frac(%dθ) = %.4f labelled m = %d", m, spectrumFrac(float64(m)*theta), m)
		}
	}
	for _, g := range rep.Spectrum.Gaps {
		if g.Label == nil {
			t.Errorf("gap at IDS %.4f unlabelled", g.IDS)
		}
	}
}

func cmpSpectrumWidth(a, b float64) int {
	switch {
	case a < b:
		return -1
	case a > b:
		return 1
	}
	return 0
}

// Edge modes of the modulated design: the four widest gaps agree with
// their labels (first end +m, last end −m), in the text table.
func TestSpectrumCommandEdgeModes(t *testing.T) {
	code, out, stderr := runCmd("spectrum", "--design", "../../testdata/spectrum/modulated.json", "--decay", "4", "--edge-modes", "--edge-gaps", "4", "--min-gap", "0.01")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if !strings.Contains(out, "edge modes") || strings.Count(out, "true\n") != 4 {
		t.Errorf("edge-mode table does not show four agreeing gaps:\n%s", out)
	}
	for _, want := range []string{"the design's θ", "θ = 0.4142136", "caution"} {
		if !strings.Contains(out, want) {
			t.Errorf("report lacks %q:\n%s", want, out)
		}
	}
}

// The θ scan writes N rows per angle, ascending within each, with
// ids = (index+1)/N; a ring of whole periods of the almost-Mathieu
// operator at θ = 1/5 has five bands, all four gaps open (Choi, Elliott &
// Yui, Commun. Math. Phys. 132, 1990): four wide steps in its levels.
func TestSpectrumCommandThetaGrid(t *testing.T) {
	path := filepath.Join(t.TempDir(), "scan.csv")
	code, out, stderr := runCmd("spectrum", "--design", "../../testdata/spectrum/lattice.json", "--harper", "1", "--ends", "periodic",
		"--theta-grid", "0.1:0.2:2", "--out", path)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if !strings.Contains(out, "written") {
		t.Errorf("no written line: %s", out)
	}
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	r := csv.NewReader(strings.NewReader(string(data)))
	r.Comment = '#'
	recs, err := r.ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(recs[0], []string{"theta", "eigenvalue", "ids"}) || len(recs) != 1+2*400 {
		t.Fatalf("header %v, %d rows; want 1 + 800", recs[0], len(recs))
	}
	var third []float64
	for _, rec := range recs[1+400:] {
		var v [3]float64
		for j := range v {
			if err := json.Unmarshal([]byte(rec[j]), &v[j]); err != nil {
				t.Fatal(err)
			}
		}
		third = append(third, v[1])
	}
	if !slices.IsSorted(third) {
		t.Error("levels at one θ not ascending")
	}
	wide := 0
	for k := 1; k < len(third); k++ {
		if third[k]-third[k-1] > 0.02*(third[len(third)-1]-third[0]) {
			wide++
		}
	}
	if wide != 4 {
		t.Errorf("θ = 1/5: %d wide steps between levels, want the 4 gaps between 5 bands", wide)
	}
}

// --out writes every level with its IDS; the counting method writes the
// staircase.
func TestSpectrumCommandOut(t *testing.T) {
	dir := t.TempDir()
	for _, c := range []struct{ method, header string }{{"values", "eigenvalue,ids"}, {"counting", "energy,ids"}} {
		path := filepath.Join(dir, c.method+".csv")
		code, _, stderr := runCmd("spectrum", "--design", "../../testdata/spectrum/lattice.json", "--harper", "1", "--theta", goldenText, "--method", c.method, "--out", path)
		if code != exitOK {
			t.Fatalf("%s: exit %d: %s", c.method, code, stderr)
		}
		data, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		lines := strings.Split(strings.TrimSpace(string(data)), "\n")
		if lines[1] != c.header || !strings.HasPrefix(lines[0], "# phasonhull spectrum") {
			t.Errorf("%s: file starts %q", c.method, lines[:2])
		}
		first, last := lines[2], lines[len(lines)-1]
		if !strings.HasSuffix(last, ",1") || (c.method == "counting" && !strings.HasSuffix(first, ",0")) {
			t.Errorf("%s: rows %q … %q, want ids from 0 (counting) or 1/N up to 1", c.method, first, last)
		}
	}
}

// Bad input exits 2 with a message naming the problem, and writes nothing.
func TestSpectrumCommandRefuses(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "out.csv")
	bad := filepath.Join(dir, "table.csv")
	if err := os.WriteFile(bad, []byte("0.5,1\n0.9,2\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	lat := "../../testdata/spectrum/lattice.json"
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--eigenvalues", "../../testdata/spectrum/bad_levels.csv", "--theta", "0.3", "--out", out}, "bad_levels.csv:3:1: \"not-a-level\" is not a number"},
		{[]string{"--eigenvalues", "../../testdata/spectrum/harper_levels.csv", "--out", out}, "--theta, --period or --pattern"},
		{[]string{"--eigenvalues", "../../testdata/spectrum/harper_levels.csv", "--theta", "0.3", "--decay", "2"}, "--decay describes an operator"},
		{[]string{"--design", lat, "--hopping", "table", "--table", bad, "--out", out}, "outside the coupling table"},
		{[]string{"--design", lat, "--hopping", "table"}, "go together"},
		{[]string{"--design", lat, "--harper", "1"}, "--theta"},
		{[]string{"--design", lat, "--edge-modes"}, "no phase"},
		{[]string{"--design", lat, "--closing", "2"}, "--ends periodic"},
		{[]string{"--design", lat, "--model", "waves"}, "--model"},
		{[]string{"--design", lat, "--theta-grid", "0.1:0.2", "--harper", "1", "--out", out}, "START:STOP:COUNT"},
		{[]string{"--design", lat, "--min-gap", "2", "--out", out}, "minimum gap"},
		{[]string{"--design", lat, "--nnn", "0.1", "--method", "counting", "--out", out}, "counting"},
		{[]string{"../../testdata/spectrum/harper_levels.csv", "--design", lat}, "exactly one"},
		{[]string{}, "exactly one"},
		{[]string{"--design", filepath.Join(dir, "missing.json")}, "missing.json"},
	} {
		code, stdout, stderr := runCmd(append([]string{"spectrum"}, c.args...)...)
		if code != exitInput || !strings.Contains(stderr, c.want) {
			t.Errorf("spectrum %v: exit %d, stderr %q; want exit %d and %q", c.args, code, stderr, exitInput, c.want)
		}
		if stdout != "" {
			t.Errorf("spectrum %v: printed %q on error", c.args, stdout)
		}
		if _, err := os.Stat(out); !os.IsNotExist(err) {
			t.Fatalf("spectrum %v: %s exists after an error", c.args, out)
		}
		if left, _ := filepath.Glob(filepath.Join(dir, ".out.csv.tmp*")); len(left) > 0 {
			t.Fatalf("spectrum %v: temporary files left: %v", c.args, left)
		}
	}
}

// Without --theta the labels come from the hull analysis of the pattern:
// a chain with spacings 1 + 0.2·cos 2π(0.2763n + 0.1) has a circle hull of
// angle 0.2763, and the widest gaps of a spacing-dependent hopping carry
// labels of that angle, m = ±1 first (the gap labelling of a circle hull,
// Bellissard 1992). The same angle labels measured levels given with
// --pattern.
func TestSpectrumCommandRecoveredAngle(t *testing.T) {
	path, _ := writeHarmonic(t, 1200)
	code, out, stderr := runCmd("spectrum", path, "--decay", "3", "--min-gap", "0.02", "--json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var rep spectrum.Report
	if err := json.Unmarshal([]byte(out), &rep); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(rep.LabelSource, "recovered") || !strings.Contains(rep.LabelSource, "circle") ||
		len(rep.Angles) != 1 || math.Abs(rep.Angles[0]-0.2763) > 1e-6 {
		t.Fatalf("labels %q, angles %v; want the recovered circle angle 0.2763", rep.LabelSource, rep.Angles)
	}
	gaps := slices.Clone(rep.Spectrum.Gaps)
	slices.SortStableFunc(gaps, func(a, b spectrum.Gap) int { return -cmpSpectrumWidth(a.Width, b.Width) })
	if len(gaps) < 2 {
		t.Fatalf("%d gaps", len(gaps))
	}
	for _, g := range gaps[:2] {
		if g.Label == nil || (g.Label.Coeffs[1] != 1 && g.Label.Coeffs[1] != -1) {
			t.Errorf("wide gap at IDS %.4f labelled %+v, want |m| = 1", g.IDS, g.Label)
		}
	}
	// Its levels as a measurement, labelled through --pattern.
	levels := filepath.Join(t.TempDir(), "levels.csv")
	if code, _, stderr := runCmd("spectrum", path, "--decay", "3", "--method", "values", "--out", levels); code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	code, out, stderr = runCmd("spectrum", "--eigenvalues", levels, "--pattern", path, "--min-gap", "0.02", "--json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var meas spectrum.Report
	if err := json.Unmarshal([]byte(out), &meas); err != nil {
		t.Fatal(err)
	}
	if len(meas.Angles) != 1 || meas.Angles[0] != rep.Angles[0] {
		t.Errorf("measured levels labelled with %v, the operator with %v", meas.Angles, rep.Angles)
	}
	labelled := 0
	for _, g := range meas.Spectrum.Gaps {
		if g.Label != nil {
			labelled++
		}
	}
	if labelled < 2 {
		t.Errorf("%d measured gaps labelled", labelled)
	}
}

// --closing is a length: with the file's unit written out, or in another
// unit, it gives the same ring as the bare number (common practice:
// 1 mm = 1000 um).
func TestSpectrumClosingTakesUnits(t *testing.T) {
	base := []string{"spectrum", "../../testdata/demo/lw0412_design.csv", "--hopping", "exp", "--decay", "3", "--ends", "periodic", "--json"}
	var outs []string
	for _, c := range []string{"3.1", "3.1mm", "3100 um"} {
		code, out, stderr := runCmd(append(base, "--closing", c)...)
		if code != exitOK {
			t.Fatalf("--closing %s: exit %d: %s", c, code, stderr)
		}
		outs = append(outs, out)
	}
	if outs[0] != outs[1] || outs[0] != outs[2] {
		t.Error("--closing 3.1, 3.1mm and 3100 um give different spectra")
	}
	if code, _, _ := runCmd(append(base, "--closing", "3.1deg")...); code != exitInput {
		t.Errorf("--closing in degrees: exit %d, want %d", code, exitInput)
	}
}
