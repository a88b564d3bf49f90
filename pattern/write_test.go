package pattern

import (
	"bytes"
	"errors"
	"math"
	"strconv"
	"strings"
	"testing"
)

// awkwardPositions are ascending floats whose shortest decimal forms are
// long, plus a few with exponents, to exercise the exact round trip.
func awkwardPositions() []float64 {
	pos := []float64{-2.5e-3, -1.0 / 3}
	for i := 0; i < 40; i++ {
		pos = append(pos, float64(i)+math.Pi/math.Pow(3, float64(i)))
	}
	return append(pos, 1e21, 1.0000000000000002e21, math.MaxFloat64/2)
}

func TestWriteCSVFormat(t *testing.T) {
	p := &Pattern{Positions: []float64{0, 0.1, 1.5, 1e-7, 2.5e21}, Unit: "um"}
	var b bytes.Buffer
	if err := WriteCSV(&b, p, []string{"family = periodic", "spec: {\"a\":1}"}); err != nil {
		t.Fatal(err)
	}
	want := "# family = periodic\n# spec: {\"a\":1}\nposition_um\n0\n0.1\n1.5\n1e-07\n2.5e+21\n"
	if b.String() != want {
		t.Errorf("WriteCSV wrote\n%q\nwant\n%q", b.String(), want)
	}
	b.Reset()
	if err := WriteCSV(&b, &Pattern{Positions: []float64{1, 2}}, nil); err != nil {
		t.Fatal(err)
	}
	if got := b.String(); got != "position\n1\n2\n" {
		t.Errorf("without unit or comments: %q", got)
	}
}

// TestWriteCSVExact checks that every written value parses back to the same
// bits (strconv's shortest round-trip formatting, common practice).
func TestWriteCSVExact(t *testing.T) {
	p := &Pattern{Positions: awkwardPositions()}
	var b bytes.Buffer
	if err := WriteCSV(&b, p, nil); err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSuffix(b.String(), "\n"), "\n")
	if lines[0] != "position" || len(lines) != len(p.Positions)+1 {
		t.Fatalf("got %d lines starting %q", len(lines), lines[0])
	}
	for i, l := range lines[1:] {
		v, err := strconv.ParseFloat(l, 64)
		if err != nil || math.Float64bits(v) != math.Float64bits(p.Positions[i]) {
			t.Errorf("line %d: %q reads back as %v (err %v), want %v", i+2, l, v, err, p.Positions[i])
		}
	}
}

func TestWriteCSVRefusals(t *testing.T) {
	p := &Pattern{Positions: []float64{1, 2}}
	var b bytes.Buffer
	if err := WriteCSV(&b, p, []string{"ok", "two\nlines"}); err == nil || !strings.Contains(err.Error(), "comment 2") {
		t.Errorf("comment with a line break: err = %v", err)
	}
	p.Unit = "m m"
	if err := WriteCSV(&b, p, nil); err == nil || !strings.Contains(err.Error(), "unit") {
		t.Errorf("unit with a space: err = %v", err)
	}
	if b.Len() != 0 {
		t.Errorf("refused writes wrote %q", b.String())
	}
	p.Unit = ""
	if err := WriteCSV(failingWriter{}, p, nil); !errors.Is(err, errDiskFull) {
		t.Errorf("failing writer: err = %v, want it to wrap %v", err, errDiskFull)
	}
}

var errDiskFull = errors.New("disk full")

type failingWriter struct{}

func (failingWriter) Write([]byte) (int, error) { return 0, errDiskFull }

// TestWriteCSVReadBack writes a pattern and reads it with Read: the
// positions come back bit for bit and the unit from the header.
func TestWriteCSVReadBack(t *testing.T) {
	for _, unit := range []string{"", "um", "nm"} {
		var pos []float64
		for i := 0; i < 50; i++ {
			pos = append(pos, 1.7*float64(i)+math.Sin(float64(i))/7+1e-13*math.Pi)
		}
		p, err := New(pos, unit, "test")
		if err != nil {
			t.Fatal(err)
		}
		var b bytes.Buffer
		if err := WriteCSV(&b, p, []string{"design = test", "spec: {\"x\": [1, 2]}"}); err != nil {
			t.Fatal(err)
		}
		q, err := Read(&b, "written.csv", ReadOptions{})
		if err != nil {
			t.Fatalf("unit %q: reading back: %v", unit, err)
		}
		if q.Unit != unit {
			t.Errorf("unit %q read back as %q", unit, q.Unit)
		}
		if len(q.Positions) != len(p.Positions) {
			t.Fatalf("unit %q: %d positions read back, wrote %d", unit, len(q.Positions), len(p.Positions))
		}
		for i := range p.Positions {
			if math.Float64bits(q.Positions[i]) != math.Float64bits(p.Positions[i]) {
				t.Errorf("unit %q: position %d: read %v, wrote %v", unit, i, q.Positions[i], p.Positions[i])
			}
		}
	}
}
