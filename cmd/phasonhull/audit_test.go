package main

import (
	"encoding/json"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"

	"phasonhull/pattern"
	"phasonhull/pattern/design"
)

// auditDir holds the shipped audit inputs: design.json (a modulated design
// of 200 sites, 450 nm apart, 40 nm first harmonic at θ = 0.381966),
// design_um.csv (the same design written in micrometres), and samples
// generated from the spec with 2 nm of position noise: sample_clean.csv and
// sample_angle.csv (built with θ = 0.39 instead).
const auditDir = "../../testdata/audit"

func auditPath(name string) string { return filepath.Join(auditDir, name) }

// auditJSON runs audit with --json and decodes the report.
func auditJSON(t *testing.T, args ...string) (int, map[string]any) {
	t.Helper()
	code, out, stderr := runCmd(append([]string{"audit", "--json"}, args...)...)
	if code != exitOK && code != exitFail {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var rep map[string]any
	if err := json.Unmarshal([]byte(out), &rep); err != nil {
		t.Fatalf("%v in %.300q", err, out)
	}
	return code, rep
}

// jsonInts reads a JSON list of numbers as ints.
func jsonInts(t *testing.T, v any) []int {
	t.Helper()
	list, ok := v.([]any)
	if !ok {
		t.Fatalf("%v is not a list", v)
	}
	out := []int{}
	for _, x := range list {
		out = append(out, int(x.(float64)))
	}
	return out
}

func num(rep map[string]any, key string) float64 {
	v, _ := rep[key].(float64)
	return v
}

// The design itself as the pattern package reads it, in nm.
func auditDesign(t *testing.T) []float64 {
	t.Helper()
	f, err := os.Open(auditPath("design.json"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	s, err := design.ReadSpec(f, "design.json")
	if err != nil {
		t.Fatal(err)
	}
	p, err := design.Generate(s)
	if err != nil {
		t.Fatal(err)
	}
	return p.Positions
}

// A sample generated from its design with only position noise passes, with
// an identity calibration (generate adds no offset or scale) within three
// standard errors, whether the design is the spec or its positions written
// in another unit.
func TestAuditCleanSamplePasses(t *testing.T) {
	for _, d := range []string{"design.json", "design_um.csv"} {
		code, rep := auditJSON(t, "--design", auditPath(d), auditPath("sample_clean.csv"))
		if code != exitOK || rep["verdict"] != "pass" {
			t.Errorf("%s: exit %d, verdict %v, reasons %v", d, code, rep["verdict"], rep["reasons"])
		}
		if m, e := jsonInts(t, rep["missing"]), jsonInts(t, rep["extra"]); len(m)+len(e) != 0 {
			t.Errorf("%s: missing %v extra %v", d, m, e)
		}
		if s, se := num(rep, "scale"), num(rep, "scale_uncertainty"); !(se > 0) || math.Abs(s-1) > 3*se {
			t.Errorf("%s: scale %v ± %v, want 1 within 3 standard errors", d, s, se)
		}
		if o, oe := num(rep, "offset"), num(rep, "offset_uncertainty"); !(oe > 0) || math.Abs(o) > 3*oe {
			t.Errorf("%s: offset %v ± %v, want 0 within 3 standard errors", d, o, oe)
		}
		// The robust sigma estimates the generated 2 nm of noise (the
		// MAD of 200 values is good to about 8%; 30% is over three of that).
		if s := num(rep, "sigma"); math.Abs(s/2-1) > 0.3 {
			t.Errorf("%s: sigma %v nm, noise 2 nm", d, s)
		}
		if rep["measured_order"] != "file" {
			t.Errorf("%s: measured order %v for an ascending column", d, rep["measured_order"])
		}
	}
}

// defects describes a sample built in closed form from the shipped design:
// x_j = offset + scale·d_j + scale·drift·(d_j − d_0)²/S + 2 nm noise, with
// the design sites in missing left out, those in displaced moved by the
// given nm, and one extra site per entry of extraAfter, 40% of the way from
// that design site to the next.
type defects struct {
	offset, scale, drift float64
	missing              []int
	displaced            map[int]float64
	extraAfter           []int
}

// write writes the sample and returns its file and the measured indices
// of the extra sites.
func (s defects) write(t *testing.T) (string, []int) {
	t.Helper()
	d := auditDesign(t)
	S := d[len(d)-1] - d[0]
	cal := func(v float64) float64 { return s.offset + s.scale*v + s.scale*s.drift*(v-d[0])*(v-d[0])/S }
	rng := rand.New(rand.NewPCG(21, 0))
	var x []float64
	for j, v := range d {
		if !slices.Contains(s.missing, j) {
			x = append(x, cal(v)+s.displaced[j]+2*rng.NormFloat64())
		}
	}
	var extras []float64
	for _, j := range s.extraAfter {
		extras = append(extras, cal(d[j]+0.4*(d[j+1]-d[j])))
	}
	x = append(x, extras...)
	slices.Sort(x)
	p, err := pattern.New(x, "nm", "injected")
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(t.TempDir(), "injected.csv")
	f, err := os.Create(path)
	if err != nil {
		t.Fatal(err)
	}
	if err := pattern.WriteCSV(f, p, []string{"closed-form sample with injected defects"}); err != nil {
		t.Fatal(err)
	}
	if err := f.Close(); err != nil {
		t.Fatal(err)
	}
	var idx []int
	for _, e := range extras {
		idx = append(idx, slices.Index(x, e))
	}
	slices.Sort(idx)
	return path, idx
}

// Injected defects come back with exactly their indices — missing sites
// (the first design site among them), an extra site, a displaced site —
// and the calibration within three standard errors; the missing and extra
// sites fail the verdict.
func TestAuditInjectedDefects(t *testing.T) {
	for _, c := range []struct {
		s     defects
		flags []string
	}{
		{defects{offset: 2500, scale: 1 + 3e-4}, nil},
		{defects{offset: -1234.5, scale: 1 - 2e-4, drift: 5e-4}, []string{"--drift"}},
	} {
		c.s.missing, c.s.displaced, c.s.extraAfter = []int{0, 77, 78}, map[int]float64{120: 30}, []int{150}
		path, extra := c.s.write(t)
		args := append([]string{"--design", auditPath("design.json"), path}, c.flags...)
		code, rep := auditJSON(t, args...)
		if code != exitFail || rep["verdict"] != "fail" {
			t.Errorf("drift %g: exit %d verdict %v: want fail for missing and extra sites", c.s.drift, code, rep["verdict"])
		}
		if got := jsonInts(t, rep["missing"]); !slices.Equal(got, c.s.missing) {
			t.Errorf("drift %g: missing %v, injected %v", c.s.drift, got, c.s.missing)
		}
		if got := jsonInts(t, rep["extra"]); !slices.Equal(got, extra) {
			t.Errorf("drift %g: extra %v, injected %v", c.s.drift, got, extra)
		}
		if got := jsonInts(t, rep["outliers"]); !slices.Equal(got, []int{120}) {
			t.Errorf("drift %g: outliers %v, displaced [120]", c.s.drift, got)
		}
		for _, p := range []struct {
			key  string
			want float64
		}{{"offset", c.s.offset}, {"scale", c.s.scale}, {"drift", c.s.drift}} {
			if p.key == "drift" && c.s.drift == 0 {
				if _, ok := rep["drift"]; ok {
					t.Errorf("drift reported without --drift")
				}
				continue
			}
			v, err := num(rep, p.key), num(rep, p.key+"_uncertainty")
			if !(err > 0) || math.Abs(v-p.want) > 3*err {
				t.Errorf("drift %g: %s %v ± %v, built with %v", c.s.drift, p.key, v, err, p.want)
			}
		}
		reasons := rep["reasons"].([]any)
		if len(reasons) < 2 || reasons[0] != "3 design site(s) missing, 0 allowed" || reasons[1] != "1 extra measured site(s), 0 allowed" {
			t.Errorf("drift %g: reasons %v", c.s.drift, reasons)
		}
		if n := len(rep["sites"].([]any)); n != 200-3 {
			t.Errorf("drift %g: %d sites reported, want the 197 matched", c.s.drift, n)
		}
	}
}

// The verdict follows the limits: two missing sites fail by default and
// pass when allowed; a displaced site is an outlier that decides nothing
// until a tolerance below its displacement is given.
func TestAuditLimits(t *testing.T) {
	path, _ := defects{offset: 700, scale: 1 + 1e-4, missing: []int{40, 130}, displaced: map[int]float64{90: 30}}.write(t)
	args := []string{"--design", auditPath("design.json"), path}
	code, rep := auditJSON(t, args...)
	if code != exitFail || len(rep["reasons"].([]any)) != 1 {
		t.Errorf("two missing, none allowed: exit %d, reasons %v", code, rep["reasons"])
	}
	code, rep = auditJSON(t, append(args, "--allow-missing", "2")...)
	if code != exitOK || rep["verdict"] != "pass" || !slices.Equal(jsonInts(t, rep["outliers"]), []int{90}) {
		t.Errorf("two missing allowed: exit %d, reasons %v, outliers %v", code, rep["reasons"], rep["outliers"])
	}
	code, rep = auditJSON(t, append(args, "--allow-missing", "2", "--tolerance", "0.02um")...)
	reasons := rep["reasons"].([]any)
	if code != exitFail || len(reasons) != 1 || !strings.Contains(reasons[0].(string), "1 matched site(s) beyond the tolerance of 20 nm") {
		t.Errorf("tolerance 20 nm: exit %d, reasons %v", code, reasons)
	}
	if tol := num(rep, "tolerance"); math.Abs(tol-20) > 1e-12 {
		t.Errorf("tolerance 0.02um read as %v nm", tol)
	}
	sites := rep["sites"].([]any)
	beyond := 0
	for _, s := range sites {
		if s.(map[string]any)["within_tolerance"] == false {
			beyond++
		}
	}
	if beyond != 1 {
		t.Errorf("%d sites beyond the tolerance, want 1", beyond)
	}
}

// The text report names the defects by index and ends with the verdict.
func TestAuditText(t *testing.T) {
	path, extra := defects{offset: 2500, scale: 1 + 3e-4, missing: []int{0, 77, 78}, displaced: map[int]float64{120: 30}, extraAfter: []int{150}}.write(t)
	code, out, _ := runCmd("audit", "--design", auditPath("design.json"), path)
	if code != exitFail {
		t.Fatalf("exit %d", code)
	}
	for _, want := range []string{"design #0 ", "design #77 ", "design #78 ", "measured #" + strconv.Itoa(extra[0]) + " ",
		"design #120 (measured #", "scale 1.000", "verdict     FAIL: 3 design site(s) missing, 0 allowed; 1 extra measured site(s), 0 allowed"} {
		if !strings.Contains(out, want) {
			t.Errorf("text report lacks %q:\n%s", want, out)
		}
	}
}

// A sample built with another angle fails the hull verdict, even with
// every registration defect allowed.
func TestAuditOtherAngleFails(t *testing.T) {
	code, rep := auditJSON(t, "--design", auditPath("design.json"), auditPath("sample_angle.csv"),
		"--allow-missing", "50", "--allow-extra", "50")
	if code != exitFail || rep["verdict"] != "fail" {
		t.Fatalf("exit %d verdict %v", code, rep["verdict"])
	}
	reasons := rep["reasons"].([]any)
	if len(reasons) != 1 || !strings.HasPrefix(reasons[0].(string), "hull: ") {
		t.Errorf("reasons %v: want the hull verdict alone", reasons)
	}
	cmp := rep["hull"].(map[string]any)["comparison"].(map[string]any)
	checks := cmp["angles"].([]any)
	if cmp["agree"] != false || len(checks) != 2 {
		t.Fatalf("comparison %v", cmp)
	}
	// The sample was generated with θ = 0.39: it is about 0.008 from the
	// spec's 0.381966.
	ref := checks[1].(map[string]any)
	if ref["against"] != "reference" || math.Abs(ref["difference"].(float64)-0.008034) > 1e-4 {
		t.Errorf("reference check %v", ref)
	}
}

// Without a design the sites are screened against the sample's own hull:
// a clean sample passes; a displaced site is flagged, and fails once a
// tolerance below its displacement is given.
func TestAuditWithoutDesign(t *testing.T) {
	code, rep := auditJSON(t, auditPath("sample_clean.csv"))
	if code != exitOK || len(jsonInts(t, rep["outliers"])) != 0 {
		t.Errorf("clean sample alone: exit %d, outliers %v, reasons %v", code, rep["outliers"], rep["reasons"])
	}
	if _, ok := rep["scale"]; ok {
		t.Error("scale reported without a design")
	}
	p, err := pattern.ReadFile(auditPath("sample_clean.csv"), pattern.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	p.Positions[90] += 40 // 20 sigma of the 2 nm noise, a tenth of a spacing
	path := filepath.Join(t.TempDir(), "displaced.csv")
	f, _ := os.Create(path)
	if err := pattern.WriteCSV(f, p, nil); err != nil {
		t.Fatal(err)
	}
	f.Close()
	code, rep = auditJSON(t, path)
	if code != exitOK || !slices.Contains(jsonInts(t, rep["outliers"]), 90) {
		t.Errorf("displaced site 90: exit %d, outliers %v", code, rep["outliers"])
	}
	code, rep = auditJSON(t, path, "--tolerance", "25nm")
	if code != exitFail || !slices.Contains(jsonInts(t, rep["outliers"]), 90) {
		t.Errorf("displaced site 90, tolerance 25 nm: exit %d, outliers %v, reasons %v", code, rep["outliers"], rep["reasons"])
	}
}

// Bad input exits with status 2 and writes nothing.
func TestAuditBadInput(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "report.json")
	badSpec := filepath.Join(dir, "bad.json")
	os.WriteFile(badSpec, []byte(`{"family": "modulated", "theta": 0.3, "amp": 0.1, "colour": "red"}`), 0o644)
	noUnit := filepath.Join(dir, "nounit.csv")
	os.WriteFile(noUnit, []byte("0\n1\n2.1\n3\n4.2\n5\n6.1\n7\n8.2\n"), 0o644)
	clean := auditPath("sample_clean.csv")
	for name, args := range map[string][]string{
		"no design file":      {"--design", filepath.Join(dir, "none.json"), clean},
		"bad spec":            {"--design", badSpec, clean},
		"broken sample":       {"--design", auditPath("design.json"), auditPath("batch/d_broken.csv")},
		"tolerance unit":      {"--design", auditPath("design.json"), clean, "--tolerance", "0.02deg"},
		"tolerance syntax":    {"--design", auditPath("design.json"), clean, "--tolerance", "-3nm"},
		"tolerance no unit":   {noUnit, "--tolerance", "3nm"},
		"gate":                {"--design", auditPath("design.json"), clean, "--gate", "1.5"},
		"allow":               {"--design", auditPath("design.json"), clean, "--allow-missing", "-1"},
		"units disagree":      {"--design", auditPath("design.json"), clean, "--unit", "px"},
		"no argument":         {"--design", auditPath("design.json")},
		"out is the measured": {"--design", auditPath("design.json"), clean, "--out", clean},
	} {
		a := append([]string{"audit"}, args...)
		if !slices.Contains(args, "--out") {
			a = append(a, "--out", out)
		}
		before, _ := os.ReadFile(clean)
		code, _, stderr := runCmd(a...)
		if code != exitInput {
			t.Errorf("%s: exit %d, want %d (%s)", name, code, exitInput, stderr)
		}
		if _, err := os.Stat(out); err == nil {
			t.Errorf("%s: %s was written", name, out)
			os.Remove(out)
		}
		if after, _ := os.ReadFile(clean); string(after) != string(before) {
			t.Fatalf("%s: the sample file was changed", name)
		}
	}
}

// --out writes what standard output gets, also for a failed audit, and
// the same input gives the same report.
func TestAuditOutAndDeterminism(t *testing.T) {
	path := filepath.Join(t.TempDir(), "audit.json")
	args := []string{"audit", "--json", "--design", auditPath("design.json"), auditPath("sample_angle.csv")}
	code1, stdout, _ := runCmd(args...)
	code2, again, _ := runCmd(args...)
	code3, _, _ := runCmd(append(args, "--out", path)...)
	written, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if code1 != exitFail || code2 != exitFail || code3 != exitFail {
		t.Errorf("exit %d, %d, %d; want %d", code1, code2, code3, exitFail)
	}
	if stdout != again || string(written) != stdout {
		t.Error("reports differ between runs or between standard output and --out")
	}
}

func TestAuditHelp(t *testing.T) {
	code, out, _ := runCmd("audit", "--help")
	for _, want := range []string{"--print-spec", "Exit status: 0 when the verdict is pass, 3 when it is fail, 2 for bad input", "--tolerance", "4 robust sigmas"} {
		if code != exitOK || !strings.Contains(out, want) {
			t.Errorf("help lacks %q", want)
		}
	}
}
