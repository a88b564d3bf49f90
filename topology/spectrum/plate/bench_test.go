package plate

import (
	"context"
	"testing"
)

// benchPlate is an l×l square plate with a two-wave potential and flux
// 1/3, open ends.
func benchPlate(b *testing.B, l int) *Operator { return benchPlateFlux(b, l, Rational(1, 3)) }

func benchPlateFlux(b *testing.B, l int, f Flux) *Operator {
	pts, lat := grid(l, l, square)
	pot := Potential{Rotation: [][]float64{{0.618034, 0.2}, {-0.2, 0.618034}}, Lambda: []float64{0.5, 0.5}}
	return build(b, pts, lat, Model{Flux: f, OnSite: OnSite{Potential: pot}})
}

// The same 10^5 sites without a field: a real operator.
func BenchmarkKPM100kReal(b *testing.B) {
	op := benchPlateFlux(b, 316, Flux{})
	b.ResetTimer()
	for b.Loop() {
		if _, err := Analyze(context.Background(), op, Options{Method: KPM, KPM: KPMOptions{Moments: 512}}); err != nil {
			b.Fatal(err)
		}
	}
}

// KPM gaps of 10^5 sites (316×316) with 512 moments and 16 vectors.
func BenchmarkKPM100k(b *testing.B) {
	op := benchPlate(b, 316)
	b.ResetTimer()
	for b.Loop() {
		if _, err := Analyze(context.Background(), op, Options{Method: KPM, KPM: KPMOptions{Moments: 512}}); err != nil {
			b.Fatal(err)
		}
	}
}

// KPM gaps of 10^6 sites (1000×1000) with 512 moments and 16 vectors,
// the operator's construction included. Run it once:
//
//	go test -run '^$' -bench KPM1M -benchtime 1x ./topology/spectrum/plate
func BenchmarkKPM1M(b *testing.B) {
	for b.Loop() {
		op := benchPlate(b, 1000)
		if _, err := Analyze(context.Background(), op, Options{Method: KPM, KPM: KPMOptions{Moments: 512}}); err != nil {
			b.Fatal(err)
		}
	}
}

// The operator of 10^5 sites.
func BenchmarkNew100k(b *testing.B) {
	for b.Loop() {
		benchPlate(b, 316)
	}
}
