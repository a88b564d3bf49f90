package rips_test

import (
	"testing"

	"phasonhull/topology/rips"
	"phasonhull/topology/rips/ripstest"
)

// The engine's speed goals are benchmarks, compared with the reference by
// the refbench program (go run ./cmd/phasonhull/internal/refbench).

func benchmarkCloud(b *testing.B, name string) {
	for _, c := range ripstest.BenchmarkSet() {
		if c.Name != name {
			continue
		}
		b.ReportAllocs()
		for b.Loop() {
			if _, err := rips.VietorisRips(c.Points, rips.Options{MaxDim: c.MaxDim}); err != nil {
				b.Fatal(err)
			}
		}
		return
	}
	b.Fatalf("no benchmark cloud %q", name)
}

func BenchmarkTwoAngle400(b *testing.B)    { benchmarkCloud(b, "two-angle-400") }
func BenchmarkNoisyCircle400(b *testing.B) { benchmarkCloud(b, "noisy-circle-400") }
func BenchmarkCube250(b *testing.B)        { benchmarkCloud(b, "cube-250") }
func BenchmarkCircle2000(b *testing.B)     { benchmarkCloud(b, "circle-2000") }
