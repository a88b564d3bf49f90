package embed

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"

	"phasonhull/pattern"
)

// DefaultLandmarks is the number of landmarks unless told otherwise.
const DefaultLandmarks = 300

// DefaultSeed is the seed used when Options.Seed is 0.
const DefaultSeed = 1

// Options control Embed. The zero value asks for the defaults.
// ExactData is the Options.Noise of data taken as exact: no position
// noise is tolerated.
const ExactData = -1.0

type Options struct {
	// Window is the delay window; 0 chooses it from the data (see
	// ChooseWindow).
	Window int
	// MaxWindow caps the chosen window; 0 means DefaultMaxWindow.
	MaxWindow int
	// Landmarks is the number of landmarks; 0 means DefaultLandmarks.
	Landmarks int
	// Seed seeds every random choice (the subsample of the window choice
	// and the first landmark); 0 means DefaultSeed, so seed 0 itself
	// cannot be asked for.
	Seed uint64
	// Noise is the position noise, as a fraction of the mean spacing,
	// that is tolerated: the noise floor estimated from the data is never
	// taken above what noise of this size produces. 0 means DefaultNoise;
	// a negative value (ExactData) tolerates none (the floor is then the
	// estimate alone, capped at zero: exact data).
	Noise float64
	// Exclude marks spacings that no delay vector may contain — a spacing
	// across a missing site, say; the vectors that would contain one are
	// left out of the cloud. nil excludes none; otherwise it holds one
	// entry per spacing.
	Exclude []bool
	// LandmarkPool, when positive, restricts the landmarks to the first
	// LandmarkPool delay vectors (a stretch of the chain long enough to
	// trace the hull bounds the O(vectors × landmarks) cost on long
	// chains); the cover radius is then that of the pool. 0 means all.
	LandmarkPool int
}

// withDefaults fills in the defaults and checks the options.
func (o Options) withDefaults() (Options, error) {
	if o.Window < 0 {
		return o, fmt.Errorf("window %d: must be positive (or 0 to choose)", o.Window)
	}
	if o.MaxWindow < 0 || o.Landmarks < 0 {
		return o, fmt.Errorf("maximum window %d, landmarks %d: must not be negative", o.MaxWindow, o.Landmarks)
	}
	if math.IsNaN(o.Noise) || math.IsInf(o.Noise, 0) || o.Noise >= 1 {
		return o, fmt.Errorf("noise %v: must be a finite fraction of the mean spacing below 1", o.Noise)
	}
	if o.MaxWindow == 0 {
		o.MaxWindow = DefaultMaxWindow
	}
	if o.Landmarks == 0 {
		o.Landmarks = DefaultLandmarks
	}
	if o.Seed == 0 {
		o.Seed = DefaultSeed
	}
	if o.Noise == 0 {
		o.Noise = DefaultNoise
	}
	return o, nil
}

// noise returns the tolerated position noise, 0 for none.
func (o Options) noise() float64 { return max(o.Noise, 0) }

// Result is what Embed found, with everything a report needs.
type Result struct {
	// Sites is the number of sites, MeanSpacing the mean spacing in Unit.
	Sites       int
	MeanSpacing float64
	Unit        string
	// Window is the delay window used.
	Window int
	// Choice holds the window rule's figures; nil when Options.Window was
	// given.
	Choice *WindowChoice
	// NoiseFloor is the eigenvalue below which a component counts as
	// noise (see ChooseWindow), three times NoiseVariance, the estimated
	// noise variance of one dimensionless spacing.
	NoiseFloor, NoiseVariance float64
	// Whitened is the whitened cloud of all delay vectors, with the full
	// spectrum, the number of kept components and the threshold.
	Whitened *Whitened
	// Rows[i] is the index n of the first spacing of the vector in row i
	// of Whitened.Cloud, ascending; it skips the vectors left out by
	// Options.Exclude, whose number is Excluded.
	Rows     []int
	Excluded int
	// Landmarks indexes the landmark rows of Whitened.Cloud in the order
	// max–min sampling chose them, and LandmarkCloud holds those rows.
	Landmarks     []int
	LandmarkCloud [][]float64
	// CoverRadius is the largest distance, in whitened units, from any
	// vector to its nearest landmark.
	CoverRadius float64
}

// Embed turns a pattern into its whitened delay-coordinate cloud and a set
// of landmarks on it: the spacings become dimensionless delay vectors
// (Delay), the window is chosen from the data unless given (ChooseWindow),
// the cloud is whitened on its significant components (Whiten) and
// landmarks are picked by max–min sampling (Landmarks).
//
// A pattern too short for the window (fewer than 2w+2 usable delay vectors
// of window w) is refused.
func Embed(p *pattern.Pattern, opt Options) (*Result, error) {
	opt, err := opt.withDefaults()
	if err != nil {
		return nil, fmt.Errorf("embedding: %w", err)
	}
	d := p.Spacings()
	if err := checkExclude(opt.Exclude, len(d)); err != nil {
		return nil, fmt.Errorf("embedding: %w", err)
	}
	res := &Result{Sites: p.Len(), MeanSpacing: p.MeanSpacing(), Unit: p.Unit}
	if opt.Window == 0 {
		ch, err := ChooseWindow(d, opt)
		if err != nil {
			return nil, fmt.Errorf("embedding: %w", err)
		}
		res.Choice, res.Window, res.NoiseFloor = ch, ch.Window, ch.NoiseFloor
	} else {
		w := opt.Window
		if rows := len(usableStarts(len(d), opt.Exclude, w)); rows < vectorsNeeded(w) {
			return nil, fmt.Errorf("embedding: the pattern is too short for window %d: %d sites give %d usable delay vectors, need at least %d", w, p.Len(), rows, vectorsNeeded(w))
		}
		res.Window = w
		var err error
		res.NoiseFloor, err = noiseFloor(d, w, opt)
		if err != nil {
			return nil, fmt.Errorf("embedding: %w", err)
		}
	}
	res.NoiseVariance = res.NoiseFloor / noiseMargin
	all, err := Delay(d, res.Window)
	if err != nil {
		return nil, fmt.Errorf("embedding: %w", err)
	}
	res.Rows = usableStarts(len(d), opt.Exclude, res.Window)
	x := all
	if total, _ := all.Dims(); len(res.Rows) < total {
		res.Excluded = total - len(res.Rows)
		x = mat.NewDense(len(res.Rows), res.Window, nil)
		for i, n := range res.Rows {
			x.SetRow(i, all.RawRowView(n))
		}
	}
	res.Whitened, err = Whiten(x, res.NoiseFloor)
	if err != nil {
		return nil, fmt.Errorf("embedding: %w", err)
	}
	pool := res.Whitened.Cloud
	if opt.LandmarkPool > 0 && opt.LandmarkPool < len(pool) {
		pool = pool[:opt.LandmarkPool]
	}
	res.Landmarks, res.CoverRadius, err = Landmarks(pool, opt.Landmarks, opt.Seed)
	if err != nil {
		return nil, fmt.Errorf("embedding: %w", err)
	}
	res.LandmarkCloud = make([][]float64, len(res.Landmarks))
	for i, j := range res.Landmarks {
		res.LandmarkCloud[i] = res.Whitened.Cloud[j]
	}
	return res, nil
}

// noiseFloor estimates the noise floor as ChooseWindow does, for a given
// window w: from the spectrum at the longest window up to
// max(w, MaxWindow+1) that the pattern has enough vectors for.
func noiseFloor(spacings []float64, w int, opt Options) (float64, error) {
	mean, err := meanSpacing(spacings)
	if err != nil {
		return 0, err
	}
	d := make([]float64, len(spacings))
	for i, v := range spacings {
		d[i] = v / mean
	}
	top := max(w, opt.MaxWindow+1)
	usable := usableStarts(len(d), opt.Exclude, top)
	for top > w && len(usable) < vectorsNeeded(top) {
		top--
		usable = usableStarts(len(d), opt.Exclude, top)
	}
	nu, _, err := newSample(d, usable, opt.Seed).noise(top, opt.noise())
	if err != nil {
		return 0, err
	}
	return noiseMargin * nu, nil
}
