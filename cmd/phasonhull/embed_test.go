package main

import (
	"encoding/csv"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"phasonhull/embed"
	"phasonhull/pattern"
)

// writeHarmonic writes a chain with spacings 1 + 0.2·cos(2π(0.2763n + 0.1))
// (a circle hull) as CSV and returns its path and the positions.
func writeHarmonic(t *testing.T, sites int) (string, []float64) {
	t.Helper()
	x := make([]float64, sites)
	for n := 1; n < sites; n++ {
		x[n] = x[n-1] + 1 + 0.2*math.Cos(2*math.Pi*(0.2763*float64(n-1)+0.1))
	}
	p, err := pattern.New(x, "nm", "harmonic")
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(t.TempDir(), "harmonic.csv")
	f, err := os.Create(path)
	if err != nil {
		t.Fatal(err)
	}
	if err := pattern.WriteCSV(f, p, nil); err != nil {
		t.Fatal(err)
	}
	if err := f.Close(); err != nil {
		t.Fatal(err)
	}
	return path, x
}

// The command reports what the library computes on the file it reads.
func TestEmbedCommandMatchesLibrary(t *testing.T) {
	path, _ := writeHarmonic(t, 1200)
	code, out, stderr := runCmd("embed", path, "--json", "--landmarks", "150")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var got embed.Summary
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatalf("%v in %q", err, out)
	}
	p, err := pattern.ReadFile(path, pattern.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	want, err := embed.Embed(p, embed.Options{Landmarks: 150})
	if err != nil {
		t.Fatal(err)
	}
	if got.Window != want.Window || got.Kept != want.Whitened.Kept || got.Landmarks != len(want.Landmarks) ||
		got.CoverRadius != want.CoverRadius || got.Vectors != len(want.Whitened.Cloud) || got.Sites != 1200 || got.Unit != "nm" {
		t.Errorf("command %+v\nlibrary window %d kept %d landmarks %d cover %v", got, want.Window, want.Whitened.Kept, len(want.Landmarks), want.CoverRadius)
	}
	// One harmonic: window 2, two components (see the embed tests).
	if got.Window != 2 || got.WindowRule != "chosen" || !got.Settled || got.Kept != 2 {
		t.Errorf("window %d (%s, settled %v), kept %d; want 2, chosen, settled, 2", got.Window, got.WindowRule, got.Settled, got.Kept)
	}
	if len(got.Spectrum) != 2 || math.Abs(got.Variance[0]+got.Variance[1]-1) > 1e-12 {
		t.Errorf("spectrum %v, variance fractions %v", got.Spectrum, got.Variance)
	}
}

func TestEmbedCommandText(t *testing.T) {
	path, _ := writeHarmonic(t, 600)
	code, out, stderr := runCmd("embed", path)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	for _, want := range []string{"600 sites", " nm\n", "window      2, chosen", "false neighbours", "2 of 2 kept", "cover radius"} {
		if !strings.Contains(out, want) {
			t.Errorf("summary lacks %q:\n%s", want, out)
		}
	}
	if n := strings.Count(out, "  kept\n"); n != 2 {
		t.Errorf("%d components marked kept, want 2:\n%s", n, out)
	}
}

// readVectors reads a vectors file: its comment line, header and rows.
func readVectors(t *testing.T, path string) (header []string, rows [][]float64, starts []int) {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	r := csv.NewReader(strings.NewReader(string(data)))
	r.Comment = '#'
	recs, err := r.ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	header = recs[0]
	for _, rec := range recs[1:] {
		n, err := strconv.Atoi(rec[0])
		if err != nil {
			t.Fatal(err)
		}
		row := make([]float64, len(rec)-1)
		for j, s := range rec[1:] {
			if row[j], err = strconv.ParseFloat(s, 64); err != nil {
				t.Fatal(err)
			}
		}
		starts, rows = append(starts, n), append(rows, row)
	}
	return header, rows, starts
}

func TestEmbedCommandOut(t *testing.T) {
	path, _ := writeHarmonic(t, 500)
	dir := t.TempDir()
	white := filepath.Join(dir, "white.csv")
	if code, _, stderr := runCmd("embed", path, "--window", "3", "--out", white); code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	header, rows, starts := readVectors(t, white)
	if strings.Join(header, ",") != "start,c1,c2" || len(rows) != 500-1-3+1 {
		t.Fatalf("header %v, %d rows; want start,c1,c2 and %d", header, len(rows), 497)
	}
	// Whitened components: zero mean, unit variance.
	for j := range 2 {
		var m, v float64
		for _, r := range rows {
			m += r[j]
		}
		m /= float64(len(rows))
		for _, r := range rows {
			v += (r[j] - m) * (r[j] - m)
		}
		v /= float64(len(rows) - 1)
		if math.Abs(m) > 1e-9 || math.Abs(v-1) > 1e-9 {
			t.Errorf("column c%d: mean %.3g, variance %.12g", j+1, m, v)
		}
	}
	for i, n := range starts {
		if n != i {
			t.Fatalf("row %d starts at spacing %d", i, n)
		}
	}

	// Raw vectors are the spacings of the file over their mean.
	raw := filepath.Join(dir, "raw.csv")
	if code, _, stderr := runCmd("embed", path, "--window", "3", "--raw", "--out", raw); code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	p, err := pattern.ReadFile(path, pattern.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	d, mean := p.Spacings(), p.MeanSpacing()
	header, rows, _ = readVectors(t, raw)
	if strings.Join(header, ",") != "start,d1,d2,d3" {
		t.Fatalf("raw header %v", header)
	}
	for n, r := range rows {
		for j, v := range r {
			if want := d[n+j] / mean; math.Abs(v-want) > 1e-12 {
				t.Fatalf("raw row %d col %d = %v, want %v", n, j, v, want)
			}
		}
	}
}

func TestEmbedCommandRefuses(t *testing.T) {
	path, _ := writeHarmonic(t, 10)
	out := filepath.Join(t.TempDir(), "never.csv")
	for _, args := range [][]string{
		{"embed", path, "--window", "5", "--out", out},
		{"embed", path, "--raw"},
		{"embed", path, "--landmarks", "0"},
		{"embed", filepath.Join(t.TempDir(), "missing.csv")},
		{"embed"},
	} {
		code, _, stderr := runCmd(args...)
		if code != exitInput || stderr == "" {
			t.Errorf("%v: exit %d, stderr %q; want %d and a message", args, code, stderr, exitInput)
		}
	}
	if _, err := os.Stat(out); !os.IsNotExist(err) {
		t.Errorf("a refused run left %s behind", out)
	}
}

func TestEmbedHelp(t *testing.T) {
	code, out, _ := runCmd("embed", "--help")
	if code != exitOK || !strings.Contains(out, "phasonhull embed design.csv") || !strings.Contains(out, "--noise") {
		t.Errorf("help (exit %d):\n%s", code, out)
	}
}
