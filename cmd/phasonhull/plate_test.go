package main

import (
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"phasonhull/pattern/design"
)

// plateJSON is the part of analyze --json a plate test reads.
type plateJSON struct {
	Dimension int `json:"dimension"`
	Hull      struct {
		Class      string `json:"class"`
		Period     int    `json:"period"`
		Components int    `json:"components"`
		Reason     string `json:"reason"`
	} `json:"hull"`
	Lattice *struct {
		Basis      [2][2]float64 `json:"basis"`
		Missing    int           `json:"missing"`
		OffLattice int           `json:"off_lattice"`
	} `json:"lattice"`
	Rotation            [][]float64 `json:"rotation"`
	RotationUncertainty [][]float64 `json:"rotation_uncertainty"`
	GapLabels           struct {
		Generators []float64 `json:"generators"`
	} `json:"gap_labels"`
}

// generatePlate writes the plate that "generate" makes from args into dir
// and returns its path and the design's spec.
func generatePlate(t *testing.T, dir, name string, args ...string) (string, design.Spec) {
	t.Helper()
	path := filepath.Join(dir, name+".csv")
	if code, _, stderr := runCmd(append(append([]string{"generate"}, args...), "--out", path)...); code != exitOK {
		t.Fatalf("generate %v: exit %d: %s", args, code, stderr)
	}
	_, js, _ := runCmd(append(append([]string{"generate"}, args...), "--print-spec")...)
	spec, err := design.ReadSpec(strings.NewReader(js), name)
	if err != nil {
		t.Fatal(err)
	}
	return path, spec
}

func analyzePlate(t *testing.T, path string) plateJSON {
	t.Helper()
	code, out, stderr := runCmd("analyze", "--json", path)
	if code != exitOK {
		t.Fatalf("analyze %s: exit %d: %s", path, code, stderr)
	}
	var r plateJSON
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatal(err)
	}
	return r
}

// sameRowSpace reports whether every row of got is a small integer
// combination of the rows of want plus an integer vector, each entry
// within k of its uncertainty, and the reverse: the two matrices describe
// the same hull (a change of torus coordinates V ∈ GL(d, Z) and N integer,
// common practice for the rotation matrix of a torus).
func sameRowSpace(got, unc, want [][]float64, k float64) error {
	match := func(a, b [][]float64, tol func(i, j int) float64) error {
		d := len(b)
		for i, row := range a {
			found := false
			var c [3]int
			var try func(m int) bool
			try = func(m int) bool {
				if m == d {
					ok := false
					for _, x := range c[:d] {
						ok = ok || x != 0
					}
					if !ok {
						return false
					}
					for j := range 2 {
						v := -row[j]
						for r := range d {
							v += float64(c[r]) * b[r][j]
						}
						if math.Abs(v-math.Round(v)) > tol(i, j) {
							return false
						}
					}
					return true
				}
				for x := -3; x <= 3; x++ {
					c[m] = x
					if try(m + 1) {
						return true
					}
				}
				return false
			}
			found = try(0)
			if !found {
				return fmt.Errorf("row %v is no integer combination of %v", row, b)
			}
		}
		return nil
	}
	maxU := 0.0
	for _, r := range unc {
		for _, u := range r {
			maxU = math.Max(maxU, u)
		}
	}
	if err := match(got, want, func(i, j int) float64 { return k * unc[i][j] }); err != nil {
		return err
	}
	// The reverse uses the largest uncertainty, scaled by the coefficients
	// (at most 3 per row).
	return match(want, got, func(int, int) float64 { return 3 * k * maxU * float64(len(got)) })
}

// inBasis turns the design's A (columns the design's basis steps) into
// the columns of the reported basis: A' = A·Uᵀ with a'_i = Σ_j U_ij a_j,
// U rounded from the reported basis in the design's (which must be an
// integer matrix of determinant ±1: the same lattice).
func inBasis(t *testing.T, A [][]float64, design, reported [2][2]float64) [][]float64 {
	t.Helper()
	det := design[0][0]*design[1][1] - design[0][1]*design[1][0]
	var U [2][2]float64
	for i := range 2 {
		// Solve reported[i] = U[i][0]·design[0] + U[i][1]·design[1].
		x, y := reported[i][0], reported[i][1]
		U[i][0] = (x*design[1][1] - y*design[1][0]) / det
		U[i][1] = (design[0][0]*y - design[0][1]*x) / det
		for j := range 2 {
			if math.Abs(U[i][j]-math.Round(U[i][j])) > 0.01 {
				t.Fatalf("reported basis %v is not the design's lattice %v (U = %v)", reported, design, U)
			}
			U[i][j] = math.Round(U[i][j])
		}
	}
	if d := U[0][0]*U[1][1] - U[0][1]*U[1][0]; math.Abs(d) != 1 {
		t.Fatalf("reported basis %v spans a sublattice of index %v of the design's", reported, d)
	}
	out := make([][]float64, len(A))
	for k, row := range A {
		out[k] = []float64{row[0]*U[0][0] + row[1]*U[0][1], row[0]*U[1][0] + row[1]*U[1][1]}
	}
	return out
}

// TestAnalyzePlates: generated plates of every kind, with 1% noise, 1%
// missing and 0.5% spurious sites, read back by analyze as plates with
// the design's lattice, class and (up to the reduction that describes the
// same hull) rotation matrix within 5 of its stated uncertainties; a
// rational A gives a finite hull with its supercell index (A = (1/4, 1/2)
// takes 4 values of ψ mod 1, common practice); a Poisson set is
// disordered (common practice: it has no average lattice).
func TestAnalyzePlates(t *testing.T) {
	dir := t.TempDir()
	common := []string{"--sites", "30", "--noise", "1%", "--missing", "0.01", "--extra", "0.005"}
	for _, c := range []struct {
		name   string
		args   []string
		class  string
		period int
	}{
		{"circle", []string{"plate", "--rotation", "0.381966,0.1", "--amps", "0.05"}, "circle", 0},
		{"torus", []string{"plate", "--rotation", "0.381966,0.1", "--rotation", "-0.1,0.2763932", "--amps", "0.05,0.05"}, "torus", 0},
		{"twisted", []string{"twisted", "--twist", "13.2", "--scale", "0.618034", "--amp", "0.05"}, "torus", 0},
		{"hex", []string{"plate", "--lattice", "hex", "--rotation", "0.381966,0", "--amps", "0.05"}, "circle", 0},
		{"supercell", []string{"plate", "--rotation", "0.25,0.5", "--amps", "0.06"}, "finite", 4},
	} {
		t.Run(c.name, func(t *testing.T) {
			path, spec := generatePlate(t, dir, c.name, append(c.args, common...)...)
			r := analyzePlate(t, path)
			if r.Dimension != 2 || r.Lattice == nil {
				t.Fatalf("dimension %d, lattice %v", r.Dimension, r.Lattice)
			}
			if r.Hull.Class != c.class || r.Hull.Period != c.period {
				t.Fatalf("class %s period %d, want %s %d: %s", r.Hull.Class, r.Hull.Period, c.class, c.period, r.Hull.Reason)
			}
			b := spec.WithDefaults()
			basis := [2][2]float64{{b.Spacing, 0}, {0, b.Spacing}}
			if b.Lattice == design.LatticeHex {
				basis[1] = [2]float64{b.Spacing / 2, b.Spacing * math.Sqrt(3) / 2}
			}
			want := inBasis(t, spec.Rotation(), basis, r.Lattice.Basis)
			if len(r.Rotation) != len(want) || len(r.RotationUncertainty) != len(want) {
				t.Fatalf("A = %v ± %v, want %d rows", r.Rotation, r.RotationUncertainty, len(want))
			}
			if err := sameRowSpace(r.Rotation, r.RotationUncertainty, want, 5); err != nil {
				t.Errorf("A = %v ± %v, design %v: %v", r.Rotation, r.RotationUncertainty, want, err)
			}
		})
	}
	t.Run("poisson", func(t *testing.T) {
		rng := rand.New(rand.NewPCG(16, 2))
		var b strings.Builder
		b.WriteString("x_um,y_um\n")
		for range 900 {
			fmt.Fprintf(&b, "%.6f,%.6f\n", 30*rng.Float64(), 30*rng.Float64())
		}
		path := filepath.Join(dir, "poisson.csv")
		os.WriteFile(path, []byte(b.String()), 0o644)
		r := analyzePlate(t, path)
		if r.Dimension != 2 || r.Hull.Class != "disordered" || r.Lattice != nil || !strings.Contains(r.Hull.Reason, "no average lattice") {
			t.Errorf("Poisson set: dimension %d, class %s, lattice %v, reason %q", r.Dimension, r.Hull.Class, r.Lattice != nil, r.Hull.Reason)
		}
		code, out, _ := runCmd("analyze", path)
		if code != exitOK || !strings.Contains(out, "hull        disordered") {
			t.Errorf("text form, exit %d:\n%s", code, out)
		}
	})
}

// TestAnalyzePlateOutputs: the text form of a plate names its lattice,
// rotation matrix and det A term; --plot writes the plate figures; report
// writes a page that shows the lattice and A; --noise is refused for a
// plate, as is report --design.
func TestAnalyzePlateOutputs(t *testing.T) {
	dir := t.TempDir()
	path, _ := generatePlate(t, dir, "twisted", "twisted", "--twist", "13.2", "--scale", "0.618034", "--amp", "0.05", "--sites", "24", "--noise", "1%", "--unit", "um")
	figs := filepath.Join(dir, "figs")
	code, out, stderr := runCmd("analyze", path, "--plot", figs)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	for _, want := range []string{"sites on a plane", "lattice     a1 = (", "rotation    A in turns per lattice step", "det A: the second-Chern term", "embedding   patches of 3×3"} {
		if !strings.Contains(out, want) {
			t.Errorf("text form lacks %q:\n%s", want, out)
		}
	}
	for _, name := range []string{"plate-sites.png", "structure-factor.png", "hull-projections.png", "persistence.png"} {
		if _, err := os.Stat(filepath.Join(figs, name)); err != nil {
			t.Errorf("--plot: %v", err)
		}
	}
	rep := filepath.Join(dir, "report")
	if code, _, stderr := runCmd("report", path, "--out", rep); code != exitOK {
		t.Fatalf("report: exit %d: %s", code, stderr)
	}
	page, _ := os.ReadFile(filepath.Join(rep, "report.html"))
	for _, want := range []string{"<th>lattice</th>", "<th>rotation A</th>", "second Chern number", `alt="plate-sites"`, `alt="structure-factor"`} {
		if !strings.Contains(string(page), want) {
			t.Errorf("report.html lacks %q", want)
		}
	}
	for _, args := range [][]string{{"analyze", path, "--noise", "2%"}, {"report", path, "--design", path, "--out", filepath.Join(dir, "r2")}} {
		if code, _, _ := runCmd(args...); code != exitInput {
			t.Errorf("%v: exit %d, want %d", args, code, exitInput)
		}
	}
}
