package embed_test

import (
	"bytes"
	"encoding/csv"
	"log"
	"math"
	"os"
	"strconv"
	"strings"
	"testing"

	"phasonhull/embed"
	"phasonhull/pattern"
)

// cosineChain is a chain whose spacings follow one cosine of the site
// index, d_n = 250·(1 + 0.12·cos 2πnθ) nm.
func cosineChain(t testing.TB, n int) *pattern.Pattern {
	x := make([]float64, n+1)
	for k := 1; k < len(x); k++ {
		x[k] = x[k-1] + 250*(1+0.12*math.Cos(2*math.Pi*0.2763*float64(k)))
	}
	p, err := pattern.New(x, "nm", "cosine")
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// The summary's variance shares sum to one, follow the spectrum, and say
// whether the window was chosen or given.
func TestSummary(t *testing.T) {
	p := cosineChain(t, 600)
	for _, window := range []int{0, 3} {
		res, err := embed.Embed(p, embed.Options{Window: window, Landmarks: 50})
		if err != nil {
			t.Fatal(err)
		}
		s := res.Summary(p.Source)
		var sum float64
		for i, v := range s.Variance {
			sum += v
			if i > 0 && v > s.Variance[i-1] {
				t.Errorf("window %d: variance shares not descending: %v", window, s.Variance)
			}
		}
		if math.Abs(sum-1) > 1e-12 || len(s.Variance) != len(res.Whitened.Spectrum) {
			t.Errorf("window %d: variance shares %v sum to %g", window, s.Variance, sum)
		}
		rule := map[int]string{0: "chosen", 3: "given"}[window]
		if s.WindowRule != rule || s.Window != res.Window || s.Source != "cosine" {
			t.Errorf("window %d: rule %q window %d source %q", window, s.WindowRule, s.Window, s.Source)
		}
		var b strings.Builder
		if err := s.WriteText(&b); err != nil {
			t.Fatal(err)
		}
		if want := "window      " + strconv.Itoa(res.Window) + ", " + map[int]string{0: "chosen: ", 3: "given (--window)"}[window]; !strings.Contains(b.String(), want) {
			t.Errorf("window %d: text lacks %q:\n%s", window, want, b.String())
		}
	}
}

// WriteVectors writes a row per vector: whitened, the kept components;
// raw, the spacings over the mean spacing.
func TestWriteVectors(t *testing.T) {
	p := cosineChain(t, 400)
	res, err := embed.Embed(p, embed.Options{Landmarks: 50})
	if err != nil {
		t.Fatal(err)
	}
	d := p.Spacings()
	mean := p.MeanSpacing()
	for _, raw := range []bool{false, true} {
		var b bytes.Buffer
		if err := res.WriteVectors(&b, p, raw); err != nil {
			t.Fatal(err)
		}
		r := csv.NewReader(&b)
		r.Comment = '#'
		rows, err := r.ReadAll()
		if err != nil {
			t.Fatal(err)
		}
		cols := res.Whitened.Kept
		if raw {
			cols = res.Window
		}
		if len(rows) != len(res.Rows)+1 || len(rows[0]) != cols+1 {
			t.Fatalf("raw %v: %d rows of %d columns, want %d of %d", raw, len(rows), len(rows[0]), len(res.Rows)+1, cols+1)
		}
		for i, row := range rows[1:] {
			start, _ := strconv.Atoi(row[0])
			if start != res.Rows[i] {
				t.Fatalf("raw %v: row %d starts at %d, want %d", raw, i, start, res.Rows[i])
			}
			for j, f := range row[1:] {
				v, _ := strconv.ParseFloat(f, 64)
				want := res.Whitened.Cloud[i][j]
				if raw {
					want = d[start+j] / mean
				}
				if math.Abs(v-want) > 1e-9 {
					t.Fatalf("raw %v: row %d column %d = %g, want %g", raw, i, j, v, want)
				}
			}
		}
	}
}

// The summary of an embedding, as "phasonhull embed" prints it.
func ExampleResult_Summary() {
	x := make([]float64, 1001)
	for n := 1; n < len(x); n++ {
		x[n] = x[n-1] + 250*(1+0.12*math.Cos(2*math.Pi*0.2763*float64(n)))
	}
	p, err := pattern.New(x, "nm", "example")
	if err != nil {
		log.Fatal(err)
	}
	res, err := embed.Embed(p, embed.Options{Landmarks: 100})
	if err != nil {
		log.Fatal(err)
	}
	if err := res.Summary(p.Source).WriteText(os.Stdout); err != nil {
		log.Fatal(err)
	}
	// Output:
	// pattern     example: 1001 sites, mean spacing 249.992 nm
	// window      2, chosen: false neighbours settle at 2, the cloud spans 2 directions
	//   window               1     2     3     4     5     6     7     8     9    10    11    12    13
	//   false neighbours 0.938 0.000 0.000 0.000 0.000 0.000 0.000 0.000 0.000 0.000 0.000 0.000     -
	//   components           1     2     2     2     2     2     2     2     2     2     2     2     2
	//   (988 vectors examined; noise 0 mean spacings per spacing, estimated)
	// components  2 of 2 kept: eigenvalue above 8.39e-12
	//     #   eigenvalue  variance
	//     1     0.008394    58.23%  kept
	//     2     0.006021    41.77%  kept
	// landmarks   100 of 999 vectors, cover radius 0.06394 (whitened units)
}
