package report

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"phasonhull/topology/hull"
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
