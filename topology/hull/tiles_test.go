package hull

import (
	"math"
	"strings"
	"testing"

	"phasonhull/pattern/design"
	"phasonhull/topology"
)

// The Fibonacci word, OEIS A003849 (0 ↔ A, 1 ↔ B; the first 60 terms from
// memory, checked against the mechanical-word formula below).
const a003849 = "010010100100101001010010010100100101001010010010100101001001"

// Fibonacci chain (substitution A → AB, B → A): the analysis reads its
// word, which agrees with OEIS A003849, finds the Sturmian complexity
// p(n) = n + 1 (Morse & Hedlund 1940), the tile frequency 1/τ and the
// folded angle 1 − 1/τ = 0.381966…; with 2% position noise the same.
func TestFibonacciChain(t *testing.T) {
	phi := (1 + math.Sqrt(5)) / 2
	for i := range 60 { // a(n) = ⌊(n+2)/φ²⌋ − ⌊(n+1)/φ²⌋, computed independently
		want := byte('0' + int(math.Floor(float64(i+2)/(phi*phi))-math.Floor(float64(i+1)/(phi*phi))))
		if a003849[i] != want {
			t.Fatalf("A003849 term %d: %c from memory, %c by formula", i, a003849[i], want)
		}
	}
	for _, noise := range []float64{0, 0.02} {
		p := generate(t, design.Spec{Family: "substitution", Rule: "fibonacci", Sites: 1000, Tiles: map[string]float64{"A": 1, "B": phi}, Noise: noise})
		r := analyze(t, p)
		if r.Hull.Class != Cantor || r.Tiles == nil {
			t.Fatalf("noise %v: class %s (%s), want cantor", noise, r.Hull.Class, r.Hull.Reason)
		}
		// Tiles are lettered by increasing length: A = 1, B = φ, as in the design.
		got := strings.NewReplacer("A", "0", "B", "1").Replace(r.Tiles.Word[:60])
		if got != a003849 {
			t.Errorf("noise %v: word %s, want A003849 %s", noise, got, a003849)
		}
		for n, pn := range r.Tiles.Complexity {
			if pn != n+2 {
				t.Errorf("noise %v: p(%d) = %d, want %d", noise, n+1, pn, n+2)
			}
		}
		if f := r.Tiles.Frequencies["A"]; math.Abs(f-1/phi) > 1.0/1000 {
			t.Errorf("noise %v: frequency of A %v, want 1/τ = %v within 1/N", noise, f, 1/phi)
		}
		if want := topology.Fold(1 / phi); math.Abs(r.Angles[0]-want) > math.Max(r.AngleUncertainty[0], 1e-12) {
			t.Errorf("noise %v: angle %.9f ± %.2g, want %.9f", noise, r.Angles[0], r.AngleUncertainty[0], want)
		}
	}
}

// A Sturmian chain of slope √2 − 1 from the cut-and-project generator:
// angle 0.414214 within 1/N.
func TestSturmianChain(t *testing.T) {
	const n = 800
	theta := math.Sqrt(2) - 1
	p := generate(t, design.Spec{Family: "sturmian", Theta: theta, Sites: n, Tiles: map[string]float64{"A": 1, "B": 1.5}})
	r := analyze(t, p)
	if r.Hull.Class != Cantor || r.Tiles.WordClass != "sturmian" {
		t.Fatalf("class %s, word class %v (%s)", r.Hull.Class, r.Tiles, r.Hull.Reason)
	}
	if math.Abs(r.Angles[0]-theta) > 1.0/n {
		t.Errorf("angle %v, want %v within 1/N", r.Angles[0], theta)
	}
	if math.Abs(r.Angles[0]-theta) > r.AngleUncertainty[0] {
		t.Errorf("angle %v ± %v (a bound) misses %v", r.Angles[0], r.AngleUncertainty[0], theta)
	}
}

// Thue–Morse chain (OEIS A010060; substitution A → AB, B → BA): a Cantor
// hull whose word is not Sturmian. Its gap labels are the numbers
// m/(3·2^k) (Bellissard 1990; recalled from memory), so the factor
// frequencies the data resolve must lie in (1/(3·2^k))Z: the module found
// is rank 1 with a denominator of that form.
func TestThueMorseChain(t *testing.T) {
	p := generate(t, design.Spec{Family: "substitution", Rule: "thue-morse", Sites: 20000, Tiles: map[string]float64{"A": 1, "B": 1.5}})
	r := analyze(t, p)
	if r.Hull.Class != Cantor || r.Tiles.WordClass == "sturmian" {
		t.Fatalf("class %s, word class %s (%s)", r.Hull.Class, r.Tiles.WordClass, r.Hull.Reason)
	}
	if r.Tiles.ModuleRank != 1 {
		t.Fatalf("module rank %d, want 1 (all factor frequencies rational)", r.Tiles.ModuleRank)
	}
	q := int(math.Round(1 / r.GapLabels.Generators[1]))
	if q%3 != 0 || (q/3)&(q/3-1) != 0 {
		t.Errorf("denominator %d is not 3·2^k", q)
	}
}

// Independent random spacings, uniform or exponential, have no hull.
func TestRandomSpacingsDisordered(t *testing.T) {
	for _, s := range []design.Spec{
		{Family: "random", Sites: 2000, Dist: "uniform", Spread: 0.5},
		{Family: "random", Sites: 2000, Dist: "exponential", Spread: 0.8},
		{Family: "random", Sites: 2000, Dist: "uniform", Spread: 0.05},
	} {
		r := analyze(t, generate(t, s))
		if r.Hull.Class != Disordered {
			t.Errorf("%s spread %v: class %s (%s), want disordered", s.Dist, s.Spread, r.Hull.Class, r.Hull.Reason)
		}
		if r.Disorder == nil || r.Disorder.Relative < s.Spread/4 {
			t.Errorf("%s spread %v: disorder %+v", s.Dist, s.Spread, r.Disorder)
		}
	}
}

// A lattice shaken by 6% position noise, beyond the embedding's noise
// tolerance, is still a point hull with the jitter as its disorder.
func TestLargeJitterIsPoint(t *testing.T) {
	r := analyze(t, generate(t, design.Spec{Family: "periodic", Cell: []float64{1}, Sites: 2000, Noise: 0.06}))
	if r.Hull.Class != Point {
		t.Fatalf("class %s (%s), want point", r.Hull.Class, r.Hull.Reason)
	}
	if math.Abs(r.Disorder.RMS-0.06) > 0.006 {
		t.Errorf("disorder %v, want 0.06 ± 10%%", r.Disorder.RMS)
	}
}

// A Thue–Morse chain too short to resolve the group of its factor
// frequencies must say so, not enumerate labels over a dozen generators.
func TestThueMorseShort(t *testing.T) {
	p := generate(t, design.Spec{Family: "substitution", Rule: "thue-morse", Sites: 4096, Tiles: map[string]float64{"A": 1, "B": 1.5}})
	r := analyze(t, p)
	if r.Hull.Class != Cantor {
		t.Fatalf("class %s", r.Hull.Class)
	}
	if len(r.GapLabels.Generators) > 3 && len(r.GapLabels.Labels) != 0 {
		t.Errorf("%d labels listed over %d generators", len(r.GapLabels.Labels), len(r.GapLabels.Generators))
	}
}
