package batch_test

import (
	"bytes"
	"context"
	"encoding/csv"
	"errors"
	"os"
	"path/filepath"
	"reflect"
	"slices"
	"strings"
	"testing"

	"phasonhull/pattern"
	"phasonhull/pattern/design"
	"phasonhull/topology/audit"
	"phasonhull/topology/batch"
	"phasonhull/topology/hull"
)

// loader serves generated patterns by name; "bad" fails to read and
// "panic" panics, as a bug would.
func loader(t *testing.T) batch.Loader {
	t.Helper()
	specs := map[string]design.Spec{
		"circle": {Family: design.Modulated, Sites: 300, Theta: 0.2763, Sin: []float64{0.1}},
		"cell":   {Family: design.Periodic, Sites: 120, Cell: []float64{1, 1.5}},
		"other":  {Family: design.Modulated, Sites: 300, Theta: 0.39, Sin: []float64{0.1}},
	}
	return func(path string) (*pattern.Pattern, error) {
		switch path {
		case "bad":
			return nil, errors.New("bad: line 3: not a number")
		case "panic":
			panic("broken")
		}
		p, err := design.Generate(specs[path])
		if err != nil {
			t.Fatal(err)
		}
		return p, nil
	}
}

// Every file gets its row, in the order given, whatever the number of
// workers; a file that fails or panics holds its error, and the counts
// say how many.
func TestRun(t *testing.T) {
	files := []string{"circle", "bad", "cell", "panic"}
	var first *batch.Summary
	for _, jobs := range []int{1, 3, 0} {
		s := batch.Run(context.Background(), files, loader(t), nil, audit.Options{}, jobs, nil)
		if s.Schema != batch.Schema || s.Files != 4 || s.Errors != 2 || s.Failed != 0 || s.Design != "" {
			t.Fatalf("jobs %d: summary %+v", jobs, s)
		}
		for i, r := range s.Rows {
			if r.File != files[i] {
				t.Errorf("jobs %d: row %d is %s, want %s", jobs, i, r.File, files[i])
			}
		}
		if r := s.Rows[0]; r.Class != string(hull.Circle) || len(r.Angles) != 1 || len(r.Uncertainty) != 1 || r.Disorder == nil || r.Verdict != "" || r.Missing != nil {
			t.Errorf("jobs %d: circle row %+v", jobs, r)
		}
		if r := s.Rows[2]; r.Class != string(hull.Finite) || r.Period != 2 || r.Sites != 120 {
			t.Errorf("jobs %d: cell row %+v", jobs, r)
		}
		if r := s.Rows[1]; r.Verdict != batch.Error || r.Error != "bad: line 3: not a number" || r.Sites != 0 {
			t.Errorf("jobs %d: bad row %+v", jobs, r)
		}
		if r := s.Rows[3]; r.Verdict != batch.Error || !strings.Contains(r.Error, "panic: internal error (a bug in phasonhull): broken") {
			t.Errorf("jobs %d: panic row %+v", jobs, r)
		}
		if first == nil {
			first = s
		} else if !reflect.DeepEqual(s, first) {
			t.Errorf("jobs %d: summary differs from one worker's", jobs)
		}
	}
}

// Against a design, a sample of the design passes and one of another
// angle fails; the rows carry the audit's counts and calibration.
func TestRunAudit(t *testing.T) {
	load := loader(t)
	p, err := load("circle")
	if err != nil {
		t.Fatal(err)
	}
	d := audit.NewDesign(context.Background(), &design.File{Path: "circle.json", Kind: design.KindPositions, Pattern: p}, hull.Options{})
	s := batch.Run(context.Background(), []string{"circle", "other"}, load, d, audit.Options{}, 2, nil)
	if s.Design != "circle.json" || s.Failed != 1 || s.Errors != 0 {
		t.Fatalf("summary %+v", s)
	}
	pass, fail := s.Rows[0], s.Rows[1]
	if pass.Verdict != string(audit.Pass) || *pass.Missing != 0 || *pass.Extra != 0 || pass.Scale == nil || pass.RMS == nil {
		t.Errorf("same sample: %+v", pass)
	}
	if fail.Verdict != string(audit.Fail) || len(fail.Reasons) == 0 {
		t.Errorf("other angle: %+v", fail)
	}
}

// The CSV has a column per field and empty cells for what a row lacks.
func TestWriteCSV(t *testing.T) {
	s := batch.Run(context.Background(), []string{"circle", "bad"}, loader(t), nil, audit.Options{}, 1, nil)
	var b bytes.Buffer
	if err := s.WriteCSV(&b); err != nil {
		t.Fatal(err)
	}
	rows, err := csv.NewReader(&b).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 3 || !slices.Equal(rows[0], batch.Columns) {
		t.Fatalf("rows %q", rows)
	}
	col := func(row []string, name string) string { return row[slices.Index(batch.Columns, name)] }
	if col(rows[1], "class") != "circle" || col(rows[1], "sites") != "300" || col(rows[1], "missing") != "" || col(rows[1], "period") != "" {
		t.Errorf("circle row %q", rows[1])
	}
	if col(rows[2], "verdict") != "error" || col(rows[2], "sites") != "" || col(rows[2], "error") != "bad: line 3: not a number" {
		t.Errorf("bad row %q", rows[2])
	}
}

// Files lists a folder's regular, non-hidden files in name order, without
// those to skip; files and missing paths stand for themselves.
func TestFiles(t *testing.T) {
	dir := t.TempDir()
	for _, n := range []string{"b.csv", "a.csv", ".hidden.csv", "design.json"} {
		if err := os.WriteFile(filepath.Join(dir, n), []byte("1\n"), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	if err := os.Mkdir(filepath.Join(dir, "sub"), 0o755); err != nil {
		t.Fatal(err)
	}
	got, err := batch.Files([]string{dir, "missing.csv"}, []string{filepath.Join(dir, ".", "design.json")})
	if err != nil {
		t.Fatal(err)
	}
	want := []string{filepath.Join(dir, "a.csv"), filepath.Join(dir, "b.csv"), "missing.csv"}
	if !slices.Equal(got, want) {
		t.Errorf("files %q, want %q", got, want)
	}
	if _, err := batch.Files([]string{"-"}, nil); err == nil {
		t.Error("standard input: no error")
	}
	if _, err := batch.Files([]string{filepath.Join(dir, "sub")}, nil); err == nil {
		t.Error("empty folder: no error")
	}
}
