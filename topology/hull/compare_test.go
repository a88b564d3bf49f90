package hull

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"phasonhull/pattern"
	"phasonhull/pattern/design"
	"phasonhull/topology"
)

func near(a, b, tol float64) bool { return math.Abs(a-b) <= tol }

// The angles a spec fixes are its construction's rotation numbers, folded
// (closed forms of each family; see the design package documentation).
func TestSpecReference(t *testing.T) {
	phi := (1 + math.Sqrt(5)) / 2
	spec := func(family design.Family, set func(*design.Spec)) design.Spec {
		s := design.NewSpec(family)
		set(&s)
		if err := s.Validate(); err != nil {
			t.Fatalf("%s: %v", family, err)
		}
		return s
	}
	for name, c := range map[string]struct {
		s      design.Spec
		class  Class
		period int
		angles []float64
	}{
		"modulated": {spec("modulated", func(s *design.Spec) { s.Theta, s.Amp = 0.7236, 0.1 }), Circle, 0, []float64{1 - 0.7236}},
		// Only the second harmonic: the modulation turns with 2θ.
		"second harmonic": {spec("modulated", func(s *design.Spec) { s.Theta, s.Sin = 0.2763, []float64{0, 0.1} }), Circle, 0, []float64{topology.Fold(2 * 0.2763)}},
		"harmonics 1, 2":  {spec("modulated", func(s *design.Spec) { s.Theta, s.Sin, s.Cos = 0.2763, []float64{0.1}, []float64{0, 0.02} }), Circle, 0, []float64{0.2763}},
		"two-angle": {spec("two-angle", func(s *design.Spec) {
			s.Theta, s.Amp, s.Theta2, s.Amp2 = 0.4142136, 0.1, 0.7320508, 0.06
		}), Torus, 0, []float64{1 - 0.7320508, 0.4142136}},
		"two-angle, one amplitude": {spec("two-angle", func(s *design.Spec) { s.Theta, s.Theta2, s.Amp2 = 0.4142136, 0.7320508, 0.06 }), Circle, 0, []float64{1 - 0.7320508}},
		"loop":                     {spec("loop", func(s *design.Spec) { s.Step, s.Amp = 0.381966, 0.15 }), Circle, 0, []float64{0.381966}},
		"rigid circle map":         {spec("circle-map", func(s *design.Spec) { s.Omega, s.Amp = 0.3090169, 0.1 }), Circle, 0, []float64{0.3090169}},
		"circle map":               {spec("circle-map", func(s *design.Spec) { s.Omega, s.K, s.Amp = 0.3, 0.9, 0.1 }), "", 0, nil},
		"sturmian":                 {spec("sturmian", func(s *design.Spec) { s.Theta = 0.618034 }), "", 0, []float64{1 - 0.618034}},
		"fibonacci":                {spec("substitution", func(s *design.Spec) { s.Rule = "fibonacci" }), "", 0, []float64{1 / (phi * phi)}},
		"thue-morse":               {spec("substitution", func(s *design.Spec) { s.Rule = "thue-morse"; s.Tiles = map[string]float64{"A": 1, "B": 1.4} }), "", 0, nil},
		"periodic cell":            {spec("periodic", func(s *design.Spec) { s.Cell = []float64{1, 1.5, 1, 1.5} }), Finite, 2, nil},
		"periodic lattice":         {spec("periodic", func(s *design.Spec) { s.Cell = []float64{2, 2} }), Point, 1, nil},
		"rational angle":           {spec("modulated", func(s *design.Spec) { s.Theta, s.Amp = 0.25, 0.1 }), "", 0, nil},
		"random":                   {spec("random", func(s *design.Spec) {}), "", 0, nil},
	} {
		r := SpecReference(c.s)
		if r.Class != c.class || r.Period != c.period || len(r.Angles) != len(c.angles) {
			t.Errorf("%s: reference %+v, want class %q period %d angles %v", name, r, c.class, c.period, c.angles)
			continue
		}
		for i := range c.angles {
			if !near(r.Angles[i], c.angles[i], 1e-15) {
				t.Errorf("%s: angle %d = %.17g, want %.17g", name, i, r.Angles[i], c.angles[i])
			}
		}
		if r.Angles == nil && r.Class == "" && r.Note == "" {
			t.Errorf("%s: fixes nothing and says nothing", name)
		}
	}
}

// The Fibonacci reference angle, computed independently: the frequency of
// the letter B in the generated Fibonacci word tends to 1/φ² with an error
// below 1/N for a Sturmian word of N letters (common practice: the
// discrepancy of a Sturmian word is bounded).
func TestFibonacciAngleIsLetterFrequency(t *testing.T) {
	s := design.NewSpec("substitution")
	s.Rule, s.Sites = "fibonacci", 4000
	p, err := design.Generate(s)
	if err != nil {
		t.Fatal(err)
	}
	freq := float64(strings.Count(p.Word, "B")) / float64(len(p.Word))
	if ref := SpecReference(s); len(ref.Angles) != 1 || !near(freq, ref.Angles[0], 2/float64(len(p.Word))) {
		t.Errorf("letter frequency %.6f, reference %v", freq, ref.Angles)
	}
}

// circleResult and friends build results by hand for the comparison rules.
func circleResult(theta, sigma float64) *Result {
	return &Result{Hull: Hull{Class: Circle}, Angles: []float64{theta}, AngleUncertainty: []float64{sigma}}
}

func TestCompareRules(t *testing.T) {
	a, b := 0.2763, 0.4142136
	for name, c := range map[string]struct {
		d, m  *Result
		agree bool
	}{
		"same circle":  {circleResult(a, 1e-6), circleResult(a+2e-6, 1e-6), true},
		"other angle":  {circleResult(a, 1e-6), circleResult(a+1e-4, 1e-6), false},
		"at 3 sigma":   {circleResult(a, 3e-6), circleResult(a+3*math.Hypot(3e-6, 4e-6)*0.999, 4e-6), true},
		"beyond 3 sig": {circleResult(a, 3e-6), circleResult(a+3*math.Hypot(3e-6, 4e-6)*1.001, 4e-6), false},
		// θ and 1 − θ are the same hull read backwards.
		"folded":        {circleResult(a, 1e-6), circleResult(1-a, 1e-6), true},
		"circle, torus": {circleResult(a, 1e-6), &Result{Hull: Hull{Class: Torus}, Angles: []float64{a, b}, AngleUncertainty: []float64{1e-6, 1e-6}}, false},
		// Another basis of the same module: {θ1, θ1 + θ2}, folded.
		"torus basis": {
			&Result{Hull: Hull{Class: Torus}, Angles: []float64{a, b}, AngleUncertainty: []float64{1e-7, 1e-7}},
			&Result{Hull: Hull{Class: Torus}, Angles: topology.CanonicalBasis([]float64{a, a + b}), AngleUncertainty: []float64{1e-7, 1e-7}}, true},
		"other torus": {
			&Result{Hull: Hull{Class: Torus}, Angles: []float64{a, b}, AngleUncertainty: []float64{1e-7, 1e-7}},
			&Result{Hull: Hull{Class: Torus}, Angles: []float64{a, b + 1e-4}, AngleUncertainty: []float64{1e-7, 1e-7}}, false},
		"same period":  {&Result{Hull: Hull{Class: Finite, Period: 3}}, &Result{Hull: Hull{Class: Finite, Period: 3}}, true},
		"other period": {&Result{Hull: Hull{Class: Finite, Period: 3}}, &Result{Hull: Hull{Class: Finite, Period: 5}}, false},
		"unresolved":   {&Result{Hull: Hull{Class: Unresolved}}, &Result{Hull: Hull{Class: Unresolved}}, true},
		"lost circle":  {circleResult(a, 1e-6), &Result{Hull: Hull{Class: Unresolved}}, false},
	} {
		cmp := Compare(c.d, c.m)
		if cmp.Agree != c.agree {
			t.Errorf("%s: agree %v, want %v (%s)", name, cmp.Agree, c.agree, cmp.Verdict)
		}
		if cmp.Verdict == "" {
			t.Errorf("%s: no verdict sentence", name)
		}
	}
}

// With a reference the sample must agree with it too, and the design's own
// distance from it widens the allowance.
func TestCompareWithReference(t *testing.T) {
	a := 0.2763
	ref := &Reference{Family: "modulated", Class: Circle, Angles: []float64{a}}
	d := circleResult(a+5e-6, 1e-7) // the analysis is 5·10⁻⁶ off its own exact design
	cmp := CompareWith(d, circleResult(a+6e-6, 1e-6), ref)
	if !cmp.Agree || len(cmp.Angles) != 2 || !near(cmp.Angles[0].ModelTolerance, 5e-6, 1e-15) {
		t.Errorf("agree %v, checks %+v", cmp.Agree, cmp.Angles)
	}
	// The exact reference is stricter than a loosely determined analysis
	// of the design: 2·10⁻³ is within 3σ of a design angle known to 10⁻³,
	// not of the exact one.
	d = circleResult(a, 1e-3)
	cmp = CompareWith(d, circleResult(a+2e-3, 1e-6), ref)
	if cmp.Agree || !cmp.Angles[0].Within || cmp.Angles[1].Within {
		t.Errorf("sample 2e-3 from an exact reference: agree %v, checks %+v", cmp.Agree, cmp.Angles)
	}
	// A design whose analysis contradicts its spec is noted.
	cmp = CompareWith(&Result{Hull: Hull{Class: Unresolved}}, &Result{Hull: Hull{Class: Unresolved}}, ref)
	if len(cmp.Notes) == 0 {
		t.Error("no note for a design whose analysis differs from its spec")
	}
}

// End to end: the analysis of a modulated design and of a noisy sample of
// it agree; a sample built with another angle does not.
func TestCompareAnalyses(t *testing.T) {
	gen := func(theta, noise float64) *Result {
		s := design.NewSpec("modulated")
		s.Sites, s.Theta, s.Sin, s.Noise, s.Seed = 400, theta, []float64{0.12, 0.03}, noise, 3
		p, err := design.Generate(s)
		if err != nil {
			t.Fatal(err)
		}
		return analyzeForCompare(t, p)
	}
	s := design.NewSpec("modulated")
	s.Sites, s.Theta, s.Sin = 400, 0.2763, []float64{0.12, 0.03}
	ref := SpecReference(s)
	d := gen(0.2763, 0)
	if cmp := CompareWith(d, gen(0.2763, 0.003), &ref); !cmp.Agree {
		t.Errorf("noisy sample of the design: %s", cmp.Verdict)
	} else {
		t.Log(cmp.Verdict)
	}
	if cmp := CompareWith(d, gen(0.2863, 0.003), &ref); cmp.Agree {
		t.Errorf("sample with angle 0.2863 against design 0.2763: %s", cmp.Verdict)
	} else {
		t.Log(cmp.Verdict)
	}
}

func analyzeForCompare(t *testing.T, p *pattern.Pattern) *Result {
	t.Helper()
	r, err := Analyze(p, Options{})
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// A two-angle design fixes its frequency module exactly: the two angles,
// folded and sorted.
func ExampleSpecReference() {
	s := design.NewSpec("two-angle")
	s.Theta, s.Amp, s.Theta2, s.Amp2 = 0.4142136, 0.1, 0.7320508, 0.06
	ref := SpecReference(s)
	fmt.Printf("%s %.7f\n", ref.Class, ref.Angles)
	// Output: torus [0.2679492 0.4142136]
}

// Two circle hulls whose angles differ by 2·10⁻⁶ with uncertainties of
// 10⁻⁶ each agree: 3·√2·10⁻⁶ is allowed.
func ExampleCompare() {
	design := &Result{Hull: Hull{Class: Circle}, Angles: []float64{0.2763}, AngleUncertainty: []float64{1e-6}}
	sample := &Result{Hull: Hull{Class: Circle}, Angles: []float64{0.276302}, AngleUncertainty: []float64{1e-6}}
	c := Compare(design, sample)
	fmt.Println(c.Agree)
	fmt.Println(c.Verdict)
	// Output:
	// true
	// both hulls are circles; the sample's angle is 2e-06 from the design's analysis (allowed 4.24e-06)
}
