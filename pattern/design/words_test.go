package design

import (
	"math"
	"math/bits"
	"strings"
	"testing"
)

// digitsToWord maps the digits 0 and 1 of an OEIS 0/1 sequence to the
// letters A and B.
func digitsToWord(digits string) string {
	return strings.NewReplacer("0", "A", "1", "B").Replace(digits)
}

// generatedWord returns the first n tiles of a substitution design.
func generatedWord(t *testing.T, rule string, n int) string {
	t.Helper()
	s := NewSpec("substitution")
	s.Sites, s.Rule = n+1, rule
	p, err := Generate(s)
	if err != nil {
		t.Fatal(err)
	}
	if len(p.Word) != n {
		t.Fatalf("%s: word of %d letters, want %d", rule, len(p.Word), n)
	}
	return p.Word
}

// TestFibonacciWord checks the fibonacci rule against the Fibonacci word.
func TestFibonacciWord(t *testing.T) {
	// OEIS A003849, the Fibonacci word, first 60 terms (from memory).
	const a003849 = "010010100100101001010010010100100101001010010010100101001001"
	// Independently: a(n) = ⌊(n+2)/φ²⌋ − ⌊(n+1)/φ²⌋, φ the golden ratio
	// (the mechanical-word formula given with A003849).
	phi2 := math.Pow((1+math.Sqrt(5))/2, 2)
	var formula strings.Builder
	for n := 0; n < 60; n++ {
		formula.WriteByte(byte('0' + int(math.Floor(float64(n+2)/phi2)-math.Floor(float64(n+1)/phi2))))
	}
	if formula.String() != a003849 {
		t.Fatalf("the recalled A003849 terms and the formula disagree:\n%s\n%s", a003849, formula.String())
	}
	if got := generatedWord(t, "fibonacci", 60); got != digitsToWord(a003849) {
		t.Errorf("fibonacci word\n%s\nwant\n%s", got, digitsToWord(a003849))
	}
	// The rule written out gives the same word.
	if got := generatedWord(t, "A=AB,B=A", 60); got != digitsToWord(a003849) {
		t.Errorf("rule A=AB,B=A gave %s", got)
	}
}

// TestThueMorseWord checks the thue-morse rule against OEIS A010060.
func TestThueMorseWord(t *testing.T) {
	// OEIS A010060, the Thue–Morse sequence, first 64 terms (from memory).
	const a010060 = "0110100110010110100101100110100110010110011010010110100110010110"
	// Independently: a(n) is the parity of the number of 1 bits of n.
	var parity strings.Builder
	for n := 0; n < 64; n++ {
		parity.WriteByte(byte('0' + bits.OnesCount(uint(n))%2))
	}
	if parity.String() != a010060 {
		t.Fatalf("the recalled A010060 terms and the popcount parity disagree:\n%s\n%s", a010060, parity.String())
	}
	if got := generatedWord(t, "thue-morse", 64); got != digitsToWord(a010060) {
		t.Errorf("thue-morse word\n%s\nwant\n%s", got, digitsToWord(a010060))
	}
}

// TestPeriodDoublingWord checks the period-doubling rule against OEIS
// A096268.
func TestPeriodDoublingWord(t *testing.T) {
	// OEIS A096268, the period-doubling sequence, first 64 terms (from
	// memory).
	const a096268 = "0100010101000100010001010100010101000101010001000100010101000100"
	// Independently: the fixed point w of 0→01, 1→00 satisfies
	// w(2m) = 0 and w(2m+1) = 1 − w(m), so a(n) is the parity of the
	// number of trailing 1 bits of n (equivalently, of the 2-adic
	// valuation of n+1).
	var trailing strings.Builder
	for n := 0; n < 64; n++ {
		trailing.WriteByte(byte('0' + bits.TrailingZeros(uint(n+1))%2))
	}
	if trailing.String() != a096268 {
		t.Fatalf("the recalled A096268 terms and the trailing-ones parity disagree:\n%s\n%s", a096268, trailing.String())
	}
	for n := 0; n < 64; n++ {
		if bits.TrailingZeros(uint(n+1)) != bits.TrailingZeros(^uint(n)) {
			t.Fatalf("trailing zeros of n+1 and trailing ones of n differ at n = %d", n)
		}
	}
	if got := generatedWord(t, "period-doubling", 64); got != digitsToWord(a096268) {
		t.Errorf("period-doubling word\n%s\nwant\n%s", got, digitsToWord(a096268))
	}
}

// TestSturmianWord checks the mechanical word: the second letter has
// frequency θ within 1/N, and the word is balanced — the numbers of B in
// two factors of the same length differ by at most 1, which characterises
// Sturmian words (Morse & Hedlund, Symbolic dynamics II: Sturmian
// trajectories, Amer. J. Math. 62, 1940).
func TestSturmianWord(t *testing.T) {
	cases := []struct{ theta, rho float64 }{
		{(3 - math.Sqrt(5)) / 2, 0}, // the Fibonacci slope 1/φ²
		{math.Sqrt(2) - 1, 0.25},
		{0.1234567, 0.9},
		{math.Pi - 3, 0.5},
	}
	const n = 2000
	for _, c := range cases {
		s := NewSpec("sturmian")
		s.Sites, s.Theta, s.Intercept = n+1, c.theta, c.rho
		s.Tiles = map[string]float64{"S": 1, "L": 1.5} // "L" sorts first: it is the letter of frequency 1 − θ
		p, err := Generate(s)
		if err != nil {
			t.Fatal(err)
		}
		w := p.Word
		if len(w) != n || strings.Trim(w, "LS") != "" {
			t.Fatalf("θ = %v: word %q… of %d letters", c.theta, w[:20], len(w))
		}
		if f := float64(strings.Count(w, "S")) / n; math.Abs(f-c.theta) > 1.0/n {
			t.Errorf("θ = %v: frequency of the second letter %v, more than 1/N from θ", c.theta, f)
		}
		// Prefix sums of S; every factor length up to 200.
		cum := make([]int, n+1)
		for i := range n {
			cum[i+1] = cum[i]
			if w[i] == 'S' {
				cum[i+1]++
			}
		}
		for l := 1; l <= 200; l++ {
			lo, hi := l, 0
			for i := 0; i+l <= n; i++ {
				k := cum[i+l] - cum[i]
				lo, hi = min(lo, k), max(hi, k)
			}
			if hi-lo > 1 {
				t.Errorf("θ = %v: factors of length %d hold between %d and %d S: not balanced", c.theta, l, lo, hi)
				break
			}
		}
		// The positions follow the tiles.
		for i, d := range p.Spacings() {
			want := map[byte]float64{'L': 1.5, 'S': 1}[w[i]]
			if math.Abs(d-want) > 1e-12*float64(n) {
				t.Fatalf("θ = %v: spacing %d = %v under tile %c", c.theta, i, d, w[i])
			}
		}
	}
}

// TestCustomRule checks a rule on three letters against its definition:
// applying the rule to the generated prefix gives a word that starts with
// that prefix (the generated word is the fixed point's prefix).
func TestCustomRule(t *testing.T) {
	s := NewSpec("substitution")
	s.Rule, s.Sites = "a=abc,b=ac,c=b", 500
	s.Tiles = map[string]float64{"a": 1, "b": 1.3, "c": 0.7}
	p, err := Generate(s)
	if err != nil {
		t.Fatal(err)
	}
	img := map[byte]string{'a': "abc", 'b': "ac", 'c': "b"}
	var next strings.Builder
	for i := range len(p.Word) {
		next.WriteString(img[p.Word[i]])
	}
	if !strings.HasPrefix(next.String(), p.Word) {
		t.Errorf("σ(word) does not start with word: %q…", p.Word[:30])
	}
}
