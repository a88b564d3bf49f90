package tiling

import (
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"

	"phasonhull/pattern/design"
)

// bruteComplexity counts distinct factors by putting every substring in a
// set: an independent computation of p(n).
func bruteComplexity(word string, maxLen int) []int {
	out := make([]int, maxLen)
	for n := 1; n <= maxLen; n++ {
		seen := map[string]bool{}
		for i := 0; i+n <= len(word); i++ {
			f := word[i : i+n]
			if strings.IndexFunc(f, func(r rune) bool { return !isLetter(byte(r)) }) < 0 {
				seen[f] = true
			}
		}
		out[n-1] = len(seen)
	}
	return out
}

// substitute returns the first n letters of the fixed point of a
// substitution started from 'A'.
func substitute(rules map[byte]string, n int) string {
	w := "A"
	for len(w) < n {
		var b strings.Builder
		for i := range len(w) {
			b.WriteString(rules[w[i]])
		}
		w = b.String()
	}
	return w[:n]
}

var (
	fibonacciRule  = map[byte]string{'A': "AB", 'B': "A"}
	thueMorseRule  = map[byte]string{'A': "AB", 'B': "BA"}
	doublingRule   = map[byte]string{'A': "AB", 'B': "AA"}
	tribonacciRule = map[byte]string{'A': "AB", 'B': "AC", 'C': "A"}
)

func randomWord(n int, letters string, seed uint64) string {
	rng := rand.New(rand.NewPCG(seed, 0))
	b := make([]byte, n)
	for i := range b {
		b[i] = letters[rng.IntN(len(letters))]
	}
	return string(b)
}

func TestComplexityBruteForce(t *testing.T) {
	words := map[string]string{
		"fibonacci":  substitute(fibonacciRule, 3000),
		"thue-morse": substitute(thueMorseRule, 3000),
		"random":     randomWord(3000, "AB", 1),
		"random abc": randomWord(3000, "ABC", 2),
		"marks":      substitute(fibonacciRule, 1000) + "+" + substitute(thueMorseRule, 1000) + "??" + randomWord(500, "XY", 3),
		"short":      "AB",
	}
	for name, w := range words {
		if got, want := Complexity(w, 20), bruteComplexity(w, 20); !slices.Equal(got, want) {
			t.Errorf("%s: p = %v, brute force %v", name, got, want)
		}
	}
	if Complexity("AB", 0) != nil {
		t.Error("Complexity(w, 0) is not nil")
	}
}

// The Fibonacci word is Sturmian: p(n) = n + 1 (Morse & Hedlund 1940), its
// letter B has frequency 1/φ² = 2 − φ = 0.381966… (closed form, from the
// substitution matrix's Perron vector), and since every B stands between
// two A's, AB and BA have B's frequency and AA the rest, 1 − 2/φ².
func TestAnalyzeFibonacci(t *testing.T) {
	const n = 100_000
	w := substitute(fibonacciRule, n)
	st, err := Analyze(w, WordOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if st.Class != Sturmian || st.Examined != DefaultMaxLength {
		t.Fatalf("class %s examined to %d, want sturmian to %d", st.Class, st.Examined, DefaultMaxLength)
	}
	for i, p := range st.Complexity {
		if p != i+2 {
			t.Fatalf("p(%d) = %d, want %d", i+1, p, i+2)
		}
	}
	theta := 2 - phi
	// A mechanical word has letter counts within 1 of N·θ: frequencies
	// within 2/N.
	const tol = 2.0 / n
	if math.Abs(st.Angle-theta) > tol {
		t.Errorf("angle %.9g, want 2 − φ = %.9g", st.Angle, theta)
	}
	want := map[string]float64{"A": 1 - theta, "B": theta, "AA": 1 - 2*theta, "AB": theta, "BA": theta}
	for _, f := range st.Factors {
		if v, ok := want[f.Word]; ok && math.Abs(f.Freq-v) > tol {
			t.Errorf("frequency of %s %.9g, want %.9g", f.Word, f.Freq, v)
		}
		delete(want, f.Word)
	}
	if len(want) != 0 {
		t.Errorf("factors %v not reported", want)
	}
	if len(st.Factors) != 2+3+4 { // p(1) + p(2) + p(3)
		t.Errorf("%d factors of length ≤ 3 reported, want 9", len(st.Factors))
	}
}

// A Sturmian chain from the design's mechanical word: the angle is the
// slope folded to [0, ½].
func TestAnalyzeMechanical(t *testing.T) {
	for _, theta := range []float64{math.Sqrt2 - 1, 0.7236067977499789, math.Pi - 3} {
		p, err := design.Generate(design.Spec{Family: "sturmian", Theta: theta, Intercept: 0.3, Sites: 50_001, Seed: 1,
			Tiles: map[string]float64{"A": 1, "B": 1.5}})
		if err != nil {
			t.Fatal(err)
		}
		st, err := Analyze(p.Word, WordOptions{})
		if err != nil {
			t.Fatal(err)
		}
		want := math.Min(theta, 1-theta)
		if st.Class != Sturmian || math.Abs(st.Angle-want) > 2.0/50_000 {
			t.Errorf("θ = %.6g: class %s, angle %.8g, want sturmian, %.8g", theta, st.Class, st.Angle, want)
		}
	}
}

// Thue–Morse: p(n) for n = 1… is 2, 4, 6, 10, 12, 16, 20, 22, 24, 28, 32,
// 36, 40, 42, 44, 46, 48, 52, 56, 60 (OEIS A005942, from memory; checked
// by brute force here too). Zero entropy, not Sturmian: aperiodic.
func TestAnalyzeThueMorse(t *testing.T) {
	w := substitute(thueMorseRule, 1<<16)
	oeis := []int{2, 4, 6, 10, 12, 16, 20, 22, 24, 28, 32, 36, 40, 42, 44, 46, 48, 52, 56, 60}
	if got := Complexity(w, len(oeis)); !slices.Equal(got, oeis) {
		t.Errorf("p = %v, A005942 gives %v", got, oeis)
	}
	if got := bruteComplexity(w[:4096], len(oeis)); !slices.Equal(got, oeis) {
		t.Errorf("brute force p = %v, A005942 gives %v", got, oeis)
	}
	st, err := Analyze(w, WordOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if st.Class != Aperiodic || st.Growth >= EntropyThreshold {
		t.Errorf("class %s, growth %.3g", st.Class, st.Growth)
	}
	// Why the plain estimate log p(n)/n is not the test: at n = 20 it is
	// still log(60)/20 = 0.205.
	if b := math.Log(60) / 20; b <= EntropyThreshold {
		t.Errorf("log p(20)/20 = %.3g", b)
	}
	// Every Thue–Morse frequency of a factor of length ≤ 3 is a multiple
	// of 1/12 (the exact frequencies are in Z[1/2]/3, Bellissard 1990 —
	// recalled from memory; only what 2^16 letters support is checked).
	for _, f := range st.Factors {
		if k := f.Freq * 12; math.Abs(k-math.Round(k)) > 12*4.0/(1<<16) {
			t.Errorf("frequency of %s is %.6g = %.4g/12", f.Word, f.Freq, k)
		}
	}
}

// Other zero-entropy substitutions are aperiodic: period doubling, and
// Tribonacci, an Arnoux–Rauzy word with p(n) = 2n + 1 (Arnoux & Rauzy,
// Bull. Soc. Math. France 119, 1991).
func TestAnalyzeSubstitutions(t *testing.T) {
	pd, err := Analyze(substitute(doublingRule, 1<<16), WordOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if pd.Class != Aperiodic {
		t.Errorf("period doubling: class %s, p = %v", pd.Class, pd.Complexity)
	}
	tr, err := Analyze(substitute(tribonacciRule, 100_000), WordOptions{})
	if err != nil {
		t.Fatal(err)
	}
	for i, p := range tr.Complexity {
		if p != 2*(i+1)+1 {
			t.Fatalf("tribonacci p(%d) = %d, want %d", i+1, p, 2*(i+1)+1)
		}
	}
	if tr.Class != Aperiodic || tr.Examined < 20 {
		t.Errorf("tribonacci: class %s examined to %d", tr.Class, tr.Examined)
	}
}

// A periodic word: p(n) equals the period from n = P−1 on (Morse &
// Hedlund 1938); one wrong letter breaks it.
func TestAnalyzePeriodic(t *testing.T) {
	w := strings.Repeat("AABAB", 2000)
	st, err := Analyze(w, WordOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if st.Class != Periodic || st.Period != 5 || !math.IsNaN(st.Angle) {
		t.Fatalf("class %s period %d angle %v", st.Class, st.Period, st.Angle)
	}
	for n := 4; n <= st.Examined; n++ {
		if st.Complexity[n-1] != 5 {
			t.Fatalf("p(%d) = %d, want 5", n, st.Complexity[n-1])
		}
	}
	// Letter frequencies are k/P.
	if f := st.Factors[1]; f.Word != "B" || math.Abs(f.Freq-0.4) > 1e-12 {
		t.Errorf("frequency of %s %v, want 0.4", f.Word, f.Freq)
	}
	broken := []byte(w)
	broken[5000] = 'B'
	if st, _ := Analyze(string(broken), WordOptions{}); st.Class == Periodic {
		t.Error("a word with one wrong letter is periodic")
	}
	if st, _ := Analyze(strings.Repeat("A", 100), WordOptions{}); st.Class != Periodic || st.Period != 1 {
		t.Errorf("one letter: class %s period %d", st.Class, st.Period)
	}
}

// A random word on k letters has p(n) = k^n while the data hold every
// factor: growth log k, positive entropy.
func TestAnalyzeRandom(t *testing.T) {
	for _, letters := range []string{"AB", "ABC"} {
		st, err := Analyze(randomWord(1<<16, letters, 4), WordOptions{})
		if err != nil {
			t.Fatal(err)
		}
		k := float64(len(letters))
		if st.Class != PositiveEntropy || math.Abs(st.Growth-math.Log(k)) > 1e-9 || st.Examined < MinLengths {
			t.Errorf("%s: class %s, growth %.4g (log k = %.4g), examined %d", letters, st.Class, st.Growth, math.Log(k), st.Examined)
		}
		// Examined stops where the rarest factor is seen fewer than five
		// times: about N·k^−n ≥ 5 less its Poisson spread.
		if lim := math.Log(float64(1<<16)/5) / math.Log(k); float64(st.Examined) > lim {
			t.Errorf("%s: examined to %d, beyond log(N/5)/log k = %.3g", letters, st.Examined, lim)
		}
	}
}

func TestAnalyzeShortAndEmpty(t *testing.T) {
	st, err := Analyze(substitute(fibonacciRule, 20), WordOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if st.Class != Unresolved || st.Examined >= MinLengths {
		t.Errorf("20 letters: class %s examined %d", st.Class, st.Examined)
	}
	if _, err := Analyze("+??+", WordOptions{}); err == nil {
		t.Error("no error for a word without letters")
	}
}

// Marks split the word: the statistics are those of the pieces.
func TestAnalyzeMarks(t *testing.T) {
	w := []byte(substitute(fibonacciRule, 50_000))
	for i := 100; i < len(w); i += 997 {
		w[i] = MissingMark
	}
	st, err := Analyze(string(w), WordOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if st.Class != Sturmian {
		t.Errorf("class %s, p = %v", st.Class, st.Complexity)
	}
	for _, f := range st.Factors {
		if strings.ContainsRune(f.Word, MissingMark) {
			t.Errorf("factor %q holds a mark", f.Word)
		}
	}
}

func BenchmarkAnalyze(b *testing.B) {
	w := substitute(fibonacciRule, 1_000_000)
	for b.Loop() {
		if _, err := Analyze(w, WordOptions{}); err != nil {
			b.Fatal(err)
		}
	}
}
