package hull

import (
	"context"
	"errors"
	"fmt"
	"math"
	"slices"

	"phasonhull/embed"
	"phasonhull/pattern"
	"phasonhull/topology"
	"phasonhull/topology/tones"
)

// Defaults of Options.
const (
	DefaultLandmarks  = 200
	DefaultSubsamples = 4
	DefaultMaxCoeff   = 6
	DefaultMaxPeriod  = 32
	DefaultSeed       = 1
	// cocyclePrime is the coefficient field for the cocycles behind the
	// circular coordinates: a prime large enough that the integer lift of a
	// Z/p cocycle is an integer cocycle (de Silva, Morozov &
	// Vejdemo-Johansson 2011 use 47).
	cocyclePrime = 47
	// maxHarmonics is the largest harmonic order tried by the frequency
	// refinement.
	maxHarmonics = 8
	// longWindow is the window the barcodes are computed at when the
	// window is chosen from the data (see newAnalysis).
	longWindow = 12
	// maxLabelGenerators bounds the generators (besides 1) over which gap
	// labels are enumerated: (2M+1)^d labels for d generators.
	maxLabelGenerators = 2
	// poolSize bounds the delay vectors the topology works on: the
	// landmarks, their cover radius and the circular coordinates come from
	// the first poolSize vectors, a stretch that traces the hull many times
	// over; the angle is then refined on every site.
	poolSize = 50000
	// windowSample bounds the clean spacings the window rules see.
	windowSample = 1500
)

// Options control Analyze. The zero value asks for the defaults.
type Options struct {
	// Window is the delay window; 0 chooses it from the data.
	Window int
	// Landmarks is the number of landmarks for the barcodes.
	Landmarks int
	// Subsamples is the number of landmark subsamples (different seeds)
	// over which the Betti numbers must agree; their agreement is the
	// confidence.
	Subsamples int
	// MaxCoeff bounds the angle coefficients of the listed gap labels.
	MaxCoeff int
	// MaxPeriod is the longest period the exact periodicity test tries.
	MaxPeriod int
	// Seed seeds every random choice; 0 means DefaultSeed.
	Seed uint64
	// Noise is the position noise, in mean spacings, that the embedding
	// tolerates (see embed.Options.Noise); 0 means embed's default.
	Noise float64
	// MemoryBudget bounds the persistence computation, in bytes; 0 means
	// the engine's default.
	MemoryBudget int64
	// Workers bounds the goroutines of the persistence engine; 0 means
	// all cores.
	Workers int
}

func (o Options) withDefaults() (Options, error) {
	if o.Window < 0 || o.Landmarks < 0 || o.Subsamples < 0 || o.MaxCoeff < 0 || o.MaxPeriod < 0 {
		return o, errors.New("window, landmarks, subsamples, max-coeff and max-period must not be negative")
	}
	if o.Landmarks == 0 {
		o.Landmarks = DefaultLandmarks
	}
	if o.Landmarks < 8 {
		return o, fmt.Errorf("landmarks %d: need at least 8", o.Landmarks)
	}
	if o.Subsamples == 0 {
		o.Subsamples = DefaultSubsamples
	}
	if o.MaxCoeff == 0 {
		o.MaxCoeff = DefaultMaxCoeff
	}
	if o.MaxPeriod == 0 {
		o.MaxPeriod = DefaultMaxPeriod
	}
	if o.Seed == 0 {
		o.Seed = DefaultSeed
	}
	return o, nil
}

// Analyze runs the hull analysis of a pattern: AnalyzeContext without a
// deadline.
func Analyze(p *pattern.Pattern, opt Options) (*Result, error) {
	return AnalyzeContext(context.Background(), p, opt)
}

// AnalyzeContext runs the hull analysis of a pattern. It stops with an
// error wrapping ctx.Err() once ctx is done: the analysis checks it
// between its steps, between landmark subsamples and inside the
// persistence computation.
//
// The steps, each reported in the Result:
//
//  1. Sites that look missing (a spacing near a multiple of the typical
//     one) or spurious (a spacing far below it) are found; the delay
//     vectors that contain such spacings are left out of the cloud and the
//     site indices skip over the missing sites.
//  2. The spacings are embedded (package embed): the window, the whitened
//     cloud, its noise level.
//  3. The class is decided by an ordered list of rules, the first that
//     proposes a class deciding (see rules): an exact period of the
//     spacings (point, finite); a tiling of a few tile lengths read
//     through its word (finite, cantor, disordered); a cloud with no
//     direction above the noise (point); Vietoris–Rips barcodes of the
//     landmarks of the delay cloud, read by the significance rule on
//     Subsamples landmark sets, naming the class whose Betti numbers they
//     show (p components × a d-torus: p·C(d, k), so (1,1,0) a circle,
//     (2,2,0) two circles, (1,2,1) a torus); a shaken lattice (point);
//     independent spacings filling the window (disordered); otherwise
//     unresolved, with what would decide. Classes lists every class.
//  4. The verdict is checked before it stands (see checks): the angles of
//     a circle or torus, from circular coordinates refined by a
//     least-squares fit of the site positions (see measureAngles), must
//     reproduce the positions within the measured noise; the spectral
//     lines of the spacings (package tones) must show the same p and d;
//     a chain of fewer than 200 sites must be read the same by the
//     calibrated short-chain decision (package shortchain). A verdict
//     that fails a check becomes unresolved, saying what each reading
//     found. Every hull with a model gets the scatter of the sites about
//     it.
//  5. The gap labels follow from the class and the angles.
func AnalyzeContext(ctx context.Context, p *pattern.Pattern, opt Options) (*Result, error) {
	opt, err := opt.withDefaults()
	if err != nil {
		return nil, fmt.Errorf("hull analysis: %w", err)
	}
	if err := ctx.Err(); err != nil {
		return nil, fmt.Errorf("hull analysis: %w", err)
	}
	res := &Result{
		Schema: Schema, Dimension: 1, Source: p.Source, Sites: p.Len(), Unit: p.Unit,
		MeanSpacing: p.MeanSpacing(), Notes: append([]string{}, p.Notes...),
		Warnings: []string{}, Angles: []float64{}, AngleUncertainty: []float64{},
		Trace: &Trace{},
	}
	a, err := newAnalysis(p, opt, res)
	if err != nil {
		return nil, fmt.Errorf("hull analysis: %w", err)
	}
	if err := a.decide(ctx); err != nil {
		return nil, fmt.Errorf("hull analysis: %w", err)
	}
	if err := a.model(ctx); err != nil {
		return nil, fmt.Errorf("hull analysis: %w", err)
	}
	a.labels()
	res.Trace.Cloud, res.Trace.Rows, res.Trace.Landmarks = a.pool, a.em.Rows[:len(a.pool)], a.em.Landmarks
	if a.reading != nil {
		res.Trace.Bars = a.reading.diagram.Bars
	}
	return res, nil
}

// model measures what the decided class has a model for: the angles of a
// circle or torus, the scatter of the sites about a periodic cell; and,
// for a hull with angles read from the delay cloud, the disorder figures.
func (a *analysis) model(ctx context.Context) error {
	ci := info(a.res.Hull.Class)
	switch {
	case ci.angles > 0:
		// The angles were measured and checked when the class was
		// decided (anglesCheck).
		if a.res.Disorder != nil && a.res.Tiles == nil {
			if mi, dim, ok := a.disorderFigures(); ok {
				a.res.Disorder.MutualInformation, a.res.Disorder.IntrinsicDimension = mi, dim
			}
		}
	case a.res.Hull.Period > 0 && a.res.Disorder == nil:
		a.periodicResiduals()
	}
	return nil
}

// analysis carries the state shared by the steps of Analyze.
type analysis struct {
	opt Options
	p   *pattern.Pattern
	res *Result

	spurious     []bool    // spurious[j]: site j looks spurious
	outliers     []int     // site indices the angle fit left out as outliers
	index        []int     // index[j]: site index of site j, skipping missing sites
	clean        []bool    // clean[i]: spacing i joins two kept sites one step apart
	siteWarnings []string  // what siteSteps found, reported unless the tiling route decides
	u            []float64 // dimensionless spacings
	em           *embed.Result
	pool         [][]float64 // the vectors the topology works on (see poolSize)
	cloud        *cloud      // the delay cloud as the barcode rule read it
	reading      *reading    // what its barcodes said; nil when no rule read them
	// undecided is the unresolved verdict of a rule that read the chain
	// and named no class (the tiling's, the barcodes'): the rules after it
	// for chains without a hull model may still decide, else it stands.
	undecided *verdict
	module    *topology.Module // the group of factor frequencies of an aperiodic tiling
	tones     *tones.Reading   // the algebraic reading of the spacings; nil until read
}

func newAnalysis(p *pattern.Pattern, opt Options, res *Result) (*analysis, error) {
	a := &analysis{opt: opt, p: p, res: res}
	d := p.Spacings()
	a.spurious, a.index, a.clean, a.siteWarnings = siteSteps(d)
	mean := p.MeanSpacing()
	a.u = make([]float64, len(d))
	for i, v := range d {
		a.u[i] = v / mean
	}
	exclude := make([]bool, len(d))
	for i, c := range a.clean {
		exclude[i] = !c
	}
	// The window rules give the shortest window that unfolds the hull;
	// they run on the first windowSample clean spacings, which is plenty
	// to see the hull and bounds their cost. The analysis then runs at a
	// long window and keeps the significant components only
	// (singular-spectrum analysis, Broomhead & King, Physica D 20, 1986):
	// the signal's components grow with the window while the noise per
	// component does not, so a thin direction of the trace no longer
	// drowns in noise once whitened.
	eo := embed.Options{Window: opt.Window, Landmarks: opt.Landmarks, Seed: opt.Seed, Noise: opt.Noise, Exclude: exclude, LandmarkPool: poolSize}
	var choice *embed.WindowChoice
	chosen := opt.Window
	if opt.Window == 0 {
		cs := a.cleanSpacings()
		if len(cs) > windowSample {
			cs = cs[:windowSample]
		}
		ch, err := embed.ChooseWindow(cs, embed.Options{Noise: opt.Noise, Seed: opt.Seed})
		if err != nil {
			return nil, err
		}
		choice, chosen = ch, ch.Window
		eo.Window = max(chosen, min(longWindow, len(d)/6))
	}
	em, err := embed.Embed(p, eo)
	if err != nil {
		return nil, err
	}
	em.Choice = choice
	a.em = em
	a.pool = em.Whitened.Cloud[:min(len(em.Whitened.Cloud), poolSize)]
	e := &res.Embedding
	e.ChosenWindow = chosen
	e.Window = em.Window
	e.WindowSettled = em.Choice == nil || em.Choice.Settled
	e.Spectrum = em.Whitened.Spectrum
	e.Components = em.Whitened.Kept
	e.NoiseVariance = em.NoiseVariance
	e.Vectors = len(em.Whitened.Cloud)
	e.Excluded = em.Excluded
	e.Landmarks = len(em.Landmarks)
	e.CoverRadius = em.CoverRadius
	return a, nil
}

// siteSteps finds sites that look spurious and spacings that look like
// missing sites, with the spacing distribution's median and its 5th and
// 95th percentiles as the yardsticks:
//
//   - a spacing below 0.7 median and 0.8 × the 5th percentile ends at a
//     spurious site: of its two sites, the one whose removal leaves a
//     merged spacing closer to a whole number of medians is taken as
//     spurious (a whole number, since a missing site may sit next to it);
//   - between two kept sites, a gap of at least 1.6 median and above 1.25
//     × the 95th percentile spans round(gap/median) steps: the sites in
//     between are missing.
//
// Both rules fire only on spacings outside the bulk of the distribution, so
// a periodic cell of unequal spacings or a strong modulation is left alone.
// It returns the spurious sites, the site index of every site (kept sites
// count up with missing ones skipped over; a spurious site takes the index
// of the kept site before it), and for each spacing whether it is clean:
// between two kept sites one step apart, and not touching either site of a
// short spacing (the choice of which one is spurious can be wrong); and the
// warnings to give when the analysis relies on them.
func siteSteps(d []float64) (spurious []bool, index []int, clean []bool, warn []string) {
	sorted := slices.Clone(d)
	slices.Sort(sorted)
	q := func(f float64) float64 { return sorted[int(f*float64(len(sorted)-1))] }
	med, q05, q95 := q(0.5), q(0.05), q(0.95)
	n := len(d) + 1
	spurious = make([]bool, n)
	near := make([]bool, len(d)) // spacings touching either site of a short one
	for i, v := range d {
		if v < 0.7*med && v < 0.8*q05 {
			for k := max(i-1, 0); k <= min(i+1, len(d)-1); k++ {
				near[k] = true
			}
		}
		if !(v < 0.7*med && v < 0.8*q05) || spurious[i] || spurious[i+1] {
			continue
		}
		// Remove site i (merging d[i-1] and d[i]) or site i+1 (merging
		// d[i] and d[i+1]), whichever lands nearer the median.
		before, after := math.Inf(1), math.Inf(1)
		if i > 0 {
			before = offLattice(d[i-1]+v, med)
		}
		if i+1 < len(d) {
			after = offLattice(v+d[i+1], med)
		}
		if before < after {
			spurious[i] = true
		} else {
			spurious[i+1] = true
		}
	}
	index = make([]int, n)
	clean = make([]bool, len(d))
	prev, missing, gaps := -1, 0, 0
	x := 0.0 // position relative to site 0, summed from the spacings
	var xPrev float64
	for j := 0; j < n; j++ {
		if j > 0 {
			x += d[j-1]
		}
		if spurious[j] {
			if prev >= 0 {
				index[j] = index[prev]
			}
			continue
		}
		if prev >= 0 {
			gap := x - xPrev
			steps := 1
			if gap >= 1.6*med && gap > 1.25*q95 {
				steps = int(math.Round(gap / med))
				missing += steps - 1
				gaps++
			}
			index[j] = index[prev] + steps
			if steps == 1 && prev == j-1 && !near[j-1] {
				clean[j-1] = true
			}
		}
		prev, xPrev = j, x
	}
	if missing > 0 {
		warn = append(warn, fmt.Sprintf("%d spacing(s) look like missing sites (%d site(s) assumed missing); delay vectors across them are left out", gaps, missing))
	}
	if k := countTrue(spurious); k > 0 {
		warn = append(warn, fmt.Sprintf("%d site(s) sit far closer to a neighbour than the rest and look spurious; they are left out of the fit and the delay vectors across them", k))
	}
	return spurious, index, clean, warn
}

// offLattice returns how far a gap is from a whole number (≥ 1) of
// spacings med, in units of med.
func offLattice(gap, med float64) float64 {
	k := max(1, math.Round(gap/med))
	return math.Abs(gap/med - k)
}

func countTrue(v []bool) int {
	n := 0
	for _, x := range v {
		if x {
			n++
		}
	}
	return n
}

// labels fills in the gap-label group from the class table.
func (a *analysis) labels() {
	g := &a.res.GapLabels
	g.MaxCoeff = a.opt.MaxCoeff
	g.Generators = []float64{1}
	if fill := info(a.res.Hull.Class).labels; fill != nil {
		fill(a, g)
	}
	if g.Labels == nil {
		g.Labels = []topology.Label{}
	}
}

// cleanSpacings returns the dimensionless spacings with those across
// missing or spurious sites dropped.
func (a *analysis) cleanSpacings() []float64 {
	out := make([]float64, 0, len(a.u))
	for i, v := range a.u {
		if a.clean[i] {
			out = append(out, v)
		}
	}
	return out
}
