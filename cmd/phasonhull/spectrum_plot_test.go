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
	f, err := os.Open(filepath.Join(dir, "spectrum.png"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	img, err := png.Decode(f)
	if err != nil {
		t.Fatalf("decoding: %v", err)
	}
	b := img.Bounds()
	first := img.At(b.Min.X, b.Min.Y)
	varied := false
	for y := b.Min.Y; y < b.Max.Y && !varied; y += 7 {
		for x := b.Min.X; x < b.Max.X; x += 7 {
			if img.At(x, y) != first {
				varied = true
				break
			}
		}
	}
	if !varied {
		t.Error("the picture is blank")
	}
}
