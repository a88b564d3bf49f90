package hull

import (
	"context"
	"errors"
	"fmt"
	"math"
	"runtime"
	"slices"
	"sync"

	"phasonhull/embed"
	"phasonhull/topology"
	"phasonhull/topology/notation"
	"phasonhull/topology/rips"
)

// cloud is what the topology stage reads a hull from: points in a
// Euclidean space, a landmark set on them, and what the significance rule
// needs to know of their sampling. It knows nothing of chains: a pattern
// along a line feeds it its whitened delay vectors (see newAnalysis), and
// any other source of points on a hull can feed it the same way.
//
// The stage runs barcodes → significance → circular coordinates:
// readBarcodes gives the Betti numbers with their confidence and scale
// band, and reading.coordinates the circular coordinate of every point
// for the most persistent loops.
type cloud struct {
	// points are the points the landmarks and the circular coordinates
	// come from.
	points [][]float64
	// landmarkIdx indexes the main landmark set in points, landmarks holds
	// those points, cover is their cover radius (the largest distance of
	// a point to its nearest landmark).
	landmarkIdx []int
	landmarks   [][]float64
	cover       float64
	// components is the number of directions of the cloud above the noise
	// floor: a cloud in four or more may be a torus, whose loops and
	// 2-cycle need a denser cover than a circle's loop.
	components int
	// noise is the root-mean-square displacement of a point by the
	// measured noise, in the cloud's units: the noise scale of the
	// significance rule.
	noise float64
}

// The significance rule for bars. A bar of the landmark barcode is
// significant when its persistence exceeds
//
//	τ = max(2·max(δ, ε), 3·s)
//
// with δ the cover radius of the landmarks in the cloud, ε half the largest
// H0 death inside a component (half the largest gap of the sampled trace),
// and s the noise scale of the cloud: the root-mean-square displacement of
// a point by the measured noise, propagated to the cloud's units
// (cloud.noise). The noise scale is measured off the data's noise, not off
// the bars being counted, so three or four equally long loops do not raise
// the threshold that is to count them.
//
// The sampling term follows the stability theorem for Vietoris–Rips
// barcodes (Chazal, de Silva & Oudot, Geom. Dedicata 173, 2014: the
// bottleneck distance between two barcodes is at most twice the
// Gromov–Hausdorff distance of the clouds): the landmarks lie within δ of
// the cloud and the cloud leaves gaps of at most 2ε in what it traces, so a
// bar that the landmarks have and the traced hull has not is at most about
// 4·max(δ, ε) long, and bars that short stem from sampling. It is used at
// half that worst case, since the worst case needs every landmark
// displaced the same way. The noise term asks a significant bar to be three
// times longer than the noise displacement of a point, the persistence of
// the loops noise closes (by the same theorem, a cloud moved by s has bars
// within 2s of the noise-free one's).
//
// The components are read off the H0 deaths first: the hull has p
// components when the p−1 longest finite H0 bars die at scales above τ and
// at least componentGap times later than every other H0 bar (the gaps
// between components against the gaps inside them); ε is then taken from
// the H0 bars inside the components. The rule is checked on every class of
// generated hull from noise-free to 5% position noise (see the tests and
// the benchmark suite); its factors are named below.
//
// noiseFactor is calibrated by simulation (BenchmarkCalibration in
// calibrate_test.go: a circle, 2 circles and a two-torus of 2000 sites at
// 0.5% to 5% position noise, 4 draws each, 60 in all): no draw had a bar
// beyond the true Betti numbers above τ (0/60, 95% upper bound 5%); where
// the noise term dominates the threshold (2% noise and more) the longest
// such bar was 1.72·s, so noise alone made no loop above 3·s (0/36). Above
// 3·s there were only sampling bars of the torus at 0.5% noise (up to
// 5.6·s, 4/4 draws), which the sampling term keeps below τ. The price:
// the shortest true bar of the torus at 3% noise was 2.44·s (4/4 draws
// below 3·s: tori at 3% come out unresolved), and at 5% every true bar
// is below 1·s. A factor of 2 would keep the 3% tori, with a margin over
// the noise bars seen too thin for 60 draws to establish; 3 stands.
const (
	samplingFactor = 2
	noiseFactor    = 3
	componentGap   = 3
	// torusLandmarks is the least number of landmarks H2 is computed on.
	torusLandmarks = 300
	// maxDenseLandmarks bounds the landmarks of the denser cover a
	// cloud is read on again (see denserCover).
	maxDenseLandmarks = 1000
)

// A three-torus needs a denser cover than a two-torus. Its loops and
// 2-cycles die at the same scales as a two-torus's of the same radii, but
// the landmarks fill a 3-manifold, so at a given number of landmarks the
// cover radius δ — and the sampling term 2δ of the significance rule — is
// larger: on the whitened cloud of three angles (six directions) 300
// landmarks leave δ ≈ 1.0 against loops of persistence ≈ 1.3.
//
// Hulls of several components (a cell of p sites decorating two angles:
// p two-tori) meet the same wall from the other term of the sampling
// scale: at 300 landmarks the gaps inside each component are not yet
// componentGap times shorter than the gaps between them, so the components
// are not told apart, ε is half a gap between components, and the 2p loops
// (persistence ≈ 1.3–1.8) stay under τ = 2ε ≈ 2.
//
// So when a cloud has loops that stand above half the threshold τ (the
// stability bound used at its worst case, see the significance rule) and
// above the noise term but that no reading so far counts — three loops in
// a cloud with room for a three-torus (six directions or more above
// noise), or 2p loops (p ≥ 2) in one with room for p two-tori (four or
// more) of which fewer than two stand above τ and above the sampling gap
// — its main landmark set is read again on a denser cover, its size
// chosen so that the sampling scale falls to half the k-th loop's
// persistence P_k (k = 3, or 2p): the cover radius of N landmarks on a
// d-dimensional hull falls as N^(−1/d), and so do the gaps inside each
// component, so N' = N·(2·max(δ, ε)/P_k)^d with d = 3 or 2, bounded by
// maxDenseLandmarks. Once the gaps inside the components are short
// enough, the components are told apart and ε is measured inside them.
// The rule itself is unchanged: τ is 2·max(δ', ε') of the denser set, and
// 3·s; a denser cover that still shows no class leaves the chain
// unresolved, as before.
//
// That barcode is computed up to the scale at which the first of the k
// loops closes (its death in the sparser barcode), not to the cloud's
// radius: the complex grows steeply past it (a 3-torus has many
// short-lived 2-cycles born where its loops die) and a 2-cycle of the
// hull has been born long before. A bar still alive at that cut counts
// with the persistence it has reached there, a lower bound of its own: the
// cut can only leave a long bar uncounted, never count a short one. H3 is
// not computed; b3 = 1 of a three-torus is not checked, (1, 3, 3) already
// names no other hull p·C(d, k).
func denserCover(bars []rips.Bar, n, directions int, cover, eps, tau, noise, merge float64) (landmarks int, cut float64, ok bool) {
	loops := loopBars(bars, math.Max(tau/2, noiseFactor*noise), merge, 2*maxComponents)
	var k, d int
	switch {
	case directions >= 6 && len(loops) >= 3:
		k, d = 3, 3
	case directions >= 4 && len(loops) >= 4 && len(loops)%2 == 0 &&
		len(loopBars(bars, math.Max(samplingFactor*eps, noiseFactor*noise), merge, 2)) < 2:
		k, d = len(loops), 2
	default:
		return 0, 0, false
	}
	cut = math.Inf(1)
	for _, l := range loops[:k] {
		cut = min(cut, l.Death)
	}
	pk := loops[k-1].Persistence()
	want := float64(n) * math.Pow(2*math.Max(cover, eps)/pk, float64(d))
	return int(min(max(want, torusLandmarks), maxDenseLandmarks)), cut, true
}

// reading is what the barcodes of a cloud say, over its landmark
// subsamples.
type reading struct {
	// betti are the Betti numbers of the main landmark set, confidence the
	// fraction of subsamples that agree with them, band the scales over
	// which they hold.
	betti      [3]int
	confidence float64
	band       []float64
	// persistence reports the main barcode and every subsample's numbers.
	persistence Persistence
	// diagram is the main barcode, with cocycles, and landmarks the points
	// behind it. A main barcode read up to a cut has its cocycles in
	// cocycles instead, once coordinates has computed them: the H1
	// barcode of the same landmarks to the cloud's radius, whose bars all
	// end.
	diagram   *rips.Diagram
	cocycles  *rips.Diagram
	landmarks [][]float64
	// plan is how the main set was read, for the subsamples to follow.
	plan densePlan
	// eps and merge are the main barcode's sampling gap and the scale at
	// which its components merge (+Inf for one).
	eps, merge float64
}

// readBarcodes computes the barcodes of c on opt.Subsamples landmark sets
// (the main one first, then sets drawn with the seeds after opt.Seed) and
// reads their Betti numbers by the significance rule. A cloud that may be
// a torus has its main landmark set made denser first: c.landmarkIdx,
// c.landmarks and c.cover are updated.
//
// The main set is read first and fixes how the others are read (see
// densePlan): the subsamples confirm the main reading, they do not search
// for one of their own.
func readBarcodes(ctx context.Context, c *cloud, opt Options) (*reading, error) {
	if c.components >= 4 && opt.Landmarks < torusLandmarks && len(c.landmarkIdx) < len(c.points) {
		idx, cover, err := embed.Landmarks(c.points, torusLandmarks, opt.Seed)
		if err != nil {
			return nil, err
		}
		c.landmarkIdx, c.landmarks, c.cover = idx, pick(c.points, idx), cover
	}
	nLandmarks := max(opt.Landmarks, len(c.landmarkIdx))

	r := &reading{}
	readings := make([]bettiReading, opt.Subsamples)
	var err error
	if readings[0], err = barcodes(ctx, c, c.landmarks, c.cover, opt, opt.Seed, nil, r); err != nil {
		return nil, err
	}
	follow := r.plan
	if _, _, named := namedByBetti(readings[0].betti); follow.dense && !named {
		// The denser cover named no class: the verdict cannot be one,
		// and the subsamples are read on the sparser cover.
		follow = densePlan{}
	}

	// The other landmark sets are read side by side, on as many
	// goroutines as the engine may use: each is independent of the
	// others, and the readings are gathered in order, so the result does
	// not depend on the number of workers.
	errs := make([]error, opt.Subsamples)
	sem := make(chan struct{}, workers(opt))
	var wg sync.WaitGroup
	for s := 1; s < opt.Subsamples; s++ {
		wg.Add(1)
		sem <- struct{}{}
		go func() {
			defer func() { <-sem; wg.Done() }()
			if err := ctx.Err(); err != nil {
				errs[s] = err
				return
			}
			n := nLandmarks
			if follow.dense {
				n = follow.landmarks
			}
			idx, cover, err := embed.Landmarks(c.points, n, opt.Seed+uint64(s))
			if err != nil {
				errs[s] = err
				return
			}
			readings[s], errs[s] = barcodes(ctx, c, pick(c.points, idx), cover, opt, opt.Seed+uint64(s), &follow, r)
		}()
	}
	wg.Wait()
	for _, err := range errs {
		if err != nil {
			return nil, err
		}
	}
	main := readings[0]
	// The sets vote with readings made the same way: when the subsamples
	// stayed on the sparser cover, the main set votes with its reading
	// there.
	ref := main.betti
	if r.plan.dense && !follow.dense {
		ref = main.sparse
		readings[0].betti = ref
	}
	votes := map[[3]int]int{}
	for _, br := range readings {
		votes[br.betti]++
		r.persistence.Subsamples = append(r.persistence.Subsamples, br.betti[:])
	}
	r.betti = main.betti
	r.confidence = float64(votes[ref]) / float64(opt.Subsamples)
	r.band = main.band
	return r, nil
}

// densePlan is how the main landmark set was read, for the subsamples to
// follow: whether it was read again on a denser cover (see denserCover),
// on how many landmarks and up to which scale. When the main set's denser
// reading names a class, every subsample is read straight on a cover of
// as many landmarks, up to the same cut: the same question asked of other
// landmarks. Otherwise the verdict cannot be a class the barcodes name,
// and the subsamples skip the denser cover: they are read on the sparser
// one, and the confidence is their agreement with the main set's reading
// there. Either way the class is the main set's reading; the subsamples
// only set the confidence.
type densePlan struct {
	dense     bool
	landmarks int
	cut       float64
}

// workers is the number of landmark sets read at once: Options.Workers,
// or every core.
func workers(o Options) int {
	if o.Workers > 0 {
		return o.Workers
	}
	return runtime.GOMAXPROCS(0)
}

// coordinates returns the circular coordinates, in turns, of every point
// of c for the k most persistent loops of the main barcode (de Silva,
// Morozov & Vejdemo-Johansson 2011): coordinates[i][j] is the i-th
// coordinate of point j.
//
// A main barcode read up to a cut (see denserCover) has bars alive there,
// whose cocycles give no scale: the cocycles then come from the H1 barcode
// of the same landmarks to the cloud's radius, computed here once.
func (r *reading) coordinates(ctx context.Context, c *cloud, k int, o Options) ([][]float64, error) {
	dg := r.diagram
	if r.persistence.MaxScale > 0 {
		if r.cocycles == nil {
			h1, err := rips.VietorisRipsContext(ctx, r.landmarks, rips.Options{MaxDim: 1, Prime: cocyclePrime, Cocycles: true, MemoryBudget: o.MemoryBudget, Workers: o.Workers})
			if err != nil {
				return nil, err
			}
			r.cocycles = h1
		}
		dg = r.cocycles
	}
	cocycles, err := topCocycles(dg, k)
	if err != nil {
		return nil, err
	}
	out := make([][]float64, 0, k)
	for _, co := range cocycles {
		scale, err := topology.DefaultScale(dg.Bars[co.Bar])
		if err != nil {
			return nil, err
		}
		cm, err := topology.CircularCoordinates(r.landmarks, co, scale)
		if err != nil {
			return nil, err
		}
		coords, err := cm.Extend(c.points)
		if err != nil {
			return nil, err
		}
		out = append(out, coords)
	}
	return out, nil
}

// componentCoords are the circular coordinates of the points of one
// component of a cloud: coords[i][j] is the i-th coordinate of point
// points[j] (an index into the cloud's points, ascending).
type componentCoords struct {
	points []int
	coords [][]float64
}

// componentCoordinates splits the cloud into the components its main
// barcode showed and gives each the circular coordinates of its k most
// persistent loops, from the barcode of its own landmarks. The landmarks
// are split by the Rips graph at the geometric mean of the largest gap
// inside a component and the scale at which the components merge; every
// point joins the component of its nearest landmark.
func (r *reading) componentCoordinates(ctx context.Context, c *cloud, k int, opt Options) ([]componentCoords, error) {
	lm := r.landmarks
	scale := math.Sqrt(2 * r.eps * r.merge)
	if math.IsInf(r.merge, 1) || !(scale > 0) {
		return nil, errors.New("circular coordinates: the barcode shows one component")
	}
	parent := make([]int, len(lm))
	for i := range parent {
		parent[i] = i
	}
	var find func(int) int
	find = func(i int) int {
		for parent[i] != i {
			parent[i] = parent[parent[i]]
			i = parent[i]
		}
		return i
	}
	for i := range lm {
		for j := i + 1; j < len(lm); j++ {
			if topology.Dist(lm[i], lm[j]) <= scale {
				parent[find(i)] = find(j)
			}
		}
	}
	label := map[int]int{}
	comp := make([]int, len(lm))
	for i := range lm {
		root := find(i)
		if _, ok := label[root]; !ok {
			label[root] = len(label)
		}
		comp[i] = label[root]
	}
	out := make([]componentCoords, len(label))
	for j, x := range c.points {
		best, bd := 0, math.Inf(1)
		for i, y := range lm {
			if d := topology.Dist(x, y); d < bd {
				best, bd = i, d
			}
		}
		out[comp[best]].points = append(out[comp[best]].points, j)
	}
	for ci := range out {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		var sub [][]float64
		for i, y := range lm {
			if comp[i] == ci {
				sub = append(sub, y)
			}
		}
		dg, err := rips.VietorisRipsContext(ctx, sub, rips.Options{MaxDim: 1, Prime: cocyclePrime, Cocycles: true, MemoryBudget: opt.MemoryBudget, Workers: opt.Workers})
		if err != nil {
			return nil, err
		}
		sr := &reading{diagram: dg, landmarks: sub}
		cc, err := sr.coordinates(ctx, &cloud{points: pick(c.points, out[ci].points)}, k, opt)
		if err != nil {
			return nil, fmt.Errorf("component %d: %w", ci+1, err)
		}
		out[ci].coords = cc
	}
	return out, nil
}

// topCocycles returns the cocycles of the k most persistent H1 bars.
func topCocycles(dg *rips.Diagram, k int) ([]rips.Cocycle, error) {
	var h1 []int
	for i, b := range dg.Bars {
		if b.Dim == 1 {
			h1 = append(h1, i)
		}
	}
	slices.SortStableFunc(h1, func(i, j int) int { return rips.ComparePersistence(dg.Bars[i], dg.Bars[j]) })
	if len(h1) < k {
		return nil, fmt.Errorf("measuring angles: %d H1 bars, need %d", len(h1), k)
	}
	out := make([]rips.Cocycle, 0, k)
	for _, bi := range h1[:k] {
		found := false
		for _, c := range dg.Cocycles {
			if c.Bar == bi {
				out = append(out, c)
				found = true
				break
			}
		}
		if !found {
			return nil, fmt.Errorf("measuring angles: no cocycle for H1 bar %d", bi)
		}
	}
	return out, nil
}

// bettiReading is the outcome of the significance rule on one landmark set.
type bettiReading struct {
	betti [3]int
	band  []float64
	// sparse is the reading of the main set before it was read again on
	// a denser cover for a possible three-torus.
	sparse [3]int
}

// barcodes computes the barcode of one landmark set lm of c and reads its
// Betti numbers; the main set (follow nil) has its barcode, its figures and
// its densePlan go into r, a subsample follows the main set's plan. H2 is
// computed only when H1 shows two loops or more: a circle needs no H2, a
// torus does.
func barcodes(ctx context.Context, c *cloud, lm [][]float64, cover float64, o Options, seed uint64, follow *densePlan, r *reading) (bettiReading, error) {
	main := follow == nil
	opt := rips.Options{MaxDim: 1, Prime: cocyclePrime, Cocycles: main, MemoryBudget: o.MemoryBudget, Workers: o.Workers}
	if !main && follow.dense {
		// The main set named a class on its denser cover: this set, as
		// dense, is read up to the same cut.
		opt.MaxDim, opt.Threshold, opt.Cocycles = 2, follow.cut, false
		dg, err := rips.VietorisRipsContext(ctx, lm, opt)
		if err != nil {
			return bettiReading{}, err
		}
		tau, _, merge := threshold(dg.Bars, cover, c.noise)
		merge = min(merge, follow.cut)
		return bettiReading{betti: count(dg.Bars, tau, merge, follow.cut), band: band(dg.Bars, tau, follow.cut)}, nil
	}
	dg, err := rips.VietorisRipsContext(ctx, lm, opt)
	if err != nil {
		return bettiReading{}, err
	}
	tau, eps, merge := threshold(dg.Bars, cover, c.noise)
	cut := math.Inf(1) // the scale the bars are read up to (see denserCover)
	b := count(dg.Bars, tau, merge, cut)
	// Two loops that stand out above noise and sampling gap but not yet
	// above the cover radius ask for a denser cover too: a torus's loops
	// are longer than a sparse cover lets them show.
	looseTau := math.Max(samplingFactor*eps, noiseFactor*c.noise)
	loose := count(dg.Bars, looseTau, merge, cut)
	// Loops that a denser cover may lift above τ: a three-torus, or p
	// two-tori whose components are not yet told apart (see
	// denserCover). Only the main set looks for them.
	var dense int
	denser := false
	if main {
		dense, cut, denser = denserCover(dg.Bars, len(lm), c.components, cover, eps, tau, c.noise, merge)
		if !denser {
			cut = math.Inf(1)
		}
	}
	sparse := b
	if b[1] >= 2 || loose[1] >= 2 || denser {
		// A 2-cycle needs a denser cover than a loop: H2 is computed on at
		// least torusLandmarks landmarks.
		want := max(o.Landmarks, torusLandmarks, dense)
		// Cycles born after the components merge do not count, so a
		// cloud of several components is computed up to that scale only:
		// its components then stay apart as essential H0 bars. A denser
		// cover is read up to the scale where the first of its loops
		// closes.
		split := min(merge, cut)
		if len(lm) < want && len(lm) < len(c.points) {
			idx, cv, err := embed.Landmarks(c.points, want, seed)
			if err != nil {
				return bettiReading{}, err
			}
			lm, cover = pick(c.points, idx), cv
			if main {
				c.landmarkIdx, c.landmarks, c.cover = idx, lm, cv
			}
		}
		opt.MaxDim = 2
		if !math.IsInf(split, 1) {
			opt.Threshold = split
		}
		if denser {
			// The circular coordinates need the cocycles of bars that
			// end: reading.coordinates computes them, to the cloud's
			// radius, when they are asked for.
			opt.Cocycles = false
			r.plan = densePlan{dense: true, landmarks: len(lm), cut: cut}
		}
		if dg, err = rips.VietorisRipsContext(ctx, lm, opt); err != nil {
			return bettiReading{}, err
		}
		tau, eps, merge = threshold(dg.Bars, cover, c.noise)
		merge = min(merge, split)
		b = count(dg.Bars, tau, merge, cut)
	}
	br := bettiReading{betti: b, band: band(dg.Bars, tau, cut), sparse: sparse}
	if main {
		r.diagram, r.landmarks, r.eps, r.merge = dg, lm, eps, merge
		p := &r.persistence
		p.Threshold, p.CoverRadius, p.SamplingGap, p.NoiseScale = tau, cover, eps, c.noise
		p.Bars = reportBars(dg.Bars, tau, cut)
		if !math.IsInf(cut, 1) {
			p.MaxScale = cut
		}
	}
	return br, nil
}

// threshold returns τ of the significance rule for a barcode, with its
// sampling gap ε and the scale at which the components found merge (+Inf
// for one component), given the cover radius and the noise scale.
func threshold(bars []rips.Bar, cover, noise float64) (tau, eps, merge float64) {
	var deaths []float64
	for _, b := range bars {
		if b.Dim == 0 && !b.Essential() {
			deaths = append(deaths, b.Death)
		}
	}
	slices.Sort(deaths)
	slices.Reverse(deaths)
	floor := math.Max(samplingFactor*cover, noiseFactor*noise)
	// The gaps between components: the longest H0 bars standing above the
	// floor and componentGap times above every bar after them.
	split := 0
	for k := 1; k < min(len(deaths), maxComponents); k++ {
		if deaths[k-1] > floor && deaths[k-1] > componentGap*deaths[k] {
			split = k
		}
	}
	if split < len(deaths) {
		eps = deaths[split] / 2
	}
	merge = math.Inf(1)
	if split > 0 {
		merge = deaths[split-1]
	}
	return math.Max(samplingFactor*math.Max(cover, eps), noiseFactor*noise), eps, merge
}

// kthLargest returns the k-th largest value of v (1-based), 0 when v has
// fewer than k values.
func kthLargest(v []float64, k int) float64 {
	if len(v) < k {
		return 0
	}
	s := slices.Clone(v)
	slices.Sort(s)
	return s[len(s)-k]
}

// count returns the Betti numbers b0..b2: the bars longer than tau (every
// essential bar counts). With components that merge at scale merge, b0
// counts the H0 bars dying at or after it, and a bar of dimension ≥ 1
// counts only when born before it: the homology of each component shows
// while the components are apart, and cycles born as they join belong to
// the space between them, not to the hull. A barcode read up to a finite
// cut counts a bar of dimension ≥ 1 alive there by the persistence it has
// reached at the cut (see cutPersistence).
func count(bars []rips.Bar, tau, merge, cut float64) [3]int {
	var b [3]int
	for _, x := range bars {
		switch {
		case x.Dim == 0 && (x.Essential() || x.Death >= merge):
			b[0]++
		case x.Dim == 0:
		case x.Dim <= 2 && cutPersistence(x, cut) > tau && x.Birth < merge:
			b[x.Dim]++
		}
	}
	return b
}

// cutPersistence is the persistence of bar x of a barcode read up to scale
// cut: its persistence, or for a bar still alive at a finite cut the
// persistence it has reached there, cut − birth (a lower bound of its own).
func cutPersistence(x rips.Bar, cut float64) float64 {
	if x.Essential() && !math.IsInf(cut, 1) {
		return cut - x.Birth
	}
	return x.Persistence()
}

// loopBars returns the k most persistent H1 bars longer than tau and born
// before merge (fewer when there are fewer).
func loopBars(bars []rips.Bar, tau, merge float64, k int) []rips.Bar {
	var out []rips.Bar
	for _, x := range bars {
		if x.Dim == 1 && x.Persistence() > tau && x.Birth < merge {
			out = append(out, x)
		}
	}
	slices.SortStableFunc(out, rips.ComparePersistence)
	return out[:min(k, len(out))]
}

// band returns the scales at which every significant bar of dimension ≥ 1
// is alive: from the latest birth to the earliest death among them (nil
// when there is none or they never overlap). A barcode read up to a finite
// cut has its bars alive there end at the cut.
func band(bars []rips.Bar, tau, cut float64) []float64 {
	lo, hi := 0.0, math.Inf(1)
	any := false
	for _, b := range bars {
		if b.Dim >= 1 && cutPersistence(b, cut) > tau {
			lo, hi, any = math.Max(lo, b.Birth), math.Min(hi, math.Min(b.Death, cut)), true
		}
	}
	if !any || !(hi > lo) || math.IsInf(hi, 1) {
		return nil
	}
	return []float64{lo, hi}
}

// reportBars lists the bars worth showing: every bar of dimension ≥ 1 and
// the H0 bars above tau, sorted by dimension and then persistence.
func reportBars(bars []rips.Bar, tau, cut float64) []Bar {
	var out []Bar
	var order []rips.Bar
	for _, b := range bars {
		if b.Dim >= 1 || b.Persistence() > tau {
			order = append(order, b)
		}
	}
	slices.SortStableFunc(order, rips.ComparePersistence)
	for _, b := range order {
		out = append(out, Bar{Bar: b, Significant: b.Dim >= 1 && cutPersistence(b, cut) > tau || b.Dim == 0 && b.Persistence() > tau})
	}
	if out == nil {
		out = []Bar{}
	}
	return out
}

// unresolvedReason says why Betti numbers b name no class, and what would
// decide.
func unresolvedReason(b [3]int) string {
	switch {
	case b[0] > 1:
		return fmt.Sprintf("the trace falls apart into %d clusters without an exact period: a tiling of a few tile lengths, outliers, or too few sites; more sites (or the tile analysis) would decide", b[0])
	case b[1] == 0:
		return "no loop stands out above the noise and sampling scale: the chain is periodic with jitter above the noise tolerance, disordered, or too short; more sites or less noise would decide"
	default:
		return fmt.Sprintf("Betti numbers %s match no class of low-dimensional hull; more sites or less noise would decide", notation.Tuple(b[:]))
	}
}

func pick(cloud [][]float64, idx []int) [][]float64 {
	out := make([][]float64, len(idx))
	for i, j := range idx {
		out[i] = cloud[j]
	}
	return out
}

// h1Persistences returns the persistences of the finite H1 bars.
func h1Persistences(bars []rips.Bar) []float64 {
	var p []float64
	for _, b := range bars {
		if b.Dim == 1 && !b.Essential() {
			p = append(p, b.Persistence())
		}
	}
	return p
}
