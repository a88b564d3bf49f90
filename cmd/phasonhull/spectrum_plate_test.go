package main

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"phasonhull/pattern"
	"phasonhull/pattern/design"
)

// A plate file: the Hofstadter model at flux 1/3 on a periodic 21×21
// square lattice read from a file. Its gaps sit at IDS r/3 with labels
// (s_r, t_r), r = 3·s_r + t_r, |t_r| ≤ 3/2, and the edge states of a strip
// cross each gap t_r times (Thouless, Kohmoto, Nightingale & den Nijs, PRL
// 49, 405, 1982; t_r from the Diophantine equation, solved below).
func TestSpectrumPlateFileFluxAndEdgeStates(t *testing.T) {
	p, err := design.GeneratePlane(design.Spec{Family: design.Plate, Sites: 21})
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(t.TempDir(), "square.csv")
	f, err := os.Create(path)
	if err != nil {
		t.Fatal(err)
	}
	if err := pattern.WritePlane(f, p, nil); err != nil {
		t.Fatal(err)
	}
	f.Close()
	code, out, stderr := runCmd("spectrum", path, "--flux", "1/3", "--ends", "periodic", "--method", "values", "--edge-modes", "--samples", "48", "--json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var rep struct {
		Schema    string `json:"schema"`
		Dimension int    `json:"dimension"`
		Method    string `json:"method"`
		Gaps      []struct {
			IDS   float64 `json:"ids"`
			Label *struct {
				Coeffs []int `json:"coeffs"`
			} `json:"label"`
		} `json:"gaps"`
		Edges struct {
			Gaps []struct {
				IDS   float64 `json:"ids"`
				Count int     `json:"count"`
			} `json:"gaps"`
		} `json:"edge_states"`
	}
	if err := json.Unmarshal([]byte(out), &rep); err != nil {
		t.Fatalf("%v in %q", err, out)
	}
	if rep.Schema != "phasonhull.plate-spectrum/1" || rep.Dimension != 2 || rep.Method != "values" {
		t.Errorf("schema %q, dimension %d, method %q", rep.Schema, rep.Dimension, rep.Method)
	}
	hall := func(r int) (s, tr int) {
		for tt := -1; tt <= 1; tt++ {
			if (r-tt)%3 == 0 {
				return (r - tt) / 3, tt
			}
		}
		return 0, 99
	}
	for r := 1; r <= 2; r++ {
		s, tr := hall(r)
		k := slices.IndexFunc(rep.Gaps, func(g struct {
			IDS   float64 `json:"ids"`
			Label *struct {
				Coeffs []int `json:"coeffs"`
			} `json:"label"`
		}) bool {
			return math.Abs(g.IDS-float64(r)/3) < 1e-9
		})
		if k < 0 || rep.Gaps[k].Label == nil || !slices.Equal(rep.Gaps[k].Label.Coeffs, []int{s, tr}) {
			t.Errorf("gap %d/3: want label (%d, %d) in %+v", r, s, tr, rep.Gaps)
		}
		e := slices.IndexFunc(rep.Edges.Gaps, func(g struct {
			IDS   float64 `json:"ids"`
			Count int     `json:"count"`
		}) bool {
			return math.Abs(g.IDS-float64(r)/3) < 1e-9
		})
		if e < 0 || rep.Edges.Gaps[e].Count != tr {
			t.Errorf("gap %d/3: want %d edge crossings in %+v", r, tr, rep.Edges.Gaps)
		}
	}
}

// A plate design's text report, its sweep CSV and figures: the flags a chain
// alone takes are refused on a plate, and a plate's on a chain.
func TestSpectrumPlateDesignSweepAndRefusals(t *testing.T) {
	dir := t.TempDir()
	spec := filepath.Join(dir, "tw.json")
	if err := os.WriteFile(spec, []byte(`{"family": "twisted", "sites": 24, "scale": 0.32901642, "twist": 10}`), 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, stderr := runCmd("spectrum", "--design", spec, "--harper", "1.5", "--ends", "periodic", "--min-gap", "0.05",
		"--sweep", "twist=0:20:3", "--out", filepath.Join(dir, "sweep.csv"), "--plot", filepath.Join(dir, "fig"))
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	for _, want := range []string{"rotation A", "label group", "sweep       twist over 3 values"} {
		if !containsLine(out, want) {
			t.Errorf("text lacks %q:\n%s", want, out)
		}
	}
	for _, name := range []string{"sweep.csv", "fig/spectrum.png", "fig/sweep.png"} {
		if _, err := os.Stat(filepath.Join(dir, name)); err != nil {
			t.Errorf("%s not written: %v", name, err)
		}
	}
	if code, _, stderr := runCmd("spectrum", "--design", spec, "--theta", "0.3"); code == exitOK || !containsLine(stderr, "--theta is for chains") {
		t.Errorf("--theta on a plate: exit %d, %s", code, stderr)
	}
	if code, _, stderr := runCmd("spectrum", "--design", "../../testdata/spectrum/lattice.json", "--flux", "1/3"); code == exitOK || !containsLine(stderr, "--flux is for plates") {
		t.Errorf("--flux on a chain: exit %d, %s", code, stderr)
	}
}

func containsLine(s, sub string) bool { return strings.Contains(s, sub) }
