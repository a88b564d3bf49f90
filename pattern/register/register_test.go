package register

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"phasonhull/pattern/design"
)

// modulatedDesign is a 300-site modulated design with a 450 nm mean
// spacing and a 40 nm first-harmonic modulation at the angle 0.381966: a
// chain whose spacings range from about 370 to 530 nm.
func modulatedDesign(t *testing.T, sites int) []float64 {
	t.Helper()
	s := design.NewSpec("modulated")
	s.Sites, s.Spacing, s.Theta, s.Amp, s.Unit = sites, 450, 0.381966, 40, "nm"
	p, err := design.Generate(s)
	if err != nil {
		t.Fatal(err)
	}
	return p.Positions
}

// sample describes a fabricated sample built in closed form from a design:
// x_j = offset + scale·d_j + scale·drift·(d_j − d_0)²/S plus Gaussian noise
// of standard deviation noise, with the design sites in missing left out,
// the sites in displaced moved by the given amounts, and extra sites
// inserted at the given design coordinates. The measured list is then put
// in the order perm gives (nil: ascending).
type sample struct {
	offset, scale, drift, noise float64
	missing                     []int
	displaced                   map[int]float64
	extraAt                     []float64
	seed                        uint64
	shuffle                     bool
}

// build returns the measured positions, the measured index of each design
// site (−1 when missing) and the measured indices of the extra sites.
func (s sample) build(d []float64) (x []float64, of []int, extra []int) {
	rng := rand.New(rand.NewPCG(s.seed, 7))
	S := d[len(d)-1] - d[0]
	cal := func(v float64) float64 {
		return s.offset + s.scale*v + s.scale*s.drift*(v-d[0])*(v-d[0])/S
	}
	var src []int // design index of each measured site, −1 for extra
	for j, v := range d {
		if slices.Contains(s.missing, j) {
			continue
		}
		x = append(x, cal(v)+s.displaced[j]+s.noise*rng.NormFloat64())
		src = append(src, j)
	}
	for _, v := range s.extraAt {
		x = append(x, cal(v)+s.noise*rng.NormFloat64())
		src = append(src, -1)
	}
	if s.shuffle {
		perm := rng.Perm(len(x))
		x2, src2 := make([]float64, len(x)), make([]int, len(x))
		for i, p := range perm {
			x2[i], src2[i] = x[p], src[p]
		}
		x, src = x2, src2
	} else {
		// Ascending order, as a reader of positions gives.
		idx := make([]int, len(x))
		for i := range idx {
			idx[i] = i
		}
		slices.SortFunc(idx, func(a, b int) int {
			if x[a] < x[b] {
				return -1
			}
			if x[a] > x[b] {
				return 1
			}
			return 0
		})
		x2, src2 := make([]float64, len(x)), make([]int, len(x))
		for i, p := range idx {
			x2[i], src2[i] = x[p], src[p]
		}
		x, src = x2, src2
	}
	of = make([]int, len(d))
	for j := range of {
		of[j] = -1
	}
	for k, j := range src {
		if j < 0 {
			extra = append(extra, k)
		} else {
			of[j] = k
		}
	}
	slices.Sort(extra)
	return x, of, extra
}

// checkCalibration asserts that the fitted calibration is within three
// standard errors of the one the sample was built with.
func checkCalibration(t *testing.T, r *Result, s sample) {
	t.Helper()
	if r.ScaleErr <= 0 || r.OffsetErr <= 0 {
		t.Fatalf("standard errors scale %g offset %g: must be positive", r.ScaleErr, r.OffsetErr)
	}
	if d := math.Abs(r.Scale - s.scale); d > 3*r.ScaleErr {
		t.Errorf("scale %.9f ± %.2g, built with %.9f: off by %.1f standard errors", r.Scale, r.ScaleErr, s.scale, d/r.ScaleErr)
	}
	if d := math.Abs(r.Offset - s.offset); d > 3*r.OffsetErr {
		t.Errorf("offset %.6g ± %.2g, built with %.6g: off by %.1f standard errors", r.Offset, r.OffsetErr, s.offset, d/r.OffsetErr)
	}
	if r.DriftFitted {
		if d := math.Abs(r.Drift - s.drift); d > 3*r.DriftErr {
			t.Errorf("drift %.6g ± %.2g, built with %.6g: off by %.1f standard errors", r.Drift, r.DriftErr, s.drift, d/r.DriftErr)
		}
	} else if r.Drift != 0 {
		t.Errorf("drift %g without Options.Drift", r.Drift)
	}
}

func equalInts(a, b []int) bool {
	if len(a) == 0 && len(b) == 0 {
		return true
	}
	return slices.Equal(a, b)
}

// A sample with only the stated noise: every site matched to its own design
// site, nothing missing, extra or flagged, the calibration recovered.
func TestCleanSample(t *testing.T) {
	d := modulatedDesign(t, 300)
	s := sample{offset: 1234.5, scale: 1 + 3e-4, noise: 3, seed: 1}
	x, of, _ := s.build(d)
	r, err := Register(d, x, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Missing) != 0 || len(r.Extra) != 0 || len(r.Merged) != 0 || len(r.Swapped) != 0 {
		t.Errorf("missing %v extra %v merged %v swapped %v; want none", r.Missing, r.Extra, r.Merged, r.Swapped)
	}
	// Under Gaussian noise a 4σ outlier among 300 sites has probability
	// about 300·6.3·10⁻⁵ ≈ 2% (common practice: the Gaussian tail).
	if len(r.Outliers) != 0 {
		t.Errorf("outliers %v in a sample with only Gaussian noise", r.Outliers)
	}
	for _, m := range r.Matches {
		if of[m.Design] != m.Measured {
			t.Fatalf("design %d matched to measured %d, built from %d", m.Design, m.Measured, of[m.Design])
		}
	}
	checkCalibration(t, r, s)
	// The robust sigma estimates the noise: the MAD of 300 Gaussian values
	// has a relative standard error of about 1.17/√300 ≈ 7% (common
	// practice), so 25% is over three of them.
	if math.Abs(r.Sigma/s.noise-1) > 0.25 {
		t.Errorf("robust sigma %.3g, noise %.3g", r.Sigma, s.noise)
	}
	if !r.Converged {
		t.Errorf("did not converge in %d iterations", r.Iterations)
	}
	if len(r.Ties) != 0 {
		t.Errorf("ties %+v: a modulated chain has one alignment", r.Ties)
	}
}

// otherAngle is the 200-site modulated design of modulatedDesign, built
// with the angle theta instead and 2 nm of position noise, with the sites
// in missing left out.
func otherAngle(t *testing.T, theta float64, seed uint64, missing ...int) []float64 {
	t.Helper()
	s := design.NewSpec("modulated")
	s.Sites, s.Spacing, s.Theta, s.Amp, s.Unit, s.Noise, s.Seed = 200, 450, theta, 40, "nm", 2, seed
	p, err := design.Generate(s)
	if err != nil {
		t.Fatal(err)
	}
	var x []float64
	for j, v := range p.Positions {
		if !slices.Contains(missing, j) {
			x = append(x, v)
		}
	}
	return x
}

// A sample built with another angle than its design, every site present:
// its residuals grow along the chain to about twice the modulation, and
// the alignment shifted by one site fits about as well, leaving the first
// design site missing and the last measured site extra. That pair is
// explained by the shift and must not be reported: every site is matched
// to the one it was built from.
func TestOtherAngleDoesNotSlip(t *testing.T) {
	d := modulatedDesign(t, 200)
	for i, theta := range []float64{0.39, 0.375, 0.3875, 0.3775} {
		x := otherAngle(t, theta, uint64(i+3))
		r, err := Register(d, x, Options{})
		if err != nil {
			t.Fatal(err)
		}
		if len(r.Missing) != 0 || len(r.Extra) != 0 {
			t.Errorf("θ = %v: missing %v extra %v; every site is present", theta, r.Missing, r.Extra)
		}
		for _, m := range r.Matches {
			if m.Design != m.Measured {
				t.Errorf("θ = %v: design %d matched to measured %d", theta, m.Design, m.Measured)
				break
			}
		}
		// A real missing site is still found, not shifted away.
		x = otherAngle(t, theta, uint64(i+3), 120)
		if r, err = Register(d, x, Options{}); err != nil {
			t.Fatal(err)
		}
		if !equalInts(r.Missing, []int{120}) || len(r.Extra) != 0 {
			t.Errorf("θ = %v, site 120 left out: missing %v extra %v", theta, r.Missing, r.Extra)
		}
	}
}

// Injected defects of known indices come back with exactly those indices:
// missing sites (the first and the last among them, so that the first
// calibration cannot lean on the ends), extra sites, displaced sites; and
// the calibration — offset, a scale error of 3·10⁻⁴, a drift — within
// three standard errors.
func TestInjectedDefects(t *testing.T) {
	d := modulatedDesign(t, 300)
	for _, drift := range []float64{0, 4e-4} {
		s := sample{
			offset: -8123.25, scale: 1 - 3e-4, drift: drift, noise: 3, seed: 2,
			missing:   []int{0, 41, 42, 150, 299},
			displaced: map[int]float64{7: 60, 120: -45, 233: 90},
			// Extra sites before the (missing) first design site, so that
			// the measured chain starts with a spurious site, and in the
			// bulk a third and 70% of the way to the next design site.
			extraAt: []float64{d[0] - 0.6*(d[1]-d[0]), d[90] + (d[91]-d[90])/3, d[260] + (d[261]-d[260])*0.7},
		}
		x, of, extra := s.build(d)
		r, err := Register(d, x, Options{Drift: drift != 0})
		if err != nil {
			t.Fatal(err)
		}
		if !equalInts(r.Missing, s.missing) {
			t.Errorf("drift %g: missing %v, injected %v", drift, r.Missing, s.missing)
		}
		if !equalInts(r.Extra, extra) {
			t.Errorf("drift %g: extra %v, injected %v", drift, r.Extra, extra)
		}
		if want := []int{7, 120, 233}; !equalInts(r.Outliers, want) {
			t.Errorf("drift %g: outliers %v, displaced %v", drift, r.Outliers, want)
		}
		for _, m := range r.Matches {
			if of[m.Design] != m.Measured {
				t.Errorf("drift %g: design %d matched to measured %d, built from %d", drift, m.Design, m.Measured, of[m.Design])
			}
		}
		// Sites 41 and 42 are missing but no site sits between them: no merge.
		if len(r.Merged) != 0 {
			t.Errorf("drift %g: merged %v", drift, r.Merged)
		}
		checkCalibration(t, r, s)
	}
}

// Without Options.Drift a drifting sample leaves a parabola in the
// residuals; with it the residuals fall to the noise. The drift changes
// the local scale by 2·drift over the chain (here 2·10⁻³ of 135 µm, a
// bow of drift·S/4 ≈ 34 nm against 3 nm of noise).
func TestDriftNeedsItsTerm(t *testing.T) {
	d := modulatedDesign(t, 300)
	s := sample{offset: 10, scale: 1, drift: 1e-3, noise: 3, seed: 3}
	x, _, _ := s.build(d)
	without, err := Register(d, x, Options{})
	if err != nil {
		t.Fatal(err)
	}
	with, err := Register(d, x, Options{Drift: true})
	if err != nil {
		t.Fatal(err)
	}
	if with.RMS > 1.3*s.noise {
		t.Errorf("with drift: RMS %.3g, noise %.3g", with.RMS, s.noise)
	}
	if without.RMS < 3*with.RMS {
		t.Errorf("without drift: RMS %.3g, with %.3g: the drift should show", without.RMS, with.RMS)
	}
	checkCalibration(t, with, s)
}

// Measured indices refer to the order the sites were given in: a shuffled
// listing reports the extra sites at their places in the listing.
func TestShuffledInput(t *testing.T) {
	d := modulatedDesign(t, 200)
	s := sample{offset: 55, scale: 1 + 2e-4, noise: 3, seed: 4, shuffle: true,
		missing: []int{3, 100}, extraAt: []float64{d[50] + 200}}
	x, of, extra := s.build(d)
	r, err := Register(d, x, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if !equalInts(r.Missing, s.missing) || !equalInts(r.Extra, extra) {
		t.Errorf("missing %v extra %v; want %v and %v", r.Missing, r.Extra, s.missing, extra)
	}
	for _, m := range r.Matches {
		if of[m.Design] != m.Measured {
			t.Fatalf("design %d matched to entry %d, built from %d", m.Design, m.Measured, of[m.Design])
		}
		if got := x[m.Measured] - r.Predict(d[m.Design]); got != m.Residual {
			t.Fatalf("residual %v, recomputed %v", m.Residual, got)
		}
	}
	checkCalibration(t, r, s)
}

// A chain measured from its other end has a negative scale and the same
// defects.
func TestReversedChain(t *testing.T) {
	d := modulatedDesign(t, 300)
	s := sample{offset: 200000, scale: -(1 + 1e-4), noise: 3, seed: 5,
		missing: []int{0, 1, 180}, extraAt: []float64{d[10] + 150}}
	x, _, extra := s.build(d)
	r, err := Register(d, x, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if !equalInts(r.Missing, s.missing) || !equalInts(r.Extra, extra) {
		t.Errorf("missing %v extra %v; want %v and %v", r.Missing, r.Extra, s.missing, extra)
	}
	checkCalibration(t, r, s)
}

// A uniform lattice is the hardest case for the first calibration: every
// shift by a whole spacing fits as well locally. With its first two sites
// missing and an offset of many spacings, the ends must still pin it.
func TestLatticeMissingEnds(t *testing.T) {
	d := make([]float64, 150)
	for i := range d {
		d[i] = 2.5 * float64(i)
	}
	s := sample{offset: 31.7, scale: 1 + 5e-4, noise: 0.01, seed: 6, missing: []int{0, 1, 149}}
	x, of, _ := s.build(d)
	r, err := Register(d, x, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if !equalInts(r.Missing, s.missing) || len(r.Extra) != 0 {
		t.Errorf("missing %v extra %v; want %v and none", r.Missing, r.Extra, s.missing)
	}
	for _, m := range r.Matches {
		if of[m.Design] != m.Measured {
			t.Fatalf("design %d matched to %d, built from %d", m.Design, m.Measured, of[m.Design])
		}
	}
	checkCalibration(t, r, s)
	// Yet a lattice cannot tell which three of its sites are missing: the
	// whole matching shifted along the measured chain by one site back, or
	// by one or two forward (design sites 3–149, 1–147 or 0–146 matched),
	// leaves three unmatched as well, at the same cost. The result must
	// say so.
	shifts := map[int]bool{}
	for _, tie := range r.Ties {
		shifts[tie.Shift] = true
		if tie.Missing+tie.Extra != 3 || !(math.Abs(tie.Cost-r.Cost) <= TieFactor*math.Hypot(tie.CostErr, r.CostErr)) {
			t.Errorf("tie %+v against cost %v ± %v", tie, r.Cost, r.CostErr)
		}
	}
	if len(r.Ties) != 3 || !shifts[-1] || !shifts[1] || !shifts[2] {
		t.Errorf("ties %+v: want the shifts by −1, 1 and 2 sites", r.Ties)
	}
}

// Two design sites fabricated as one, midway between them: both missing,
// the measured site extra, and the three reported as a merge.
func TestMerged(t *testing.T) {
	d := modulatedDesign(t, 200)
	s := sample{offset: 0, scale: 1, noise: 2, seed: 8,
		missing: []int{60, 61}, extraAt: []float64{(d[60] + d[61]) / 2}}
	x, _, extra := s.build(d)
	r, err := Register(d, x, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if !equalInts(r.Missing, []int{60, 61}) || !equalInts(r.Extra, extra) {
		t.Fatalf("missing %v extra %v; want [60 61] and %v", r.Missing, r.Extra, extra)
	}
	want := []Merge{{Design: [2]int{60, 61}, Measured: extra[0]}}
	if !slices.Equal(r.Merged, want) {
		t.Errorf("merged %v, want %v", r.Merged, want)
	}
}

// A scan listing with two neighbours exchanged: the matching by position
// is unchanged, and the exchanged pair is reported. Rows listed in blocks
// that run in alternate directions (a serpentine scan) are not swaps.
func TestSwapped(t *testing.T) {
	d := modulatedDesign(t, 120)
	s := sample{offset: 5, scale: 1, noise: 2, seed: 9}
	x, _, _ := s.build(d) // ascending: entry k is design k
	// Serpentine: 0..39 forward, 40..79 backward, 80..119 forward.
	var listing []float64
	var designOf []int
	for b := 0; b < 3; b++ {
		for i := 0; i < 40; i++ {
			j := 40*b + i
			if b == 1 {
				j = 40*b + 39 - i
			}
			listing = append(listing, x[j])
			designOf = append(designOf, j)
		}
	}
	// Exchange the entries of design 10 and 11 (forward block) and of
	// design 60 and 59 (backward block: entries 19 and 20 of it).
	listing[10], listing[11] = listing[11], listing[10]
	designOf[10], designOf[11] = designOf[11], designOf[10]
	listing[60], listing[61] = listing[61], listing[60]
	designOf[60], designOf[61] = designOf[61], designOf[60]
	r, err := Register(d, listing, Options{})
	if err != nil {
		t.Fatal(err)
	}
	want := []Swap{
		{Measured: [2]int{10, 11}, Design: [2]int{designOf[10], designOf[11]}},
		{Measured: [2]int{60, 61}, Design: [2]int{designOf[60], designOf[61]}},
	}
	if !slices.Equal(r.Swapped, want) {
		t.Errorf("swapped %v, want %v", r.Swapped, want)
	}
	if len(r.Missing)+len(r.Extra)+len(r.Outliers) != 0 {
		t.Errorf("missing %v extra %v outliers %v", r.Missing, r.Extra, r.Outliers)
	}
}

// The standard errors are right, not merely generous: over many noise
// draws the scale errors divided by their standard errors have a root
// mean square near 1. With 60 draws the RMS of unit normal values lies
// within [0.75, 1.25] with probability above 99.9% (its standard error is
// 1/√120 ≈ 0.09; common practice).
func TestStandardErrorsCalibrated(t *testing.T) {
	d := modulatedDesign(t, 200)
	draws := 60
	if testing.Short() {
		draws = 20
	}
	var zs, zo float64
	for seed := range draws {
		s := sample{offset: 77, scale: 1 + 4e-4, noise: 3, seed: uint64(100 + seed)}
		x, _, _ := s.build(d)
		r, err := Register(d, x, Options{})
		if err != nil {
			t.Fatal(err)
		}
		zs += math.Pow((r.Scale-s.scale)/r.ScaleErr, 2)
		zo += math.Pow((r.Offset-s.offset)/r.OffsetErr, 2)
	}
	lo, hi := 0.75, 1.25
	if testing.Short() {
		lo, hi = 0.6, 1.4
	}
	for name, z := range map[string]float64{"scale": zs, "offset": zo} {
		t.Logf("%s: RMS z %.3f", name, math.Sqrt(z/float64(draws)))
		if rms := math.Sqrt(z / float64(draws)); rms < lo || rms > hi {
			t.Errorf("%s: RMS of error/stderr %.3f over %d draws, want within [%g, %g]", name, rms, draws, lo, hi)
		}
	}
}

// The exact design against itself: identity calibration, zero residuals,
// and rounding never flagged.
func TestExactSelf(t *testing.T) {
	d := modulatedDesign(t, 100)
	r, err := Register(d, d, Options{Drift: true})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(r.Scale-1) > 1e-12 || math.Abs(r.Offset) > 1e-9 || math.Abs(r.Drift) > 1e-12 || r.Max > 1e-9 {
		t.Errorf("scale %v offset %v drift %v max %v", r.Scale, r.Offset, r.Drift, r.Max)
	}
	if len(r.Matches) != 100 || len(r.Outliers)+len(r.Missing)+len(r.Extra) != 0 {
		t.Errorf("%d matches, outliers %v, missing %v, extra %v", len(r.Matches), r.Outliers, r.Missing, r.Extra)
	}
}

func TestRefusals(t *testing.T) {
	d := modulatedDesign(t, 20)
	for name, c := range map[string]struct {
		d, x []float64
		opt  Options
	}{
		"nan":             {d, append(slices.Clone(d[:10]), math.NaN()), Options{}},
		"one site":        {d[:1], d, Options{}},
		"gate":            {d, d, Options{Gate: 1.5}},
		"iterations":      {d, d, Options{MaxIter: -1}},
		"duplicate":       {append(slices.Clone(d), d[3]), d, Options{}},
		"nothing matches": {d, []float64{1e9, 2e9, 3e9}, Options{}},
	} {
		if _, err := Register(c.d, c.x, c.opt); err == nil {
			t.Errorf("%s: no error", name)
		}
	}
}

func TestScreen(t *testing.T) {
	rng := rand.New(rand.NewPCG(12, 0))
	r := make([]float64, 400)
	for i := range r {
		r[i] = 0.5 * rng.NormFloat64()
	}
	r[17], r[300] = 4, -3.5
	r[5] = math.NaN()
	s, err := Screen(r, 1e-9)
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(s.Flagged, []int{17, 300}) || !slices.Equal(s.NotFitted, []int{5}) {
		t.Errorf("flagged %v not fitted %v; want [17 300] and [5]", s.Flagged, s.NotFitted)
	}
	if s.Threshold != OutlierFactor*s.Sigma || math.Abs(s.Sigma/0.5-1) > 0.25 {
		t.Errorf("sigma %v threshold %v", s.Sigma, s.Threshold)
	}
	if _, err := Screen([]float64{math.NaN()}, 0); err == nil {
		t.Error("all NaN: no error")
	}
}

// A modulated design of N sites with ‖Nθ‖ small is nearly its own mirror
// image: reversing it, x_{N−1−n} = C − x_n up to 2πa‖(N−1)θ‖-sized terms
// (closed form: sin 2π((N−1)θ − nθ) = −sin 2πnθ + O(‖(N−1)θ‖)). With
// θ = 0.381966 and N = 200, (N−1)θ = 76.0112: the mirror fits to about
// 2.8 nm against 2 nm of noise. Auto keeps the forward direction there;
// Direction decides a sample that really is reversed.
func TestNearMirrorDesign(t *testing.T) {
	d := modulatedDesign(t, 200)
	if m := 199 * 0.381966; math.Abs(m-math.Round(m)) > 0.02 {
		t.Fatalf("‖199θ‖ = %v: the design is not near its mirror image", math.Abs(m-math.Round(m)))
	}
	fwd := sample{offset: 40, scale: 1 - 2e-4, drift: 5e-4, noise: 2, seed: 13, missing: []int{0, 77, 78}}
	x, _, _ := fwd.build(d)
	r, err := Register(d, x, Options{Drift: true})
	if err != nil {
		t.Fatal(err)
	}
	if !equalInts(r.Missing, fwd.missing) {
		t.Errorf("forward sample: missing %v, want %v", r.Missing, fwd.missing)
	}
	checkCalibration(t, r, fwd)

	rev := sample{offset: 90000, scale: -1, noise: 2, seed: 14, missing: []int{5}}
	x, _, _ = rev.build(d)
	r, err = Register(d, x, Options{Direction: Reversed})
	if err != nil {
		t.Fatal(err)
	}
	if !equalInts(r.Missing, rev.missing) {
		t.Errorf("reversed sample, Direction Reversed: missing %v, want %v", r.Missing, rev.missing)
	}
	checkCalibration(t, r, rev)
	if r, err = Register(d, x, Options{Direction: Forward}); err != nil || r.Scale < 0 {
		t.Errorf("Direction Forward: scale %v, error %v", r.Scale, err)
	}
}

// The linear-time median equals the middle of the sorted values (the
// mean of the two middle ones for an even count), duplicates included.
func TestMedianMatchesSort(t *testing.T) {
	rng := rand.New(rand.NewPCG(15, 0))
	for n := 1; n < 200; n++ {
		v := make([]float64, n)
		for i := range v {
			v[i] = math.Round(rng.NormFloat64() * 3) // many ties
		}
		s := slices.Clone(v)
		slices.Sort(s)
		want := s[n/2]
		if n%2 == 0 {
			want = (s[n/2-1] + s[n/2]) / 2
		}
		if got := median(v); got != want {
			t.Fatalf("n = %d: median %v, sorted middle %v", n, got, want)
		}
	}
}
