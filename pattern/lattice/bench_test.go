package lattice

import (
	"context"
	"fmt"
	"testing"

	"phasonhull/pattern"
)

// BenchmarkRecover recovers a hexagonal plate with 5% noise, 5% missing
// and 2% spurious sites, rotated and offset, at 10^4, 10^5 and 10^6
// sites.
func BenchmarkRecover(b *testing.B) {
	for _, side := range []int{100, 316, 1000} {
		c := plate{basis: hex, n1: side, n2: side, noise: 0.05, missing: 0.05, extra: 0.02, rot: 0.7, offset: [2]float64{3, 4}, seed: 1}
		p, err := pattern.NewPlane(points(c.sites()), "µm", "bench")
		if err != nil {
			b.Fatal(err)
		}
		b.Run(fmt.Sprintf("sites=%d", side*side), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := Recover(context.Background(), p, Options{}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
