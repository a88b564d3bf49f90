package shortchain

import "math"

// The calibration grid: chain sizes and position noises (in mean
// spacings). table.go holds, for each size, the margin each class needs and,
// for each size and noise, how the rule called simulated chains of each
// class.
var (
	sizes  = [...]int{16, 24, 32, 48, 64, 100, 150, 200}
	noises = [...]float64{0, 0.005, 0.01, 0.02, 0.03}
)

// Grid returns the calibrated sizes and noises.
func Grid() ([]int, []float64) {
	return append([]int(nil), sizes[:]...), append([]float64(nil), noises[:]...)
}

func kindIndex(k Kind) int {
	for i, v := range Kinds() {
		if v == k {
			return i
		}
	}
	return len(Kinds()) // Undecided
}

// threshold is the margin a call of k needs at N sites: the larger of the
// two calibrated sizes around N (the largest size beyond it).
func threshold(N int, k Kind) float64 {
	i := kindIndex(k)
	if i >= len(Kinds()) {
		return math.Inf(1)
	}
	t := math.Inf(-1)
	for j, s := range sizes {
		if s == N {
			return thresholds[j][i]
		}
		if s < N && (j == len(sizes)-1 || sizes[j+1] > N) {
			t = math.Max(t, thresholds[j][i])
		}
		if s > N && (j == 0 || sizes[j-1] < N) {
			t = math.Max(t, thresholds[j][i])
		}
	}
	return t
}

// nearestCell returns the grid cell nearest a size and a noise.
func nearestCell(N int, noise float64) (int, int) {
	si, ni := 0, 0
	for j, s := range sizes {
		if math.Abs(float64(s-N)) < math.Abs(float64(sizes[si]-N)) {
			si = j
		}
	}
	for j, v := range noises {
		if math.Abs(v-noise) < math.Abs(noises[ni]-noise) {
			ni = j
		}
	}
	return si, ni
}

// falseCallRate is the largest fraction of simulated chains of another
// class that the rule called k in cell (si, ni).
func falseCallRate(si, ni int, k Kind) float64 {
	c := kindIndex(k)
	worst := 0
	for t := range Kinds() {
		if t != c {
			worst = max(worst, confusion[si][ni][t][c])
		}
	}
	return float64(worst) / tableDraws
}

// minSites is the smallest calibrated size ≥ N at which the rule called
// simulated chains of class k correctly at least 90% of the time at noise
// index ni; 0 if none.
func minSites(N, ni int, k Kind) int {
	c := kindIndex(k)
	for j, s := range sizes {
		if s >= N && c < len(Kinds()) && confusion[j][ni][c][c] >= 9*tableDraws/10 {
			return s
		}
	}
	return 0
}
