package spectrum

import (
	"testing"
)

// IDS and gap labels of a Fibonacci chain of 10^5 sites by counting.
func BenchmarkGapsCounting100k(b *testing.B) {
	op := build(b, generate(b, fibonacciChain(b, 100_000)), Model{Law: Exp{T0: 1, Decay: 2}})
	b.ResetTimer()
	for b.Loop() {
		if _, err := Analyze(op, Options{Angles: []float64{golden}, MaxCoeff: 80}); err != nil {
			b.Fatal(err)
		}
	}
}

// One Sturm count of 10^5 sites (four energies per pass, so a quarter of
// a pass).
func BenchmarkCount100k(b *testing.B) {
	op := harper(b, 100_000, 1, golden, 0.1, Open)
	c := []int{0}
	for b.Loop() {
		op.countMany([]float64{0.3}, c)
	}
}

// Every level of 3000 sites: tridiagonal QL (open), bisection on ring
// counts (periodic), and the dense eigensolver (next-nearest bonds).
func BenchmarkEigenvalues3000(b *testing.B) {
	p := lattice(b, 3000)
	on := OnSite{Lambda: 1, Theta: golden, Phase: 0.1}
	for _, c := range []struct {
		name string
		m    Model
	}{
		{"open", Model{OnSite: on}},
		{"periodic", Model{OnSite: on, Ends: Periodic}},
		{"next-nearest", Model{OnSite: on, NNN: 0.2}},
	} {
		op := build(b, p, c.m)
		b.Run(c.name, func(b *testing.B) {
			for b.Loop() {
				if _, err := op.Eigenvalues(); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// Gaps and labels of 3000 sites from every level (the dense path).
func BenchmarkGapsValues3000(b *testing.B) {
	op := harper(b, 3000, 1, golden, 0.1, Open)
	for b.Loop() {
		if _, err := Analyze(op, Options{Angles: []float64{golden}}); err != nil {
			b.Fatal(err)
		}
	}
}

// An edge-mode sweep of a 300-site modulated design, six gaps.
func BenchmarkEdgeModes300(b *testing.B) {
	sw, err := PhaseSweep(modulatedSpec(0.4142136))
	if err != nil {
		b.Fatal(err)
	}
	for b.Loop() {
		if _, err := EdgeModes(sw, Model{Law: Exp{T0: 1, Decay: 4}}, EdgeOptions{Options: Options{Angles: []float64{0.4142136}}}); err != nil {
			b.Fatal(err)
		}
	}
}
