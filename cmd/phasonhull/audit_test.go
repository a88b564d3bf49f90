package main

import (
	"context"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"phasonhull/pattern"
	"phasonhull/pattern/design"
	"phasonhull/pattern/register"
	"phasonhull/topology/audit"
	"phasonhull/topology/hull"
)

// auditDir holds the shipped audit inputs: design.json (a modulated design
// of 200 sites, 450 nm apart, 40 nm first harmonic at θ = 0.381966),
// design_um.csv (the same design written in micrometres), and samples
// generated from the spec with 2 nm of position noise: sample_clean.csv and
// sample_angle.csv (built with θ = 0.39 instead); and sample_nm_nounit.csv,
// a sample of the same design in nm written without a unit.
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

func num(rep map[string]any, key string) float64 {
	v, _ := rep[key].(float64)
	return v
}

// The flags that decide an audit reach the library: the command prints
// what audit.Run reports for the same options, byte for byte.
func TestAuditFlagsReachTheLibrary(t *testing.T) {
	args := []string{"--design", auditPath("design.json"), auditPath("sample_angle.csv"), "--allow-missing", "50", "--allow-extra", "3",
		"--tolerance", "0.003 um", "--fit-drift", "--direction", "forward", "--gate", "0.3", "--landmarks", "150", "--seed", "7"}
	_, stdout, _ := runCmd(append([]string{"audit", "--json"}, args...)...)
	f, err := design.ReadFile(auditPath("design.json"), "")
	if err != nil {
		t.Fatal(err)
	}
	ho := hull.Options{Landmarks: 150, Seed: 7}
	p, err := pattern.ReadFile(auditPath("sample_angle.csv"), pattern.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	rep, err := audit.Run(context.Background(), audit.NewDesign(context.Background(), f, ho), p, audit.Options{AllowMissing: 50, AllowExtra: 3, Tolerance: pattern.Length{Value: 3, Unit: "nm"},
		Drift: true, Direction: register.Forward, Gate: 0.3, Hull: ho})
	if err != nil {
		t.Fatal(err)
	}
	want, err := indentJSON(rep)
	if err != nil {
		t.Fatal(err)
	}
	if stdout != string(want) {
		t.Errorf("audit --json differs from the library's report:\n%.400s\n%.400s", stdout, want)
	}
	if rep.Drift == nil || rep.Tolerance == nil || *rep.Tolerance != 3 {
		t.Errorf("drift %v, tolerance %v: the options did not reach the audit", rep.Drift, rep.Tolerance)
	}
	code, text, _ := runCmd(append([]string{"audit"}, args...)...)
	var b strings.Builder
	rep.WriteText(&b)
	if code != exitFail || text != b.String() {
		t.Errorf("exit %d; text differs from the library's:\n%s\n%s", code, text, b.String())
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

// A design in um against a sample written in nm without a unit fails
// (exit 3) and names the units and the flag; with --unit nm it passes.
// The sample built with another angle is registered without a slip.
func TestAuditUnitMismatch(t *testing.T) {
	args := []string{"--design", auditPath("design_um.csv"), auditPath("sample_nm_nounit.csv")}
	code, rep := auditJSON(t, args...)
	reasons := fmt.Sprint(rep["reasons"])
	if code != exitFail || !strings.Contains(reasons, "written in nm against a design in um? give --unit nm") {
		t.Errorf("exit %d, reasons %s", code, reasons)
	}
	if code, rep = auditJSON(t, append(args, "--unit", "nm")...); code != exitOK {
		t.Errorf("with --unit nm: exit %d, reasons %v", code, rep["reasons"])
	}
	if code, _, stderr := runCmd(append([]string{"audit"}, append(args, "--max-scale-error", "0")...)...); code != exitInput {
		t.Errorf("--max-scale-error 0: exit %d (%s)", code, stderr)
	}
	_, rep = auditJSON(t, "--design", auditPath("design.json"), auditPath("sample_angle.csv"))
	if m, e := rep["missing"].([]any), rep["extra"].([]any); len(m) != 0 || len(e) != 0 {
		t.Errorf("sample_angle.csv: missing %v extra %v; every site is present", m, e)
	}
	if a, ok := rep["alignment"].(map[string]any); !ok || a["ties"] == nil {
		t.Errorf("alignment %v", rep["alignment"])
	}
}

// audit dispatches on the dimension: the demo plate passes against its
// spec (exit 0, the JSON a plate's), and a plate against a chain design,
// or a chain against a plate design, is refused as bad input with the
// reason.
func TestAuditPlate(t *testing.T) {
	plate := filepath.Join("..", "..", "testdata", "demo", "lw0907_plate_scan.csv")
	spec := filepath.Join("..", "..", "testdata", "demo", "lw0907_plate_design.json")
	chainDesign := filepath.Join("..", "..", "testdata", "demo", "lw0412_design.json")
	chain := filepath.Join("..", "..", "testdata", "demo", "lw0412_cmm.csv")
	code, stdout, stderr := runCmd("audit", "--json", "--design", spec, plate, "--allow-missing", "2", "--allow-extra", "2")
	if code != exitOK {
		t.Fatalf("the demo plate: exit %d (%s)", code, stderr)
	}
	for _, want := range []string{`"dimension": 2`, `"rotation_degrees"`, `"residual_xy"`} {
		if !strings.Contains(stdout, want) {
			t.Errorf("the plate's JSON lacks %s", want)
		}
	}
	for name, args := range map[string][]string{
		"plate against a chain": {"audit", "--design", chainDesign, plate},
		"chain against a plate": {"audit", "--design", spec, chain},
	} {
		code, _, stderr := runCmd(args...)
		if code != exitInput || !strings.Contains(stderr, "different dimensions") {
			t.Errorf("%s: exit %d, stderr %q; want %d and the reason", name, code, stderr, exitInput)
		}
	}
}
