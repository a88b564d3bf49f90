package hull

import (
	"encoding/json"
	"math"
	"testing"

	"phasonhull/pattern"
)

// fuzzSites bounds the chains FuzzAnalyze builds, so each run is quick.
const fuzzSites = 64

// classes are the documented values of Hull.Class.
var classes = map[Class]bool{
	Point: true, Finite: true, Circle: true, Torus: true, Torus3: true,
	Cantor: true, Disordered: true, Unresolved: true,
}

// FuzzAnalyze builds short chains from fuzzed numbers: a mean spacing, a
// modulation (amplitude, angle, phase), a jitter scale and a seed for the
// jitter, and n sites. pattern.New refuses what is not a valid chain;
// Analyze must then return an error or a Result whose class is documented,
// whose numbers are finite where the JSON form needs them, and whose JSON
// encoding succeeds (encoding/json refuses NaN and infinities).
func FuzzAnalyze(f *testing.F) {
	f.Add(1.0, 0.1, 0.2763, 0.0, 0.0, uint64(1), 64)
	f.Add(1.0, 0.0, 0.5, 0.0, 0.0, uint64(2), 40) // a lattice
	f.Add(1.0, 0.3, 0.5, 0.1, 0.0, uint64(3), 32) // period two
	f.Add(2.5, 0.02, 0.381966, 0.3, 0.5, uint64(4), 64)
	f.Add(1e-300, 0.1, 0.2763, 0.0, 0.01, uint64(5), 64)
	f.Add(1e300, 0.1, 0.2763, 0.0, 0.01, uint64(6), 64)
	f.Add(1.0, 0.9999, 0.1, 0.0, 0.0, uint64(7), 8)
	f.Fuzz(func(t *testing.T, spacing, amp, theta, phase, jitter float64, seed uint64, n int) {
		n = min(max(n, 0), fuzzSites)
		pos := make([]float64, n)
		// A small deterministic jitter from the seed (an LCG), so the
		// fuzzer can reach irregular chains through one number.
		state := seed
		for i := range pos {
			state = state*6364136223846793005 + 1442695040888963407
			u := float64(state>>11)/(1<<53) - 0.5
			pos[i] = spacing * (float64(i) + amp*math.Sin(2*math.Pi*(theta*float64(i)+phase)) + jitter*u)
		}
		p, err := pattern.New(pos, "", "fuzz")
		if err != nil {
			return
		}
		res, err := Analyze(p, Options{Seed: seed%7 + 1, Workers: 1})
		if err != nil {
			return
		}
		if !classes[res.Hull.Class] {
			t.Fatalf("class %q is not documented", res.Hull.Class)
		}
		if res.Sites != p.Len() {
			t.Fatalf("sites = %d, want %d", res.Sites, p.Len())
		}
		if len(res.Angles) != len(res.AngleUncertainty) {
			t.Fatalf("%d angles, %d uncertainties", len(res.Angles), len(res.AngleUncertainty))
		}
		for _, a := range res.Angles {
			if !(a >= 0 && a <= 0.5) {
				t.Fatalf("angle %v outside [0, 1/2]", a)
			}
		}
		if _, err := json.Marshal(res); err != nil {
			t.Fatalf("result of class %s does not encode: %v", res.Hull.Class, err)
		}
	})
}
