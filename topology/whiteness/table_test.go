package whiteness

import "testing"

// TestTableDraws checks the generated table against the calibration it
// claims: at least 1000 chains with a hull per size, noise and family, and
// at least 200 independent chains per size and spread.
func TestTableDraws(t *testing.T) {
	for i, N := range sizes {
		if tableDraws[i] < 1000 {
			t.Errorf("%d sites: %d draws per cell, need at least 1000", N, tableDraws[i])
		}
		if powerDraws[i] < 200 {
			t.Errorf("%d sites: %d independent draws per spread, need at least 200", N, powerDraws[i])
		}
		for _, byNoise := range falseCalls[i] {
			for _, n := range byNoise {
				if n < 0 || n > tableDraws[i] {
					t.Errorf("%d sites: count %d outside 0..%d", N, n, tableDraws[i])
				}
			}
		}
	}
}

// TestCallsOnlyWhereCalibrated: the rule calls independent only at sizes
// whose calibrated false-call rate, and that of the next calibrated size,
// is at most 1%.
func TestCallsOnlyWhereCalibrated(t *testing.T) {
	for N := 17; N <= 25000; N += 1 + N/10 {
		r := falseCallRate(N)
		i := sizeIndex(N)
		if cellRate(i) > r || (sizes[i] < N && i+1 < len(sizes) && cellRate(i+1) > r) {
			t.Errorf("%d sites: rate %.4f below a neighbouring cell's", N, r)
		}
	}
}
