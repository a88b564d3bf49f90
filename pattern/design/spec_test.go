package design

import (
	"bytes"
	"encoding/json"
	"errors"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"phasonhull/pattern"
)

// designFiles returns the example specs in testdata/design.
func designFiles(t *testing.T) []string {
	t.Helper()
	files, err := filepath.Glob(filepath.Join("..", "..", "testdata", "design", "*.json"))
	if err != nil || len(files) == 0 {
		t.Fatalf("no example specs found: %v", err)
	}
	return files
}

// allFamilies returns one valid spec per family.
func allFamilies() []Spec {
	var specs []Spec
	for _, f := range Families() {
		s := NewSpec(f)
		switch f {
		case Periodic:
			s.Cell = []float64{1, 1.5}
		case Modulated:
			s.Theta, s.Sin, s.Cos, s.Phase = 0.2763, []float64{0.1, 0.02}, []float64{0, 0.01}, 0.3
		case Loop:
			s.Step, s.Amp, s.RadiusCos = 0.381966, 0.2, []float64{0.1, 0.2}
		case CircleMap:
			s.Omega, s.K, s.Amp = 0.3, 0.7, 0.1
		case Decorated:
			s.Cell, s.Theta, s.Sin, s.Phase = []float64{0.88, 1.12}, 0.2763, []float64{0.1}, 0.3
		case TwoAngle:
			s.Theta, s.Theta2, s.Amp, s.Amp2 = 0.4142, 0.7320508, 0.1, 0.05
		case MultiAngle:
			s.Thetas, s.Amps, s.Phases = []float64{0.4142, 0.2679, 0.618}, []float64{0.05, 0.04, 0.03}, []float64{0.1, 0.2}
		case Sturmian:
			s.Theta, s.Intercept = 0.381966, 0.2
		case Substitution:
			s.Rule = "period-doubling"
		case Random:
			s.Dist = "exponential"
		}
		s.Unit = "um"
		specs = append(specs, s)
	}
	return specs
}

// TestRoundTrip writes every family with WriteCSV and reads the file back
// with pattern.Read: the positions come back bit for bit, with the unit.
func TestRoundTrip(t *testing.T) {
	specs := allFamilies()
	perturbed := modulatedSpec(300)
	perturbed.Noise, perturbed.Missing, perturbed.Extra, perturbed.Drift = 0.02, 0.1, 0.1, 0.01
	for _, s := range append(specs, perturbed) {
		p, err := Generate(s)
		if err != nil {
			t.Fatalf("%s: %v", s.Family, err)
		}
		var b bytes.Buffer
		if err := pattern.WriteCSV(&b, p, s.Comments()); err != nil {
			t.Fatal(err)
		}
		q, err := pattern.Read(&b, string(s.Family)+".csv", pattern.ReadOptions{})
		if err != nil {
			t.Fatalf("%s: reading back: %v", s.Family, err)
		}
		if q.Unit != s.Unit || q.Len() != p.Len() {
			t.Fatalf("%s: read back %d sites in %q, wrote %d in %q", s.Family, q.Len(), q.Unit, p.Len(), s.Unit)
		}
		for i := range p.Positions {
			if math.Float64bits(p.Positions[i]) != math.Float64bits(q.Positions[i]) {
				t.Fatalf("%s: site %d read back as %v, wrote %v", s.Family, i, q.Positions[i], p.Positions[i])
			}
		}
	}
}

// TestCommentsTraceBack: the "spec:" comment line holds the whole spec, and
// reading it back regenerates the same pattern.
func TestCommentsTraceBack(t *testing.T) {
	for _, s := range allFamilies() {
		s.Noise, s.Seed = 0.01, 9
		lines := s.Comments()
		last := lines[len(lines)-1]
		if !strings.HasPrefix(last, "spec: ") {
			t.Fatalf("%s: last comment %q", s.Family, last)
		}
		if !slicesContain(lines, "family = "+string(s.Family)) || !slicesContain(lines, "noise = 0.01") || !slicesContain(lines, "seed = 9") {
			t.Errorf("%s: comments %q lack a parameter", s.Family, lines)
		}
		back, err := ReadSpec(strings.NewReader(strings.TrimPrefix(last, "spec: ")), "comment")
		if err != nil {
			t.Fatalf("%s: %v", s.Family, err)
		}
		if !reflect.DeepEqual(back, s.WithDefaults()) {
			t.Errorf("%s: spec read back as %+v, want %+v", s.Family, back, s.WithDefaults())
		}
		a, b := mustGenerate(t, s), mustGenerate(t, back)
		if !reflect.DeepEqual(a, b) {
			t.Errorf("%s: the traced-back spec generates another pattern", s.Family)
		}
	}
}

func slicesContain(lines []string, want string) bool {
	for _, l := range lines {
		if l == want {
			return true
		}
	}
	return false
}

// TestExampleSpecs reads and generates every spec in testdata/design.
func TestExampleSpecs(t *testing.T) {
	for _, path := range designFiles(t) {
		f, err := os.Open(path)
		if err != nil {
			t.Fatal(err)
		}
		s, err := ReadSpec(f, path)
		f.Close()
		if err != nil {
			t.Errorf("%v", err)
			continue
		}
		p, err := Generate(s)
		if err != nil {
			t.Errorf("%s: %v", path, err)
			continue
		}
		if p.Source != "generated" || len(p.Notes) == 0 || !strings.Contains(p.Notes[0], string(s.Family)) {
			t.Errorf("%s: source %q, notes %q", path, p.Source, p.Notes)
		}
	}
}

// TestReadSpecRefusals checks that ReadSpec names the file and the field.
func TestReadSpecRefusals(t *testing.T) {
	for _, c := range []struct{ json, want string }{
		{``, "spec.json: the file is empty"},
		{`{"family": "modulated", "theta": 0.3, "thetta": 0.2}`, `spec.json: unknown field "thetta"`},
		{`{"family": "modulated",` + "\n" + ` "theta": "0.3"}`, `spec.json:2:15: field "theta"`},
		{`{"family": "modulated", "theta": "0.3"}`, `field "theta"`},
		{`{"family": "modulated", "sites": 1.5, "theta": 0.3}`, `field "sites"`},
		{`{"family": "modulated", "theta": 0.3`, "not closed"},
		{`{"family": "modulated", "theta": 0.3}{}`, "spec.json:1:38: unexpected data after the spec object"},
		{`{"family": "modulated" "theta": 0.3}`, "spec.json:1:24: invalid character"},
		{`{"family": "modulated", "theta": 1.3}`, "spec.json: theta = 1.3: must lie strictly between 0 and 1"},
		{`{"family": "spiral"}`, `spec.json: family "spiral": unknown`},
	} {
		_, err := ReadSpec(strings.NewReader(c.json), "spec.json")
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("ReadSpec(%q): err = %v, want it to contain %q", c.json, err, c.want)
		}
		var ie *pattern.InputError
		if !errors.As(err, &ie) || ie.File != "spec.json" {
			t.Errorf("ReadSpec(%q): err %v (%T) is not an *InputError naming the file", c.json, err, err)
		}
	}
	big := `{"family": "periodic", "cell": [` + strings.Repeat("1, ", MaxSpecBytes/3) + `1]}`
	if _, err := ReadSpec(strings.NewReader(big), "big.json"); err == nil || !strings.Contains(err.Error(), "big.json: a design spec is at most") {
		t.Errorf("oversized spec: err = %v", err)
	}
}

// TestValidateRefusals checks that impossible designs are refused with a
// message naming the parameter (and, for too-large amplitudes, the spacing
// and its value).
func TestValidateRefusals(t *testing.T) {
	mod := func(f func(*Spec)) Spec { s := modulatedSpec(200); f(&s); return s }
	fam := func(name Family, f func(*Spec)) Spec { s := NewSpec(name); f(&s); return s }
	for _, c := range []struct {
		s    Spec
		want string
	}{
		{Spec{}, "family: missing"},
		{mod(func(s *Spec) { s.Sites = 5 }), "sites = 5: a design needs at least 8"},
		{mod(func(s *Spec) { s.Sites = MaxSites + 1 }), "at most"},
		{mod(func(s *Spec) { s.Theta = 0 }), "theta = 0: must lie strictly between 0 and 1"},
		{mod(func(s *Spec) { s.Theta = 1 }), "theta = 1:"},
		{mod(func(s *Spec) { s.Theta = math.NaN() }), "theta = NaN: not a finite number"},
		{mod(func(s *Spec) { s.Spacing = -1 }), "spacing = -1: must be positive"},
		// 2·sin(π·0.2763)·0.7 ≈ 1.07 > 1: some spacing goes negative.
		{mod(func(s *Spec) { s.Amp = 0.7 }), "sin/cos amplitudes too large: spacing"},
		{mod(func(s *Spec) { s.Amp = 0.7 }), "the harmonics change a spacing by up to 1.068"},
		{mod(func(s *Spec) { s.Sin = []float64{0.1} }), "amp is shorthand"},
		{mod(func(s *Spec) { s.Cell = []float64{1} }), "cell = 1 has no effect on the modulated family"},
		{mod(func(s *Spec) { s.Unit = "u m" }), `unit "u m"`},
		{mod(func(s *Spec) { s.Noise = -0.1 }), "noise = -0.1"},
		{mod(func(s *Spec) { s.Missing = 1 }), "missing = 1: the fraction of missing sites must lie in [0, 1)"},
		{mod(func(s *Spec) { s.Sites, s.Missing = 10, 0.5 }), "leaves 5, fewer than 8"},
		{mod(func(s *Spec) { s.Extra = -0.5 }), "extra = -0.5"},
		{mod(func(s *Spec) { s.Drift = -0.5 }), "drift = -0.5: must be greater than -0.5"},
		{fam("periodic", func(s *Spec) {}), "cell: missing"},
		{fam("periodic", func(s *Spec) { s.Cell = []float64{1, 0} }), "cell[1] = 0: spacings must be positive"},
		{fam("loop", func(s *Spec) { s.Step = 1.5 }), "step = 1.5"},
		{fam("loop", func(s *Spec) { s.Step, s.RadiusCos = 0.3, []float64{1.2} }), "radius-cos/radius-sin: the radius falls to"},
		{fam("loop", func(s *Spec) { s.Step, s.Amp = 0.3, 0.9 }), "amp = 0.9 too large: spacing"},
		{fam("circle-map", func(s *Spec) { s.Omega, s.K = 0.3, 1.5 }), "k = 1.5: must lie in [0, 1]"},
		{fam("circle-map", func(s *Spec) { s.Omega = 1 }), "omega = 1"},
		{fam("two-angle", func(s *Spec) { s.Theta, s.Theta2 = 0.3, 0.7 }), "theta2 = 0.7: the same angle as theta = 0.3"},
		{fam("two-angle", func(s *Spec) { s.Theta, s.Theta2, s.Amp, s.Amp2 = 0.3, 0.41, 0.5, 0.5 }), "amp = 0.5 and amp2 = 0.5 too large"},
		{fam("decorated", func(s *Spec) { s.Theta, s.Sin = 0.3, []float64{0.1} }), "cell: missing"},
		{fam("decorated", func(s *Spec) { s.Cell, s.Sin = []float64{1, 1.2}, []float64{0.1} }), "theta = 0: must lie strictly between 0 and 1"},
		{fam("decorated", func(s *Spec) { s.Cell, s.Theta, s.Amp = []float64{1, 1.2}, 0.3, 0.1 }), "amp = 0.1 has no effect on the decorated family"},
		// 2·sin(π·0.3)·0.3 ≈ 0.485 against the smallest cell spacing 0.4.
		{fam("decorated", func(s *Spec) { s.Cell, s.Theta, s.Sin = []float64{0.4, 1.6}, 0.3, []float64{0.3} }), "against the smallest cell spacing 0.4"},
		{fam("decorated", func(s *Spec) {
			s.Cell, s.Theta, s.Thetas, s.Amps = []float64{1, 1.2}, 0.3, []float64{0.4}, []float64{0.1}
		}), "theta = 0.3 with thetas"},
		{fam("decorated", func(s *Spec) {
			s.Cell, s.Sin, s.Thetas, s.Amps = []float64{1, 1.2}, []float64{0.1}, []float64{0.4}, []float64{0.1}
		}), "sin/cos with thetas"},
		{fam("decorated", func(s *Spec) { s.Cell, s.Thetas, s.Amps = []float64{1, 1.2}, []float64{0.4, 0.2}, []float64{0.1} }), "amps: 1 amplitudes for 2 angles"},
		// 2·sin(π·0.4)·0.25 + 2·sin(π·0.3)·0.1 ≈ 0.64 against 0.5.
		{fam("decorated", func(s *Spec) {
			s.Cell, s.Thetas, s.Amps = []float64{0.5, 1.5}, []float64{0.4, 0.3}, []float64{0.25, 0.1}
		}), "against the smallest cell spacing 0.5"},
		{fam("multi-angle", func(s *Spec) {}), "thetas: 0 angles"},
		{fam("multi-angle", func(s *Spec) { s.Thetas, s.Amps = []float64{0.1, 0.2, 0.3, 0.4}, []float64{0, 0, 0, 0} }), "thetas: 4 angles"},
		{fam("multi-angle", func(s *Spec) { s.Thetas, s.Amps = []float64{0.1, 0.2}, []float64{0.1} }), "amps: 1 amplitudes for 2 angles"},
		{fam("multi-angle", func(s *Spec) { s.Thetas, s.Amps, s.Phases = []float64{0.1}, []float64{0.1}, []float64{0, 0} }), "phases: 2 phases for 1 angles"},
		{fam("multi-angle", func(s *Spec) { s.Thetas, s.Amps = []float64{0.3, 1}, []float64{0.1, 0.1} }), "thetas[1] = 1: must lie strictly between"},
		{fam("multi-angle", func(s *Spec) { s.Thetas, s.Amps = []float64{0.3, 0.7}, []float64{0.1, 0.1} }), "thetas[1] = 0.7: the same angle as thetas[0] = 0.3"},
		{fam("multi-angle", func(s *Spec) { s.Thetas, s.Amps = []float64{0.3, 0.41}, []float64{0.5, 0.5} }), "amps = 0.5,0.5 too large"},
		{fam("multi-angle", func(s *Spec) { s.Thetas, s.Amps, s.Theta = []float64{0.3}, []float64{0.1}, 0.3 }), "theta = 0.3 has no effect on the multi-angle family (it takes spacing, thetas, amps, phases)"},
		{fam("sturmian", func(s *Spec) { s.Theta = 0.3; s.Tiles = map[string]float64{"A": 1, "B": -2} }), `tiles: length of "B" = -2: tile lengths must be positive`},
		{fam("sturmian", func(s *Spec) { s.Theta = 0.3; s.Tiles = map[string]float64{"A": 1} }), "exactly two tile letters, got 1"},
		{fam("sturmian", func(s *Spec) { s.Theta = 0.3; s.Tiles = map[string]float64{"AB": 1, "C": 2} }), `letter "AB"`},
		{fam("sturmian", func(s *Spec) { s.Theta, s.Intercept = 0.3, 1 }), "intercept = 1"},
		{fam("substitution", func(s *Spec) {}), "rule: missing"},
		{fam("substitution", func(s *Spec) { s.Rule = "fibonaci" }), `rule "fibonaci": unknown`},
		{fam("substitution", func(s *Spec) { s.Rule = "A=AB,B=C" }), `uses letter 'C', which the rule does not define`},
		{fam("substitution", func(s *Spec) { s.Rule = "A=B,B=A" }), "does not grow"},
		{fam("substitution", func(s *Spec) { s.Rule = "A=B,B=CC,C=C"; s.Tiles = map[string]float64{"A": 1, "B": 2, "C": 3} }), "does not grow: from A its words stop at 2 letters"},
		{fam("substitution", func(s *Spec) { s.Rule = "A=AB,B=" }), "maps to the empty word"},
		{fam("substitution", func(s *Spec) { s.Rule = "A=AB,B=A,A=B" }), "defined twice"},
		{fam("substitution", func(s *Spec) { s.Rule = "a=ab,b=a" }), "tiles: missing; the rule's letters ab need lengths"},
		{fam("substitution", func(s *Spec) { s.Rule = "fibonacci"; s.Tiles = map[string]float64{"A": 1, "B": 2, "C": 3} }), `letter "C" does not occur`},
		{fam("substitution", func(s *Spec) { s.Rule = "fibonacci"; s.Tiles = map[string]float64{"A": 1, "B": 1e-12} }), "too small for distinct sites"},
		{fam("random", func(s *Spec) { s.Dist = "cauchy" }), `dist "cauchy": unknown`},
		{fam("random", func(s *Spec) { s.Dist, s.Spread = "gaussian", 0.3 }), "a gaussian spread must stay below 0.25"},
		{fam("random", func(s *Spec) { s.Spread = 1 }), "spread = 1"},
		{fam("random", func(s *Spec) { s.Theta = 0.3 }), "theta = 0.3 has no effect on the random family (it takes spacing, dist, spread)"},
	} {
		err := c.s.Validate()
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("Validate(%+v): err = %v, want it to contain %q", c.s, err, c.want)
		}
		if _, gerr := Generate(c.s); gerr == nil {
			t.Errorf("Generate accepted a spec Validate refuses: %+v", c.s)
		}
	}
	for _, s := range allFamilies() {
		if err := s.Validate(); err != nil {
			t.Errorf("Validate refused a good %s spec: %v", s.Family, err)
		}
	}
}

// TestSpecJSONNames: the JSON field names are the flag names, and every
// field a family takes is one of them.
func TestSpecJSONNames(t *testing.T) {
	s := allFamilies()[1].WithDefaults()
	js, err := json.Marshal(s)
	if err != nil {
		t.Fatal(err)
	}
	for _, name := range []string{`"family":"modulated"`, `"sites":200`, `"theta":0.2763`, `"sin":[0.1,0.02]`, `"seed":1`} {
		if !strings.Contains(string(js), name) {
			t.Errorf("JSON %s lacks %s", js, name)
		}
	}
	typ := reflect.TypeOf(Spec{})
	tags := map[string]bool{}
	for i := range typ.NumField() {
		tags[strings.Split(typ.Field(i).Tag.Get("json"), ",")[0]] = true
	}
	for _, p := range familyParams() {
		if !tags[p.name] {
			t.Errorf("parameter %q is not a JSON field of Spec", p.name)
		}
	}
}
