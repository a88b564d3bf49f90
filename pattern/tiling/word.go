package tiling

import (
	"fmt"
	"math"
	"slices"
	"strings"
)

// Class names the kind of order of a tile word.
type Class string

// The classes Analyze tells apart.
const (
	// Periodic: p(n) stops growing and the word repeats with period p.
	Periodic Class = "periodic"
	// Sturmian: two letters and p(n) = n + 1 at every length examined.
	Sturmian Class = "sturmian"
	// Aperiodic: p grows, but more slowly than exponentially (substitution
	// words, for instance).
	Aperiodic Class = "aperiodic"
	// PositiveEntropy: p grows exponentially (random tilings).
	PositiveEntropy Class = "positive-entropy"
	// Unresolved: the word is too short for MinLengths lengths to be
	// examined.
	Unresolved Class = "unresolved"
)

// Defaults of WordOptions and fixed thresholds of Analyze.
const (
	// DefaultMaxLength is the longest factor length examined.
	DefaultMaxLength = 48
	// DefaultMinOccurrences is how often the rarest factor of a length
	// must occur for that length to be examined.
	DefaultMinOccurrences = 5
	// DefaultFactorLength is the longest factor whose frequency is
	// reported.
	DefaultFactorLength = 3
	// MinLengths is the fewest lengths that must be examined for a class
	// to be decided.
	MinLengths = 6
	// EntropyThreshold is the growth rate, in nats per letter, that
	// log p(n+1) − log p(n) must keep at every length examined for the
	// word to count as of positive entropy.
	EntropyThreshold = 0.1
)

// WordOptions tune Analyze. A zero or negative field takes its default.
type WordOptions struct {
	// MaxLength is the longest factor length examined
	// (DefaultMaxLength).
	MaxLength int
	// MinOccurrences is how often the rarest factor of a length must
	// occur for the length to be examined (DefaultMinOccurrences).
	MinOccurrences int
	// FactorLength is the longest factor whose frequency is reported
	// (DefaultFactorLength).
	FactorLength int
}

func (o WordOptions) withDefaults() WordOptions {
	if o.MaxLength < 1 {
		o.MaxLength = DefaultMaxLength
	}
	if o.MinOccurrences < 1 {
		o.MinOccurrences = DefaultMinOccurrences
	}
	if o.FactorLength < 1 {
		o.FactorLength = DefaultFactorLength
	}
	return o
}

// Factor is a factor (a run of consecutive letters) of a word and how
// often it occurs.
type Factor struct {
	// Word is the factor.
	Word string
	// Count is the number of positions it starts at.
	Count int
	// Freq is Count over the number of positions a factor of its length
	// can start at (those whose run holds no mark).
	Freq float64
}

// WordStats describes the order of a tile word.
type WordStats struct {
	// Letters are the distinct letters, in byte order.
	Letters string
	// Complexity[n−1] is p(n), the number of distinct factors of length
	// n, for n = 1, …, Examined.
	Complexity []int
	// Examined is the longest length examined (see Analyze).
	Examined int
	// Class is the kind of order p(n) shows.
	Class Class
	// Period is the period of a Periodic word; 0 otherwise.
	Period int
	// Angle is the frequency of a letter of a Sturmian word, folded to
	// [0, ½]; its frequency module and gap-label group is Z + Zθ. NaN for
	// other classes.
	Angle float64
	// Growth is the least of log p(n+1) − log p(n) over the lengths
	// examined: a lower estimate of the growth rate of p, in nats per
	// letter. NaN when fewer than two lengths were examined.
	Growth float64
	// EntropyBound is log p(Examined)/Examined, an upper bound on the
	// topological entropy (p is submultiplicative). NaN when nothing was
	// examined.
	EntropyBound float64
	// Factors lists every factor of length 1 to FactorLength, by length
	// and then in byte order, with its frequency.
	Factors []Factor
}

// isLetter reports whether c is a tile letter: MissingMark, OddMark and
// any other byte that is not an ASCII letter interrupt the word.
func isLetter(c byte) bool { return 'a' <= c && c <= 'z' || 'A' <= c && c <= 'Z' }

// factorClasses numbers the factors of one length: id[i] is the number of
// the factor starting at i (−1 where the factor would run past the end or
// over a mark), count[f] how often factor f occurs and start[f] the first
// position it occurs at.
type factorClasses struct {
	n     int
	id    []int32
	count []int
	start []int
}

// factorWalk enumerates the factor classes of a word for n = 1, 2, …
type factorWalk struct {
	code  []int16 // letter code, −1 at marks
	sigma int
	cur   factorClasses
	table []int32 // dense map (id, letter) → new id, reused
}

func newFactorWalk(word string) *factorWalk {
	var present [256]bool
	for i := range len(word) {
		if isLetter(word[i]) {
			present[word[i]] = true
		}
	}
	var rank [256]int16
	sigma := 0
	for c := range 256 {
		if present[c] {
			rank[c] = int16(sigma)
			sigma++
		}
	}
	w := &factorWalk{code: make([]int16, len(word)), sigma: sigma}
	for i := range len(word) {
		if isLetter(word[i]) {
			w.code[i] = rank[word[i]]
		} else {
			w.code[i] = -1
		}
	}
	// Length 1: the factor is the letter.
	w.cur = factorClasses{n: 1, id: make([]int32, len(word)), count: make([]int, sigma), start: make([]int, sigma)}
	for c := range w.cur.start {
		w.cur.start[c] = -1
	}
	for i, c := range w.code {
		w.cur.id[i] = int32(c)
		if c >= 0 {
			if w.cur.count[c] == 0 {
				w.cur.start[c] = i
			}
			w.cur.count[c]++
		}
	}
	return w
}

// next advances from length n to n+1: the factor of length n+1 at i is
// the pair (factor of length n at i, letter at i+n), renumbered in order of
// first occurrence.
func (w *factorWalk) next() {
	n := w.cur.n
	p := len(w.cur.count)
	id := w.cur.id // updated in place: id[i] is read before it is written
	var count, start []int
	var dense []int32
	var sparse map[int64]int32
	if p*w.sigma <= 1<<22 {
		if cap(w.table) < p*w.sigma {
			w.table = make([]int32, p*w.sigma)
		}
		dense = w.table[:p*w.sigma]
		for k := range dense {
			dense[k] = -1
		}
	} else {
		sparse = make(map[int64]int32)
	}
	for i := range id {
		if id[i] < 0 || i+n >= len(w.code) || w.code[i+n] < 0 {
			id[i] = -1
			continue
		}
		key := int64(id[i])*int64(w.sigma) + int64(w.code[i+n])
		var f int32
		var ok bool
		if dense != nil {
			f = dense[key]
			ok = f >= 0
		} else {
			f, ok = sparse[key]
		}
		if !ok {
			f = int32(len(count))
			count = append(count, 0)
			start = append(start, i)
			if dense != nil {
				dense[key] = f
			} else {
				sparse[key] = f
			}
		}
		count[f]++
		id[i] = f
	}
	w.cur = factorClasses{n: n + 1, id: id, count: count, start: start}
}

// present returns the number of distinct factors of the current length,
// the occurrences of the rarest and the number of positions they start at.
func (w *factorWalk) present() (p, rarest, positions int) {
	rarest = math.MaxInt
	for _, c := range w.cur.count {
		if c > 0 {
			p++
			rarest = min(rarest, c)
			positions += c
		}
	}
	if p == 0 {
		rarest = 0
	}
	return p, rarest, positions
}

// Complexity returns p(n), the number of distinct factors of length n of
// word, for n = 1, …, maxLen: Complexity(w, m)[n−1] = p(n). Factors that
// contain a byte other than an ASCII letter (MissingMark, OddMark) are not
// counted: the word is read as the pieces between its marks.
func Complexity(word string, maxLen int) []int {
	if maxLen < 1 {
		return nil
	}
	w := newFactorWalk(word)
	out := make([]int, 0, maxLen)
	for n := 1; n <= maxLen; n++ {
		if n > 1 {
			w.next()
		}
		p, _, _ := w.present()
		out = append(out, p)
	}
	return out
}

// Analyze computes the complexity function of a tile word, its class and
// its factor frequencies.
//
// Lengths examined. p(n) is computed for n = 1, 2, … as long as n ≤
// MaxLength and the rarest factor of length n occurs at least
// MinOccurrences times (default 5): a factor seen that often is no
// accident of the sample, and a missed factor of comparable frequency
// would be missing with probability about e⁻⁵ (Poisson), so p(n) is the
// full count. Examined is the last such n. Linearly recurrent words
// (Sturmian and primitive substitution words) have factors of length n of
// frequency at least c/n, so a word of N letters supports n up to order
// N/(5c); a random word of entropy h supports only n ≈ log(N/5)/h.
//
// Classes, decided in this order on n ≤ Examined, with at least MinLengths
// (6) lengths examined (Unresolved otherwise):
//
//   - Periodic: p(Examined−1) = p(Examined) = P and the word repeats with
//     period P (checked letter by letter). By Morse & Hedlund (Amer. J.
//     Math. 60, 815, 1938) a bi-infinite word whose p(n) stops growing is
//     periodic, with p equal to the least period from n = P−1 on.
//   - Sturmian: two letters and p(n) = n + 1 at every n examined, the
//     least complexity of a word that is not eventually periodic (Morse &
//     Hedlund, Amer. J. Math. 62, 1, 1940). A periodic mechanical word of
//     period q > Examined+1 looks Sturmian at the lengths examined.
//     Angle is the frequency of one letter folded to [0, ½]: the angle of
//     the rotation that codes the word, and its gap-label group is
//     Z + Zθ (Bellissard, Bovier & Ghez, Rev. Math. Phys. 4, 1, 1992).
//   - PositiveEntropy: log p(n+1) − log p(n) ≥ 0.1 at every n examined.
//     The plainer estimate log p(n)/n is no use at the lengths data allow:
//     it decreases to the entropy only as log(Cn)/n, and stays above 0.1
//     up to n = 35 for p(n) = n + 1 and up to n ≈ 50 for Thue–Morse
//     (p(n) ≈ 3.3n). The consecutive ratios fall below e^0.1 as soon as p
//     grows linearly — p(10)/p(9) = 11/10 for p(n) = n + 1, p(8)/p(7) =
//     22/20 for Thue–Morse (OEIS A005942), p(7)/p(6) = 11/10 for period
//     doubling — and stay at k for a random word on k letters. The test
//     needs the lengths examined to reach that far: a word of zero entropy
//     examined only to n = 6 can pass it.
//   - Aperiodic: the rest; p grows, but not exponentially.
//
// Analyze returns an error for a word with no letter.
func Analyze(word string, opt WordOptions) (*WordStats, error) {
	o := opt.withDefaults()
	w := newFactorWalk(word)
	if w.sigma == 0 {
		return nil, fmt.Errorf("analysing the tile word: it holds no tile letter")
	}
	st := &WordStats{Angle: math.NaN(), Growth: math.NaN(), EntropyBound: math.NaN()}
	var letters []byte
	for c := range 256 {
		if strings.IndexByte(word, byte(c)) >= 0 && isLetter(byte(c)) {
			letters = append(letters, byte(c))
		}
	}
	st.Letters = string(letters)
	for n := 1; n <= max(o.MaxLength, o.FactorLength); n++ {
		if n > 1 {
			w.next()
		}
		p, rarest, positions := w.present()
		if p == 0 {
			break
		}
		if n <= o.FactorLength {
			st.Factors = append(st.Factors, factorsOf(word, w, positions)...)
		}
		if n <= o.MaxLength && n == st.Examined+1 && rarest >= o.MinOccurrences {
			st.Complexity = append(st.Complexity, p)
			st.Examined = n
		}
		if n > o.FactorLength && n > st.Examined {
			break
		}
	}
	st.classify(word)
	return st, nil
}

// factorsOf lists the factors of the walk's current length in byte order.
func factorsOf(word string, w *factorWalk, positions int) []Factor {
	n := w.cur.n
	var fs []Factor
	for f, c := range w.cur.count {
		if c > 0 {
			s := w.cur.start[f]
			fs = append(fs, Factor{Word: word[s : s+n], Count: c, Freq: float64(c) / float64(positions)})
		}
	}
	slices.SortFunc(fs, func(a, b Factor) int { return strings.Compare(a.Word, b.Word) })
	return fs
}

// classify sets Class, Period, Angle, Growth and EntropyBound from the
// complexity function.
func (st *WordStats) classify(word string) {
	p := st.Complexity
	m := st.Examined
	if m >= 1 {
		st.EntropyBound = math.Log(float64(p[m-1])) / float64(m)
	}
	if m >= 2 {
		st.Growth = math.Inf(1)
		for n := 1; n < m; n++ {
			st.Growth = math.Min(st.Growth, math.Log(float64(p[n])/float64(p[n-1])))
		}
	}
	if m < MinLengths {
		st.Class = Unresolved
		return
	}
	if P := p[m-1]; p[m-2] == P && hasPeriod(word, P) {
		st.Class, st.Period = Periodic, P
		return
	}
	sturmian := len(st.Letters) == 2
	for n := 1; n <= m && sturmian; n++ {
		sturmian = p[n-1] == n+1
	}
	if sturmian {
		st.Class = Sturmian
		f := st.Factors[0].Freq // the first letter's frequency
		st.Angle = math.Min(f, 1-f)
		return
	}
	if st.Growth >= EntropyThreshold {
		st.Class = PositiveEntropy
		return
	}
	st.Class = Aperiodic
}

// hasPeriod reports whether word[i] = word[i+P] wherever both are letters,
// with at least one such pair.
func hasPeriod(word string, P int) bool {
	pairs := 0
	for i := 0; i+P < len(word); i++ {
		a, b := word[i], word[i+P]
		if !isLetter(a) || !isLetter(b) {
			continue
		}
		if a != b {
			return false
		}
		pairs++
	}
	return pairs > 0
}
