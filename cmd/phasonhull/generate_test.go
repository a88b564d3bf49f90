package main

import (
	"bytes"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"phasonhull/pattern"
	"phasonhull/pattern/design"
)

// runCmd runs one command line and returns its exit status and outputs.
func runCmd(args ...string) (code int, stdout, stderr string) {
	var out, errb bytes.Buffer
	code = run(args, strings.NewReader(""), &out, &errb)
	return code, out.String(), errb.String()
}

// TestGenerateMatchesDesign: the command writes exactly what
// design.Generate and pattern.WriteCSV produce, and reading the file back
// gives the positions bit for bit.
func TestGenerateMatchesDesign(t *testing.T) {
	code, out, stderr := runCmd("generate", "modulated", "--sites", "300", "--theta", "0.2763", "--amp", "0.12", "--unit", "um", "--noise", "0.01", "--seed", "5")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	s := design.NewSpec("modulated")
	s.Sites, s.Theta, s.Amp, s.Unit, s.Noise, s.Seed = 300, 0.2763, 0.12, "um", 0.01, 5
	p, err := design.Generate(s)
	if err != nil {
		t.Fatal(err)
	}
	var want bytes.Buffer
	if err := pattern.WriteCSV(&want, p, s.Comments()); err != nil {
		t.Fatal(err)
	}
	if out != want.String() {
		t.Fatalf("command output differs from design.Generate + WriteCSV:\n%.300s", out)
	}
	q, err := pattern.Read(strings.NewReader(out), "out.csv", pattern.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	for i := range p.Positions {
		if math.Float64bits(p.Positions[i]) != math.Float64bits(q.Positions[i]) || q.Unit != "um" {
			t.Fatalf("site %d read back as %v %s, generated %v", i, q.Positions[i], q.Unit, p.Positions[i])
		}
	}
}

// TestGenerateOut: --out writes the file that standard output would get,
// and a refused parameter leaves no file and exits with status 2.
func TestGenerateOut(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "design.csv")
	args := []string{"generate", "sturmian", "--theta", "0.381966", "--tiles", "A=1,B=1.618", "--sites", "50"}
	_, stdout, _ := runCmd(args...)
	if code, out, stderr := runCmd(append(args, "--out", path)...); code != exitOK || out != "" {
		t.Fatalf("exit %d, stdout %q, stderr %s", code, out, stderr)
	}
	got, err := os.ReadFile(path)
	if err != nil || string(got) != stdout {
		t.Fatalf("file holds %.100q (err %v), standard output got %.100q", got, err, stdout)
	}

	bad := filepath.Join(dir, "bad.csv")
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"generate", "modulated", "--theta", "1.5"}, "theta = 1.5: must lie strictly between 0 and 1"},
		{[]string{"generate", "modulated", "--theta", "1.5", "--print-spec"}, "theta = 1.5"},
		{[]string{"generate", "modulated", "--theta", "0.3", "--amp", "0.9"}, "sin/cos amplitudes too large: spacing"},
		{[]string{"generate", "modulated", "--theta", "0.3", "--amp", "0.1", "--sin", "0.1"}, "--amp is shorthand"},
		{[]string{"generate", "periodic", "--cell", "1,1.5", "--theta", "0.3"}, "theta = 0.3 has no effect on the periodic family"},
		{[]string{"generate", "sturmian", "--theta", "0.3", "--tiles", "A=1,B=x"}, "--tiles"},
		{[]string{"generate", "spiral"}, `family "spiral": unknown`},
		{[]string{"generate"}, "generate needs a FAMILY"},
		{[]string{"generate", "random", "--sites", "5"}, "sites = 5"},
		{[]string{"generate", "random", "--missing", "1"}, "missing = 1"},
		{[]string{"generate", "random", "--bogus", "1"}, "unknown flag: --bogus"},
		{[]string{"generate", "--spec", filepath.Join(dir, "none.json")}, "none.json"},
	} {
		code, out, stderr := runCmd(append(c.args, "--out", bad)...)
		if code != exitInput || out != "" || !strings.Contains(stderr, c.want) {
			t.Errorf("%q: exit %d, stdout %q, stderr %q; want exit %d and %q", c.args, code, out, stderr, exitInput, c.want)
		}
		if _, err := os.Stat(bad); !os.IsNotExist(err) {
			t.Fatalf("%q: a refused run left %s behind", c.args, bad)
		}
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 {
		t.Errorf("the folder holds %d entries, want only design.csv (no temporary files)", len(entries))
	}
}

// TestGenerateSpec: --print-spec writes a spec that --spec reads back into
// the same design, and flags override a spec file.
func TestGenerateSpec(t *testing.T) {
	dir := t.TempDir()
	spec := filepath.Join(dir, "loop.json")
	args := []string{"generate", "loop", "--step", "0.381966", "--amp", "0.15", "--radius-cos", "0,0.3", "--missing", "0.05", "--seed", "3"}
	if code, _, stderr := runCmd(append(args, "--print-spec", "--out", spec)...); code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	_, direct, _ := runCmd(args...)
	code, fromSpec, stderr := runCmd("generate", "--spec", spec)
	if code != exitOK || fromSpec != direct {
		t.Fatalf("from the printed spec (exit %d, %s):\n%.200s\ndirect:\n%.200s", code, stderr, fromSpec, direct)
	}
	// A flag overrides the file; the rest of the design stays.
	_, over, _ := runCmd("generate", "--spec", spec, "--sites", "120")
	_, want, _ := runCmd(append(args, "--sites", "120")...)
	if over != want {
		t.Errorf("--spec with --sites 120 differs from the flags with --sites 120")
	}
	// --amp replaces the first sine amplitude of a modulated spec.
	mod := filepath.Join(dir, "mod.json")
	os.WriteFile(mod, []byte(`{"family": "modulated", "theta": 0.3, "sin": [0.2, 0.01]}`), 0o644)
	_, over, _ = runCmd("generate", "--spec", mod, "--amp", "0.1")
	_, want, _ = runCmd("generate", "modulated", "--theta", "0.3", "--sin", "0.1,0.01")
	if over != want {
		t.Errorf("--amp over a spec with sin = [0.2, 0.01] should give sin = [0.1, 0.01]")
	}
	if code, _, stderr := runCmd("generate", "--spec", "../../testdata/design/fabricated.json"); code != exitOK {
		t.Errorf("testdata/design/fabricated.json: exit %d: %s", code, stderr)
	}
}

// TestGenerateExamples runs every example of the help texts of generate
// and of the root command that calls generate, so they stay true.
func TestGenerateExamples(t *testing.T) {
	var lines []string
	for _, ex := range []string{newGenerateCmd().Example, newRootCmd(nil, nil, nil).Example} {
		for _, l := range strings.Split(ex, "\n") {
			if l = strings.TrimSpace(l); strings.HasPrefix(l, "phasonhull generate ") {
				lines = append(lines, l)
			}
		}
	}
	if len(lines) < 10 {
		t.Fatalf("only %d generate examples found", len(lines))
	}
	dir := t.TempDir()
	for _, l := range lines {
		l, _, _ = strings.Cut(l, " > ") // redirection: standard output is captured here
		args := strings.Fields(l)[1:]
		for i, a := range args {
			switch {
			case a == "--out":
				args[i+1] = filepath.Join(dir, args[i+1])
			case strings.HasPrefix(a, "testdata/"):
				args[i] = filepath.Join("..", "..", a)
			}
		}
		if code, _, stderr := runCmd(args...); code != exitOK {
			t.Errorf("%s: exit %d: %s", l, code, stderr)
		}
	}
}

// TestGeneratePlate: for a plate family the command writes what
// design.GeneratePlane and pattern.WritePlane produce, ReadSites reads it
// back as the same plane bit for bit, and its "# spec:" line and
// --print-spec give the design back; lengths take their unit.
func TestGeneratePlate(t *testing.T) {
	args := []string{"generate", "twisted", "--twist", "13.2", "--scale", "0.618034", "--amp", "40nm", "--spacing", "1.2", "--unit", "um",
		"--sites", "12", "--noise", "1%", "--missing", "0.02", "--extra", "0.01", "--seed", "4"}
	code, out, stderr := runCmd(args...)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	s := design.NewSpec(design.Twisted)
	s.Sites, s.Twist, s.Scale, s.Amp, s.Spacing, s.Unit, s.Noise, s.Missing, s.Extra, s.Seed = 12, 13.2, 0.618034, 0.04, 1.2, "um", 0.012, 0.02, 0.01, 4
	p, err := design.GeneratePlane(s)
	if err != nil {
		t.Fatal(err)
	}
	var want bytes.Buffer
	if err := pattern.WritePlane(&want, p, s.Comments()); err != nil {
		t.Fatal(err)
	}
	if out != want.String() {
		t.Fatalf("command output differs from design.GeneratePlane + WritePlane:\n%.400s\nwant\n%.400s", out, want.String())
	}
	sites, err := pattern.ReadSites(strings.NewReader(out), "out.csv", pattern.ReadOptions{})
	if err != nil || sites.Plane == nil {
		t.Fatalf("read back: %v (chain %v)", err, sites.Chain != nil)
	}
	q := sites.Plane
	if q.Len() != p.Len() || q.Unit != "um" {
		t.Fatalf("read back %d sites in %q, generated %d", q.Len(), q.Unit, p.Len())
	}
	for i := range p.Points {
		if p.Points[i] != q.Points[i] {
			t.Fatalf("site %d read back as %v, generated %v", i, q.Points[i], p.Points[i])
		}
	}
	// The file's "# spec:" line holds the design, and so does the printed spec.
	_, line, _ := strings.Cut(out, "# spec: ")
	line, _, _ = strings.Cut(line, "\n")
	spec, err := design.ReadSpec(strings.NewReader(line), "spec line")
	if err != nil {
		t.Fatalf("the spec line of the written file: %v", err)
	}
	// A = s·R(twist): A21 = s·sin(twist) (common practice: the rotation matrix).
	if got := spec.Rotation(); len(got) != 2 || math.Abs(got[1][0]-0.618034*math.Sin(13.2*math.Pi/180)) > 1e-12 {
		t.Errorf("the file's spec has A = %v", got)
	}
	dir := t.TempDir()
	printed := filepath.Join(dir, "plate.json")
	if code, _, stderr := runCmd(append(args, "--print-spec", "--out", printed)...); code != exitOK {
		t.Fatalf("--print-spec: exit %d: %s", code, stderr)
	}
	if _, again, _ := runCmd("generate", "--spec", printed); again != out {
		t.Errorf("generate --spec of the printed spec differs from the flags' output")
	}
	// Flags of the chain families are refused for a plate, and a drift.
	for _, bad := range [][]string{{"generate", "plate", "--theta", "0.3"}, {"generate", "twisted", "--twist", "10", "--drift", "0.01"}, {"generate", "plate", "--rotation", "0.3"}} {
		if code, _, _ := runCmd(bad...); code != exitInput {
			t.Errorf("%v: exit %d, want %d", bad, code, exitInput)
		}
	}
}
