package main

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strconv"
	"strings"
	"testing"

	"phasonhull/embed"
	"phasonhull/pattern"
	"phasonhull/topology/rips"
)

func writeText(t *testing.T, name, text string) string {
	t.Helper()
	path := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// torusCloud returns points of a torus of revolution in R³ on a grid of
// angles, written as comma-separated text with comments and blank lines.
func torusCloud() ([][]float64, string) {
	var pts [][]float64
	var b strings.Builder
	b.WriteString("# torus, R = 2, r = 1\n\n")
	for i := 0; i < 12; i++ {
		for j := 0; j < 7; j++ {
			a, c := 2*math.Pi*float64(i)/12, 2*math.Pi*float64(j)/7+0.1*float64(i)
			p := []float64{(2 + math.Cos(c)) * math.Cos(a), (2 + math.Cos(c)) * math.Sin(a), math.Sin(c)}
			pts = append(pts, p)
			for k, x := range p {
				if k > 0 {
					b.WriteString(", ")
				}
				b.WriteString(strconv.FormatFloat(x, 'g', -1, 64))
			}
			b.WriteString("  # point " + strconv.Itoa(len(pts)) + "\n")
		}
	}
	return pts, b.String()
}

// decode reads the JSON report back, with its bars.
func decode(t *testing.T, out string) (*rips.Barcode, []rips.Bar) {
	t.Helper()
	var rep rips.Barcode
	if err := json.Unmarshal([]byte(out), &rep); err != nil {
		t.Fatalf("%v in %q", err, out)
	}
	return &rep, rep.Bars
}

// The command reports exactly the bars the library computes on the points
// it reads, sorted by dimension and decreasing persistence.
func TestBarcodePointsMatchesLibrary(t *testing.T) {
	pts, text := torusCloud()
	path := writeText(t, "torus.csv", text)
	for _, prime := range []int{2, 3} {
		code, out, stderr := runCmd("barcode", "--points", path, "--json", "--field", strconv.Itoa(prime))
		if code != exitOK {
			t.Fatalf("exit %d: %s", code, stderr)
		}
		rep, got := decode(t, out)
		d, err := rips.VietorisRips(pts, rips.Options{MaxDim: 2, Prime: prime})
		if err != nil {
			t.Fatal(err)
		}
		want := d.Barcode(path, 2, 0).Bars
		if !reflect.DeepEqual(got, want) {
			t.Errorf("Z/%d: command bars differ from the library's:\n%v\n%v", prime, got, want)
		}
		if rep.Points != len(pts) || rep.Prime != prime || rep.Threshold != d.Threshold || len(rep.Counts) != 3 {
			t.Errorf("report header %+v", rep)
		}
		for i := 1; i < len(got); i++ {
			a, b := got[i-1], got[i]
			if a.Dim > b.Dim || (a.Dim == b.Dim && a.Persistence() < b.Persistence()) {
				t.Fatalf("bars out of order at %d: %v then %v", i, a, b)
			}
		}
	}
}

// A modulated chain's hull is a circle (common practice): the landmark
// cloud that "phasonhull embed" builds has one long H1 bar, and the command
// reports what the library computes on it.
func TestBarcodePatternMatchesLibrary(t *testing.T) {
	x := make([]float64, 900)
	for n := 1; n < len(x); n++ {
		x[n] = x[n-1] + 1 + 0.2*math.Cos(2*math.Pi*(0.2763*float64(n-1)+0.1))
	}
	p, err := pattern.New(x, "nm", "modulated")
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(t.TempDir(), "modulated.csv")
	f, err := os.Create(path)
	if err != nil {
		t.Fatal(err)
	}
	if err := pattern.WriteCSV(f, p, nil); err != nil {
		t.Fatal(err)
	}
	f.Close()

	code, out, stderr := runCmd("barcode", path, "--json", "--homology", "1", "--landmarks", "120")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	rep, got := decode(t, out)
	q, err := pattern.ReadFile(path, pattern.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	res, err := embed.Embed(q, embed.Options{Landmarks: 120})
	if err != nil {
		t.Fatal(err)
	}
	d, err := rips.VietorisRips(res.LandmarkCloud, rips.Options{MaxDim: 1})
	if err != nil {
		t.Fatal(err)
	}
	if want := d.Barcode(path, 1, 0).Bars; !reflect.DeepEqual(got, want) {
		t.Errorf("command bars differ from the library's:\n%v\n%v", got, want)
	}
	long := 0
	for _, b := range got {
		if b.Dim == 1 && b.Persistence() > rep.Radius/4 {
			long++
		}
	}
	if long != 1 {
		t.Errorf("%d long H1 bars, want 1 (a circle)", long)
	}
}

func TestBarcodeText(t *testing.T) {
	path := writeText(t, "square.txt", "0 0\n1 0\n0 1\n1 1\n")
	code, out, stderr := runCmd("barcode", "--points", path)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	for _, want := range []string{"4 points", "Z/47", "H0: 4 bars, H1: 1 bar, H2: 0 bars", "dim", "persistence", "inf", "1.41421"} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
	// --min-persistence drops the short bars, a --max-edge short of the
	// radius of the cloud is said.
	code, out, _ = runCmd("barcode", "--points", path, "--min-persistence", "0.5", "--max-edge", "1.2")
	if code != exitOK || !strings.Contains(out, "H0: 4 bars, H1: 1 bar") || !strings.Contains(out, "short of the cloud's radius") {
		t.Errorf("exit %d:\n%s", code, out)
	}
	code, out, _ = runCmd("barcode", "--points", path, "--min-persistence", "1.5")
	if code != exitOK || !strings.Contains(out, "H0: 1 bar, H1: 0 bars") {
		t.Errorf("exit %d:\n%s", code, out)
	}
}

func TestBarcodeRefuses(t *testing.T) {
	ragged := writeText(t, "ragged.txt", "0 0\n1 0\n0 1 2\n")
	word := writeText(t, "word.txt", "# two columns\n0, 0\n1, x\n")
	empty := writeText(t, "empty.txt", "0,0\n1,,0\n")
	none := writeText(t, "none.txt", "# nothing\n")
	ok := writeText(t, "ok.txt", "0 0\n1 0\n0 1\n1 1\n3 3\n")
	cases := []struct {
		args []string
		want string
	}{
		{[]string{"--points", ragged}, ragged + ":3: expected 2 columns like the first data row (line 1), got 3"},
		{[]string{"--points", word}, word + ":3:2: \"x\" is not a number"},
		{[]string{"--points", empty}, empty + ":2:2: empty field"},
		{[]string{"--points", none}, none + ": has no data rows"},
		{[]string{"--points", filepath.Join(t.TempDir(), "missing.txt")}, "missing.txt"},
		{[]string{}, "either a pattern FILE or --points"},
		{[]string{ok, "--points", ok}, "not both"},
		{[]string{"--points", ok, "--field", "4"}, "--field 4: not a prime"},
		{[]string{"--points", ok, "--homology", "4"}, "--homology 4"},
		{[]string{"--points", ok, "--max-edge", "-1"}, "--max-edge"},
		{[]string{"--points", ok, "--memory", "lots"}, "--memory"},
		{[]string{"--points", ok, "--memory", "100B"}, "memory budget"},
		{[]string{"--points", ok, "--memory", "100B"}, "--threshold, --dim, --landmarks, --memory"},
	}
	for _, c := range cases {
		code, _, stderr := runCmd(append([]string{"barcode"}, c.args...)...)
		if code != exitInput || !strings.Contains(stderr, c.want) {
			t.Errorf("%v: exit %d, stderr %q, want exit %d and %q", c.args, code, stderr, exitInput, c.want)
		}
	}
}

func TestBarcodeHelp(t *testing.T) {
	code, out, _ := runCmd("barcode", "--help")
	for _, want := range []string{"Examples:", "phasonhull barcode --points cloud.csv", "--max-edge", "--field", "--memory", "Z/47"} {
		if code != exitOK || !strings.Contains(out, want) {
			t.Errorf("help lacks %q:\n%s", want, out)
		}
	}
}
