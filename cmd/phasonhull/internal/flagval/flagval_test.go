package flagval

import (
	"math"
	"slices"
	"testing"
)

// A length given with its own unit is converted to the unit of the
// positions; a bare number is taken in that unit; a unit without a unit
// to convert to is refused (common practice: 1 um = 1000 nm).
func TestLengthResolve(t *testing.T) {
	x := 1.0
	v := NewLength(&x)
	if err := v.Resolve("um"); err != nil || x != 1 {
		t.Fatalf("default: %v, %v", x, err)
	}
	for _, c := range []struct {
		in, unit string
		want     float64
		ok       bool
	}{
		{"450nm", "um", 0.45, true},
		{"0.45", "um", 0.45, true},
		{"-20 nm", "nm", -20, true},
		{"2mm", "", 0, false},
		{"2deg", "um", 0, false},
	} {
		if err := v.Set(c.in); err != nil {
			t.Fatalf("Set(%q): %v", c.in, err)
		}
		err := v.Resolve(c.unit)
		if (err == nil) != c.ok || (c.ok && x != c.want) {
			t.Errorf("%q in %q: %v, %v; want %v (ok %v)", c.in, c.unit, x, err, c.want, c.ok)
		}
	}
	if err := v.Set("abc"); err == nil {
		t.Error("Set accepted a word")
	}
}

func TestLengthListResolve(t *testing.T) {
	var xs []float64
	v := NewLengthList(&xs)
	if err := v.Set("0.1,30nm,-0.02"); err != nil {
		t.Fatal(err)
	}
	if err := v.Resolve("um"); err != nil || !slices.Equal(xs, []float64{0.1, 0.03, -0.02}) {
		t.Errorf("got %v, %v", xs, err)
	}
	if err := v.Set("0.1,x"); err == nil {
		t.Error("a list with a word was accepted")
	}
}

// ParseBytes reads memory sizes in binary and decimal units (common
// practice: 1 KiB = 1024 B, 1 kB = 1000 B).
func TestParseBytes(t *testing.T) {
	for in, want := range map[string]int64{"512MiB": 512 << 20, "8GiB": 8 << 30, "2GB": 2e9, "1000000": 1e6, " 4 KiB ": 4096} {
		if got, err := ParseBytes(in); err != nil || got != want {
			t.Errorf("ParseBytes(%q) = %d, %v; want %d", in, got, err, want)
		}
	}
	for _, bad := range []string{"", "0", "-1GiB", "lots", "1e30TB"} {
		if _, err := ParseBytes(bad); err == nil {
			t.Errorf("ParseBytes(%q) accepted", bad)
		}
	}
}

// A grid START:STOP:COUNT spaces COUNT lengths evenly, both ends included,
// the unit of one end applying to the other; a list stays a list.
func TestLengthGrid(t *testing.T) {
	for _, c := range []struct {
		in   string
		want []float64
	}{
		{"0:0.2mm:5", []float64{0, 0.05, 0.1, 0.15, 0.2}},
		{"10um:30um:3", []float64{0.01, 0.02, 0.03}},
		{"0.01,20um", []float64{0.01, 0.02}},
	} {
		var got []float64
		g := NewLengthGrid(&got)
		if err := g.Set(c.in); err != nil {
			t.Fatal(err)
		}
		if err := g.Resolve("mm"); err != nil {
			t.Fatal(err)
		}
		if len(got) != len(c.want) {
			t.Fatalf("%s: %v, want %v", c.in, got, c.want)
		}
		for i := range got {
			if math.Abs(got[i]-c.want[i]) > 1e-12 {
				t.Errorf("%s: %v, want %v", c.in, got, c.want)
			}
		}
	}
	for _, bad := range []string{"0:1", "0:1mm:1", "0nm:1mm:3", "a:1:3"} {
		var got []float64
		if err := NewLengthGrid(&got).Set(bad); err == nil {
			t.Errorf("%q accepted", bad)
		}
	}
}
