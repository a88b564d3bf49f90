package design

import (
	"bytes"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// fuzzMaxSites bounds the designs the fuzz target generates, so that each
// run stays quick; larger valid specs are only read and validated.
const fuzzMaxSites = 2000

// FuzzReadSpec feeds arbitrary bytes to ReadSpec. Invariants: no panic; a
// refusal names the file; an accepted spec passes Validate again, survives
// a JSON round trip unchanged, and (when small) generates a Pattern that
// keeps the pattern invariant: sorted, finite, at least pattern.MinSites
// (or, for a plate, a Plane of finite sites).
func FuzzReadSpec(f *testing.F) {
	paths, err := filepath.Glob(filepath.Join("..", "..", "testdata", "design", "*.json"))
	if err != nil {
		f.Fatal(err)
	}
	for _, p := range paths {
		data, err := os.ReadFile(p)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(data)
	}
	f.Add([]byte(`{"family":"modulated","sites":-5,"theta":2}`))
	f.Add([]byte(`{"family":"periodic","cell":[1e308,1e308],"sites":20}`))
	f.Add([]byte(`{"family":"substitution","rule":"A->AB,B->A","sites":1e9}`))
	f.Add([]byte(`{"family":"random","sites":30,"noise":1e300}`))
	f.Add([]byte(`{"family":"plate","sites":12,"lattice":"hex","rotation":[[0.4142,0.1],[0.2,-0.3]],"amps":[0.1,0.2],"extra":0.1}`))
	f.Add([]byte(`{"family":"twisted","sites":9,"twist":5,"amp":0.1,"noise":0.01}`))
	f.Fuzz(func(t *testing.T, data []byte) {
		s, err := ReadSpec(bytes.NewReader(data), "fuzz.json")
		if err != nil {
			if !strings.Contains(err.Error(), "fuzz.json") {
				t.Fatalf("refusal %q does not name the file", err)
			}
			return
		}
		if err := s.Validate(); err != nil {
			t.Fatalf("ReadSpec accepted a spec Validate refuses: %v", err)
		}
		out, err := json.Marshal(s)
		if err != nil {
			t.Fatalf("accepted spec does not encode: %v", err)
		}
		back, err := ReadSpec(bytes.NewReader(out), "again.json")
		if err != nil {
			t.Fatalf("re-reading the encoded spec %s: %v", out, err)
		}
		if again, _ := json.Marshal(back); !bytes.Equal(again, out) {
			t.Fatalf("round trip changed the spec:\n%s\n%s", out, again)
		}
		if s.Family.Dimension() == 2 {
			if s.Sites*s.Sites > fuzzMaxSites {
				return
			}
			p, err := GeneratePlane(s)
			if err != nil {
				return
			}
			for i, q := range p.Points {
				if math.IsNaN(q[0]) || math.IsInf(q[0], 0) || math.IsNaN(q[1]) || math.IsInf(q[1], 0) {
					t.Fatalf("generated site %d is %v", i, q)
				}
			}
			return
		}
		if s.Sites > fuzzMaxSites {
			return
		}
		p, err := Generate(s)
		if err != nil {
			return
		}
		if len(p.Positions) < 8 {
			t.Fatalf("generated %d sites", len(p.Positions))
		}
		for i, x := range p.Positions {
			if math.IsNaN(x) || math.IsInf(x, 0) {
				t.Fatalf("generated position %d is %v", i, x)
			}
			if i > 0 && !(x > p.Positions[i-1]) {
				t.Fatalf("generated positions %d,%d = %v,%v not ascending", i-1, i, p.Positions[i-1], x)
			}
		}
	})
}
