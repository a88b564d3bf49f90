package design

import (
	"math"
	"slices"
	"strings"
	"testing"
)

func modulatedSpec(n int) Spec {
	s := NewSpec("modulated")
	s.Sites, s.Theta, s.Amp = n, 0.2763, 0.1
	return s
}

func hasNote(notes []string, sub string) bool {
	return slices.ContainsFunc(notes, func(n string) bool { return strings.Contains(n, sub) })
}

// TestPerturbDeterminism: the same seed gives the same pattern, another
// seed another one.
func TestPerturbDeterminism(t *testing.T) {
	specs := []Spec{modulatedSpec(500), NewSpec("random")}
	for i := range specs {
		specs[i].Noise, specs[i].Missing, specs[i].Extra = 0.01, 0.1, 0.05
	}
	for _, s := range specs {
		a, b := mustGenerate(t, s), mustGenerate(t, s)
		if !slices.Equal(a, b) {
			t.Errorf("%s: two runs with seed %d differ", s.Family, s.Seed)
		}
		s.Seed = 2
		if c := mustGenerate(t, s); slices.Equal(a, c) {
			t.Errorf("%s: seeds 1 and 2 give the same pattern", s.Family)
		}
	}
}

// TestMissingAndExtra: the counts are the requested fractions, the kept
// sites are design sites (exactly), the inserted ones lie inside the chain,
// and the tile word is dropped with a note.
func TestMissingAndExtra(t *testing.T) {
	s := NewSpec("substitution")
	s.Rule, s.Sites = "fibonacci", 1000
	p, err := Generate(s)
	if err != nil {
		t.Fatal(err)
	}
	design := p.Positions
	s.Missing = 0.1
	q, err := Generate(s)
	if err != nil {
		t.Fatal(err)
	}
	if q.Len() != 900 {
		t.Errorf("missing = 0.1 of 1000: %d sites left, want 900", q.Len())
	}
	for _, x := range q.Positions {
		if _, ok := slices.BinarySearch(design, x); !ok {
			t.Fatalf("kept site %v is not a design site", x)
		}
	}
	if q.Word != "" || !hasNote(q.Notes, "tile word was dropped") || !hasNote(q.Notes, "removed 100 of 1000") {
		t.Errorf("after removing sites: word %q…, notes %q", q.Word[:min(10, len(q.Word))], q.Notes)
	}
	s.Missing, s.Extra = 0, 0.05
	r, err := Generate(s)
	if err != nil {
		t.Fatal(err)
	}
	if r.Len() != 1050 {
		t.Errorf("extra = 0.05 of 1000: %d sites, want 1050", r.Len())
	}
	inserted := 0
	for _, x := range r.Positions {
		if _, ok := slices.BinarySearch(design, x); !ok {
			inserted++
			if x < design[0] || x > design[len(design)-1] {
				t.Errorf("inserted site %v outside the chain [%v, %v]", x, design[0], design[len(design)-1])
			}
		}
	}
	if inserted != 50 || r.Word != "" {
		t.Errorf("%d sites inserted, want 50; word %q", inserted, r.Word)
	}
}

// TestNoise: the position errors have the requested standard deviation and
// zero mean within sampling error (5 standard errors; the standard error
// of a sample standard deviation is σ/√(2N) for Gaussian data, common
// practice), and removing the same sites with and without noise picks the
// same sites, as each perturbation has its own random stream.
func TestNoise(t *testing.T) {
	const n, sigma = 20000, 0.01
	s := modulatedSpec(n)
	s.Missing = 0.05
	clean := mustGenerate(t, s)
	s.Noise = sigma
	p, err := Generate(s)
	if err != nil {
		t.Fatal(err)
	}
	if p.Len() != len(clean) {
		t.Fatalf("%d sites with noise, %d without", p.Len(), len(clean))
	}
	mean, m2 := 0.0, 0.0
	for i, x := range p.Positions {
		e := x - clean[i]
		if math.Abs(e) > 8*sigma {
			t.Fatalf("site %d moved by %v: not the same site as without noise", i, e)
		}
		mean += e
		m2 += e * e
	}
	m := float64(len(clean))
	mean /= m
	sd := math.Sqrt(m2/m - mean*mean)
	if math.Abs(mean) > 5*sigma/math.Sqrt(m) {
		t.Errorf("mean position error %v, want 0 within %v", mean, 5*sigma/math.Sqrt(m))
	}
	if math.Abs(sd-sigma) > 5*sigma/math.Sqrt(2*m) {
		t.Errorf("noise standard deviation %v, want %v within %v", sd, sigma, 5*sigma/math.Sqrt(2*m))
	}
	if !hasNote(p.Notes, "Gaussian position noise") {
		t.Errorf("no noise note in %q", p.Notes)
	}
}

// TestNoiseReorders: noise larger than the spacing reorders sites; they are
// sorted, noted, and the tile word is dropped.
func TestNoiseReorders(t *testing.T) {
	s := NewSpec("sturmian")
	s.Theta, s.Noise = 0.381966, 0.8
	p, err := Generate(s)
	if err != nil {
		t.Fatal(err)
	}
	if !slices.IsSorted(p.Positions) || p.Word != "" || !hasNote(p.Notes, "reordered") {
		t.Errorf("sorted %v, word %q, notes %q", slices.IsSorted(p.Positions), p.Word, p.Notes)
	}
	s.Noise = 1e-4
	if p, err = Generate(s); err != nil || len(p.Word) != s.Sites-1 {
		t.Errorf("small noise should keep the tile word: %v, %q", err, p.Word)
	}
}

// TestDrift checks the drift against its closed form: site x goes to
// x0 + u(1 + drift·u/span), so the chain's length becomes span·(1 + drift)
// and the local scale at the end is 1 + 2·drift.
func TestDrift(t *testing.T) {
	s := NewSpec("periodic")
	s.Cell, s.Sites = []float64{1}, 1001
	for _, drift := range []float64{0.01, -0.2} {
		s.Drift = drift
		pos := mustGenerate(t, s)
		span := 1000.0
		if got := pos[1000] - pos[0]; math.Abs(got-span*(1+drift)) > 1e-9 {
			t.Errorf("drift %v: length %v, want %v", drift, got, span*(1+drift))
		}
		for i, x := range pos {
			u := float64(i)
			if want := u * (1 + drift*u/span); math.Abs(x-want) > 1e-9 {
				t.Fatalf("drift %v: site %d at %v, want %v", drift, i, x, want)
			}
		}
		// The last spacing is (1 + 2·drift) up to the curvature term
		// drift/span.
		if last := pos[1000] - pos[999]; math.Abs(last-(1+2*drift)) > 1.01*math.Abs(drift)/span {
			t.Errorf("drift %v: last spacing %v, want about %v", drift, last, 1+2*drift)
		}
	}
}
