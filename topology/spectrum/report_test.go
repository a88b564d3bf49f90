package spectrum

import (
	"bytes"
	"context"
	"encoding/csv"
	"math"
	"slices"
	"strconv"
	"strings"
	"testing"

	"phasonhull/pattern/design"
	"phasonhull/topology/hull"
)

// Label records where the labels came from, the group, and what the
// caller must know; the options it returns are labelled as Apply labels
// them.
func TestReportLabel(t *testing.T) {
	for _, c := range []struct {
		l      Labelling
		source string
		warn   bool
	}{
		{Labelling{Source: GivenAngles, Angles: []float64{0.3}}, "given (--theta)", false},
		{Labelling{Source: GivenPeriod, Period: 4}, "given (--period)", false},
		{Labelling{Source: DesignAngles, Angles: []float64{0.3, 0.7}}, "the design's θ", false},
		{Labelling{Source: DesignCell, Period: 3}, "the design's cell", false},
		{Labelling{Source: HullAnalysis, Class: hull.Circle, Angles: []float64{0.3}, Resolution: 0.01}, "recovered by the hull analysis (circle hull)", false},
		{Labelling{Source: HullAnalysis, Class: hull.Unresolved, Unresolved: "too few sites"}, "recovered by the hull analysis (unresolved hull)", true},
	} {
		r := NewReport(5)
		opt := r.Label(c.l, Options{MinGap: 0.01})
		if r.LabelSource != c.source {
			t.Errorf("%s: label source %q, want %q", c.l.Source, r.LabelSource, c.source)
		}
		want := c.l.Apply(Options{MinGap: 0.01})
		if !slices.Equal(opt.Angles, want.Angles) || opt.Period != want.Period || opt.Resolution != want.Resolution || opt.MinGap != 0.01 {
			t.Errorf("%s: options %+v, want %+v", c.l.Source, opt, want)
		}
		if r.Angles == nil || !slices.Equal(r.Angles, want.Angles) && len(want.Angles) > 0 || r.Period != c.l.Period {
			t.Errorf("%s: report angles %v period %d", c.l.Source, r.Angles, r.Period)
		}
		warned := len(r.Warnings) == 1 && strings.Contains(r.Warnings[0], c.l.Unresolved) && strings.Contains(r.Warnings[0], "not labelled")
		if warned != c.warn {
			t.Errorf("%s: warnings %q", c.l.Source, r.Warnings)
		}
	}
}

// Info describes the operator with its on-site terms, defaults filled in.
func TestModelInfo(t *testing.T) {
	i := Model{}.Info("")
	if i.Model != "hopping" || i.Ends != "open" || i.Law != (Exp{T0: 1}).String() || i.OnSite != "0" {
		t.Errorf("zero model: %+v", i)
	}
	m := Model{Kind: Springs, Law: Power{T0: 2, Power: 3}, Ends: Periodic, Closing: 1.5, NNN: 0.2,
		OnSite: OnSite{Constant: 0.5, Values: []float64{1, 2}, Lambda: 1.5, Phase: 0.1}}
	i = m.Info("terms.txt")
	want := OperatorInfo{Model: "springs", Law: m.Law.String(), NNN: 0.2, Ends: "periodic", Closing: 1.5, OnSite: "0.5 + values from terms.txt + 2·1.5·cos 2π(nθ + 0.1)"}
	if *i != want {
		t.Errorf("info %+v, want %+v", *i, want)
	}
}

// MinGapFor is the default until 4 mean level spacings exceed it.
func TestMinGapFor(t *testing.T) {
	if got := MinGapFor(10000); got != DefaultMinGap {
		t.Errorf("10000 sites: %g, want %g", got, DefaultMinGap)
	}
	if got := MinGapFor(1000); got != 0.004 {
		t.Errorf("1000 sites: %g, want 0.004", got)
	}
}

// readCSV reads a CSV with '#' comments and a header row.
func readCSV(t *testing.T, b *bytes.Buffer, header string) [][]float64 {
	t.Helper()
	r := csv.NewReader(b)
	r.Comment = '#'
	rows, err := r.ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if strings.Join(rows[0], ",") != header {
		t.Fatalf("header %v, want %s", rows[0], header)
	}
	v := make([][]float64, len(rows)-1)
	for i, row := range rows[1:] {
		for _, f := range row {
			x, err := strconv.ParseFloat(f, 64)
			if err != nil {
				t.Fatal(err)
			}
			v[i] = append(v[i], x)
		}
	}
	return v
}

// WriteLevels writes every level with the IDS just above it, or the
// counting staircase from 0 to 1 when the levels were counted.
func TestWriteLevels(t *testing.T) {
	op := build(t, lattice(t, 200), Model{OnSite: OnSite{Lambda: 1, Theta: golden}})
	for _, method := range []Method{Values, Counting} {
		res, err := Analyze(op, Options{Method: method})
		if err != nil {
			t.Fatal(err)
		}
		r := NewReport(DefaultMaxCoeff)
		r.Source, r.Spectrum = "lattice", res
		var b bytes.Buffer
		if err := r.WriteLevels(&b, op); err != nil {
			t.Fatal(err)
		}
		if method == Values {
			rows := readCSV(t, &b, "eigenvalue,ids")
			if len(rows) != 200 {
				t.Fatalf("%d levels, want 200", len(rows))
			}
			for k, row := range rows {
				if row[0] != res.Values[k] || row[1] != float64(k+1)/200 {
					t.Fatalf("row %d: %v, want %g,%g", k, row, res.Values[k], float64(k+1)/200)
				}
			}
			continue
		}
		rows := readCSV(t, &b, "energy,ids")
		if len(rows) != 2001 || rows[0][1] != 0 || rows[len(rows)-1][1] != 1 {
			t.Fatalf("staircase of %d rows from %v to %v", len(rows), rows[0], rows[len(rows)-1])
		}
		for k := 1; k < len(rows); k++ {
			if rows[k][0] <= rows[k-1][0] || rows[k][1] < rows[k-1][1] {
				t.Fatalf("staircase not increasing at row %d: %v after %v", k, rows[k], rows[k-1])
			}
		}
	}
}

// ParseGrid spaces COUNT values evenly from START to STOP, and refuses
// what is not a grid.
func TestParseGrid(t *testing.T) {
	v, err := ParseGrid("0.1:0.5:5")
	if err != nil {
		t.Fatal(err)
	}
	for i, want := range []float64{0.1, 0.2, 0.3, 0.4, 0.5} {
		if math.Abs(v[i]-want) > 1e-15 {
			t.Errorf("value %d: %g, want %g", i, v[i], want)
		}
	}
	if v, err := ParseGrid("0.3:0.9:1"); err != nil || !slices.Equal(v, []float64{0.3}) {
		t.Errorf("one value: %v, %v", v, err)
	}
	for _, bad := range []string{"1:2", "a:1:2", "0:1:0", "0:1:100001", "NaN:1:3", "0:Inf:3", "0:1:2.5"} {
		if _, err := ParseGrid(bad); err == nil {
			t.Errorf("%q: no error", bad)
		}
	}
}

// WriteScan writes the whole spectrum at each θ, the same values it hands
// to each.
func TestWriteScan(t *testing.T) {
	spec := design.Spec{Family: design.Periodic, Sites: 30, Cell: []float64{1}}
	m := Model{OnSite: OnSite{Lambda: 1}}
	thetas := []float64{0.2, 0.4}
	var got [][]float64
	var b bytes.Buffer
	if err := WriteScan(context.Background(), &b, spec, m, thetas, "lattice.json", func(theta float64, v []float64) { got = append(got, append([]float64{theta}, v...)) }); err != nil {
		t.Fatal(err)
	}
	rows := readCSV(t, &b, "theta,eigenvalue,ids")
	if len(got) != 2 || len(rows) != 60 {
		t.Fatalf("%d spectra handed, %d rows written; want 2 and 60", len(got), len(rows))
	}
	for i, row := range rows {
		s, k := got[i/30], i%30
		if row[0] != s[0] || row[1] != s[1+k] || row[2] != float64(k+1)/30 {
			t.Fatalf("row %d: %v, want %g,%g,%g", i, row, s[0], s[1+k], float64(k+1)/30)
		}
	}
}

// On a Fibonacci chain most gaps are of high order: the text names the
// bound that labels them, and that bound labels as many gaps as it says.
func TestLargerBound(t *testing.T) {
	p := generate(t, design.Spec{Family: design.Substitution, Rule: "fibonacci", Sites: 5000, Tiles: map[string]float64{"A": 1.618, "B": 1}})
	op := build(t, p, Model{Law: Exp{T0: 1, Decay: 2}})
	theta := (3 - math.Sqrt(5)) / 2 // frequency of B (common practice)
	report := func(maxCoeff int) *Report {
		r := NewReport(maxCoeff)
		r.Source, r.Sites = p.Source, p.Len()
		opt := r.Label(Labelling{Source: GivenAngles, Angles: []float64{theta}}, Options{MaxCoeff: maxCoeff})
		r.Spectrum = analyze(t, op, opt)
		return r
	}
	labelled := func(r *Report) int {
		n := 0
		for _, g := range r.Spectrum.Gaps {
			if g.Label != nil {
				n++
			}
		}
		return n
	}
	r := report(DefaultMaxCoeff)
	now := labelled(r)
	mc, n, ok := r.LargerBound()
	if !ok || mc <= DefaultMaxCoeff || n <= now {
		t.Fatalf("%d gaps, %d labelled at |m| ≤ %d: LargerBound = %d, %d, %v; want a larger bound that labels more", len(r.Spectrum.Gaps), now, DefaultMaxCoeff, mc, n, ok)
	}
	if got := labelled(report(mc)); got != n {
		t.Errorf("--max-coeff %d labels %d gaps, LargerBound said %d", mc, got, n)
	}
	var b strings.Builder
	if err := r.WriteText(&b); err != nil {
		t.Fatal(err)
	}
	if want := "            --max-coeff " + strconv.Itoa(mc) + " would label " + strconv.Itoa(n) + " of them"; !strings.Contains(b.String(), want) {
		t.Errorf("text lacks %q:\n%s", want, b.String())
	}
}
