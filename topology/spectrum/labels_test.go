package spectrum

import (
	"context"
	"math"
	"slices"
	"strings"
	"testing"

	"phasonhull/pattern/design"
	"phasonhull/topology/hull"
)

// The rules of ChooseLabels in order: each case also offers the sources of
// the later rules, so that a change of order fails.
func TestChooseLabelsOrder(t *testing.T) {
	mod := design.NewSpec(design.Modulated)
	mod.Theta, mod.Sin = 0.2763, []float64{0.1}
	two := design.NewSpec(design.TwoAngle)
	two.Theta, two.Theta2, two.Amp, two.Amp2 = 0.4142, 0.732, 0.1, 0.05
	per := design.NewSpec(design.Periodic)
	per.Cell = []float64{1, 1.5, 1.2}
	for _, c := range []struct {
		name   string
		src    LabelSources
		source LabelSource
		angles []float64
		period int
	}{
		{"given angles", LabelSources{Angles: []float64{0.3}, Period: 4, Design: &mod}, GivenAngles, []float64{0.3}, 0},
		{"given period", LabelSources{Period: 4, Design: &mod}, GivenPeriod, nil, 4},
		{"design θ", LabelSources{Design: &mod}, DesignAngles, []float64{0.2763}, 0},
		{"design θ and θ2", LabelSources{Design: &two}, DesignAngles, []float64{0.4142, 0.732}, 0},
		{"design cell", LabelSources{Design: &per}, DesignCell, nil, 3},
	} {
		l, err := ChooseLabels(context.Background(), c.src)
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		if l.Source != c.source || !slices.Equal(l.Angles, c.angles) || l.Period != c.period || l.Resolution != 0 {
			t.Errorf("%s: %+v, want source %q, angles %v, period %d and the default width", c.name, l, c.source, c.angles, c.period)
		}
	}
	if _, err := ChooseLabels(context.Background(), LabelSources{}); err == nil {
		t.Error("no source at all: no error")
	}
}

// Without given labels or a design angle, the hull analysis labels: a
// loop design's circle (its spec has no θ) with a match widened by the
// angle's uncertainty, a lattice with none and a note why.
func TestChooseLabelsFromHull(t *testing.T) {
	loop := design.NewSpec(design.Loop)
	loop.Sites, loop.Step, loop.Amp, loop.RadiusCos = 1000, 0.2763, 0.2, []float64{0, 0.3}
	p, err := design.Generate(loop)
	if err != nil {
		t.Fatal(err)
	}
	l, err := ChooseLabels(context.Background(), LabelSources{Design: &loop, Pattern: p, MaxCoeff: 4})
	if err != nil {
		t.Fatal(err)
	}
	if l.Source != HullAnalysis || l.Class != hull.Circle || len(l.Angles) != 1 || math.Abs(l.Angles[0]-0.2763) > 1e-3 {
		t.Fatalf("loop design: %+v, want the circle angle 0.2763 from the hull analysis", l)
	}
	if base := DefaultResolution / float64(p.Len()); !(l.Resolution > base) {
		t.Errorf("match width %g for a measured angle, want more than the default %g", l.Resolution, base)
	}
	opt := l.Apply(Options{MinGap: 0.01})
	if !slices.Equal(opt.Angles, l.Angles) || opt.Resolution != l.Resolution || opt.MinGap != 0.01 {
		t.Errorf("Apply gave %+v", opt)
	}

	lattice, err := design.Generate(design.Spec{Family: design.Periodic, Cell: []float64{1}, Sites: 300, Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	l, err = ChooseLabels(context.Background(), LabelSources{Pattern: lattice})
	if err != nil {
		t.Fatal(err)
	}
	if l.Class != hull.Point || l.Angles != nil || l.Period != 0 || l.Labels != nil || len(l.Notes) != 1 || !strings.Contains(l.Notes[0], "group is Z") {
		t.Errorf("lattice: %+v, want no labels and a note on the group Z", l)
	}
}
