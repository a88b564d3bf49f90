package embed

import (
	"encoding/binary"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"sort"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/spatial/kdtree"
	"gonum.org/v1/gonum/stat"
)

// Parameters of the window choice.
const (
	// DefaultMaxWindow is the largest window examined unless told
	// otherwise.
	DefaultMaxWindow = 12
	// DefaultNoise is the position noise, as a fraction of the mean
	// spacing, that the window choice and the whitening tolerate unless
	// told otherwise.
	DefaultNoise = 0.03
	// MaxSample is the number of delay vectors above which the window
	// choice works on a seeded random subsample of that many.
	MaxSample = 5000

	// fnnRatio is Kennel's R_tol: a neighbour is false when the next
	// coordinate separates it by more than this multiple of its distance.
	fnnRatio = 15
	// fnnSize is Kennel's A_tol: a neighbour farther than this multiple of
	// the spread of the spacings is no neighbour at all.
	fnnSize = 2
	// fnnNoise is the number of noise standard deviations by which the
	// next coordinate must separate a pair before the separation counts.
	fnnNoise = 4
	// fnnSettled is the fraction of false neighbours at or below which a
	// window unfolds the cloud.
	fnnSettled = 0.01
	// resolution is the smallest separation, in mean spacings, that the
	// rules resolve: √AbsoluteCut, a millionth of the mean spacing.
	resolution = 1e-6
	// noiseMargin is the noise floor in units of the per-coordinate noise
	// variance ν: jitter of the positions puts covariance eigenvalues up to
	// 2ν (the spectrum of the second-difference matrix), so 3ν clears them.
	noiseMargin = 3
)

// WindowChoice reports how the window was chosen and on what figures.
type WindowChoice struct {
	// Window is the chosen window length.
	Window int
	// Settled reports whether both rules settled within Cap; when not,
	// Window is Cap. With RankWindow = 0 the cloud fills every direction,
	// as independent random spacings do. With NeighbourWindow = 0 and
	// RankWindow > 0 the vectors stay within a few directions but keep
	// splitting as the window grows, as the windows of a Sturmian chain do
	// (a Cantor hull).
	Settled bool
	// Cap is the largest window examined: the requested maximum, lowered
	// when the pattern is too short for it.
	Cap int
	// Vectors is the number of delay vectors the figures are computed on.
	Vectors int
	// FalseNeighbours[k−1] is the fraction of false nearest neighbours at
	// window k (pairs that are neighbours at window k and fly apart when
	// the window grows to k+1), for k = 1, …, Cap.
	FalseNeighbours []float64
	// NeighbourWindow is the smallest k whose fraction is at most 1%
	// (0 when none is).
	NeighbourWindow int
	// Rank[k−1] is the number of significant principal components at
	// window k, for k = 1, …, Cap+1.
	Rank []int
	// RankWindow is the number of significant components at window
	// Cap+1 (at least 1), the directions the trace spans; 0 when the cloud
	// fills every direction there.
	RankWindow int
	// NoiseVariance is ν, the estimated noise variance of one
	// dimensionless spacing, and NoiseFloor = 3ν the eigenvalue below
	// which a component is noise.
	NoiseVariance, NoiseFloor float64
	// NoiseCapped reports that ν was capped at the tolerance (see
	// Options.Noise) rather than estimated.
	NoiseCapped bool
}

// sample is a deterministic subsample of the delay-vector start indices
// together with the dimensionless spacings they index.
type sample struct {
	d      []float64 // spacings divided by their mean
	starts []int     // ascending start indices n of the vectors used
}

// newSample picks from the start indices of the usable vectors all of
// them, or a seeded random subset of MaxSample in ascending order.
func newSample(d []float64, usable []int, seed uint64) sample {
	starts := usable
	if len(usable) > MaxSample {
		rng := rand.New(rand.NewPCG(seed, 1))
		starts = make([]int, MaxSample)
		for i, j := range rng.Perm(len(usable))[:MaxSample] {
			starts[i] = usable[j]
		}
		sort.Ints(starts)
	}
	return sample{d: d, starts: starts}
}

// usableStarts returns the start indices n of the delay vectors of window
// w that contain no excluded spacing (exclude nil: all of them).
func usableStarts(n int, exclude []bool, w int) []int {
	var starts []int
	bad := 0 // excluded spacings in the current window
	for i := 0; i < n; i++ {
		if exclude != nil && exclude[i] {
			bad++
		}
		if i >= w && exclude != nil && exclude[i-w] {
			bad--
		}
		if i >= w-1 && bad == 0 {
			starts = append(starts, i-w+1)
		}
	}
	return starts
}

// checkExclude checks that exclude has one entry per spacing.
func checkExclude(exclude []bool, n int) error {
	if exclude != nil && len(exclude) != n {
		return fmt.Errorf("%d exclusion marks for %d spacings", len(exclude), n)
	}
	return nil
}

// matrix returns the sampled vectors of window k as rows.
func (s sample) matrix(k int) *mat.Dense {
	x := mat.NewDense(len(s.starts), k, nil)
	for i, n := range s.starts {
		x.SetRow(i, s.d[n:n+k])
	}
	return x
}

// noise estimates the per-coordinate noise variance ν from the spectrum
// at window w: the median eigenvalue, which is a noise eigenvalue as long
// as fewer than half the components carry signal. It is capped at 2·tol²,
// the variance that independent position noise of tol mean spacings gives
// a spacing, so that a cloud filling every direction well above that —
// disorder — is not mistaken for noise.
func (s sample) noise(w int, tol float64) (nu float64, capped bool, err error) {
	p, err := principal(s.matrix(w))
	if err != nil {
		return 0, false, err
	}
	v := slices.Clone(p.values)
	sort.Float64s(v)
	nu = v[len(v)/2]
	if len(v)%2 == 0 {
		nu = (v[len(v)/2-1] + v[len(v)/2]) / 2
	}
	if limit := 2 * tol * tol; nu > limit {
		return limit, true, nil
	}
	return nu, false, nil
}

// vectorsNeeded is the fewest delay vectors accepted for a window w: twice
// as many as coordinates, so that a covariance and a nearest neighbour are
// meaningful.
func vectorsNeeded(w int) int { return 2*w + 2 }

// ChooseWindow chooses the delay window for a spacing sequence by two
// rules, each a published one, and takes the larger of the two windows.
//
// False nearest neighbours (Kennel, Brown & Abarbanel, Phys. Rev. A 45,
// 3403, 1992): a window k unfolds the cloud when points that are close at
// window k stay close at window k+1. A pair of nearest neighbours at
// distance R_k is false when the extra coordinate separates it by more
// than 15 R_k (Kennel's R_tol) plus four noise standard deviations, or when
// the pair lies farther apart at window k+1 than twice the spread of the
// spacings (Kennel's second criterion, A_tol = 2, which catches neighbours
// that are near only because nothing is nearer) and than twice the
// distance noise alone puts between two copies of one vector. The rule
// settles at the first k with at most 1% false neighbours.
//
// For a p-periodic chain the vectors are finitely many points. Exact
// duplicates are neighbours at distance 0 (ties go to the earliest
// vector), and equal windows with different continuations are false
// neighbours, at least 1/p of the vectors while such a window remains. For
// periods below 100 the rule therefore settles at the first k at which
// every window of length k has a single continuation, and then the windows
// of length k are exactly the p distinct ones (Morse & Hedlund, Amer. J.
// Math. 60, 815, 1938: once the number of distinct windows stops growing
// with their length, it equals the period).
//
// Principal-component rank (Broomhead & King, Physica D 20, 217, 1986):
// the number of covariance eigenvalues above the noise floor is the number
// of independent directions the trace explores, and a window shorter than
// that projects it onto fewer directions than it spans — a one-harmonic
// modulation traces an ellipse in a 2-plane, two incommensurate angles a
// torus in a 4-space. The rule counts the significant components (see
// Whiten) at window Cap+1 and asks for at least that many. It settles
// when that count is at most Cap, that is when the cloud leaves some
// direction empty; independent random spacings fill them all. Folds that
// stay inside the span are invisible to it and visible to false
// neighbours; a torus squashed into three coordinates self-intersects only
// along a curve, which false neighbours see weakly and the rank plainly.
//
// Noise: ν, the noise variance of one spacing, is estimated from the
// spectrum at window Cap+1 (its median eigenvalue) and capped at the
// variance that position noise of opt.Noise mean spacings gives a spacing.
// Components below 3ν count as noise, and separations below 4√(2ν) as
// noise too.
//
// For independent random spacings neither rule settles: the vectors fill
// every direction at every window, and about a fifth of the neighbours
// stay false at every window. Then the window is Cap and Settled is false.
//
// ChooseWindow uses opt.MaxWindow, opt.Noise, opt.Seed and opt.Exclude
// (see Options); above MaxSample vectors it works on a seeded subsample.
func ChooseWindow(spacings []float64, opt Options) (*WindowChoice, error) {
	opt, err := opt.withDefaults()
	if err != nil {
		return nil, err
	}
	mean, err := meanSpacing(spacings)
	if err != nil {
		return nil, fmt.Errorf("choosing the window: %w", err)
	}
	d := make([]float64, len(spacings))
	for i, v := range spacings {
		d[i] = v / mean
	}
	if err := checkExclude(opt.Exclude, len(d)); err != nil {
		return nil, fmt.Errorf("choosing the window: %w", err)
	}
	// The rules look at windows up to Cap+1; lower Cap until the pattern
	// has enough vectors of that length.
	c := opt.MaxWindow
	usable := usableStarts(len(d), opt.Exclude, c+1)
	for c >= 1 && len(usable) < vectorsNeeded(c+1) {
		c--
		usable = usableStarts(len(d), opt.Exclude, c+1)
	}
	if c < 1 {
		return nil, fmt.Errorf("choosing the window: %d usable delay vectors of window 2 are too few (need at least %d)", len(usable), vectorsNeeded(2))
	}
	s := newSample(d, usable, opt.Seed)
	ch := &WindowChoice{Cap: c, Vectors: len(s.starts)}
	nu, capped, err := s.noise(c+1, opt.noise())
	if err != nil {
		return nil, fmt.Errorf("choosing the window: %w", err)
	}
	ch.NoiseVariance, ch.NoiseFloor, ch.NoiseCapped = nu, noiseMargin*nu, capped

	for k := 1; k <= c+1; k++ {
		p, err := principal(s.matrix(k))
		if err != nil {
			return nil, fmt.Errorf("choosing the window: %w", err)
		}
		r, _ := p.rank(ch.NoiseFloor)
		ch.Rank = append(ch.Rank, r)
	}
	if r := ch.Rank[c]; r <= c {
		ch.RankWindow = max(r, 1)
	}
	spread := stat.PopStdDev(d, nil)
	for k := 1; k <= c; k++ {
		f := s.falseNeighbours(k, spread, nu)
		ch.FalseNeighbours = append(ch.FalseNeighbours, f)
		if ch.NeighbourWindow == 0 && f <= fnnSettled {
			ch.NeighbourWindow = k
		}
	}
	ch.Settled = ch.NeighbourWindow > 0 && ch.RankWindow > 0
	if ch.Settled {
		ch.Window = max(ch.NeighbourWindow, ch.RankWindow)
	} else {
		ch.Window = c
	}
	return ch, nil
}

// falseNeighbours returns the fraction of sampled vectors of window k
// whose nearest neighbour is false on going to window k+1 (see
// ChooseWindow); spread is Kennel's R_A and nu the noise variance of one
// coordinate.
//
// Exact duplicates (a periodic chain's vectors) are grouped first: the
// nearest other point of a duplicated vector is the first other member of
// its group, at distance 0, and only one member of each group goes into
// the k-d tree. This gives the same pairs as a search over all vectors
// with ties broken by sample position, without the quadratic cost of
// searching among thousands of equal points.
func (s sample) falseNeighbours(k int, spread, nu float64) float64 {
	groups := make(map[string][]int)
	keys := make([]string, len(s.starts))
	buf := make([]byte, 8*k)
	for i, n := range s.starts {
		for j, v := range s.d[n : n+k] {
			binary.LittleEndian.PutUint64(buf[8*j:], math.Float64bits(v))
		}
		keys[i] = string(buf)
		groups[keys[i]] = append(groups[keys[i]], i)
	}
	var reps delayPoints
	for i, n := range s.starts {
		if groups[keys[i]][0] == i {
			reps = append(reps, delayPoint{x: s.d[n : n+k], id: i})
		}
	}
	tree := kdtree.New(reps, false)

	// Separations and distances below these are what noise (or rounding)
	// produces between two copies of one point.
	noiseSep := math.Max(fnnNoise*math.Sqrt(2*nu), resolution)
	noiseDist := math.Max(fnnSize*math.Sqrt(2*nu*float64(k+1)), resolution)
	var nFalse int
	for i, n := range s.starts {
		var j int
		var rk2 float64
		if g := groups[keys[i]]; len(g) > 1 {
			j = g[0]
			if j == i {
				j = g[1]
			}
		} else {
			keep := &nearestOther{self: i, Heap: kdtree.Heap{{Dist: math.Inf(1)}}}
			tree.NearestSet(keep, delayPoint{x: s.d[n : n+k], id: i})
			if len(keep.Heap) == 0 {
				continue // a lone vector has no neighbour to judge
			}
			j, rk2 = keep.Heap[0].Comparable.(delayPoint).id, keep.Heap[0].Dist
		}
		sep := math.Abs(s.d[n+k] - s.d[s.starts[j]+k])
		rk1 := math.Sqrt(rk2 + sep*sep)
		fold := sep > fnnRatio*math.Sqrt(rk2)+noiseSep
		apart := rk1 > fnnSize*spread && rk1 > noiseDist
		if fold || apart {
			nFalse++
		}
	}
	return float64(nFalse) / float64(len(s.starts))
}

// delayPoint is a delay vector in a k-d tree, carrying its position in
// the sample so that a query can skip itself and break ties by it.
type delayPoint struct {
	x  []float64
	id int
}

// Compare implements kdtree.Comparable.
func (p delayPoint) Compare(c kdtree.Comparable, d kdtree.Dim) float64 {
	return p.x[d] - c.(delayPoint).x[d]
}

// Dims implements kdtree.Comparable.
func (p delayPoint) Dims() int { return len(p.x) }

func (p delayPoint) coords() []float64 { return p.x }

// Distance implements kdtree.Comparable: the squared Euclidean distance.
func (p delayPoint) Distance(c kdtree.Comparable) float64 {
	q := c.(delayPoint)
	var s float64
	for i, v := range p.x {
		d := v - q.x[i]
		s += d * d
	}
	return s
}

// delayPoints is the k-d tree set of delay vectors.
type delayPoints = treeSet[delayPoint]

// nearestOther is a kdtree.Keeper that keeps the single nearest point
// other than the query itself, breaking ties in distance by the lower
// sample position. The tree visits every point at a distance equal to the
// best so far, so the tie-break makes the answer independent of how the
// tree was built.
type nearestOther struct {
	kdtree.Heap
	self int
}

// Keep implements kdtree.Keeper.
func (k *nearestOther) Keep(c kdtree.ComparableDist) {
	id := c.Comparable.(delayPoint).id
	if id == k.self {
		return
	}
	best := k.Heap[0]
	if c.Dist < best.Dist || (c.Dist == best.Dist && best.Comparable != nil && id < best.Comparable.(delayPoint).id) {
		k.Heap[0] = c
	}
}
