package main

import (
	"encoding/csv"
	"encoding/json"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"

	"phasonhull/pattern"
	"phasonhull/topology/batch"
	"phasonhull/topology/hull"
)

// batchFolder holds three generated samples of the shipped design
// (a_clean, b_clean: 2 nm noise, seeds 7 and 8; c_angle: built with
// θ = 0.39) and d_broken.csv, whose fourth site is not a number.
var batchFolder = filepath.Join(auditDir, "batch")

func readSummary(t *testing.T, path string) (header []string, rows []map[string]string) {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	header = recs[0]
	for _, r := range recs[1:] {
		m := map[string]string{}
		for i, h := range header {
			m[h] = r[i]
		}
		rows = append(rows, m)
	}
	return header, rows
}

// A folder with one broken file: its row holds the error (file and line),
// the other files are analysed as analyze would, in name order, and the
// exit status says that a file failed.
func TestBatchFolderWithBrokenFile(t *testing.T) {
	dir := t.TempDir()
	out, js := filepath.Join(dir, "summary.csv"), filepath.Join(dir, "summary.json")
	code, stdout, stderr := runCmd("batch", batchFolder, "--out", out, "--out-json", js)
	if code != exitInput {
		t.Errorf("exit %d, want %d (a file could not be read)", code, exitInput)
	}
	if !strings.Contains(stdout, "4 file(s), 1 error(s)") || !strings.Contains(stderr, "d_broken.csv:6") {
		t.Errorf("stdout %q, stderr %q", stdout, stderr)
	}
	header, rows := readSummary(t, out)
	for _, col := range []string{"file", "sites", "class", "angles", "uncertainty", "disorder", "verdict", "error"} {
		if !slices.Contains(header, col) {
			t.Errorf("no column %q in %v", col, header)
		}
	}
	names := []string{"a_clean.csv", "b_clean.csv", "c_angle.csv", "d_broken.csv"}
	if len(rows) != len(names) {
		t.Fatalf("%d rows, want %d", len(rows), len(names))
	}
	for i, r := range rows {
		if filepath.Base(r["file"]) != names[i] {
			t.Errorf("row %d is %s, want %s", i, r["file"], names[i])
		}
	}
	broken := rows[3]
	if broken["verdict"] != "error" || !strings.Contains(broken["error"], "d_broken.csv:6") || broken["class"] != "" {
		t.Errorf("broken row %v", broken)
	}
	// Each good row is what the library finds on the file.
	for _, r := range rows[:3] {
		p, err := pattern.ReadFile(r["file"], pattern.ReadOptions{})
		if err != nil {
			t.Fatal(err)
		}
		res, err := hull.Analyze(p, hull.Options{})
		if err != nil {
			t.Fatal(err)
		}
		if r["error"] != "" || r["sites"] != strconv.Itoa(p.Len()) || r["class"] != string(res.Hull.Class) {
			t.Errorf("row %v; library: %d sites, %s", r, p.Len(), res.Hull.Class)
		}
		if len(res.Angles) != 1 || r["angles"] != strconv.FormatFloat(res.Angles[0], 'g', -1, 64) {
			t.Errorf("%s: angles %q, library %v", r["file"], r["angles"], res.Angles)
		}
		if res.Disorder == nil || r["disorder"] != strconv.FormatFloat(res.Disorder.RMS, 'g', -1, 64) {
			t.Errorf("%s: disorder %q, library %+v", r["file"], r["disorder"], res.Disorder)
		}
	}
	// The JSON summary holds the same rows.
	data, err := os.ReadFile(js)
	if err != nil {
		t.Fatal(err)
	}
	var sum batch.Summary
	if err := json.Unmarshal(data, &sum); err != nil {
		t.Fatal(err)
	}
	if sum.Files != 4 || sum.Errors != 1 || len(sum.Rows) != 4 || sum.Rows[3].Error != broken["error"] || sum.Rows[0].Class != rows[0]["class"] {
		t.Errorf("JSON summary %+v", sum)
	}
}

// Against a design: the clean samples pass, the one with another angle
// fails, and without the broken file the exit status is that of a failed
// audit.
func TestBatchAudit(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "audit.csv")
	files := []string{filepath.Join(batchFolder, "a_clean.csv"), filepath.Join(batchFolder, "b_clean.csv"), filepath.Join(batchFolder, "c_angle.csv")}
	code, _, stderr := runCmd(append([]string{"batch", "--design", auditPath("design.json"), "--out", out}, files...)...)
	if code != exitFail {
		t.Errorf("exit %d, want %d: %s", code, exitFail, stderr)
	}
	_, rows := readSummary(t, out)
	want := []string{"pass", "pass", "fail"}
	for i, r := range rows {
		if r["verdict"] != want[i] {
			t.Errorf("%s: verdict %q (%s), want %s", r["file"], r["verdict"], r["reasons"], want[i])
		}
		if r["missing"] == "" || r["scale"] == "" || r["rms"] == "" {
			t.Errorf("%s: audit columns empty: %v", r["file"], r)
		}
	}
	if !strings.Contains(rows[2]["reasons"], "hull: ") {
		t.Errorf("angle sample reasons %q", rows[2]["reasons"])
	}
	// Another angle, every site present: the registration does not slip
	// by a site (no missing + extra pair), so only the hull fails.
	if rows[2]["missing"] != "0" || rows[2]["extra"] != "0" || strings.Contains(rows[2]["reasons"], "missing") {
		t.Errorf("angle sample: missing %s, extra %s (%s): want 0 and 0", rows[2]["missing"], rows[2]["extra"], rows[2]["reasons"])
	}
	// The same row as the audit command gives for the file.
	_, rep := auditJSON(t, "--design", auditPath("design.json"), files[0])
	if s := strconv.FormatFloat(num(rep, "scale"), 'g', -1, 64); rows[0]["scale"] != s {
		t.Errorf("batch scale %s, audit %s", rows[0]["scale"], s)
	}
}

// A folder's files leave out the design. A summary written into the folder
// would be one of its files on the next run: that run is refused before
// any work and leaves the summary as it was; a summary written outside the
// folder gives the same rows run after run.
func TestBatchFolderSkipsDesignAndRefusesItsOwnFiles(t *testing.T) {
	dir := t.TempDir()
	for _, name := range []string{"a_clean.csv", "b_clean.csv"} {
		data, err := os.ReadFile(filepath.Join(batchFolder, name))
		if err != nil {
			t.Fatal(err)
		}
		os.WriteFile(filepath.Join(dir, name), data, 0o644)
	}
	spec, _ := os.ReadFile(auditPath("design.json"))
	os.WriteFile(filepath.Join(dir, "design.json"), spec, 0o644)
	inside := filepath.Join(dir, "summary.csv")
	outside := filepath.Join(t.TempDir(), "summary.csv")
	var first string
	for run := range 2 {
		code, _, stderr := runCmd("batch", dir, "--design", filepath.Join(dir, "design.json"), "--out", outside)
		if code != exitOK {
			t.Fatalf("run %d: exit %d: %s", run, code, stderr)
		}
		data, _ := os.ReadFile(outside)
		if run == 0 {
			first = string(data)
		} else if string(data) != first {
			t.Errorf("second run differs:\n%s\n%s", first, data)
		}
	}
	if _, rows := readSummary(t, outside); len(rows) != 2 {
		t.Errorf("%d rows, want the two samples", len(rows))
	}
	if code, _, stderr := runCmd("batch", dir, "--design", filepath.Join(dir, "design.json"), "--out", inside); code != exitOK {
		t.Fatalf("first run into the folder: exit %d: %s", code, stderr)
	}
	before, _ := os.ReadFile(inside)
	code, _, stderr := runCmd("batch", dir, "--design", filepath.Join(dir, "design.json"), "--out", inside)
	if code != exitInput || strings.Count(stderr, "\n") != 1 || !strings.Contains(stderr, inside) {
		t.Errorf("second run into the folder: exit %d, %q; want exit 2 and one line naming %s", code, stderr, inside)
	}
	if after, _ := os.ReadFile(inside); string(after) != string(before) {
		t.Error("the refused run changed the summary")
	}
}

// The summary does not depend on the number of workers.
func TestBatchDeterministic(t *testing.T) {
	dir := t.TempDir()
	var got []string
	for _, jobs := range []string{"1", "3"} {
		out := filepath.Join(dir, "s"+jobs+".csv")
		runCmd("batch", batchFolder, "--jobs", jobs, "--out", out)
		data, err := os.ReadFile(out)
		if err != nil {
			t.Fatal(err)
		}
		got = append(got, string(data))
	}
	if got[0] != got[1] {
		t.Errorf("summaries differ between 1 and 3 workers:\n%s\n%s", got[0], got[1])
	}
}

// Outputs that name an input are refused, bad flags and a bad design
// write nothing, and inputs are never touched.
func TestBatchRefuses(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "in.csv")
	data, err := os.ReadFile(filepath.Join(batchFolder, "a_clean.csv"))
	if err != nil {
		t.Fatal(err)
	}
	os.WriteFile(in, data, 0o644)
	out := filepath.Join(dir, "summary.csv")
	badSpec := filepath.Join(dir, "spec.json")
	os.WriteFile(badSpec, []byte(`{"family": "nonesuch"}`), 0o644)
	for name, args := range map[string][]string{
		"out is an input":         {in, "--out", in},
		"json is an input":        {in, "--out", out, "--out-json", in},
		"out is the design":       {in, "--out", badSpec, "--design", badSpec},
		"out is json":             {in, "--out", out, "--out-json", out},
		"no out":                  {in},
		"bad design":              {in, "--out", out, "--design", badSpec},
		"bad tolerance":           {in, "--out", out, "--tolerance", "x"},
		"jobs":                    {in, "--out", out, "--jobs", "-2"},
		"standard input":          {"-", "--out", out},
		"folder without files":    {t.TempDir(), "--out", out},
		"out in a missing folder": {in, "--out", filepath.Join(dir, "none", "s.csv")},
	} {
		code, _, stderr := runCmd(append([]string{"batch"}, args...)...)
		if code != exitInput {
			t.Errorf("%s: exit %d, want %d (%s)", name, code, exitInput, stderr)
		}
		if _, err := os.Stat(out); err == nil {
			t.Errorf("%s: %s was written", name, out)
			os.Remove(out)
		}
		if after, _ := os.ReadFile(in); string(after) != string(data) {
			t.Fatalf("%s: the input was changed", name)
		}
	}
}

func TestBatchHelp(t *testing.T) {
	code, out, _ := runCmd("batch", "--help")
	for _, want := range []string{"--design", "--jobs", "disorder", "Exit status: 2 when some file could not be processed"} {
		if code != exitOK || !strings.Contains(out, want) {
			t.Errorf("help lacks %q", want)
		}
	}
}
