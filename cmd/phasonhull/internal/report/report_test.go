package report

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"phasonhull/topology"
	"phasonhull/topology/hull"
	"phasonhull/topology/notation"
)

func testPage() *Page {
	return &Page{
		Analysis: &hull.Result{Source: "s.csv", Sites: 10, Hull: hull.Hull{Class: hull.Circle, Betti: []int{1, 1, 0}, Confidence: 1}},
		Figures:  []Figure{{Name: "f", Caption: "c", PNG: []byte{0x89, 'P', 'N', 'G'}}},
		Files:    []File{{Name: "analysis.json", Data: []byte("{}\n")}},
	}
}

func TestWriteNewAndExistingFolders(t *testing.T) {
	root := t.TempDir()
	// A folder that does not exist yet.
	dir := filepath.Join(root, "new")
	if err := Write(dir, testPage()); err != nil {
		t.Fatal(err)
	}
	for _, name := range []string{"report.html", "analysis.json"} {
		if _, err := os.Stat(filepath.Join(dir, name)); err != nil {
			t.Error(err)
		}
	}
	// An existing folder with a file of its own: kept, ours replaced.
	keep := filepath.Join(dir, "notes.txt")
	os.WriteFile(keep, []byte("mine"), 0o644)
	if err := Write(dir, testPage()); err != nil {
		t.Fatal(err)
	}
	if b, err := os.ReadFile(keep); err != nil || string(b) != "mine" {
		t.Errorf("a file already in the folder was not kept: %q, %v", b, err)
	}
	left, _ := filepath.Glob(filepath.Join(root, ".*"))
	if len(left) > 0 {
		t.Errorf("temporary folders left behind: %v", left)
	}
	html, _ := os.ReadFile(filepath.Join(dir, "report.html"))
	if !strings.Contains(string(html), `src="data:image/png;base64,iVBORw==`) {
		t.Errorf("the figure is not embedded as a data URI")
	}
}

func TestWriteAllOrNone(t *testing.T) {
	root := t.TempDir()
	dir := filepath.Join(root, "out")
	p := testPage()
	p.Files = append(p.Files, File{Name: "../escape.json", Data: []byte("x")})
	if err := Write(dir, p); err == nil {
		t.Fatal("a file name with a path was accepted")
	}
	entries, _ := os.ReadDir(root)
	if len(entries) != 0 {
		t.Errorf("a failed write left %d entries behind", len(entries))
	}
	// No analysis: refused before anything is created.
	if err := Write(dir, &Page{}); err == nil {
		t.Error("a page without an analysis was written")
	}
}

// The page writes tuples, angles and labels as the text does: Betti
// numbers and coefficients as (1, -3), values to the digits their
// uncertainty justifies, labels lowest order first; a class without Betti
// numbers shows none.
func TestViewNotation(t *testing.T) {
	theta, sigma := 0.2741, 0.0015
	r := &hull.Result{Source: "s.csv", Sites: 25, Hull: hull.Hull{Class: hull.Circle, Betti: []int{1, 1, 0}, Confidence: 1},
		Angles: []float64{theta}, AngleUncertainty: []float64{sigma},
		GapLabels: hull.GapLabels{Generators: []float64{1, theta}, MaxCoeff: 10, Labels: topology.Labels([]float64{theta}, 10)}}
	v := view(&Page{Analysis: r})
	row := func(k string) string {
		for _, kv := range v.Summary {
			if kv[0] == k {
				return kv[1]
			}
		}
		return ""
	}
	if got := row("Betti numbers"); got != "(1, 1, 0)" {
		t.Errorf("Betti numbers %q, want (1, 1, 0)", got)
	}
	if got, want := row("angle θ"), notation.PlusMinus(theta, sigma)+" turns"; !strings.HasPrefix(got, want) {
		t.Errorf("angle %q, want it to start with %q", got, want)
	}
	listed := r.ListLabels()
	if len(v.Labels) != maxLabels || v.More != len(listed)-maxLabels {
		t.Fatalf("%d labels shown, %d more; want %d and %d", len(v.Labels), v.More, maxLabels, len(listed)-maxLabels)
	}
	for i, l := range v.Labels {
		want := labelRow{IDS: notation.PlusMinus(listed[i].IDS, listed[i].Uncertainty), Coeffs: listed[i].CoeffString(), Blurred: listed[i].Blurred}
		if l != want {
			t.Errorf("label row %d: %+v, want %+v", i, l, want)
		}
	}
	if v.Labels[0].Coeffs != "(0, 1)" || !v.Blurred {
		t.Errorf("first label %s, blurred rows %v: want (0, 1) first and the order-8 labels blurred", v.Labels[0].Coeffs, v.Blurred)
	}
	var b strings.Builder
	if err := Render(&b, &Page{Analysis: r}); err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"<td>(1, 1, 0)</td>", "<td>(0, 1)</td>", "? uncertain by more than half the distance"} {
		if !strings.Contains(b.String(), want) {
			t.Errorf("page lacks %q", want)
		}
	}
	// A Cantor hull has no Betti numbers and no confidence to show.
	r.Hull = hull.Hull{Class: hull.Cantor, Confidence: 1}
	v = view(&Page{Analysis: r})
	if row("Betti numbers") != "" || row("confidence") != "" {
		t.Errorf("cantor shows Betti numbers %q, confidence %q", row("Betti numbers"), row("confidence"))
	}
}
