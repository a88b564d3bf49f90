package tiling

import (
	"math"
	"math/rand/v2"
	"reflect"
	"slices"
	"strings"
	"testing"

	"phasonhull/pattern/design"
)

var phi = (1 + math.Sqrt(5)) / 2

// generate builds a design and returns its spacings and tile word.
func generate(t testing.TB, s design.Spec) ([]float64, string) {
	t.Helper()
	p, err := design.Generate(s)
	if err != nil {
		t.Fatal(err)
	}
	return p.Spacings(), p.Word
}

// mismatches counts the positions where two words of equal length differ.
func mismatches(a, b string) int {
	n := 0
	for i := range len(a) {
		if a[i] != b[i] {
			n++
		}
	}
	return n
}

// detect runs Detect and fails the test when it refuses.
func detect(t *testing.T, d []float64, opt Options) *Tiles {
	t.Helper()
	tl, ok := Detect(d, opt)
	if !ok {
		t.Fatalf("Detect refused: %s", tl.Reason)
	}
	return tl
}

// checkLengths compares the detected lengths with the design's, within
// four standard errors of the mean, and each scatter with the spacing
// noise √2σ that position noise σ gives (closed form, common practice),
// within five standard errors of a standard deviation (σ_s/√(2n)) plus a
// small floor for the misread letters.
func checkLengths(t *testing.T, tl *Tiles, want []float64, sigma float64) {
	t.Helper()
	if len(tl.Lengths) != len(want) {
		t.Fatalf("%d tiles %v, want %d %v", len(tl.Lengths), tl.Lengths, len(want), want)
	}
	ss := math.Sqrt2 * sigma
	for j, w := range want {
		n := float64(tl.Counts[j])
		if se := 4 * math.Max(tl.Scatter[j], 1e-12) / math.Sqrt(n); math.Abs(tl.Lengths[j]-w) > se {
			t.Errorf("tile %c: length %.6g, want %.6g ± %.2g", tl.Letters[j], tl.Lengths[j], w, se)
		}
		if tol := 5*ss/math.Sqrt(2*n) + 1e-9; math.Abs(tl.Scatter[j]-ss) > tol {
			t.Errorf("tile %c: scatter %.4g, want √2σ = %.4g ± %.2g", tl.Letters[j], tl.Scatter[j], ss, tol)
		}
	}
}

// The word is recovered letter for letter when adjacent tiles differ by
// about ten spacing-noise standard deviations or more (see Detect).
func TestDetectExactWords(t *testing.T) {
	cases := []struct {
		name  string
		spec  design.Spec
		tiles []float64
	}{
		{"fibonacci 1:φ, noise 3%", design.Spec{Family: "substitution", Rule: "fibonacci", Noise: 0.03,
			Tiles: map[string]float64{"A": 1, "B": phi}}, []float64{1, phi}},
		{"thue-morse 1:1.5, noise 3%", design.Spec{Family: "substitution", Rule: "thue-morse", Noise: 0.03,
			Tiles: map[string]float64{"A": 1, "B": 1.5}}, []float64{1, 1.5}},
		{"sturmian 10% apart, noise 0.7%", design.Spec{Family: "sturmian", Theta: 0.3819660112501051, Noise: 0.007,
			Tiles: map[string]float64{"A": 1, "B": 1.1}}, []float64{1, 1.1}},
		{"tribonacci 10% apart, noise 0.7%", design.Spec{Family: "substitution", Rule: "A=AB,B=AC,C=A", Noise: 0.007,
			Tiles: map[string]float64{"A": 1, "B": 1.1, "C": 1.2}}, []float64{1, 1.1, 1.2}},
		{"four letters 10% apart, noise 0.7%", design.Spec{Family: "substitution", Rule: "A=AB,B=AC,C=AD,D=A", Noise: 0.007,
			Tiles: map[string]float64{"A": 1, "B": 1.1, "C": 1.2, "D": 1.3}}, []float64{1, 1.1, 1.2, 1.3}},
		{"period-doubling, exact tiles", design.Spec{Family: "substitution", Rule: "period-doubling",
			Tiles: map[string]float64{"A": 2, "B": 3}}, []float64{2, 3}},
	}
	for _, c := range cases {
		for seed := uint64(1); seed <= 3; seed++ {
			c.spec.Sites, c.spec.Seed = 5000, seed
			d, word := generate(t, c.spec)
			tl := detect(t, d, Options{})
			if n := mismatches(tl.Word, word); n != 0 {
				t.Errorf("%s, seed %d: %d letters misread", c.name, seed, n)
			}
			checkLengths(t, tl, c.tiles, c.spec.Noise)
			if len(tl.Missing)+len(tl.Odd) != 0 {
				t.Errorf("%s, seed %d: %d missing and %d odd spacings in a complete chain", c.name, seed, len(tl.Missing), len(tl.Odd))
			}
			if c.spec.Noise > 0 {
				// Position noise: lag-1 correlation of the residuals −½
				// (closed form), sampling s.d. √(0.5/n) (Bartlett).
				if tol := 5 * math.Sqrt(0.5/float64(len(d))); math.Abs(tl.Lag1+0.5) > tol {
					t.Errorf("%s, seed %d: lag-1 correlation %.4g, want −0.5 ± %.2g", c.name, seed, tl.Lag1, tol)
				}
			}
		}
	}
}

// Between six and ten noise standard deviations apart the tiles are found
// and letters are misread at the rate the Gaussian tail gives: a spacing
// is misread when its noise, of s.d. √2σ, passes half the difference Δ.
func TestDetectMisreadRate(t *testing.T) {
	const sites, sigma, delta = 20000, 0.01, 0.1
	d, word := generate(t, design.Spec{Family: "sturmian", Theta: 0.3819660112501051, Sites: sites, Noise: sigma, Seed: 7,
		Tiles: map[string]float64{"A": 1, "B": 1 + delta}})
	tl := detect(t, d, Options{})
	got := mismatches(tl.Word, word)
	p := 0.5 * math.Erfc(delta/2/(math.Sqrt2*sigma)/math.Sqrt2) // Φ(−Δ/(2√2σ))
	mean := p * float64(len(d))
	if hi := mean + 5*math.Sqrt(mean) + 3; float64(got) > hi {
		t.Errorf("%d letters misread, expected about %.2g (at most %.3g)", got, mean, hi)
	}
	t.Logf("%d of %d letters misread; Gaussian tail expects %.2g", got, len(d), mean)
}

// Tiles 10% apart under 3% position noise overlap (Δ = 2.4 spacing-noise
// standard deviations): no reading could be letter for letter, and Detect
// refuses rather than return a wrong word.
func TestDetectRefusesOverlappingTiles(t *testing.T) {
	d, _ := generate(t, design.Spec{Family: "sturmian", Theta: 0.3819660112501051, Sites: 5000, Noise: 0.03, Seed: 1,
		Tiles: map[string]float64{"A": 1, "B": 1.1}})
	if tl, ok := Detect(d, Options{}); ok {
		t.Errorf("accepted %d tiles %v", len(tl.Lengths), tl.Lengths)
	}
}

// removeSites drops a fraction of the interior sites of positions and adds
// Gaussian noise; span[i] is the number of design tiles remaining spacing
// i covers, and first[i] the first of them.
func removeSites(pos []float64, frac, sigma float64, seed uint64) (d []float64, span, first []int) {
	rng := rand.New(rand.NewPCG(seed, 0))
	var kept []int
	for i := range pos {
		if i == 0 || i == len(pos)-1 || rng.Float64() >= frac {
			kept = append(kept, i)
		}
	}
	x := make([]float64, len(kept))
	for j, i := range kept {
		x[j] = pos[i] + sigma*rng.NormFloat64()
	}
	for j := 1; j < len(kept); j++ {
		d = append(d, x[j]-x[j-1])
		span = append(span, kept[j]-kept[j-1])
		first = append(first, kept[j-1])
	}
	return d, span, first
}

// A missing site joins two tiles into one spacing: it is marked, with the
// pair, and makes no tile of its own; two missing sites in a row are odd.
func TestDetectMissingSites(t *testing.T) {
	p, err := design.Generate(design.Spec{Family: "substitution", Rule: "fibonacci", Sites: 5000, Seed: 1,
		Tiles: map[string]float64{"A": 1, "B": phi}})
	if err != nil {
		t.Fatal(err)
	}
	for seed := uint64(1); seed <= 3; seed++ {
		d, span, first := removeSites(p.Positions, 0.02, 0.02, seed)
		tl := detect(t, d, Options{})
		if len(tl.Lengths) != 2 || math.Abs(tl.Lengths[0]-1) > 0.005 || math.Abs(tl.Lengths[1]-phi) > 0.005 {
			t.Fatalf("seed %d: lengths %v, want [1 φ]", seed, tl.Lengths)
		}
		missing := map[int]string{}
		for _, m := range tl.Missing {
			missing[m.Spacing] = m.Pair
		}
		var wrong, joined int
		for i := range d {
			switch span[i] {
			case 1:
				if tl.Word[i] != p.Word[first[i]] {
					wrong++
				}
			case 2:
				joined++
				pair := []byte(p.Word[first[i] : first[i]+2])
				slices.Sort(pair)
				if tl.Word[i] != MissingMark || missing[i] != string(pair) {
					t.Errorf("seed %d: spacing %d joins %s: read %q, pair %q", seed, i, p.Word[first[i]:first[i]+2], tl.Word[i], missing[i])
				}
			default:
				if tl.Word[i] != OddMark {
					t.Errorf("seed %d: spacing %d joins %d tiles, read %q, want odd", seed, i, span[i], tl.Word[i])
				}
			}
		}
		if wrong != 0 || len(tl.Missing) != joined {
			t.Errorf("seed %d: %d single tiles misread, %d missing sites marked of %d", seed, wrong, len(tl.Missing), joined)
		}
	}
}

// Spurious sites cut spacings into pieces that match nothing (or, by
// chance, a tile); the spacings they leave alone are read exactly.
func TestDetectExtraSites(t *testing.T) {
	p, err := design.Generate(design.Spec{Family: "substitution", Rule: "fibonacci", Sites: 5000, Seed: 1,
		Tiles: map[string]float64{"A": 1, "B": phi}})
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(3, 0))
	pos := slices.Clone(p.Positions)
	cut := map[int]bool{}
	for range 25 {
		i := rng.IntN(len(pos) - 1)
		cut[i] = true
	}
	var x []float64
	var orig []int // design spacing of each new spacing, −1 for pieces
	for i := 0; i+1 < len(pos); i++ {
		x = append(x, pos[i]+0.01*rng.NormFloat64())
		if cut[i] {
			x = append(x, pos[i]+(pos[i+1]-pos[i])*(0.2+0.6*rng.Float64()))
			orig = append(orig, -1, -1)
		} else {
			orig = append(orig, i)
		}
	}
	x = append(x, pos[len(pos)-1])
	d := make([]float64, len(x)-1)
	for i := range d {
		d[i] = x[i+1] - x[i]
	}
	tl := detect(t, d, Options{})
	for i, o := range orig {
		if o >= 0 && tl.Word[i] != p.Word[o] {
			t.Errorf("spacing %d (design %d, %c) read %q", i, o, p.Word[o], tl.Word[i])
		}
	}
}

// posAmp is the position amplitude a of the modulated family that gives
// the spacings the amplitude s: x_{n+1} − x_n = L + 2a·sin(πθ)·cos(…).
func posAmp(s, theta float64) float64 { return s / (2 * math.Sin(math.Pi*theta)) }

// Chains without a few tile lengths are refused: a modulated chain's
// spacings spread continuously (an arcsine law), a weak modulation leaves
// correlated residuals, random spacings fill an interval, and a weak
// random spread lacks the lag-1 correlation of position noise.
func TestDetectRefuses(t *testing.T) {
	cases := []struct {
		name string
		spec design.Spec
		why  string
	}{
		{"modulated 20%", design.Spec{Family: "modulated", Theta: 0.2763, Amp: posAmp(0.2, 0.2763)}, "differ by only"},
		{"modulated 20%, noise", design.Spec{Family: "modulated", Theta: 0.2763, Amp: posAmp(0.2, 0.2763), Noise: 0.01}, ""},
		{"modulated 1%", design.Spec{Family: "modulated", Theta: 0.2763, Amp: posAmp(0.01, 0.2763)}, "correlation"},
		{"modulated 1%, noise 0.3%", design.Spec{Family: "modulated", Theta: 0.2763, Amp: posAmp(0.01, 0.2763), Noise: 0.003}, "correlation"},
		{"two angles", design.Spec{Family: "two-angle", Theta: 0.2763, Amp: 0.02, Theta2: 0.3819660112501051, Amp2: 0.02}, ""},
		{"uniform random", design.Spec{Family: "random", Spread: 0.5}, ""},
		{"uniform random ±4%", design.Spec{Family: "random", Spread: 0.04}, "not position noise"},
		{"exponential random", design.Spec{Family: "random", Dist: "exponential", Spread: 0.3}, ""},
		{"periodic cell of five lengths", design.Spec{Family: "periodic", Cell: []float64{1, 1.3, 1.7, 2.2, 2.9}, Noise: 0.01}, "more than the 4 tiles"},
	}
	for _, c := range cases {
		for seed := uint64(1); seed <= 2; seed++ {
			c.spec.Sites, c.spec.Seed = 5000, seed
			d, _ := generate(t, c.spec)
			tl, ok := Detect(d, Options{})
			if ok {
				t.Errorf("%s, seed %d: accepted %d tiles %v (scatter %v)", c.name, seed, len(tl.Lengths), tl.Lengths, tl.Scatter)
				continue
			}
			if tl.Reason == "" || !strings.Contains(tl.Reason, c.why) {
				t.Errorf("%s, seed %d: reason %q, want one mentioning %q", c.name, seed, tl.Reason, c.why)
			}
		}
	}
}

// A common tile as long as two others together is a tile, not a missing
// site; MaxTiles lets more tiles in.
func TestDetectSumTile(t *testing.T) {
	d, _ := generate(t, design.Spec{Family: "periodic", Cell: []float64{1, 1.3, 2.3}, Sites: 3000, Noise: 0.01, Seed: 1})
	tl := detect(t, d, Options{})
	if len(tl.Lengths) != 3 || len(tl.Missing) != 0 {
		t.Fatalf("lengths %v, %d missing sites; want three tiles", tl.Lengths, len(tl.Missing))
	}
	for i := range d {
		if want := "ABC"[i%3]; tl.Word[i] != want {
			t.Fatalf("letter %d is %c, want %c", i, tl.Word[i], want)
		}
	}
	d, _ = generate(t, design.Spec{Family: "periodic", Cell: []float64{1, 1.3, 1.7, 2.2, 2.9}, Sites: 5000, Noise: 0.01, Seed: 1})
	tl = detect(t, d, Options{MaxTiles: 5})
	if tl.Letters != "ABCDE" {
		t.Errorf("letters %q, want ABCDE", tl.Letters)
	}
}

// A lattice is a tiling of one tile: position noise of 3% gives it the
// scatter 4.2%, below the 5% a tile may have.
func TestDetectLattice(t *testing.T) {
	d, _ := generate(t, design.Spec{Family: "periodic", Cell: []float64{1}, Sites: 5000, Noise: 0.03, Seed: 1})
	tl := detect(t, d, Options{})
	if tl.Letters != "A" || strings.Count(tl.Word, "A") != len(d) || !math.IsInf(tl.Separation, 1) {
		t.Fatalf("letters %q, %d of %d spacings A, separation %v", tl.Letters, strings.Count(tl.Word, "A"), len(d), tl.Separation)
	}
	checkLengths(t, tl, []float64{1}, 0.03)
}

// The separation factor F = 6 exceeds the ratio of the difference of the
// two cluster means to their larger scatter for the best split in two of a
// Gaussian (2√(2/π)/√(1−2/π) ≈ 2.65), a uniform (√12 ≈ 3.46) and an
// arcsine law (the spacings of a cosine modulation: (4/π)/√(½ − 4/π²) ≈
// 4.14). Closed forms, computed here from the quantiles of each law.
func TestSeparationFactor(t *testing.T) {
	const n = 4000
	laws := []struct {
		name     string
		quantile func(p float64) float64
		want     float64
	}{
		{"gaussian", func(p float64) float64 { return -math.Sqrt2 * math.Erfcinv(2*p) }, 2 * math.Sqrt(2/math.Pi) / math.Sqrt(1-2/math.Pi)},
		{"uniform", func(p float64) float64 { return p }, math.Sqrt(12)},
		{"arcsine", func(p float64) float64 { return -math.Cos(math.Pi * p) }, 4 / math.Pi / math.Sqrt(0.5-4/(math.Pi*math.Pi))},
	}
	for _, l := range laws {
		x := make([]float64, n)
		for i := range x {
			x[i] = l.quantile((float64(i) + 0.5) / n)
		}
		starts := kmeansPartitions(x, 2)[1]
		if starts[1] != n/2 {
			t.Errorf("%s: best split at %d, want the median %d (symmetry)", l.name, starts[1], n/2)
		}
		m0, s0 := moments(x[:starts[1]])
		m1, s1 := moments(x[starts[1]:])
		got := (m1 - m0) / math.Max(s0, s1)
		if math.Abs(got-l.want) > 0.01*l.want {
			t.Errorf("%s: ratio %.4g, closed form %.4g", l.name, got, l.want)
		}
		if got >= DefaultSeparation {
			t.Errorf("%s: ratio %.4g is not below F = %d", l.name, got, DefaultSeparation)
		}
	}
}

// The dynamic programme finds the least-cost partition: compared with
// every split of small samples by brute force.
func TestKMeansOptimal(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 0))
	for trial := 0; trial < 50; trial++ {
		n := 6 + rng.IntN(10)
		x := make([]float64, n)
		for i := range x {
			x[i] = rng.Float64() * float64(1+rng.IntN(3))
		}
		slices.Sort(x)
		cost := func(starts []int) float64 {
			var c float64
			for k, lo := range starts {
				hi := n
				if k+1 < len(starts) {
					hi = starts[k+1]
				}
				_, s := moments(x[lo:hi])
				c += s * s * float64(hi-lo)
			}
			return c
		}
		parts := kmeansPartitions(x, 4)
		for k := 2; k <= 4; k++ {
			best := math.Inf(1)
			var rec func(starts []int)
			rec = func(starts []int) {
				if len(starts) == k {
					best = math.Min(best, cost(starts))
					return
				}
				for s := starts[len(starts)-1] + 1; s < n; s++ {
					rec(append(slices.Clone(starts), s))
				}
			}
			rec([]int{0})
			if got := cost(parts[k-1]); got > best*(1+1e-9)+1e-12 {
				t.Fatalf("trial %d, k=%d: cost %.6g, brute force %.6g", trial, k, got, best)
			}
		}
	}
}

// A given word is reported as it is, even where the spacings alone would
// not separate its tiles.
func TestDetectGivenWord(t *testing.T) {
	d, word := generate(t, design.Spec{Family: "sturmian", Theta: 0.3819660112501051, Sites: 5000, Noise: 0.03, Seed: 1,
		Tiles: map[string]float64{"A": 1, "B": 1.1}})
	tl, ok := Detect(d, Options{Word: word})
	if !ok || !tl.Given || tl.Word != word || tl.Letters != "AB" {
		t.Fatalf("ok %v, given %v, letters %q", ok, tl.Given, tl.Letters)
	}
	checkLengths(t, tl, []float64{1, 1.1}, 0.03)
	if tl.Counts[1] != strings.Count(word, "B") {
		t.Errorf("count of B %d, word has %d", tl.Counts[1], strings.Count(word, "B"))
	}
	// Letters are sorted by length, not by name.
	swapped := strings.Map(func(r rune) rune { return map[rune]rune{'A': 'y', 'B': 'x'}[r] }, word)
	if tl, _ := Detect(d, Options{Word: swapped}); tl.Letters != "yx" {
		t.Errorf("letters %q, want yx (y the shorter)", tl.Letters)
	}
	if _, ok := Detect(d, Options{Word: word[1:]}); ok {
		t.Error("accepted a word one letter short")
	}
}

func TestDetectBadInput(t *testing.T) {
	good, _ := generate(t, design.Spec{Family: "substitution", Rule: "fibonacci", Sites: 100, Seed: 1,
		Tiles: map[string]float64{"A": 1, "B": phi}})
	for name, d := range map[string][]float64{
		"too few":  good[:MinSpacings-1],
		"NaN":      append(slices.Clone(good[:20]), math.NaN()),
		"negative": append(slices.Clone(good[:20]), -1),
		"zero":     append(slices.Clone(good[:20]), 0),
		"infinite": append(slices.Clone(good[:20]), math.Inf(1)),
	} {
		if tl, ok := Detect(d, Options{}); ok || tl.Reason == "" {
			t.Errorf("%s: ok %v, reason %q", name, ok, tl.Reason)
		}
	}
	if _, ok := Detect(good[:MinSpacings], Options{}); !ok {
		t.Errorf("refused %d exact Fibonacci spacings", MinSpacings)
	}
}

func TestDetectDeterministic(t *testing.T) {
	d, _ := generate(t, design.Spec{Family: "substitution", Rule: "fibonacci", Sites: 20000, Noise: 0.03, Seed: 9,
		Tiles: map[string]float64{"A": 1, "B": phi}})
	a, _ := Detect(d, Options{})
	b, _ := Detect(slices.Clone(d), Options{})
	if !reflect.DeepEqual(a, b) {
		t.Error("two runs on the same spacings differ")
	}
}

func BenchmarkDetect(b *testing.B) {
	d, _ := generate(b, design.Spec{Family: "substitution", Rule: "fibonacci", Sites: 1_000_000, Noise: 0.03, Seed: 1,
		Tiles: map[string]float64{"A": 1, "B": phi}})
	b.ResetTimer()
	for b.Loop() {
		if _, ok := Detect(d, Options{}); !ok {
			b.Fatal("refused")
		}
	}
}
