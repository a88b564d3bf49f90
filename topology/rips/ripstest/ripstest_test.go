package ripstest

import (
	"math"
	"slices"
	"testing"

	"phasonhull/topology/rips"
)

// The reference's output format, as ripser 1.2.1 prints it.
const sampleOutput = `value range: [0.1,2]
distance matrix with 4 points, using threshold at enclosing radius 2
persistence intervals in dim 0:
 [0,0.5)
 [0, )
persistence intervals in dim 1:
 [0.5,0.707107)
`

func TestReferenceNotationRoundTrip(t *testing.T) {
	got, err := ParseReference([]byte(sampleOutput))
	if err != nil {
		t.Fatal(err)
	}
	want := FormatBars([]rips.Bar{
		{Dim: 1, Birth: 0.5, Death: math.Sqrt(0.5)},
		{Dim: 0, Birth: 0, Death: math.Inf(1)},
		{Dim: 0, Birth: 0, Death: 0.5},
	})
	if !slices.Equal(got, want) {
		t.Errorf("parsed %q, formatted %q", got, want)
	}
	if a, b := Diff(got, want); len(a)+len(b) > 0 {
		t.Errorf("Diff of equal lists: %q, %q", a, b)
	}
	a, b := Diff(got, want[:2])
	if !slices.Equal(a, want[2:]) || len(b) != 0 {
		t.Errorf("Diff with one bar missing: %q, %q", a, b)
	}
}

func TestParseReferenceRefusesABarOutsideADimension(t *testing.T) {
	if _, err := ParseReference([]byte(" [0,1)\n")); err == nil {
		t.Error("a bar before any dimension line was accepted")
	}
}

// Quantize promises coordinates on a power-of-two grid of at most Grid
// steps across, hence squared distances that are whole numbers of squared
// steps, at most dim·Grid².
func TestQuantizeGivesIntegerSquaredDistances(t *testing.T) {
	raw := Torus(60, 2, 1, 3)
	width := 0.0
	for k := range raw[0] {
		lo, hi := math.Inf(1), math.Inf(-1)
		for _, p := range raw {
			lo, hi = min(lo, p[k]), max(hi, p[k])
		}
		width = max(width, hi-lo)
	}
	unit := math.Exp2(math.Ceil(math.Log2(width / Grid)))
	pts := Quantize(raw)
	for i := range pts {
		for j := range i {
			s := 0.0
			for k := range pts[i] {
				d := (pts[i][k] - pts[j][k]) / unit
				s += d * d
			}
			if s != math.Round(s) || s > 3*Grid*Grid {
				t.Fatalf("points %d, %d: squared distance %v steps²", i, j, s)
			}
		}
	}
}

func TestReferenceArgs(t *testing.T) {
	got := ReferenceArgs("c.txt", 2, 3, 0.5)
	want := []string{"--format", "point-cloud", "--dim", "2", "--modulus", "3", "--threshold", "0.5", "c.txt"}
	if !slices.Equal(got, want) || ReferenceProgram(3) != "ripser-coeff" || ReferenceProgram(0) != "ripser" {
		t.Errorf("ReferenceArgs = %q, programs %q %q", got, ReferenceProgram(0), ReferenceProgram(3))
	}
}
