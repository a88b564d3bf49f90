package design

import "testing"

func benchmarkGenerate(b *testing.B, s Spec) {
	for b.Loop() {
		if _, err := Generate(s); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkLoop100k: arc-length inversion dominates (about one
// Gauss–Legendre panel integral per Newton step).
func BenchmarkLoop100k(b *testing.B) {
	s := NewSpec("loop")
	s.Sites, s.Step, s.Amp, s.RadiusCos, s.RadiusSin = 100_000, 0.381966, 0.15, []float64{0, 0.3}, []float64{0.1}
	benchmarkGenerate(b, s)
}

func BenchmarkModulated1M(b *testing.B) {
	s := NewSpec("modulated")
	s.Sites, s.Theta, s.Sin, s.Cos = 1_000_000, 0.2763, []float64{0.1, 0.02}, []float64{0, 0.01}
	benchmarkGenerate(b, s)
}

func BenchmarkSubstitution1M(b *testing.B) {
	s := NewSpec("substitution")
	s.Sites, s.Rule = 1_000_000, "fibonacci"
	benchmarkGenerate(b, s)
}

func BenchmarkPerturbed1M(b *testing.B) {
	s := NewSpec("random")
	s.Sites, s.Noise, s.Missing, s.Extra, s.Drift = 1_000_000, 0.01, 0.05, 0.05, 0.001
	benchmarkGenerate(b, s)
}
