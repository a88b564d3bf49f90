package whiteness

import "math"

// The calibration grid: chain sizes (sites), the position noises of the
// chains with a hull (mean spacings), and the spreads of the independent
// chains (the uniform law's half-width s, standard deviation s/√3, and the
// gaussian and exponential laws' standard deviation). table.go holds, for
// each size, how often the rule called the chains of each family
// independent.
var (
	sizes   = [...]int{16, 24, 32, 48, 64, 100, 200, 500, 1000, 3000, 10000, 20000}
	noises  = [...]float64{0, 0.01, 0.03, 0.05}
	spreads = [...]Spread{
		{"uniform", 0.03}, {"uniform", 0.06}, {"uniform", 0.12}, {"uniform", 0.25}, {"uniform", 0.5},
		{"gaussian", 0.075}, {"exponential", 0.3},
	}
)

// Spread is a law of independent spacings and its spread parameter.
type Spread struct {
	Law    string
	Spread float64
}

// SD is the standard deviation of a spacing, in mean spacings.
func (s Spread) SD() float64 {
	if s.Law == "uniform" {
		return s.Spread / math.Sqrt(3)
	}
	return s.Spread
}

// Grid returns the calibrated sizes, noises and spreads.
func Grid() ([]int, []float64, []Spread) {
	return append([]int(nil), sizes[:]...), append([]float64(nil), noises[:]...), append([]Spread(nil), spreads[:]...)
}

// sizeIndex returns the largest calibrated size at or below N (the
// smallest one below it).
func sizeIndex(N int) int {
	i := 0
	for j, s := range sizes {
		if s <= N {
			i = j
		}
	}
	return i
}

// falseCallRate is the worst false-call rate over the families and noises
// of the two calibrated sizes around N (the largest size beyond it).
func falseCallRate(N int) float64 {
	i := sizeIndex(N)
	r := cellRate(i)
	if sizes[i] < N && i+1 < len(sizes) {
		r = math.Max(r, cellRate(i+1))
	}
	return r
}

// cellRate is the worst fraction of chains with a hull called independent
// at size index i.
func cellRate(i int) float64 {
	worst := 0
	for _, byNoise := range falseCalls[i] {
		for _, n := range byNoise {
			worst = max(worst, n)
		}
	}
	return float64(worst) / float64(tableDraws[i])
}

// MinPower is the fraction of simulated independent chains a size must
// call independent to count as deciding (see Decision.MinSites).
const MinPower = 0.8

// minSites is the smallest calibrated size above N whose false-call
// rate is at most MaxFalseCall and at which the rule called at least
// MinPower of the simulated independent chains of the uniform spread
// nearest sd (in the noise-free draws) independent; 0 if none.
func minSites(N int, sd float64) int {
	k := 0
	for j, s := range spreads {
		if s.Law == "uniform" && math.Abs(s.SD()-sd) < math.Abs(spreads[k].SD()-sd) {
			k = j
		}
	}
	for i, s := range sizes {
		if s > N && cellRate(i) <= MaxFalseCall && float64(power[i][k]) >= MinPower*float64(powerDraws[i]) {
			return s
		}
	}
	return 0
}
