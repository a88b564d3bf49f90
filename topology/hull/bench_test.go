package hull_test

import (
	"math"
	"testing"

	"phasonhull/pattern/design"
	"phasonhull/topology/hull"
)

// benchAnalyze times Analyze on one generated chain. The class is checked
// once before timing, so that a benchmark never times a failing analysis.
func benchAnalyze(b *testing.B, s design.Spec, want hull.Class) {
	p, err := design.Generate(s)
	if err != nil {
		b.Fatal(err)
	}
	r, err := hull.Analyze(p, hull.Options{})
	if err != nil {
		b.Fatal(err)
	}
	if r.Hull.Class != want {
		b.Fatalf("class %s %v, want %s", r.Hull.Class, r.Hull.Betti, want)
	}
	for b.Loop() {
		if _, err := hull.Analyze(p, hull.Options{}); err != nil {
			b.Fatal(err)
		}
	}
}

// A one-harmonic circle hull, 2000 sites, 1% position noise: the size the
// speed goal (under half a second) is stated for.
func BenchmarkAnalyzeCircle2000(b *testing.B) {
	benchAnalyze(b, design.Spec{Family: "modulated", Sites: 2000, Theta: math.Sqrt2 - 1, Sin: []float64{0.1}, Phase: 0.13, Noise: 0.01, Seed: 1}, hull.Circle)
}

// A two-torus, 3000 sites: H2 on the denser landmark set.
func BenchmarkAnalyzeTorus3000(b *testing.B) {
	benchAnalyze(b, design.Spec{Family: "two-angle", Sites: 3000, Theta: math.Sqrt2 - 1, Amp: 0.1, Theta2: math.Sqrt(3) - 1, Amp2: 0.08, Seed: 1}, hull.Torus)
}

// A circle hull of 20000 sites, 1% position noise: the cost that grows with
// the chain (embedding, landmarks, the fit of every site).
func BenchmarkAnalyze20000(b *testing.B) {
	benchAnalyze(b, design.Spec{Family: "modulated", Sites: 20000, Theta: math.Sqrt2 - 1, Sin: []float64{0.1}, Phase: 0.13, Noise: 0.01, Seed: 1}, hull.Circle)
}

// A three-torus of 5000 sites (noise-free, three angles): H2 on the denser
// landmark set a three-torus needs, read up to where its first loop
// closes. The goal is under 3 s.
func BenchmarkAnalyzeTorus3_5000(b *testing.B) {
	benchAnalyze(b, design.Spec{Family: "multi-angle", Sites: 5000, Thetas: []float64{0.4142136, 0.2679492, 0.618034}, Amps: []float64{0.05, 0.04, 0.03}, Seed: 1}, hull.Torus3)
}
