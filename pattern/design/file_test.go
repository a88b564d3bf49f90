package design

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"phasonhull/pattern"
)

// A spec file and the positions it generates, written as CSV, read as the
// same design; a JSON positions file (no "family") is positions too.
func TestReadFileKinds(t *testing.T) {
	spec := filepath.Join("..", "..", "testdata", "demo", "lw0412_design.json")
	positions := filepath.Join("..", "..", "testdata", "demo", "lw0412_design.csv")
	s, err := ReadFile(spec, "")
	if err != nil {
		t.Fatal(err)
	}
	p, err := ReadFile(positions, "")
	if err != nil {
		t.Fatal(err)
	}
	if s.Kind != KindSpec || s.Spec == nil || s.Spec.Family != "modulated" || s.Pattern.Source != spec || s.Path != spec {
		t.Errorf("spec read as %+v", s)
	}
	if p.Kind != KindPositions || p.Spec != nil || p.Pattern.Len() != s.Pattern.Len() || p.Pattern.Unit != "mm" {
		t.Errorf("positions read as kind %s, %d sites in %q", p.Kind, p.Pattern.Len(), p.Pattern.Unit)
	}
	for i, x := range s.Pattern.Positions {
		if d := x - p.Pattern.Positions[i]; d > 1e-9 || d < -1e-9 {
			t.Fatalf("site %d: spec %v, positions file %v", i, x, p.Pattern.Positions[i])
		}
	}
	dir := t.TempDir()
	js := filepath.Join(dir, "positions.json")
	os.WriteFile(js, []byte(`{"unit": "um", "positions": [0, 1, 2.1, 3, 4.2, 5, 6.1, 7, 8.2]}`), 0o644)
	f, err := ReadFile(js, "nm")
	if err != nil || f.Kind != KindPositions || f.Pattern.Len() != 9 || f.Pattern.Unit != "nm" {
		t.Errorf("JSON positions with unit override: %+v, %v", f, err)
	}
}

// A spec's perturbations are left out, with a note, and the unit given
// overrides the spec's.
func TestReadFilePerturbationsLeftOut(t *testing.T) {
	path := filepath.Join(t.TempDir(), "fab.json")
	os.WriteFile(path, []byte("\ufeff"+`{"family": "modulated", "sites": 50, "theta": 0.3, "amp": 0.1, "noise": 0.01, "missing": 0.1, "unit": "mm"}`), 0o644)
	f, err := ReadFile(path, " um ")
	if err != nil {
		t.Fatal(err)
	}
	if f.Pattern.Len() != 50 || f.Spec.Noise != 0 || f.Spec.Missing != 0 || f.Pattern.Unit != "um" {
		t.Errorf("%d sites, noise %v, missing %v, unit %q", f.Pattern.Len(), f.Spec.Noise, f.Spec.Missing, f.Pattern.Unit)
	}
	if len(f.Notes) != 1 || !strings.Contains(f.Notes[0], "noise = 0.01, missing = 0.1") {
		t.Errorf("notes %q", f.Notes)
	}
}

// Bad design files are refused with an *InputError that names the file
// and, where there is one, the line and column of the fault in the file.
func TestReadFileRefusals(t *testing.T) {
	dir := t.TempDir()
	for _, c := range []struct {
		name, content string
		line, col     int
		want          string
	}{
		{"field.json", `{"family": "modulated", "theta": 0.3, "amp": 0.1, "colour": "red"}`, 0, 0, `unknown field "colour"`},
		{"family.json", `{"family": "nonesuch"}`, 0, 0, `family "nonesuch"`},
		{"syntax.json", "\n\n" + `{"family": "modulated", "theta": 0.3,` + "\n" + ` "amp": x}`, 4, 9, "invalid character 'x'"},
		{"sites.json", `{"family": "modulated", "theta": 0.3, "amp": 0.1, "sites": 5}`, 0, 0, "at least 8 sites"},
		{"key.json", `{"x": 1}`, 1, 2, `unknown key "x"`},
		{"column.csv", "1\n2\nx\n", 3, 1, `"x" is not a number`},
		{"broken family.json", `{"family": "modulated", "theta": 0.3,`, 0, 0, "not closed"},
	} {
		path := filepath.Join(dir, c.name)
		os.WriteFile(path, []byte(c.content), 0o644)
		_, err := ReadFile(path, "")
		var ie *pattern.InputError
		if !errors.As(err, &ie) || ie.File != path || ie.Line != c.line || ie.Col != c.col || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: err %v (%T), want an *InputError at %d:%d containing %q", c.name, err, err, c.line, c.col, c.want)
		}
	}
	_, err := ReadFile(filepath.Join(dir, "none.json"), "")
	var ie *pattern.InputError
	if !errors.As(err, &ie) || !errors.Is(err, os.ErrNotExist) {
		t.Errorf("missing file: %v (%T)", err, err)
	}
}
