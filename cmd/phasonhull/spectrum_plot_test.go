package main

import (
	"bytes"
	"image/png"
	"os"
	"path/filepath"
	"testing"
)

// spectrum --plot writes the IDS staircase of the demo design as a PNG
// that decodes and is not blank (common practice: a picture with content
// has pixels of more than one value).
func TestSpectrumPlot(t *testing.T) {
	dir := t.TempDir()
	var out, errb bytes.Buffer
	code := run([]string{"spectrum", "../../testdata/demo/lw0412_design.csv", "--hopping", "exp", "--decay", "3", "--plot", dir}, nil, &out, &errb)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errb.String())
	}
	checkPNG(t, filepath.Join(dir, "spectrum.png"))
}

// spectrum --theta-grid --plot draws the spectrum against the angle.
func TestThetaScanPlot(t *testing.T) {
	dir := t.TempDir()
	spec := filepath.Join(dir, "spec.json")
	if err := os.WriteFile(spec, []byte(`{"family": "modulated", "sites": 120, "theta": 0.3, "sin": [0.15], "seed": 1}`), 0o644); err != nil {
		t.Fatal(err)
	}
	var out, errb bytes.Buffer
	code := run([]string{"spectrum", "--design", spec, "--hopping", "exp", "--decay", "3", "--theta-grid", "0.05:0.45:20", "--out", filepath.Join(dir, "scan.csv"), "--plot", filepath.Join(dir, "figures")}, nil, &out, &errb)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errb.String())
	}
	checkPNG(t, filepath.Join(dir, "figures", "spectrum-theta.png"))
}

// checkPNG asserts that path holds a PNG that decodes and is not blank.
func checkPNG(t *testing.T, path string) {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	img, err := png.Decode(f)
	if err != nil {
		t.Fatalf("decoding %s: %v", path, err)
	}
	b := img.Bounds()
	first := img.At(b.Min.X, b.Min.Y)
	for y := b.Min.Y; y < b.Max.Y; y += 7 {
		for x := b.Min.X; x < b.Max.X; x += 7 {
			if img.At(x, y) != first {
				return
			}
		}
	}
	t.Errorf("%s is blank", path)
}

// spectrum --edge-modes --plot draws the spectral flow over the sweep.
func TestEdgeFlowPlot(t *testing.T) {
	dir := t.TempDir()
	var out, errb bytes.Buffer
	code := run([]string{"spectrum", "--design", "../../testdata/demo/lw0412_design.json", "--hopping", "exp", "--decay", "3", "--edge-modes", "--plot", dir}, nil, &out, &errb)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errb.String())
	}
	checkPNG(t, filepath.Join(dir, "edge-modes.png"))
	checkPNG(t, filepath.Join(dir, "spectrum.png"))
}
