package hull

import (
	"strings"
	"testing"

	"phasonhull/pattern/design"
)

// Chains of independent spacings have no hull: their positions wander
// from any lattice like a random walk (common practice). The calibrated
// independent-spacings rule calls them disordered where it can tell: 3000
// Gaussian spacings of 7.5% spread and 64 uniform spacings of ±12% (the
// random design family, default seed).
func TestIndependentSpacingsAreDisordered(t *testing.T) {
	for _, s := range []design.Spec{
		{Family: "random", Dist: "gaussian", Spread: 0.075, Sites: 3000},
		{Family: "random", Dist: "uniform", Spread: 0.12, Sites: 64},
		{Family: "random", Dist: "exponential", Spread: 0.3, Sites: 2000},
	} {
		r := analyze(t, generate(t, s))
		if r.Hull.Class != Disordered {
			t.Errorf("%s %g, %d sites: class %s (%s), want disordered", s.Dist, s.Spread, s.Sites, r.Hull.Class, r.Hull.Reason)
			continue
		}
		if r.Disorder == nil || r.Disorder.Relative <= 0 {
			t.Errorf("%s %g, %d sites: no disorder figure", s.Dist, s.Spread, s.Sites)
		}
	}
}

// A lattice shaken by position noise and a circle drowned in it are never
// called disordered: their spacings' lag-1 autocorrelation is near −½
// (common practice).
func TestShakenChainsAreNotDisordered(t *testing.T) {
	for _, s := range []design.Spec{
		{Family: "periodic", Cell: []float64{1}, Sites: 64, Noise: 0.05},
		{Family: "modulated", Theta: 0.2763, Sin: []float64{0.05}, Sites: 64, Noise: 0.05},
		{Family: "modulated", Theta: 0.2763, Sin: []float64{0.05}, Sites: 3000, Noise: 0.05},
	} {
		r := analyze(t, generate(t, s))
		if r.Hull.Class == Disordered {
			t.Errorf("%s, %d sites, noise %g: called disordered (%s)", s.Family, s.Sites, s.Noise, r.Hull.Reason)
		}
	}
}

// Below the size where the rule can tell, a chain of independent spacings
// is unresolved, and the reason names the smallest size that would decide.
func TestShortIndependentChainSaysWhatWouldDecide(t *testing.T) {
	r := analyze(t, generate(t, design.Spec{Family: "random", Dist: "uniform", Spread: 0.12, Sites: 24}))
	if r.Hull.Class == Disordered {
		return // the rule could tell on this draw
	}
	if r.Hull.Class != Unresolved {
		t.Fatalf("class %s (%s), want unresolved or disordered", r.Hull.Class, r.Hull.Reason)
	}
	if !strings.Contains(r.Hull.Reason, "sites would decide") && !strings.Contains(r.Hull.Reason, "would decide") {
		t.Errorf("reason does not say what would decide: %s", r.Hull.Reason)
	}
}
