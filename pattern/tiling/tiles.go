package tiling

import (
	"cmp"
	"fmt"
	"math"
	"slices"
	"sort"
	"strings"

	"gonum.org/v1/gonum/stat"
)

// Defaults of Options, and the fixed thresholds of Detect.
const (
	// DefaultMaxTiles is the most tile lengths Detect accepts.
	DefaultMaxTiles = 4
	// DefaultSeparation is the factor F of the separation rule: adjacent
	// tile lengths differ by at least F times the larger of their
	// scatters.
	DefaultSeparation = 6
	// DefaultMaxScatter is the largest scatter of a tile, as a fraction of
	// its length.
	DefaultMaxScatter = 0.05
	// DefaultMinShare is the smallest fraction of the spacings a tile
	// makes up.
	DefaultMinShare = 0.01
	// DefaultMaxMissing is the largest fraction of the spacings that may
	// be read as two tiles with the site between them missing.
	DefaultMaxMissing = 0.05
	// DefaultMaxOdd is the largest fraction of the spacings that may match
	// neither a tile nor the sum of two.
	DefaultMaxOdd = 0.01

	// MinCount is the fewest occurrences of a tile, whatever the share.
	MinCount = 3
	// MinSpacings is the fewest spacings Detect examines.
	MinSpacings = 16

	// MissingMark stands in a word for a spacing that equals the sum of
	// two tile lengths: a site is missing and the order of the two tiles
	// is unknown.
	MissingMark = '+'
	// OddMark stands in a word for a spacing that matches neither a tile
	// nor the sum of two.
	OddMark = '?'
)

// Internal parameters of Detect.
const (
	// resolution is the scatter, relative to the shortest tile, below
	// which the tiles count as exact: rounding of the positions, not
	// noise.
	resolution = 1e-6
	// sampleSize is the number of order statistics the candidate
	// clusterings are computed on.
	sampleSize = 4096
	// maxRefine bounds the assignment iterations of one candidate.
	maxRefine = 50
	// maxLag is the longest lag at which the residuals are examined.
	maxLag = 8
	// lag1Limit: position noise makes consecutive spacings share a site,
	// so their residuals have lag-1 correlation −½; at most −¼ says that
	// at least half the scatter is position noise.
	lag1Limit = -0.25
	// lagLimit is the largest |correlation| of the residuals at lags 2 to
	// maxLag, which position noise leaves uncorrelated.
	lagLimit = 0.25
	// lagSigmas is the number of sampling standard deviations the
	// correlation limits are widened by.
	lagSigmas = 4
)

// Options tune Detect. The zero value asks for the defaults; a zero,
// negative or NaN field takes its default.
type Options struct {
	// MaxTiles is the most tile lengths accepted (DefaultMaxTiles).
	MaxTiles int
	// Separation is the factor F of the separation rule
	// (DefaultSeparation).
	Separation float64
	// MaxScatter is the largest scatter of a tile relative to its length
	// (DefaultMaxScatter).
	MaxScatter float64
	// MinShare is the smallest share of the spacings a tile holds
	// (DefaultMinShare); a tile also occurs at least MinCount times.
	MinShare float64
	// MaxMissing is the largest share of missing-site spacings
	// (DefaultMaxMissing).
	MaxMissing float64
	// MaxOdd is the largest share of spacings matching nothing
	// (DefaultMaxOdd).
	MaxOdd float64
	// Word, when not empty, is a tile word already known for the chain
	// (a Pattern's Word): one letter per spacing. Detect then reports the
	// word's tiles instead of detecting them.
	Word string
}

func (o Options) withDefaults() Options {
	if o.MaxTiles < 1 {
		o.MaxTiles = DefaultMaxTiles
	}
	def := func(v *float64, d float64) {
		if !(*v > 0) || math.IsInf(*v, 0) {
			*v = d
		}
	}
	def(&o.Separation, DefaultSeparation)
	def(&o.MaxScatter, DefaultMaxScatter)
	def(&o.MinShare, DefaultMinShare)
	def(&o.MaxMissing, DefaultMaxMissing)
	def(&o.MaxOdd, DefaultMaxOdd)
	return o
}

// Tiles describes a chain recognised as a tiling.
type Tiles struct {
	// Letters holds one letter per tile, by increasing length: "AB",
	// "ABC", ... for detected tiles, the word's own letters for a given
	// word.
	Letters string
	// Lengths[j] is the mean length of the spacings read as tile j.
	Lengths []float64
	// Counts[j] is the number of spacings read as tile j.
	Counts []int
	// Scatter[j] is the standard deviation of those spacings.
	Scatter []float64
	// Word has one symbol per spacing: a tile letter, MissingMark or
	// OddMark.
	Word string
	// Missing lists the spacings read as two tiles with the site between
	// them missing, in order.
	Missing []MissingSite
	// Odd lists the spacings that match neither a tile nor a pair, in
	// order.
	Odd []int
	// Given reports that the word came from Options.Word.
	Given bool
	// Separation is the smallest ratio of the difference of adjacent tile
	// lengths to the larger of their scatters: the figure the separation
	// rule is checked on (+Inf for a single tile or exact tiles).
	Separation float64
	// Lag1 and MaxLag are the lag-1 correlation of the residuals (spacing
	// minus its tile length) and the largest |correlation| at lags 2 to 8;
	// NaN when not examined (exact tiles or a given word).
	Lag1, MaxLag float64
	// Reason says why the chain was refused; empty when it was accepted.
	Reason string
}

// MissingSite is a spacing equal to the sum of two tile lengths.
type MissingSite struct {
	// Spacing is the index of the spacing.
	Spacing int
	// Pair holds the two tile letters, the shorter first.
	Pair string
}

// Detect decides whether the spacings are those of a tiling with at most
// opt.MaxTiles tile lengths, and reads its word.
//
// Rule. Candidate clusterings come from optimal one-dimensional k-means
// (solved exactly by dynamic programming, Wang & Song, The R Journal 3(2),
// 2011) on up to 4096 order statistics of the spacings, for k up to
// MaxTiles plus the number of tile pairs plus two. The clusters holding at
// least MinShare of the spacings (and MinCount of them) seed the tiles.
// Each candidate is refined by assigning every spacing to the nearest
// reference length — a tile length, or the sum of two (a missing site) —
// when it lies within F scatters of it (F = opt.Separation), and
// recomputing the lengths and scatters, until the assignment is stable:
// first on the order statistics, where candidates failing the rules on the
// tiles below are dropped, then on all the spacings, where every rule is
// checked again. A tile whose length equals the sum of two shorter
// ones within F/2 scatters and which holds at most MaxMissing of the
// spacings is read as missing sites, not as a tile. A refined candidate is
// accepted when
//
//   - it has 1 to MaxTiles tiles, each of at least MinCount spacings and a
//     share of at least MinShare;
//   - every tile's scatter σ_j is at most MaxScatter times its length;
//   - adjacent lengths differ by at least F·max(σ_j, σ_j+1): a Gaussian
//     cluster split in two gives 2.7, a uniform spread cut into cells √12
//     = 3.46, a cosine modulation (arcsine law) cut at its middle 4.14, so
//     the default F = 6 refuses all three;
//   - at most MaxMissing of the spacings are missing sites and at most
//     MaxOdd match nothing;
//   - the residuals look like position noise: position noise σ gives each
//     spacing the noise √2σ and consecutive spacings the correlation −½,
//     and leaves spacings two or more apart uncorrelated, while a
//     modulation leaves them correlated and independent random spacings
//     leave the lag-1 correlation at 0. The lag-1 correlation must be at
//     most −¼ and those at lags 2 to 8 at most ¼ in magnitude, both widened
//     by four sampling standard deviations (Bartlett's formula). Exact
//     tiles (scatter below 10⁻⁶ of the shortest) skip this check.
//
// Of the accepted candidates the one with the most tiles wins (ties: the
// smaller k); a coarser candidate that merges two tiles is accepted only
// when no finer one is.
//
// What the noise allows. A spacing is read by the nearest tile, so a
// spacing-noise standard deviation σ_s = √2σ misreads a spacing with
// probability about 2Φ(−Δ/2σ_s), Δ the difference of adjacent lengths.
// The word is exact with high probability (10⁻⁶ per spacing) when
// Δ ≥ 10σ_s; between 6σ_s and 10σ_s the tiles are found but a few letters
// may be wrong; below 6σ_s the chain is refused. No reading of the
// spacings alone can do much better: swapping two adjacent different tiles
// moves only the site between them, by Δ, so even the best decoding of
// the positions confuses such a swap with probability Φ(−Δ/2σ). Tiles 10%
// apart are read letter for letter up to position noise of 0.7% of the
// shortest tile; position noise of 3% needs tiles 42% apart.
//
// Detect returns ok false, with only Reason set, for fewer than
// MinSpacings spacings, spacings that are not finite and positive, or when
// no candidate is accepted. With opt.Word set it returns that word's tiles
// (Given true) when the word has one letter per spacing: letters are its
// bytes, sorted by mean length; bytes that are not ASCII letters are odd.
func Detect(spacings []float64, opt Options) (*Tiles, bool) {
	o := opt.withDefaults()
	if len(spacings) < MinSpacings {
		return &Tiles{Reason: fmt.Sprintf("%d spacings are too few (need at least %d)", len(spacings), MinSpacings)}, false
	}
	for i, d := range spacings {
		if !(d > 0) || math.IsInf(d, 0) {
			return &Tiles{Reason: fmt.Sprintf("spacing %d is %v: spacings must be finite and positive", i, d)}, false
		}
	}
	if o.Word != "" {
		return fromWord(spacings, o.Word)
	}
	s := newSorted(spacings)
	sample := s.sample()
	var best *Tiles
	var why refusal
	// Each candidate is refined first on the sample, then on all the
	// spacings from there; candidates that converge to the same ranges
	// are examined once.
	var seenSample, seen [][]int
	fresh := func(seen *[][]int, key []int) bool {
		if slices.ContainsFunc(*seen, func(k []int) bool { return slices.Equal(k, key) }) {
			return false
		}
		*seen = append(*seen, key)
		return true
	}
	for _, init := range sample.candidates(len(s.x), o) {
		f := sample.refine(init, o)
		if !fresh(&seenSample, f.key()) {
			continue
		}
		// Screen on the sample: the rules on the tiles alone are
		// checked again on all the spacings.
		if r, _ := checkTiles(f.tiles, len(sample.x), o); r.stage > 0 {
			if r.stage > why.stage {
				why = r
			}
			continue
		}
		if f = s.refine(f.tiles, o); !fresh(&seen, f.key()) {
			continue
		}
		t, r := s.accept(spacings, f, o)
		if t == nil {
			if r.stage > why.stage {
				why = r
			}
			continue
		}
		if best == nil || len(t.Lengths) > len(best.Lengths) {
			best = t
		}
	}
	if best == nil {
		if why.reason == "" {
			why.reason = "no cluster of spacings is large enough to be a tile"
		}
		return &Tiles{Reason: why.reason}, false
	}
	return best, true
}

// refusal records why a candidate failed and how far it got: the later
// the check, the closer the candidate came.
type refusal struct {
	stage  int
	reason string
}

// sortedSpacings holds the spacings in ascending order.
type sortedSpacings struct{ x []float64 }

func newSorted(d []float64) *sortedSpacings {
	x := slices.Clone(d)
	sort.Float64s(x)
	return &sortedSpacings{x: x}
}

// firstAbove is the index of the first value above t; firstAtLeast the
// first at or above t.
func (s *sortedSpacings) firstAbove(t float64) int {
	return sort.Search(len(s.x), func(j int) bool { return s.x[j] > t })
}
func (s *sortedSpacings) firstAtLeast(t float64) int { return sort.SearchFloat64s(s.x, t) }

// moments returns the mean and standard deviation of x (two passes).
func moments(x []float64) (mean, std float64) {
	if len(x) == 0 {
		return math.NaN(), math.NaN()
	}
	mean, variance := stat.PopMeanVariance(x, nil)
	return mean, math.Sqrt(variance)
}

// tile is a tile under refinement: its length, its scatter and the range
// [lo, hi) of the sorted spacings read as it.
type tile struct {
	length, scatter float64
	lo, hi          int
}

// sample returns at most sampleSize evenly spaced order statistics of the
// spacings: their empirical distribution follows the spacings' to within
// 1/sampleSize.
func (s *sortedSpacings) sample() *sortedSpacings {
	n := len(s.x)
	if n <= sampleSize {
		return s
	}
	x := make([]float64, sampleSize)
	for t := range x {
		x[t] = s.x[(2*t+1)*n/(2*sampleSize)]
	}
	return &sortedSpacings{x: x}
}

// candidates returns the seed tiles of every candidate clustering of the
// sample, for a chain of n spacings.
func (s *sortedSpacings) candidates(n int, o Options) [][]tile {
	sample := s.x
	m := len(sample)
	kmax := min(o.MaxTiles+o.MaxTiles*(o.MaxTiles+1)/2+2, m)
	var out [][]tile
	for _, starts := range kmeansPartitions(sample, kmax) {
		var seeds []tile
		for c, lo := range starts {
			hi := m
			if c+1 < len(starts) {
				hi = starts[c+1]
			}
			share := float64(hi-lo) / float64(m)
			if share < o.MinShare || share*float64(n) < MinCount {
				continue
			}
			mean, std := moments(sample[lo:hi])
			seeds = append(seeds, tile{length: mean, scatter: std})
		}
		if len(seeds) > 0 {
			out = append(out, seeds)
		}
	}
	return out
}

// kmeansPartitions returns, for k = 1, …, kmax, the partition of the sorted
// values x into k consecutive clusters of least total within-cluster sum
// of squares, as the start index of each cluster.
//
// In one dimension the clusters of an optimal k-means partition are runs
// of the sorted values, so D[k][i], the least cost of x[0:i] in k
// clusters, obeys D[k][i] = min_j D[k−1][j] + cost(x[j:i]) (Wang & Song,
// The R Journal 3(2), 2011). The minimising j is non-decreasing in i
// (Grønlund et al., "Fast exact k-means, k-medians and Bregman divergence
// clustering in 1D", 2017), so each layer is solved by divide and conquer
// in O(n log n).
func kmeansPartitions(x []float64, kmax int) [][]int {
	n := len(x)
	shift := x[n/2] // centre the sums: fewer digits lost in cost
	p1 := make([]float64, n+1)
	p2 := make([]float64, n+1)
	for i, v := range x {
		v -= shift
		p1[i+1] = p1[i] + v
		p2[i+1] = p2[i] + v*v
	}
	cost := func(j, i int) float64 { // sum of squares of x[j:i] about its mean
		a := p1[i] - p1[j]
		return p2[i] - p2[j] - a*a/float64(i-j)
	}
	prev := make([]float64, n+1)
	for i := 1; i <= n; i++ {
		prev[i] = cost(0, i)
	}
	arg := make([][]int32, kmax+1) // arg[k][i]: start of the last cluster
	for k := 2; k <= kmax; k++ {
		cur := make([]float64, n+1)
		ak := make([]int32, n+1)
		var solve func(lo, hi, optLo, optHi int)
		solve = func(lo, hi, optLo, optHi int) {
			if lo > hi {
				return
			}
			mid := (lo + hi) / 2
			best, bj := math.Inf(1), optLo
			for j := optLo; j <= min(mid-1, optHi); j++ {
				if c := prev[j] + cost(j, mid); c < best {
					best, bj = c, j
				}
			}
			cur[mid], ak[mid] = best, int32(bj)
			solve(lo, mid-1, optLo, bj)
			solve(mid+1, hi, bj, optHi)
		}
		// x[0:i] in k clusters needs i ≥ k, and the last cluster
		// starts at j ≥ k−1.
		solve(k, n, k-1, n-1)
		arg[k], prev = ak, cur
	}
	out := make([][]int, kmax)
	for k := 1; k <= kmax; k++ {
		starts := make([]int, k)
		i := n
		for kk := k; kk >= 2; kk-- {
			i = int(arg[kk][i])
			starts[kk-1] = i
		}
		out[k-1] = starts
	}
	return out
}

// reference is a length a spacing may be read as: a tile, or the sum of
// tiles a and b (tile −1). Spacings in [lo, hi) of the sorted order are
// read as it.
type reference struct {
	value, radius float64
	tile, a, b    int
	lo, hi        int
}

// fit is a refined candidate: its tiles, ascending, and the references
// the spacings were last assigned to.
type fit struct {
	tiles []tile
	refs  []reference
}

// key identifies a converged candidate by its tiles' ranges.
func (f fit) key() []int {
	k := make([]int, 0, 2*len(f.tiles))
	for _, t := range f.tiles {
		k = append(k, t.lo, t.hi)
	}
	return k
}

// floor is the smallest scatter that counts: below it the tiles are exact.
func floorOf(tiles []tile) float64 { return resolution * tiles[0].length }

// references lists the tiles and the pair sums that lie at least F
// scatters from every tile and every earlier pair, sorted by value; each
// takes the spacings within F scatters of it (its band). A pair sum closer
// to a tile than that cannot be told from it; the tile wins.
func references(tiles []tile, F float64) []reference {
	fl := floorOf(tiles)
	var refs []reference
	for j, t := range tiles {
		refs = append(refs, reference{value: t.length, radius: F * math.Max(t.scatter, fl), tile: j, a: -1, b: -1})
	}
	for a := range tiles {
		for b := a; b < len(tiles); b++ {
			// Position noise gives the spacing across a missing site
			// the same scatter as one spacing.
			v := tiles[a].length + tiles[b].length
			r := F * math.Max(math.Max(tiles[a].scatter, tiles[b].scatter), fl)
			if !slices.ContainsFunc(refs, func(q reference) bool { return math.Abs(v-q.value) < (r+q.radius)/2 }) {
				refs = append(refs, reference{value: v, radius: r, tile: -1, a: a, b: b})
			}
		}
	}
	slices.SortStableFunc(refs, func(p, q reference) int { return cmp.Compare(p.value, q.value) })
	return refs
}

// cell returns the bounds of reference i's Voronoi cell (mid-points to its
// neighbours) intersected with its band: a spacing x is read as it when
// lower < x ≤ upper within the cell and |x − value| ≤ radius.
func cell(refs []reference, i int) (lower, upper float64) {
	lower, upper = math.Inf(-1), math.Inf(1)
	if i > 0 {
		lower = (refs[i-1].value + refs[i].value) / 2
	}
	if i+1 < len(refs) {
		upper = (refs[i].value + refs[i+1].value) / 2
	}
	return lower, upper
}

// assign sets each reference's range of sorted spacings.
func (s *sortedSpacings) assign(refs []reference) {
	for i := range refs {
		r := &refs[i]
		lower, upper := cell(refs, i)
		r.lo = max(s.firstAbove(lower), s.firstAtLeast(r.value-r.radius))
		r.hi = min(s.firstAbove(upper), s.firstAbove(r.value+r.radius))
		if r.hi < r.lo {
			r.hi = r.lo
		}
	}
}

// refine iterates the assignment from the seed tiles until it is stable.
func (s *sortedSpacings) refine(seeds []tile, o Options) fit {
	n := len(s.x)
	tiles := slices.Clone(seeds)
	var refs []reference
	for iter := 0; iter < maxRefine && len(tiles) > 0; iter++ {
		refs = references(tiles, o.Separation)
		s.assign(refs)
		var next []tile
		for _, r := range refs {
			if r.tile >= 0 && r.hi-r.lo >= 2 {
				mean, std := moments(s.x[r.lo:r.hi])
				next = append(next, tile{length: mean, scatter: std, lo: r.lo, hi: r.hi})
			}
		}
		// A rare tile as long as two shorter ones together is a
		// missing site: drop it, and the pair's band takes its
		// spacings on the next pass.
		for j := 0; j < len(next); j++ {
			if float64(next[j].hi-next[j].lo) > o.MaxMissing*float64(n) {
				continue
			}
			isPair := false
			for a := 0; a < j && !isPair; a++ {
				for b := a; b < j && !isPair; b++ {
					tol := o.Separation / 2 * math.Max(math.Max(next[j].scatter, next[a].scatter), math.Max(next[b].scatter, floorOf(next)))
					isPair = math.Abs(next[j].length-next[a].length-next[b].length) <= tol
				}
			}
			if isPair {
				next = slices.Delete(next, j, j+1)
				j--
			}
		}
		stable := len(next) == len(tiles)
		for j := 0; stable && j < len(next); j++ {
			stable = next[j].lo == tiles[j].lo && next[j].hi == tiles[j].hi
		}
		tiles = next
		if stable {
			break
		}
	}
	if len(tiles) > 0 {
		refs = references(tiles, o.Separation)
		s.assign(refs)
	}
	return fit{tiles: tiles, refs: refs}
}

// checkTiles applies the rules of Detect that concern the tiles alone, for
// a chain of n spacings. It returns the zero refusal when they pass, and
// the smallest separation ratio.
func checkTiles(tiles []tile, n int, o Options) (refusal, float64) {
	nt := len(tiles)
	if nt == 0 {
		return refusal{1, "no cluster of spacings is large enough to be a tile"}, 0
	}
	for _, t := range tiles {
		if c := t.hi - t.lo; c < MinCount || float64(c) < o.MinShare*float64(n) {
			return refusal{2, fmt.Sprintf("a tile of length %.6g would hold only %d spacings (a tile needs %d and %.3g%% of them)", t.length, c, MinCount, 100*o.MinShare)}, 0
		}
	}
	for _, t := range tiles {
		if t.scatter > o.MaxScatter*t.length {
			return refusal{3, fmt.Sprintf("the spacings near %.6g scatter by %.3g%% of it, more than the %.3g%% a tile may (a continuous spread of spacings)", t.length, 100*t.scatter/t.length, 100*o.MaxScatter)}, 0
		}
	}
	fl := floorOf(tiles)
	sep := math.Inf(1)
	for j := 0; j+1 < nt; j++ {
		a, b := tiles[j], tiles[j+1]
		r := (b.length - a.length) / math.Max(math.Max(a.scatter, b.scatter), fl)
		sep = math.Min(sep, r)
		if r < o.Separation {
			return refusal{4, fmt.Sprintf("the lengths %.6g and %.6g differ by only %.3g times their scatter (a tile needs %g): the spacings do not fall into separate clusters", a.length, b.length, r, o.Separation)}, 0
		}
	}
	if nt > o.MaxTiles {
		return refusal{5, fmt.Sprintf("the spacings fall into %d separate clusters, more than the %d tiles allowed", nt, o.MaxTiles)}, sep
	}
	return refusal{}, sep
}

// accept checks a candidate refined on all the spacings against the rules
// of Detect and, when it passes, reads the word.
func (s *sortedSpacings) accept(spacings []float64, f fit, o Options) (*Tiles, refusal) {
	n := len(spacings)
	nt := len(f.tiles)
	r, sep := checkTiles(f.tiles, n, o)
	if r.stage > 0 {
		return nil, r
	}
	fl := floorOf(f.tiles)
	t := &Tiles{Separation: sep, Lag1: math.NaN(), MaxLag: math.NaN()}
	word := make([]byte, n)
	resid := make([]float64, n)
	for i := range resid {
		resid[i] = math.NaN()
	}
	t.Lengths = make([]float64, nt)
	t.Scatter = make([]float64, nt)
	t.Counts = make([]int, nt)
	letters := make([]byte, nt)
	for j, ti := range f.tiles {
		t.Lengths[j], t.Scatter[j] = ti.length, ti.scatter
		letters[j] = byte('A' + j)
	}
	t.Letters = string(letters)
	uppers := make([]float64, len(f.refs)) // cell upper bounds, for the search
	for i := range f.refs {
		_, uppers[i] = cell(f.refs, i)
	}
	for i, d := range spacings {
		k := sort.SearchFloat64s(uppers, d) // first cell with d ≤ upper
		r := f.refs[k]
		switch {
		case !(d >= r.value-r.radius && d <= r.value+r.radius):
			word[i] = OddMark
			t.Odd = append(t.Odd, i)
		case r.tile >= 0:
			word[i] = letters[r.tile]
			t.Counts[r.tile]++
			resid[i] = d - r.value
		default:
			word[i] = MissingMark
			t.Missing = append(t.Missing, MissingSite{Spacing: i, Pair: string([]byte{letters[r.a], letters[r.b]})})
		}
	}
	t.Word = string(word)
	if m := len(t.Missing); float64(m) > o.MaxMissing*float64(n) {
		return nil, refusal{6, fmt.Sprintf("%d spacings (%.3g%%) equal the sum of two tiles, more than the %.3g%% of missing sites allowed", m, 100*float64(m)/float64(n), 100*o.MaxMissing)}
	}
	if m := len(t.Odd); float64(m) > o.MaxOdd*float64(n) {
		return nil, refusal{6, fmt.Sprintf("%d spacings (%.3g%%) match no tile and no pair of tiles, more than the %.3g%% allowed", m, 100*float64(m)/float64(n), 100*o.MaxOdd)}
	}
	if rms := pooledRMS(resid); rms > fl {
		lag, pairs := autocorrelations(resid, maxLag)
		t.Lag1 = lag[0]
		t.MaxLag = 0
		for k := 1; k < maxLag; k++ {
			t.MaxLag = math.Max(t.MaxLag, math.Abs(lag[k]))
		}
		if pairs[0] > 0 {
			// Sampling standard deviation of the lag-1 correlation of
			// position noise: √((1 − 3ρ² + 4ρ⁴)/M) = √(0.5/M) at ρ = −½.
			if lim := lag1Limit + lagSigmas*math.Sqrt(0.5/float64(pairs[0])); lag[0] > lim {
				return nil, refusal{7, fmt.Sprintf("consecutive spacings deviate from their tile lengths with correlation %.3g, above %.3g: the scatter is not position noise (independent random spacings give 0, position noise −0.5)", lag[0], lim)}
			}
		}
		for k := 1; k < maxLag; k++ {
			if pairs[k] == 0 {
				continue
			}
			// Bartlett: for noise correlated only at lag 1 (ρ₁ = −½)
			// the correlation at lags ≥ 2 has variance (1 + 2ρ₁²)/M.
			if lim := lagLimit + lagSigmas*math.Sqrt(1.5/float64(pairs[k])); math.Abs(lag[k]) > lim {
				return nil, refusal{7, fmt.Sprintf("spacings %d apart deviate from their tile lengths with correlation %.3g, beyond ±%.3g: the spacings vary smoothly along the chain (a modulation), not by noise", k+1, lag[k], lim)}
			}
		}
	}
	return t, refusal{}
}

// pooledRMS is the root mean square of the residuals that are not NaN.
func pooledRMS(r []float64) float64 {
	var s float64
	var m int
	for _, v := range r {
		if !math.IsNaN(v) {
			s += v * v
			m++
		}
	}
	if m == 0 {
		return 0
	}
	return math.Sqrt(s / float64(m))
}

// autocorrelations returns the correlation of the residuals at lags 1 to
// maxLag over the pairs where both are defined, normalised by the mean
// square of all of them (each tile's residuals have mean zero by
// construction), and the number of pairs at each lag.
func autocorrelations(r []float64, maxLag int) ([]float64, []int) {
	var v float64
	var m int
	for _, x := range r {
		if !math.IsNaN(x) {
			v += x * x
			m++
		}
	}
	v /= float64(m)
	rho := make([]float64, maxLag)
	pairs := make([]int, maxLag)
	for k := 1; k <= maxLag; k++ {
		var s float64
		for i := 0; i+k < len(r); i++ {
			if !math.IsNaN(r[i]) && !math.IsNaN(r[i+k]) {
				s += r[i] * r[i+k]
				pairs[k-1]++
			}
		}
		if pairs[k-1] > 0 {
			rho[k-1] = s / float64(pairs[k-1]) / v
		}
	}
	return rho, pairs
}

// fromWord reports the tiles of a given word.
func fromWord(spacings []float64, word string) (*Tiles, bool) {
	if len(word) != len(spacings) {
		return &Tiles{Reason: fmt.Sprintf("the given word has %d letters for %d spacings", len(word), len(spacings))}, false
	}
	byLetter := map[byte][]float64{}
	t := &Tiles{Word: word, Given: true, Lag1: math.NaN(), MaxLag: math.NaN(), Separation: math.Inf(1)}
	for i := range len(word) {
		c := word[i]
		if !('a' <= c && c <= 'z' || 'A' <= c && c <= 'Z') {
			t.Odd = append(t.Odd, i)
			continue
		}
		byLetter[c] = append(byLetter[c], spacings[i])
	}
	if len(byLetter) == 0 {
		return &Tiles{Reason: "the given word holds no tile letter"}, false
	}
	type entry struct {
		letter byte
		mean   float64
		std    float64
		count  int
	}
	var es []entry
	for c, d := range byLetter {
		mean, std := moments(d)
		es = append(es, entry{c, mean, std, len(d)})
	}
	slices.SortFunc(es, func(p, q entry) int {
		if p.mean != q.mean {
			if p.mean < q.mean {
				return -1
			}
			return 1
		}
		return int(p.letter) - int(q.letter)
	})
	var letters strings.Builder
	for j, e := range es {
		letters.WriteByte(e.letter)
		t.Lengths = append(t.Lengths, e.mean)
		t.Scatter = append(t.Scatter, e.std)
		t.Counts = append(t.Counts, e.count)
		if j > 0 {
			if s := math.Max(e.std, es[j-1].std); s > 0 {
				t.Separation = math.Min(t.Separation, (e.mean-es[j-1].mean)/s)
			}
		}
	}
	t.Letters = letters.String()
	return t, true
}
