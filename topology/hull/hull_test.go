package hull

import (
	"bytes"
	"encoding/json"
	"math"
	"testing"

	"phasonhull/pattern"
	"phasonhull/pattern/design"
	"phasonhull/topology"
)

func generate(t *testing.T, s design.Spec) *pattern.Pattern {
	t.Helper()
	p, err := design.Generate(s)
	if err != nil {
		t.Fatalf("generate %+v: %v", s, err)
	}
	return p
}

func analyze(t *testing.T, p *pattern.Pattern) *Result {
	t.Helper()
	r, err := Analyze(p, Options{})
	if err != nil {
		t.Fatalf("analyze: %v", err)
	}
	return r
}

// A one-harmonic modulation x_n = n + a sin 2π(nθ + φ) has a circle hull
// rotated by θ (common practice): the class is circle and, noise-free, the
// folded angle is θ to better than 1e-9 for 2000 sites.
func TestCircleNoiseFree(t *testing.T) {
	for _, theta := range []float64{(math.Sqrt(5) - 1) / 2, math.Sqrt(2) - 1, 0.2763} {
		p := generate(t, design.Spec{Family: "modulated", Sites: 2000, Theta: theta, Sin: []float64{0.1}, Phase: 0.13})
		r := analyze(t, p)
		if r.Hull.Class != Circle {
			t.Fatalf("θ = %v: class %s (%s), want circle", theta, r.Hull.Class, r.Hull.Reason)
		}
		if got, want := r.Angles[0], topology.Fold(theta); math.Abs(got-want) > 1e-9 {
			t.Errorf("θ = %v: angle %.15f, want %.15f", theta, got, want)
		}
		if len(r.GapLabels.Labels) != 2*DefaultMaxCoeff {
			t.Errorf("θ = %v: %d labels, want %d (one per m ≠ 0, |m| ≤ M, for irrational θ; common practice)", theta, len(r.GapLabels.Labels), 2*DefaultMaxCoeff)
		}
	}
}

// Small samples: a circle hull must be found from 40 sites.
func TestCircleFortySites(t *testing.T) {
	p := generate(t, design.Spec{Family: "modulated", Sites: 40, Theta: math.Sqrt(2) - 1, Sin: []float64{0.1}})
	r := analyze(t, p)
	if r.Hull.Class != Circle {
		t.Fatalf("class %s (%s), want circle", r.Hull.Class, r.Hull.Reason)
	}
	if math.Abs(r.Angles[0]-(math.Sqrt(2)-1)) > 1e-6 {
		t.Errorf("angle %v, want √2−1", r.Angles[0])
	}
}

// The sine circle map ψ → ψ + Ω − (K/2π) sin 2πψ at K = 1 and
// Ω ≈ 0.6066610635 has rotation number (√5−1)/2 (Shenker, Physica D 5,
// 1982; Ω from memory). The test computes the orbit's lifted rotation
// number independently and checks both, then asks the analysis — which
// never sees Ω — for the folded angle 1 − (√5−1)/2 = 0.381966 within 1e-4.
func TestCriticalCircleMap(t *testing.T) {
	const omega, n = 0.6066610635, 2000
	golden := (math.Sqrt(5) - 1) / 2
	psi := 0.0
	for range 100000 {
		psi += omega - 1/(2*math.Pi)*math.Sin(2*math.Pi*psi)
	}
	if rho := psi / 100000; math.Abs(rho-golden) > 1e-4 {
		t.Fatalf("lifted rotation number of the orbit %v, want (√5−1)/2 = %v", rho, golden)
	}
	p := generate(t, design.Spec{Family: "circle-map", Sites: n, Omega: omega, K: 1, Amp: 0.1})
	r := analyze(t, p)
	if r.Hull.Class != Circle {
		t.Fatalf("class %s (%s), want circle", r.Hull.Class, r.Hull.Reason)
	}
	if want := topology.Fold(golden); math.Abs(r.Angles[0]-want) > 1e-4 {
		t.Errorf("angle %.7f, want %.7f within 1e-4", r.Angles[0], want)
	}
}

// A deformed loop: the rotation number is the arc step, not any angle of
// the curve's parametrisation.
func TestDeformedLoop(t *testing.T) {
	p := generate(t, design.Spec{Family: "loop", Sites: 1000, Step: 0.2763, Amp: 0.2, RadiusCos: []float64{0, 0.3}})
	r := analyze(t, p)
	if r.Hull.Class != Circle {
		t.Fatalf("class %s (%s), want circle", r.Hull.Class, r.Hull.Reason)
	}
	if math.Abs(r.Angles[0]-0.2763) > 1e-7 {
		t.Errorf("angle %.9f, want 0.2763", r.Angles[0])
	}
}

// Two incommensurate modulations: a two-torus, with a basis of the module
// Z + Zθ1 + Zθ2 (any basis is correct; compared with SameModule).
func TestTorus(t *testing.T) {
	if testing.Short() {
		t.Skip("H2 on 300 landmarks")
	}
	t1, t2 := math.Sqrt(2)-1, math.Sqrt(3)-1
	p := generate(t, design.Spec{Family: "two-angle", Sites: 3000, Theta: t1, Amp: 0.1, Theta2: t2, Amp2: 0.08})
	r := analyze(t, p)
	if r.Hull.Class != Torus {
		t.Fatalf("class %s %v (%s), want torus", r.Hull.Class, r.Hull.Betti, r.Hull.Reason)
	}
	if !topology.SameModule([]float64{t1, t2}, r.Angles, 3, 1e-7) {
		t.Errorf("angles %v do not generate Z + Z(√2−1) + Z(√3−1)", r.Angles)
	}
}

// Periodic cells: a finite hull of p points and the labels k/p (Bloch's
// theorem; common practice); a rational modulation θ = p/q is periodic with
// period q.
func TestPeriodic(t *testing.T) {
	cases := []struct {
		spec   design.Spec
		class  Class
		period int
	}{
		{design.Spec{Family: "periodic", Cell: []float64{1}, Sites: 200}, Point, 1},
		{design.Spec{Family: "periodic", Cell: []float64{1, 1.5, 1.2}, Sites: 200}, Finite, 3},
		{design.Spec{Family: "modulated", Theta: 0.375, Sin: []float64{0.1}, Sites: 300}, Finite, 8},
		{design.Spec{Family: "modulated", Theta: 2.0 / 7, Sin: []float64{0.1}, Sites: 300, Noise: 0.01}, Finite, 7},
		{design.Spec{Family: "periodic", Cell: []float64{1}, Sites: 500, Noise: 0.02}, Point, 1},
	}
	for _, c := range cases {
		r := analyze(t, generate(t, c.spec))
		if r.Hull.Class != c.class || r.Hull.Period != c.period {
			t.Errorf("%+v: class %s period %d (%s), want %s period %d", c.spec, r.Hull.Class, r.Hull.Period, r.Hull.Reason, c.class, c.period)
			continue
		}
		if c.period > 1 {
			if len(r.GapLabels.Labels) != c.period-1 {
				t.Errorf("%+v: %d labels, want %d", c.spec, len(r.GapLabels.Labels), c.period-1)
			}
			for i, l := range r.GapLabels.Labels {
				if want := float64(i+1) / float64(c.period); math.Abs(l.IDS-want) > 1e-15 {
					t.Errorf("%+v: label %d = %v, want %v", c.spec, i, l.IDS, want)
				}
			}
		}
	}
}

// A periodic chain with 2% jitter is a point hull whose disorder figure is
// the jitter (common practice: the residual about the fitted lattice).
func TestJitterIsDisorder(t *testing.T) {
	r := analyze(t, generate(t, design.Spec{Family: "periodic", Cell: []float64{1}, Sites: 2000, Noise: 0.02}))
	if r.Hull.Class != Point || r.Disorder == nil {
		t.Fatalf("class %s, disorder %v", r.Hull.Class, r.Disorder)
	}
	if math.Abs(r.Disorder.RMS-0.02) > 0.002 {
		t.Errorf("disorder %v, want 0.02 ± 10%%", r.Disorder.RMS)
	}
}

// Missing sites must not bias the angle: the indices skip over them.
func TestMissingSites(t *testing.T) {
	theta := math.Sqrt(2) - 1
	p := generate(t, design.Spec{Family: "modulated", Sites: 2000, Theta: theta, Sin: []float64{0.1}, Missing: 0.01, Seed: 3})
	r := analyze(t, p)
	if r.Hull.Class != Circle {
		t.Fatalf("class %s (%s), want circle", r.Hull.Class, r.Hull.Reason)
	}
	if math.Abs(r.Angles[0]-theta) > 1e-9 {
		t.Errorf("angle %.12f, want %.12f", r.Angles[0], theta)
	}
}

// With position noise the angle error stays within a few reported
// uncertainties.
func TestNoisyCircleUncertainty(t *testing.T) {
	theta := math.Sqrt(2) - 1
	for seed := uint64(1); seed <= 5; seed++ {
		p := generate(t, design.Spec{Family: "modulated", Sites: 500, Theta: theta, Sin: []float64{0.1}, Noise: 0.02, Seed: seed})
		r := analyze(t, p)
		if r.Hull.Class != Circle {
			t.Fatalf("seed %d: class %s (%s), want circle", seed, r.Hull.Class, r.Hull.Reason)
		}
		if d := math.Abs(r.Angles[0] - theta); d > 4*r.AngleUncertainty[0] {
			t.Errorf("seed %d: angle error %.3g exceeds 4 × uncertainty %.3g", seed, d, r.AngleUncertainty[0])
		}
	}
}

// Independent random spacings have no low-dimensional hull.
func TestRandomIsNotAHull(t *testing.T) {
	r := analyze(t, generate(t, design.Spec{Family: "random", Sites: 500, Spread: 0.5}))
	if r.Hull.Class != Disordered {
		t.Errorf("random spacings classified %s (%s), want disordered", r.Hull.Class, r.Hull.Reason)
	}
}

// The same input and options give byte-identical JSON.
func TestDeterministic(t *testing.T) {
	p := generate(t, design.Spec{Family: "modulated", Sites: 600, Theta: 0.2763, Sin: []float64{0.1}, Noise: 0.01})
	var out [2][]byte
	for i := range out {
		var b bytes.Buffer
		if err := json.NewEncoder(&b).Encode(analyze(t, p)); err != nil {
			t.Fatal(err)
		}
		out[i] = b.Bytes()
	}
	if !bytes.Equal(out[0], out[1]) {
		t.Error("two runs gave different JSON")
	}
}

// Spurious extra sites and missing ones together (1% and 0.75%) must leave
// the class and, within its uncertainty, the angle intact.
func TestExtraAndMissingSites(t *testing.T) {
	const theta = 0.381966
	for seed := uint64(1); seed <= 4; seed++ {
		p := generate(t, design.Spec{Family: "modulated", Sites: 400, Theta: theta, Sin: []float64{0.1}, Noise: 0.004, Extra: 0.01, Missing: 0.0075, Seed: seed})
		r := analyze(t, p)
		if r.Hull.Class != Circle {
			t.Fatalf("seed %d: class %s (%s), want circle", seed, r.Hull.Class, r.Hull.Reason)
		}
		if d := math.Abs(r.Angles[0] - theta); d > 4*r.AngleUncertainty[0] {
			t.Errorf("seed %d: angle error %.3g exceeds 4 × uncertainty %.3g", seed, d, r.AngleUncertainty[0])
		}
	}
}
