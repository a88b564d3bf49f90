package shortchain

import "testing"

// TestTableMeetsTarget checks the generated table against the goal it was
// computed for: in every cell of the calibration, the chains of each class
// are called another class at most 1% of the time.
func TestTableMeetsTarget(t *testing.T) {
	if tableDraws < 1000 {
		t.Fatalf("calibration on %d draws per cell, need at least 1000", tableDraws)
	}
	for si, N := range sizes {
		for ni, s := range noises {
			for tc, row := range confusion[si][ni] {
				total, wrong := 0, 0
				for c, n := range row {
					total += n
					if c != tc && c < len(Kinds()) {
						wrong += n
					}
				}
				if total != tableDraws || wrong*100 > tableDraws {
					t.Errorf("%d sites, noise %g, %s: %d of %d called another class", N, s, Kinds()[tc], wrong, total)
				}
			}
		}
	}
}
