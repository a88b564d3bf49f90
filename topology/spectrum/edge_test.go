package spectrum

import (
	"strings"
	"testing"

	"phasonhull/pattern"
	"phasonhull/pattern/design"
)

// modulatedSpec is x_n = n + 0.15·sin 2π(nθ + 0.1) on 300 sites.
func modulatedSpec(theta float64) design.Spec {
	s := design.NewSpec("modulated")
	s.Sites, s.Theta, s.Amp, s.Phase = 300, theta, 0.15, 0.1
	return s
}

// Bulk–boundary correspondence: sweeping the phase of a modulated design
// through one turn, the states on the first end of an open chain cross
// each of the widest gaps m times (net, upward positive) and those on the
// last end −m times, m the gap label's angle coefficient for the angle the
// phase advances by from site to site (the package documentation gives
// the argument; the counting of boundary-state crossings is that of
// Hatsugai, Phys. Rev. Lett. 71, 1993, and of the pumping of Kraus et al.,
// Phys. Rev. Lett. 109, 2012). Hopping with two angles, and springs; the
// gaps carry m of both signs and |m| up to 3.
func TestEdgeModesCountLabel(t *testing.T) {
	cases := []struct {
		name  string
		theta float64
		m     Model
		gaps  int
	}{
		{"hopping θ=0.2763", 0.2763, Model{Law: Exp{T0: 1, Decay: 4}}, 6},
		{"hopping θ=√2−1", 0.4142136, Model{Law: Exp{T0: 1, Decay: 4}}, 6},
		{"springs θ=0.2763", 0.2763, Model{Kind: Springs, Law: Exp{T0: 1, Decay: 4}}, 4},
	}
	if testing.Short() {
		cases = cases[1:2]
	}
	for _, c := range cases {
		sw, err := PhaseSweep(modulatedSpec(c.theta))
		if err != nil {
			t.Fatal(err)
		}
		r, err := EdgeModes(sw, c.m, EdgeOptions{Options: Options{Angles: []float64{c.theta}}, Gaps: c.gaps})
		if err != nil {
			t.Fatal(err)
		}
		if len(r.Gaps) != c.gaps {
			t.Fatalf("%s: %d gaps followed, want %d", c.name, len(r.Gaps), c.gaps)
		}
		signs := map[bool]bool{}
		maxM := 0
		for _, g := range r.Gaps {
			l := g.Gap.Label
			if l == nil {
				t.Errorf("%s: gap at IDS %.4f is unlabelled", c.name, g.Gap.IDS)
				continue
			}
			m := l.Coeffs[1]
			if g.First != m || g.Last != -m || g.Unresolved != 0 || !g.Agrees {
				t.Errorf("%s: gap at IDS %.4f (m = %d): first end %+d, last end %+d, %d unresolved, agrees %v; want %+d and %+d",
					c.name, g.Gap.IDS, m, g.First, g.Last, g.Unresolved, g.Agrees, m, -m)
			}
			signs[m > 0] = true
			maxM = max(maxM, abs(m))
		}
		if !signs[true] || !signs[false] || maxM < 2 {
			t.Errorf("%s: labels of the followed gaps lack both signs or |m| ≥ 2 (max |m| %d)", c.name, maxM)
		}
	}
}

// The convention is oriented: sweeping the phase the other way reverses
// every count.
func TestEdgeModesReversedSweep(t *testing.T) {
	sw, err := PhaseSweep(modulatedSpec(0.4142136))
	if err != nil {
		t.Fatal(err)
	}
	back := func(s float64) (*pattern.Pattern, error) { return sw(-s) }
	m := Model{Law: Exp{T0: 1, Decay: 4}}
	opt := EdgeOptions{Options: Options{Angles: []float64{0.4142136}}, Gaps: 4}
	fwd, err := EdgeModes(sw, m, opt)
	if err != nil {
		t.Fatal(err)
	}
	rev, err := EdgeModes(back, m, opt)
	if err != nil {
		t.Fatal(err)
	}
	for i := range fwd.Gaps {
		f, r := fwd.Gaps[i], rev.Gaps[i]
		if f.First == 0 || r.First != -f.First || r.Last != -f.Last || r.Agrees {
			t.Errorf("gap %d: forward %+d/%+d, backward %+d/%+d (agrees %v); want the backward counts reversed and not agreeing",
				i, f.First, f.Last, r.First, r.Last, r.Agrees)
		}
	}
}

func TestEdgeModesRefuses(t *testing.T) {
	if _, err := PhaseSweep(design.Spec{Family: "periodic", Sites: 20, Cell: []float64{1, 2}, Seed: 1}); err == nil || !strings.Contains(err.Error(), "no phase") {
		t.Errorf("periodic family: %v, want a refusal (no phase)", err)
	}
	sw, err := PhaseSweep(modulatedSpec(0.3))
	if err != nil {
		t.Fatal(err)
	}
	if _, err := EdgeModes(sw, Model{Ends: Periodic}, EdgeOptions{}); err == nil || !strings.Contains(err.Error(), "open") {
		t.Errorf("periodic ends: %v, want a refusal", err)
	}
	if _, err := EdgeModes(sw, Model{}, EdgeOptions{Samples: -1}); err == nil {
		t.Error("negative samples accepted")
	}
}

// A Sturmian tiling swept through its intercept changes by jumps (one tile
// flips at a time), which EdgeModes reads from the count below each gap's
// middle. The widest gaps, m = ±1, still agree with their labels; and no
// gap disagrees without saying so: where a level jumps across a whole gap
// and no end can be credited, the step is counted unresolved.
func TestEdgeModesSturmianJumps(t *testing.T) {
	thetas := []float64{golden * golden, 0.2763}
	if testing.Short() {
		thetas = thetas[:1]
	}
	for _, theta := range thetas {
		s := design.NewSpec("sturmian")
		s.Sites, s.Theta = 300, theta
		sw, err := PhaseSweep(s)
		if err != nil {
			t.Fatal(err)
		}
		r, err := EdgeModes(sw, Model{Law: Exp{T0: 1, Decay: 2}}, EdgeOptions{Options: Options{Angles: []float64{theta}, MinGap: 0.01}, Gaps: 6})
		if err != nil {
			t.Fatal(err)
		}
		jumps := 0
		for _, g := range r.Gaps {
			jumps += g.Jumps
			l := g.Gap.Label
			if l == nil {
				continue
			}
			m := l.Coeffs[1]
			if abs(m) == 1 && !g.Agrees {
				t.Errorf("θ %.4f: gap m = %d: first %+d last %+d (%d jumps, %d unresolved), want agreement", theta, m, g.First, g.Last, g.Jumps, g.Unresolved)
			}
			if g.Unresolved == 0 && (g.First != m || g.Last != -m) {
				t.Errorf("θ %.4f: gap m = %d read %+d/%+d with no unresolved step", theta, m, g.First, g.Last)
			}
		}
		if jumps == 0 {
			t.Errorf("θ %.4f: no step read as a jump; the sweep of a tiling should have some", theta)
		}
	}
}
