package main

import (
	"bytes"
	"context"
	"encoding/base64"
	"encoding/json"
	"fmt"
	"html"
	"image"
	"image/png"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"
)

const (
	demoSample = "../../testdata/demo/lw0412_cmm.csv"
	demoDesign = "../../testdata/demo/lw0412_design.json"
)

// imgTag matches every <img> element of a page and captures its src.
var imgTag = regexp.MustCompile(`<img\b[^>]*?\bsrc="([^"]*)"`)

// greyVariance is the variance of the grey level of img over a grid of
// sampled pixels.
func greyVariance(img image.Image) float64 {
	b := img.Bounds()
	var s, s2, n float64
	for y := b.Min.Y; y < b.Max.Y; y += 2 {
		for x := b.Min.X; x < b.Max.X; x += 2 {
			r, g, bl, _ := img.At(x, y).RGBA()
			l := (0.299*float64(r) + 0.587*float64(g) + 0.114*float64(bl)) / 65535
			s, s2, n = s+l, s2+l*l, n+1
		}
	}
	m := s / n
	return s2/n - m*m
}

// writeDemoReport runs the report command on the demo sample and design.
func writeDemoReport(t *testing.T, dir string) string {
	t.Helper()
	code, _, stderr := runCmd("report", demoSample, "--design", demoDesign, "--out", dir)
	if code != exitOK {
		t.Fatalf("report: exit %d: %s", code, stderr)
	}
	return filepath.Join(dir, "report.html")
}

func TestReportDemo(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "out")
	page := writeDemoReport(t, dir)
	doc, err := os.ReadFile(page)
	if err != nil {
		t.Fatal(err)
	}
	var analysis, audit map[string]any
	for name, v := range map[string]*map[string]any{"analysis.json": &analysis, "audit.json": &audit} {
		b, err := os.ReadFile(filepath.Join(dir, name))
		if err != nil {
			t.Fatal(err)
		}
		if err := json.Unmarshal(b, v); err != nil {
			t.Fatalf("%s: %v", name, err)
		}
	}
	// analysis.json is what analyze --json prints for the same sample.
	code, want, stderr := runCmd("analyze", "--json", demoSample)
	if code != exitOK {
		t.Fatalf("analyze: exit %d: %s", code, stderr)
	}
	if got, _ := os.ReadFile(filepath.Join(dir, "analysis.json")); string(got) != want {
		t.Error("analysis.json differs from analyze --json")
	}
	code, want, stderr = runCmd("audit", "--json", "--design", demoDesign, demoSample)
	if code != exitOK && code != exitFail {
		t.Fatalf("audit: exit %d: %s", code, stderr)
	}
	if got, _ := os.ReadFile(filepath.Join(dir, "audit.json")); string(got) != want {
		t.Error("audit.json differs from audit --json")
	}
	if analysis["schema"] != "phasonhull.analysis/1" || audit["schema"] != "phasonhull.audit/1" {
		t.Errorf("schemas %v and %v", analysis["schema"], audit["schema"])
	}
	// The page shows what the JSON says: class and verdict.
	class := analysis["hull"].(map[string]any)["class"].(string)
	for _, want := range []string{"<td>" + class + "</td>", `class="` + audit["verdict"].(string) + `"`, "confidence", "analysis.json", "audit.json"} {
		if !strings.Contains(string(doc), want) {
			t.Errorf("report.html lacks %q", want)
		}
	}
	// Every flagged site is listed with its design index and file row: the
	// demo misses one rod, whose design index the audit names.
	if !strings.Contains(string(doc), "<h3>Flagged sites</h3>") {
		t.Error("report.html has no list of flagged sites")
	}
	for _, m := range audit["missing"].([]any) {
		row := "<tr><td>missing</td><td>" + fmt.Sprint(m) + "</td><td>—</td>"
		if !strings.Contains(string(doc), row) {
			t.Errorf("report.html does not list the missing design site %v (%q)", m, row)
		}
	}
	// Self-contained: no external resource, every image a PNG data URI.
	for _, bad := range []string{"http://", "https://", "<link", "<script"} {
		if strings.Contains(string(doc), bad) {
			t.Errorf("report.html refers to %q", bad)
		}
	}
	imgs := imgTag.FindAllStringSubmatch(string(doc), -1)
	if len(imgs) < 3 {
		t.Fatalf("%d images in the page, want the audit, projections and persistence at least", len(imgs))
	}
	const prefix = "data:image/png;base64,"
	for _, m := range imgs {
		src := html.UnescapeString(m[1]) // attribute values may hold character references
		if !strings.HasPrefix(src, prefix) {
			t.Fatalf("image source %.40q is not a PNG data URI", src)
		}
		raw, err := base64.StdEncoding.DecodeString(src[len(prefix):])
		if err != nil {
			t.Fatal(err)
		}
		img, err := png.Decode(bytes.NewReader(raw))
		if err != nil {
			t.Fatal(err)
		}
		if v := greyVariance(img); v < 0.01 {
			t.Errorf("an embedded figure looks blank (grey variance %.3g)", v)
		}
	}
	// Deterministic: a second run writes the same page.
	again, err := os.ReadFile(writeDemoReport(t, filepath.Join(t.TempDir(), "again")))
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(doc, again) {
		t.Error("two runs wrote different pages")
	}
}

// strconvItoa prints a JSON number that holds an integer.
func strconvItoa(v any) string {
	return strings.TrimSuffix(strings.TrimSuffix(fmt.Sprint(v), ".0"), "e+00")
}

// A report re-run into the folder of an earlier one leaves only the new
// run's files of ours: without --design, the audit.json of the earlier
// audit is gone; a file of the user's in the folder is kept.
func TestReportRerunLeavesOnlyItsFiles(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "out")
	writeDemoReport(t, dir)
	if _, err := os.Stat(filepath.Join(dir, "audit.json")); err != nil {
		t.Fatal(err)
	}
	os.WriteFile(filepath.Join(dir, "notes.txt"), []byte("mine"), 0o644)
	code, _, stderr := runCmd("report", demoSample, "--out", dir)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if got := entries(t, dir); strings.Join(got, ",") != "analysis.json,notes.txt,report.html" {
		t.Errorf("the folder holds %v, want the new run's analysis.json and report.html and the user's notes.txt", got)
	}
	page, _ := os.ReadFile(filepath.Join(dir, "report.html"))
	if strings.Contains(string(page), "audit.json") || strings.Contains(string(page), "Audit against") {
		t.Error("the new page still mentions an audit")
	}
}

func TestReportRefuses(t *testing.T) {
	// Into the folder of its input.
	tmp := t.TempDir()
	sample := filepath.Join(tmp, "sample.csv")
	data, err := os.ReadFile(demoSample)
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(sample, data, 0o644); err != nil {
		t.Fatal(err)
	}
	if code, _, stderr := runCmd("report", sample, "--out", tmp); code != exitInput || !strings.Contains(stderr, "holds the input") {
		t.Errorf("report into the input's folder: exit %d, %q", code, stderr)
	}
	if _, err := os.Stat(filepath.Join(tmp, "report.html")); err == nil {
		t.Error("a refused report wrote report.html")
	}
	// Without --out, onto a file, or on a bad design: nothing written.
	if code, _, _ := runCmd("report", sample); code != exitInput {
		t.Errorf("report without --out: exit %d", code)
	}
	file := filepath.Join(t.TempDir(), "taken")
	os.WriteFile(file, nil, 0o644)
	if code, _, _ := runCmd("report", sample, "--out", file); code != exitInput {
		t.Errorf("report onto a file: exit %d", code)
	}
	out := filepath.Join(t.TempDir(), "none")
	if code, _, _ := runCmd("report", sample, "--design", filepath.Join(tmp, "missing.json"), "--out", out); code != exitInput {
		t.Errorf("report with a missing design: exit %d", code)
	}
	if _, err := os.Stat(out); err == nil {
		t.Error("a failed report left its folder behind")
	}
	if left, _ := filepath.Glob(filepath.Join(filepath.Dir(out), ".*tmp*")); len(left) > 0 {
		t.Errorf("temporary files left behind: %v", left)
	}
}

// TestPlotFlags: analyze and audit write their figures as PNG (or SVG).
func TestPlotFlags(t *testing.T) {
	dir := t.TempDir()
	if code, _, stderr := runCmd("analyze", demoSample, "--plot", dir); code != exitOK {
		t.Fatalf("analyze --plot: exit %d: %s", code, stderr)
	}
	for _, name := range []string{"hull-projections.png", "persistence.png", "angle.png"} {
		b, err := os.ReadFile(filepath.Join(dir, name))
		if err != nil {
			t.Fatal(err)
		}
		img, err := png.Decode(bytes.NewReader(b))
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if w := img.Bounds().Dx(); w != 900 {
			t.Errorf("%s: %d pixels wide, want 6 in at 150 dpi", name, w)
		}
	}
	svg := t.TempDir()
	if code, _, stderr := runCmd("audit", "--design", demoDesign, demoSample, "--plot", svg, "--plot-format", "svg"); code != exitFail && code != exitOK {
		t.Fatalf("audit --plot: exit %d: %s", code, stderr)
	}
	b, err := os.ReadFile(filepath.Join(svg, "audit.svg"))
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Contains(b, []byte("<svg")) {
		t.Error("audit.svg holds no <svg> element")
	}
	// A finite hull has no circular coordinate: no angle figure.
	code, csv, _ := runCmd("generate", "periodic", "--cell", "1,1.5", "--sites", "120")
	if code != exitOK {
		t.Fatalf("generate: exit %d", code)
	}
	per := filepath.Join(t.TempDir(), "periodic.csv")
	if err := os.WriteFile(per, []byte(csv), 0o644); err != nil {
		t.Fatal(err)
	}
	fin := t.TempDir()
	if code, _, stderr := runCmd("analyze", per, "--plot", fin); code != exitOK {
		t.Fatalf("analyze --plot on a periodic chain: exit %d: %s", code, stderr)
	}
	if _, err := os.Stat(filepath.Join(fin, "hull-projections.png")); err != nil {
		t.Error(err)
	}
	if _, err := os.Stat(filepath.Join(fin, "angle.png")); err == nil {
		t.Error("an angle figure for a finite hull")
	}
	if code, _, _ := runCmd("analyze", demoSample, "--plot", dir, "--plot-format", "gif"); code != exitInput {
		t.Errorf("--plot-format gif: exit %d, want %d", code, exitInput)
	}
}

// TestReportInChromium renders the page in headless Chromium and checks
// the screenshot is a picture with something on it. Under CI=true a
// missing chromium is a failure.
func TestReportInChromium(t *testing.T) {
	bin, err := exec.LookPath("chromium")
	if err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatal("chromium is not on PATH (required under CI)")
		}
		t.Skip("chromium is not on PATH")
	}
	tmp := t.TempDir()
	page, err := filepath.Abs(writeDemoReport(t, filepath.Join(tmp, "report")))
	if err != nil {
		t.Fatal(err)
	}
	profile, shot := filepath.Join(tmp, "profile"), filepath.Join(tmp, "shot.png")
	ctx, cancel := context.WithTimeout(context.Background(), 90*time.Second)
	defer cancel()
	cmd := exec.CommandContext(ctx, bin, "--headless", "--no-sandbox", "--disable-gpu",
		"--disable-background-networking", "--disable-component-update", "--disable-sync", "--no-first-run",
		"--user-data-dir="+profile, "--screenshot="+shot, "--window-size=1200,2000", "file://"+page)
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("chromium: %v\n%s", err, out)
	}
	b, err := os.ReadFile(shot)
	if err != nil {
		t.Fatal(err)
	}
	img, err := png.Decode(bytes.NewReader(b))
	if err != nil {
		t.Fatal(err)
	}
	if got := img.Bounds().Size(); got.X != 1200 || got.Y != 2000 {
		t.Errorf("screenshot %v, want 1200x2000", got)
	}
	if v := greyVariance(img); v < 0.005 {
		t.Errorf("the rendered page looks blank (grey variance %.3g)", v)
	}
}

// --plot lists the files it wrote on standard error, and --quiet keeps it
// silent; the results on standard output are the same either way.
func TestPlotListsFilesWritten(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "figs")
	code, out, stderr := runCmd("analyze", demoSample, "--plot", dir)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	for _, name := range entries(t, dir) {
		if !strings.Contains(stderr, "wrote "+filepath.Join(dir, name)+"\n") {
			t.Errorf("stderr %q does not list %s", stderr, name)
		}
	}
	code, quietOut, quietErr := runCmd("analyze", demoSample, "--plot", dir, "--quiet")
	if code != exitOK || quietErr != "" || quietOut != out {
		t.Errorf("--quiet: exit %d, stderr %q, same stdout %v", code, quietErr, quietOut == out)
	}
}

// TestReportBudget: --budget adds the budget --json of a design to the
// page, with its verdict line; a file that is not a budget is refused and
// nothing is written.
func TestReportBudget(t *testing.T) {
	dir := t.TempDir()
	code, js, stderr := runCmd("budget", "--design", demoDesign, "--hopping", "exp", "--decay", "3",
		"--sigma", "0.1mm", "--trials", "20", "--hull-trials", "0", "--edge-trials", "0", "--json", "--quiet")
	if code != 0 {
		t.Fatalf("budget: exit %d: %s", code, stderr)
	}
	saved := filepath.Join(dir, "budget.json")
	if err := os.WriteFile(saved, []byte(js), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "rep")
	if code, _, stderr := runCmd("report", demoSample, "--budget", saved, "--out", out, "--quiet"); code != 0 {
		t.Fatalf("report --budget: exit %d: %s", code, stderr)
	}
	page, err := os.ReadFile(filepath.Join(out, "report.html"))
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"Fabrication error budget of", "20 trials per level", "(0, 1)"} {
		if !strings.Contains(string(page), want) {
			t.Errorf("the page lacks %q", want)
		}
	}
	bad := filepath.Join(dir, "bad")
	if code, _, stderr := runCmd("report", demoSample, "--budget", demoDesign, "--out", bad); code != exitInput || !strings.Contains(stderr, "budget --json") {
		t.Errorf("report --budget on a design: exit %d, %q", code, stderr)
	}
	if _, err := os.Stat(bad); err == nil {
		t.Error("a refused report left its folder behind")
	}
}
