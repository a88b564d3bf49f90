package hull

import (
	"slices"
	"testing"

	"phasonhull/topology"
)

// The rules of LabelGroup, each on a result that would also satisfy a
// later rule, so that a change of their order fails.
func TestLabelGroupRules(t *testing.T) {
	list := GapLabels{Generators: []float64{1, 0.2, 0.3}, Labels: []topology.Label{{IDS: 0.2, Coeffs: []int{0, 1, 0}}}}
	finite := &Result{Hull: Hull{Class: Finite, Period: 3}, Angles: []float64{0.25}, GapLabels: list}
	if g := finite.LabelGroup(); g.Period != 3 || g.Angles != nil || g.Labels != nil {
		t.Errorf("finite hull of period 3: %+v, want the period alone", g)
	}
	circle := &Result{Hull: Hull{Class: Circle}, Angles: []float64{0.3}, AngleUncertainty: []float64{2e-4}, GapLabels: list}
	if g := circle.LabelGroup(); !slices.Equal(g.Angles, []float64{0.3}) || g.Uncertainty != 2e-4 || g.Labels != nil {
		t.Errorf("circle: %+v, want its angle and uncertainty", g)
	}
	torus := &Result{Hull: Hull{Class: Torus}, Angles: []float64{0.3, 0.41}, AngleUncertainty: []float64{1e-4, 3e-4}}
	if g := torus.LabelGroup(); len(g.Angles) != 2 || g.Uncertainty != 3e-4 {
		t.Errorf("torus: %+v, want both angles and the larger uncertainty", g)
	}
	point := &Result{Hull: Hull{Class: Point, Period: 1}, GapLabels: list}
	if g := point.LabelGroup(); g.Period != 0 || g.Angles != nil || g.Labels != nil {
		t.Errorf("point hull: %+v, want no labels", g)
	}
	tiling := &Result{Hull: Hull{Class: Cantor}, GapLabels: list}
	if g := tiling.LabelGroup(); len(g.Labels) != 1 || !slices.Equal(g.Generators, list.Generators) {
		t.Errorf("tiling without angles: %+v, want its own label list", g)
	}
	unresolved := &Result{Hull: Hull{Class: Unresolved}, GapLabels: GapLabels{Labels: []topology.Label{}}}
	if g := unresolved.LabelGroup(); g.Period != 0 || g.Angles != nil || g.Labels != nil {
		t.Errorf("unresolved: %+v, want no labels", g)
	}
}
