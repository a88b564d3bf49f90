// Command suite measures the accuracy and precision of the hull analysis on
// a seeded grid of generated chains whose hulls are known in closed form.
//
// It prints a confusion matrix (true class × reported class), one row per
// case (class, confidence, angle error, reported uncertainty, their ratio,
// wall time), the barcode figures of every misclassified case, the
// breakdown points of each class (the smallest size and the largest
// position noise at which it is still recognised), and three precision
// checks with PASS or FAIL against their goals: noise-free circle angles to
// 1e-9, the angle RMSE under position noise against the Cramér–Rao bound,
// and the wall time of one analysis of 2000 sites.
//
// Usage:
//
//	go run ./topology/hull/internal/suite [-quick] [-seed N] [-json]
//
// The suite is a measurement, not a test: it exits 0 whatever the verdicts
// (1 when it cannot run). The same seed gives the same cases and the same
// results; only the wall times vary.
package main

import (
	"bytes"
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"hash/fnv"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"slices"
	"strconv"
	"strings"
	"text/tabwriter"
	"time"

	"gonum.org/v1/gonum/mat"

	"phasonhull/pattern"
	"phasonhull/pattern/design"
	"phasonhull/topology"
	"phasonhull/topology/hull"
)

func main() {
	quick := flag.Bool("quick", false, "run a small subset (smoke test)")
	seed := flag.Uint64("seed", 1, "seed of every random choice")
	asJSON := flag.Bool("json", false, "write the report as JSON")
	flag.Parse()
	rep, err := Run(Config{Quick: *quick, Seed: *seed})
	if err != nil {
		fmt.Fprintln(os.Stderr, "suite:", err)
		os.Exit(1)
	}
	if *asJSON {
		err = writeJSON(os.Stdout, rep)
	} else {
		err = writeText(os.Stdout, rep)
	}
	if err != nil {
		fmt.Fprintln(os.Stderr, "suite:", err)
		os.Exit(1)
	}
}

// Config selects what Run measures.
type Config struct {
	Quick bool   // the small subset
	Seed  uint64 // suite seed; every case seed derives from it and the case name
}

// The classes of the suite. Cantor and disordered are the true classes of
// the negative cases; the analysis may not name them yet.
const (
	cantor     hull.Class = "cantor"
	disordered hull.Class = "disordered"
	failed     hull.Class = "error" // Analyze returned an error
)

var (
	trueClasses     = []hull.Class{hull.Point, hull.Finite, hull.Circle, hull.Torus, cantor, disordered}
	reportedClasses = []hull.Class{hull.Point, hull.Finite, hull.Circle, hull.Torus, cantor, disordered, hull.Unresolved, failed}
)

// Goals of the precision checks.
const (
	exactAngleGoal = 1e-9 // noise-free circle angle error, 2000 sites
	crbGoal        = 1.5  // angle RMSE over √CRB
	timeGoal       = 0.5  // seconds, median analysis of 2000 sites
)

// Grid axes.
var (
	sizes      = []int{40, 100, 500, 2000, 5000, 20000}
	torusSizes = []int{2000, 5000, 20000}
	noises     = []float64{0, 0.005, 0.01, 0.02, 0.03, 0.05}
	// sweepNoise is the noise of the second size sweep; noiseSweepSites
	// the size of the noise sweep.
	sweepNoise      = 0.01
	noiseSweepSites = 2000
)

// Case is one generated chain and what is known of its hull.
type Case struct {
	Name  string      `json:"name"`
	Spec  design.Spec `json:"spec"`
	Class hull.Class  `json:"true_class"`
	// Period of a point or finite hull.
	Period int `json:"true_period,omitempty"`
	// Angles are the true angles, folded into [0, ½] and sorted; nil when
	// the hull has none. AngleRef bounds their own error (0: exact by
	// construction) and AngleSource says where they come from.
	Angles      []float64 `json:"true_angles,omitempty"`
	AngleRef    float64   `json:"true_angle_precision,omitempty"`
	AngleSource string    `json:"true_angle_source,omitempty"`
	// Noise is the position noise in mean spacings (every design has mean
	// spacing 1, so it equals Spec.Noise).
	Noise float64 `json:"noise"`
	// Centroids: the chain goes through tilted 2-D centroids and
	// pattern.Read.
	Centroids bool `json:"centroids,omitempty"`
	// SizeSweep and NoiseSweep mark the cases of the breakdown sweeps.
	SizeSweep  bool `json:"size_sweep,omitempty"`
	NoiseSweep bool `json:"noise_sweep,omitempty"`
}

// Outcome is what the analysis made of one case.
type Outcome struct {
	Case       Case       `json:"case"`
	Sites      int        `json:"sites"`
	Reported   hull.Class `json:"reported_class"`
	Period     int        `json:"reported_period,omitempty"`
	Betti      []int      `json:"betti"`
	Confidence float64    `json:"confidence"`
	// Correct: the true class (and period) was reported. FalseHull: a
	// negative case (cantor, disordered) was given a point, finite, circle
	// or torus hull.
	Correct   bool `json:"correct"`
	FalseHull bool `json:"false_hull,omitempty"`
	// AngleError is |reported − true| (for two angles the smallest
	// tolerance at which the two bases generate the same module);
	// Uncertainty the reported one (root sum of squares for two angles);
	// Ratio their quotient. Nil where there is nothing to compare.
	AngleError  *float64  `json:"angle_error"`
	Uncertainty *float64  `json:"uncertainty"`
	Ratio       *float64  `json:"error_over_uncertainty"`
	Angles      []float64 `json:"angles"`
	// Residual is the positional scatter the fitted hull leaves, in mean
	// spacings (Result.Disorder); about the position noise when the hull
	// is right. Nil when no hull was fitted.
	Residual *float64 `json:"residual"`
	Seconds  float64  `json:"seconds"`
	Barcode  Barcode  `json:"barcode"`
	Reason   string   `json:"reason"`
	Err      string   `json:"error,omitempty"`
}

// Barcode holds the figures behind a classification.
type Barcode struct {
	Threshold   float64   `json:"threshold"`
	CoverRadius float64   `json:"cover_radius"`
	SamplingGap float64   `json:"sampling_gap"`
	NoiseScale  float64   `json:"noise_scale"`
	H1          []float64 `json:"h1_top"` // the longest H1 persistences, at most 4
	H2          []float64 `json:"h2_top"` // the longest H2 persistences, at most 3
	Subsamples  [][]int   `json:"subsamples"`
	Window      int       `json:"window"`
	Components  int       `json:"components"`
	Landmarks   int       `json:"landmarks"`
}

// Report is everything the suite measured.
type Report struct {
	Seed      uint64      `json:"seed"`
	Quick     bool        `json:"quick"`
	Confusion Confusion   `json:"confusion"`
	Outcomes  []Outcome   `json:"cases"`
	Breakdown []Breakdown `json:"breakdown"`
	Exact     ExactCheck  `json:"exact_angles"`
	CRB       []CRBCheck  `json:"cramer_rao"`
	Calib     Calibration `json:"uncertainty_calibration"`
	Timing    TimingCheck `json:"timing"`
	Seconds   float64     `json:"total_seconds"`
}

// Confusion counts cases by true class (rows) and reported class
// (columns).
type Confusion struct {
	Rows   []hull.Class `json:"true"`
	Cols   []hull.Class `json:"reported"`
	Counts [][]int      `json:"counts"`
}

// Run builds the grid, analyses every case in order and runs the precision
// checks.
func Run(cfg Config) (*Report, error) {
	start := time.Now()
	cases, err := Grid(cfg)
	if err != nil {
		return nil, err
	}
	rep := &Report{Seed: cfg.Seed, Quick: cfg.Quick}
	for _, c := range cases {
		o, err := RunCase(c, cfg.Seed)
		if err != nil {
			return nil, err
		}
		rep.Outcomes = append(rep.Outcomes, o)
	}
	rep.Confusion = confusion(rep.Outcomes)
	rep.Breakdown = breakdowns(rep.Outcomes)
	rep.Exact = exactCheck(rep.Outcomes)
	rep.Calib = calibration(rep.Outcomes)
	draws := 100
	if cfg.Quick {
		draws = 10
	}
	for _, sigma := range []float64{0.01, 0.02} {
		c, err := crbCheck(500, 0.1, sigma, draws, cfg.Seed)
		if err != nil {
			return nil, err
		}
		rep.CRB = append(rep.CRB, c)
	}
	if rep.Timing, err = timingCheck(cfg.Seed, 7); err != nil {
		return nil, err
	}
	rep.Seconds = time.Since(start).Seconds()
	return rep, nil
}

// --- the grid -------------------------------------------------------------

var (
	golden  = (math.Sqrt(5) - 1) / 2 // 1/φ
	sqrt2m1 = math.Sqrt2 - 1
	sqrt3m1 = math.Sqrt(3) - 1
)

// prototype builds the representative case of a class at a size and noise:
// the cases of the breakdown sweeps.
func prototype(class hull.Class, sites int, noise float64) Case {
	c := Case{Class: class, Noise: noise}
	switch class {
	case hull.Point:
		c.Spec = design.Spec{Family: "periodic", Cell: []float64{1}}
		c.Period = 1
	case hull.Finite:
		// A cell of three spacings, mean 1.
		c.Spec = design.Spec{Family: "periodic", Cell: []float64{1 / 1.2, 1.5 / 1.2, 1.1 / 1.2}}
		c.Period = 3
	case hull.Circle:
		c = modulated(sqrt2m1, []float64{0.1}, nil, 1, noise)
	case hull.Torus:
		c = twoAngle(sqrt2m1, 0.1, sqrt3m1, 0.1, noise)
	case cantor:
		c = sturmian(1-golden, noise)
	case disordered:
		c.Spec = design.Spec{Family: "random", Dist: "uniform", Spread: 0.5}
	}
	c.Spec.Sites, c.Spec.Noise = sites, noise
	c.Name = fmt.Sprintf("%s/N%d/%s", class, sites, noiseLabel(noise))
	return c
}

// modulated is x_n = n + Σ_k a_k sin 2πk(nθ+φ) + b_k cos 2πk(nθ+φ); its
// hull is a circle turned by gθ, g the gcd of the harmonic orders present
// (common practice), and the angle is exact by construction.
func modulated(theta float64, sin, cos []float64, g int, noise float64) Case {
	return Case{
		Class: hull.Circle, Noise: noise,
		Spec:        design.Spec{Family: "modulated", Theta: theta, Sin: sin, Cos: cos, Phase: 0.13},
		Angles:      []float64{topology.Fold(float64(g) * theta)},
		AngleSource: fmt.Sprintf("%d·θ of the construction", g),
	}
}

// twoAngle has a two-torus hull with the module Z + Zθ1 + Zθ2 (common
// practice).
func twoAngle(t1, a1, t2, a2, noise float64) Case {
	return Case{
		Class: hull.Torus, Noise: noise,
		Spec:        design.Spec{Family: "two-angle", Theta: t1, Amp: a1, Theta2: t2, Amp2: a2, Phase: 0.13, Phase2: 0.71},
		Angles:      topology.CanonicalBasis([]float64{t1, t2}),
		AngleSource: "θ1, θ2 of the construction",
	}
}

// sturmian is the Sturmian tiling of slope θ with tiles 1 and φ scaled to
// mean spacing 1. Its hull is a Cantor set (the mechanical words of slope
// θ; Lothaire, Algebraic Combinatorics on Words, ch. 2) carrying the
// rotation by θ.
func sturmian(theta, noise float64) Case {
	phi := 1 / golden
	mean := (1-theta)*1 + theta*phi
	return Case{
		Class: cantor, Noise: noise,
		Spec:        design.Spec{Family: "sturmian", Theta: theta, Tiles: map[string]float64{"A": 1 / mean, "B": phi / mean}},
		Angles:      []float64{topology.Fold(theta)},
		AngleSource: "slope θ of the mechanical word",
	}
}

func noiseLabel(noise float64) string {
	return "σ" + strconv.FormatFloat(100*noise, 'g', -1, 64) + "%"
}

// Grid returns the cases of the suite, in the order they run.
func Grid(cfg Config) ([]Case, error) {
	var cases []Case
	add := func(c Case, name string) {
		if name != "" {
			c.Name = name
		}
		cases = append(cases, c)
	}
	sizeAxis, noiseAxis, nSweep := sizes, noises, noiseSweepSites
	if cfg.Quick {
		sizeAxis, noiseAxis, nSweep = []int{100, 500}, []float64{0, 0.01, 0.02, 0.05}, 500
	}

	// The breakdown sweeps: each class's prototype over the sizes, noise
	// free and at sweepNoise, and over the noises at one size.
	for _, class := range trueClasses {
		ns := sizeAxis
		if class == hull.Torus {
			ns = torusSizes
			if cfg.Quick {
				ns = []int{2000}
			}
		}
		for _, noise := range []float64{0, sweepNoise} {
			if class == hull.Torus && cfg.Quick && noise > 0 {
				continue
			}
			for _, n := range ns {
				c := prototype(class, n, noise)
				c.SizeSweep = true
				c.NoiseSweep = n == nSweep
				add(c, "")
			}
		}
		if class == hull.Torus && cfg.Quick {
			continue
		}
		for _, noise := range noiseAxis {
			if noise == 0 || noise == sweepNoise {
				continue // in the size sweeps
			}
			c := prototype(class, nSweep, noise)
			c.NoiseSweep = true
			add(c, "")
		}
	}

	if cfg.Quick {
		// One noise-free circle of 2000 sites for the exact-angle check,
		// one chain each through the missing-site and centroid routes.
		c := prototype(hull.Circle, 2000, 0)
		add(c, "")
		c = prototype(hull.Circle, 500, 0.01)
		c.Spec.Missing = 0.01
		add(c, "circle/missing1%/N500/σ1%")
		c = prototype(hull.Circle, 500, 0.01)
		c.Centroids = true
		add(c, "circle/centroids/N500/σ1%")
		return cases, nil
	}

	// Finite hulls: cells of 2 to 5 spacings and rational modulations
	// θ = p/q, whose chains repeat every q sites (common practice).
	for _, cell := range [][]float64{{1, 1.4}, {1, 1.3, 0.8, 1.1}, {1, 1.2, 1.4, 0.9, 1.1}} {
		c := Case{Class: hull.Finite, Period: len(cell), Noise: 0.01,
			Spec: design.Spec{Family: "periodic", Cell: scaleToMean(cell), Sites: 500, Noise: 0.01}}
		add(c, fmt.Sprintf("finite/cell%d/N500/σ1%%", len(cell)))
	}
	for _, pq := range [][2]int{{1, 2}, {1, 3}, {2, 5}, {3, 7}, {3, 8}, {5, 12}, {7, 11}, {1, 12}} {
		for _, noise := range []float64{0, 0.01} {
			if noise == 0 && pq != [2]int{5, 12} {
				continue
			}
			c := modulated(float64(pq[0])/float64(pq[1]), []float64{0.1}, nil, 1, noise)
			c.Class, c.Period, c.Angles, c.AngleSource = hull.Finite, pq[1], nil, ""
			c.Spec.Sites, c.Spec.Noise = 500, noise
			add(c, fmt.Sprintf("finite/theta%d_%d/N500/%s", pq[0], pq[1], noiseLabel(noise)))
		}
	}

	// Circles: one harmonic at several angles (a small one and one near
	// 1/3 among them), several harmonics, deformed loops, circle maps;
	// each noise-free and at 1%, 2000 sites.
	type circle struct {
		name string
		make func() (Case, error)
	}
	circles := []circle{
		{"golden", func() (Case, error) { return modulated(golden, []float64{0.1}, nil, 1, 0), nil }},
		{"theta0.2763", func() (Case, error) { return modulated(0.2763, []float64{0.1}, nil, 1, 0), nil }},
		{"pi-3", func() (Case, error) { return modulated(math.Pi-3, []float64{0.1}, nil, 1, 0), nil }},
		{"e-2", func() (Case, error) { return modulated(math.E-2, []float64{0.1}, nil, 1, 0), nil }},
		{"small0.0618", func() (Case, error) { return modulated(golden/10, []float64{0.1}, nil, 1, 0), nil }},
		{"near1_3", func() (Case, error) { return modulated(0.3343, []float64{0.1}, nil, 1, 0), nil }},
		{"harmonics123", func() (Case, error) {
			return modulated(sqrt2m1, []float64{0.1, 0.04, 0.02}, []float64{0, 0.03}, 1, 0), nil
		}},
		{"harmonics24", func() (Case, error) {
			// Only harmonics 2 and 4 of θ: the hull turns by 2θ.
			return modulated(0.2763, []float64{0, 0.1, 0, 0.03}, nil, 2, 0), nil
		}},
		{"loop-oval", func() (Case, error) {
			return Case{Class: hull.Circle, Spec: design.Spec{Family: "loop", Step: 0.2763, Amp: 0.2, RadiusCos: []float64{0, 0.3}},
				Angles: []float64{0.2763}, AngleSource: "arc step of the construction"}, nil
		}},
		{"loop-lumpy", func() (Case, error) {
			return Case{Class: hull.Circle, Spec: design.Spec{Family: "loop", Step: golden, Amp: 0.2, RadiusSin: []float64{0.2, 0, 0.1}, Phase: 0.3},
				Angles: []float64{topology.Fold(golden)}, AngleSource: "arc step of the construction"}, nil
		}},
		{"circlemap-K0.5", func() (Case, error) { return circleMapCase(0.5) }},
		{"circlemap-K1", func() (Case, error) { return circleMapCase(1) }},
	}
	for _, cm := range circles {
		for _, noise := range []float64{0, 0.01} {
			c, err := cm.make()
			if err != nil {
				return nil, err
			}
			c.Spec.Sites, c.Spec.Noise, c.Noise = 2000, noise, noise
			add(c, fmt.Sprintf("circle/%s/N2000/%s", cm.name, noiseLabel(noise)))
		}
	}

	// A second torus, with unequal amplitudes.
	for _, noise := range []float64{0, 0.01} {
		c := twoAngle(golden, 0.1, sqrt2m1, 0.08, noise)
		c.Spec.Sites, c.Spec.Noise = 5000, noise
		add(c, fmt.Sprintf("torus/golden+sqrt2/N5000/%s", noiseLabel(noise)))
	}

	// Every prototype with 1% of its sites missing, and through centroids.
	for _, class := range trueClasses {
		c := prototype(class, 2000, 0.01)
		c.Spec.Missing = 0.01
		add(c, fmt.Sprintf("%s/missing1%%/N2000/σ1%%", class))
	}
	for _, class := range trueClasses {
		c := prototype(class, 2000, 0.01)
		c.Centroids = true
		add(c, fmt.Sprintf("%s/centroids/N2000/σ1%%", class))
	}

	// More negative cases: other spacing laws, the Fibonacci substitution
	// tiling (the Sturmian word of slope 1/φ²), another slope.
	add(Case{Class: disordered, Spec: design.Spec{Family: "random", Dist: "exponential", Spread: 0.3, Sites: 2000}}, "disordered/exponential0.3/N2000/σ0%")
	add(Case{Class: disordered, Spec: design.Spec{Family: "random", Dist: "uniform", Spread: 0.1, Sites: 2000}}, "disordered/uniform0.1/N2000/σ0%")
	phi := 1 / golden
	fm := (golden*1 + (1-golden)*phi) // letter A has frequency 1/φ, B 1/φ²
	add(Case{Class: cantor, Spec: design.Spec{Family: "substitution", Rule: "fibonacci", Sites: 2000, Tiles: map[string]float64{"A": 1 / fm, "B": phi / fm}},
		Angles: []float64{1 - golden}, AngleSource: "frequency 1/φ² of B (common practice)"}, "cantor/fibonacci-substitution/N2000/σ0%")
	c := sturmian(sqrt2m1, 0)
	c.Spec.Sites = 2000
	add(c, "cantor/sturmian-sqrt2/N2000/σ0%")
	return cases, nil
}

// scaleToMean scales a cell of spacings to mean 1.
func scaleToMean(cell []float64) []float64 {
	var s float64
	for _, v := range cell {
		s += v
	}
	out := make([]float64, len(cell))
	for i, v := range cell {
		out[i] = v * float64(len(cell)) / s
	}
	return out
}

// circleMapCase builds a sine-circle-map chain whose rotation number is
// known independently: for K = 1 at Ω = 0.6066610635, which gives the
// golden mean (Shenker, Physica D 5, 1982; Ω from memory), for K < 1 at the
// Ω found by bisection to give the golden mean; either way the reference
// is the rotation number computed from the map at that Ω (see
// circleMapRotation), not the target.
func circleMapCase(k float64) (Case, error) {
	omega := 0.6066610635
	if k < 1 {
		var err error
		if omega, err = omegaFor(golden, k); err != nil {
			return Case{}, err
		}
	}
	rho, bound, how, err := circleMapRotation(omega, k)
	if err != nil {
		return Case{}, err
	}
	return Case{
		Class:       hull.Circle,
		Spec:        design.Spec{Family: "circle-map", Omega: omega, K: k, Amp: 0.1},
		Angles:      []float64{topology.Fold(rho)},
		AngleRef:    bound,
		AngleSource: how,
	}, nil
}

// --- running one case ------------------------------------------------------

// caseSeed derives the seed of a case from the suite seed and its name, so
// that adding a case leaves the others' draws alone.
func caseSeed(seed uint64, name string) uint64 {
	h := fnv.New64a()
	io.WriteString(h, name)
	s := rand.New(rand.NewPCG(seed, h.Sum64())).Uint64()
	if s == 0 {
		s = 1 // 0 stands for the default in hull.Options
	}
	return s
}

// RunCase generates a case, analyses it and compares the result with the
// truth.
func RunCase(c Case, seed uint64) (Outcome, error) {
	s := caseSeed(seed, c.Name)
	spec := c.Spec
	spec.Seed = s
	p, err := design.Generate(spec)
	if err != nil {
		return Outcome{}, fmt.Errorf("case %s: %w", c.Name, err)
	}
	if c.Centroids {
		if p, err = throughCentroids(p, s, c.Name); err != nil {
			return Outcome{}, fmt.Errorf("case %s: %w", c.Name, err)
		}
	}
	o := Outcome{Case: c, Sites: p.Len(), Angles: []float64{}}
	t0 := time.Now()
	r, err := hull.Analyze(p, hull.Options{Seed: s})
	o.Seconds = time.Since(t0).Seconds()
	if err != nil {
		o.Reported, o.Err = failed, err.Error()
		return o, nil
	}
	o.Reported, o.Period, o.Betti, o.Confidence = r.Hull.Class, r.Hull.Period, r.Hull.Betti, r.Hull.Confidence
	o.Reason, o.Angles = r.Hull.Reason, r.Angles
	o.Barcode = barcodeOf(r)
	if r.Disorder != nil {
		v := r.Disorder.Relative
		o.Residual = &v
	}
	switch c.Class {
	case hull.Point, hull.Finite:
		o.Correct = o.Reported == c.Class && o.Period == c.Period
	default:
		o.Correct = o.Reported == c.Class
	}
	if c.Class == cantor || c.Class == disordered {
		switch o.Reported {
		case hull.Point, hull.Finite, hull.Circle, hull.Torus:
			o.FalseHull = true
		}
	}
	if len(c.Angles) > 0 && len(r.Angles) == len(c.Angles) {
		e := angleDistance(c.Angles, r.Angles)
		var v float64
		for _, u := range r.AngleUncertainty {
			v += u * u
		}
		u := math.Sqrt(v)
		o.AngleError, o.Uncertainty = &e, &u
		if u > 0 {
			q := e / u
			o.Ratio = &q
		}
	}
	return o, nil
}

func barcodeOf(r *hull.Result) Barcode {
	b := Barcode{
		Threshold: r.Persistence.Threshold, CoverRadius: r.Persistence.CoverRadius,
		SamplingGap: r.Persistence.SamplingGap, NoiseScale: r.Persistence.NoiseScale,
		Subsamples: r.Persistence.Subsamples, Window: r.Embedding.Window,
		Components: r.Embedding.Components, Landmarks: r.Embedding.Landmarks,
		H1: []float64{}, H2: []float64{},
	}
	// Bars come sorted by dimension, then persistence, longest first.
	for _, bar := range r.Persistence.Bars {
		p := math.Inf(1)
		if bar.Death != nil {
			p = *bar.Death - bar.Birth
		}
		switch {
		case bar.Dim == 1 && len(b.H1) < 4:
			b.H1 = append(b.H1, p)
		case bar.Dim == 2 && len(b.H2) < 3:
			b.H2 = append(b.H2, p)
		}
	}
	return b
}

// angleDistance is |a − b| for one angle each (both folded); for more it
// is the smallest tolerance at which topology.SameModule accepts the two
// bases with coefficients up to hull.DefaultMaxCoeff, by bisection
// (acceptance only grows with the tolerance). Any basis of the right module
// is a correct answer, so bases are never compared entry by entry.
func angleDistance(a, b []float64) float64 {
	if len(a) == 1 {
		return math.Abs(topology.Fold(a[0]) - topology.Fold(b[0]))
	}
	if topology.SameModule(a, b, hull.DefaultMaxCoeff, 0) {
		return 0
	}
	lo, hi := 0.0, 0.5
	if !topology.SameModule(a, b, hull.DefaultMaxCoeff, hi) {
		return hi
	}
	for hi-lo > 1e-3*hi && hi > 1e-17 {
		mid := (lo + hi) / 2
		if topology.SameModule(a, b, hull.DefaultMaxCoeff, mid) {
			hi = mid
		} else {
			lo = mid
		}
	}
	return hi
}

// Geometry of the simulated centroid scan: the chain runs at a tilt across
// the scan table, each centroid scattered across the chain.
const (
	scanTiltDeg    = 3.0
	scanTransverse = 0.02 // standard deviation across the chain, in mean spacings
	scanX0, scanY0 = 12.5, 40.2
)

// throughCentroids writes the pattern as tilted x,y centroids with
// transverse scatter into an in-memory CSV file and reads it back with
// pattern.Read, so that the analysis sees what the centroid reader makes
// of a scan.
func throughCentroids(p *pattern.Pattern, seed uint64, name string) (*pattern.Pattern, error) {
	rng := rand.New(rand.NewPCG(seed, 5))
	sin, cos := math.Sincos(scanTiltDeg * math.Pi / 180)
	var buf bytes.Buffer
	buf.WriteString("# simulated centroid scan of " + name + "\nx,y\n")
	for _, s := range p.Positions {
		t := scanTransverse * rng.NormFloat64()
		x := scanX0 + s*cos - t*sin
		y := scanY0 + s*sin + t*cos
		buf.WriteString(strconv.FormatFloat(x, 'g', -1, 64) + "," + strconv.FormatFloat(y, 'g', -1, 64) + "\n")
	}
	q, err := pattern.Read(&buf, name+".csv", pattern.ReadOptions{})
	if err != nil {
		return nil, err
	}
	if q.Scan == nil || q.Scan.Dim != 2 {
		return nil, errors.New("the centroid file was not read as 2-D centroids")
	}
	return q, nil
}

// --- references --------------------------------------------------------------

// circleMapRotation returns the rotation number ρ of the sine circle map
// F(ψ) = ψ + Ω − (K/2π) sin 2πψ (a lift with F(0) = Ω), an estimate of its
// error, and how it was computed.
//
// ρ is the weighted Birkhoff average of the increment F(ψ) − ψ along an
// orbit, with the bump weight exp(−1/(t(1−t))): for a smooth conjugacy to
// the rotation it converges faster than any power of the orbit length
// (Das, Saiki, Sander & Yorke, Nonlinearity 30, 2017; from memory). At
// K = 1 the conjugacy is not smooth and nothing guarantees that rate, so
// the error is estimated from the spread of the averages over orbits of
// 2.5·10⁵, 5·10⁵ and 10⁶ steps, and the result must also lie within the
// rigorous bound of the plain average over L = 10⁶ steps,
// |(F^L(ψ) − ψ)/L − ρ| < 1/L, which holds for every lift of a circle
// homeomorphism (common practice).
func circleMapRotation(omega, k float64) (rho, bound float64, how string, err error) {
	r1 := weightedRotation(omega, k, 250_000)
	r2 := weightedRotation(omega, k, 500_000)
	rho = weightedRotation(omega, k, 1_000_000)
	bound = math.Max(math.Max(math.Abs(rho-r1), math.Abs(rho-r2)), 1e-15)
	const L = 1_000_000
	wind, frac := 0.0, 0.0
	for range L {
		frac += omega - k/(2*math.Pi)*math.Sin(2*math.Pi*frac)
		fl := math.Floor(frac)
		wind, frac = wind+fl, frac-fl
	}
	if plain := (wind + frac) / L; math.Abs(plain-rho) >= 1.0/L {
		return 0, 0, "", fmt.Errorf("circle map Ω = %v, K = %v: the weighted average %v lies outside the plain average's bound %v ± %v", omega, k, rho, plain, 1.0/L)
	}
	return rho, bound, "weighted Birkhoff average of the map's orbit", nil
}

// weightedRotation is the weighted Birkhoff average of the increment of
// the circle map over n steps from ψ = 0.
func weightedRotation(omega, k float64, n int) float64 {
	psi, sum, wsum := 0.0, 0.0, 0.0
	for i := range n {
		t := (float64(i) + 0.5) / float64(n)
		w := math.Exp(-1 / (t * (1 - t)))
		// Only the fractional part of ψ enters the increment; keeping ψ in
		// [0, 1) keeps its rounding at 1e-16.
		inc := omega - k/(2*math.Pi)*math.Sin(2*math.Pi*psi)
		sum += w * inc
		wsum += w
		psi += inc
		psi -= math.Floor(psi)
	}
	return sum / wsum
}

// omegaFor finds Ω with rotation number target for the sine circle map at
// K < 1 by bisection: the rotation number is continuous and nondecreasing
// in Ω (common practice), and an irrational target is taken at one Ω only.
func omegaFor(target, k float64) (float64, error) {
	lo, hi := 0.0, 1.0
	for range 60 {
		mid := (lo + hi) / 2
		if weightedRotation(mid, k, 20_000) < target {
			lo = mid
		} else {
			hi = mid
		}
	}
	if math.Abs(weightedRotation(lo, k, 200_000)-target) > 1e-6 {
		return 0, fmt.Errorf("circle map K = %v: no Ω gives rotation number %v", k, target)
	}
	return lo, nil
}

// kayCRB is the Cramér–Rao bound on the variance of the frequency (in
// turns per site) of a real sinusoid of amplitude a in white noise of
// variance σ², from N samples, with amplitude, frequency and phase
// unknown: 24σ²/((2π)² a² N(N²−1)) (Rife & Boorstyn, IEEE Trans. Inf.
// Theory 20, 1974; Kay, Fundamentals of Statistical Signal Processing,
// 1993, Example 3.14, written with the SNR a²/2σ²).
func kayCRB(n int, a, sigma float64) float64 {
	N := float64(n)
	return 24 * sigma * sigma / (4 * math.Pi * math.Pi * a * a * N * (N*N - 1))
}

// exactCRB is the Cramér–Rao bound on the variance of θ for the model the
// analysis fits, x_n = c + L·n + a sin 2π(nθ + φ) + e_n, e_n white of
// variance σ², computed from its Fisher information J = Σ g_n g_nᵀ / σ²
// (g_n the gradient of the mean in (c, L, a, θ, φ)) by inversion. It has
// the two trend parameters beyond kayCRB's model, and no large-N
// approximation.
func exactCRB(n int, a, theta, phase, sigma float64) (float64, error) {
	const d = 5
	j := mat.NewSymDense(d, nil)
	g := make([]float64, d)
	for i := range n {
		t := float64(i)
		s, c := math.Sincos(2 * math.Pi * (t*theta + phase))
		g[0], g[1], g[2], g[3], g[4] = 1, t, s, 2*math.Pi*a*t*c, 2*math.Pi*a*c
		for p := range d {
			for q := p; q < d; q++ {
				j.SetSym(p, q, j.At(p, q)+g[p]*g[q])
			}
		}
	}
	// Normalise to unit diagonal before inverting: the entries span many
	// orders of magnitude.
	scale := make([]float64, d)
	for p := range d {
		scale[p] = math.Sqrt(j.At(p, p))
	}
	c := mat.NewSymDense(d, nil)
	for p := range d {
		for q := p; q < d; q++ {
			c.SetSym(p, q, j.At(p, q)/(scale[p]*scale[q]))
		}
	}
	var ch mat.Cholesky
	if !ch.Factorize(c) {
		return 0, errors.New("the Fisher information is singular")
	}
	var inv mat.SymDense
	if err := ch.InverseTo(&inv); err != nil {
		return 0, err
	}
	return sigma * sigma * inv.At(3, 3) / (scale[3] * scale[3]), nil
}

// --- precision checks ---------------------------------------------------------

// ExactCheck is the check of the noise-free circle angles at 2000 sites.
type ExactCheck struct {
	Goal  float64      `json:"goal"`
	Cases []ExactAngle `json:"cases"`
	// Pass: every decisive case is a circle within the goal.
	Pass bool `json:"pass"`
}

// ExactAngle is one case of the exact-angle check. Decisive is false when
// the true angle is itself known only to worse than a tenth of the goal.
type ExactAngle struct {
	Name      string     `json:"name"`
	Reported  hull.Class `json:"reported_class"`
	Error     *float64   `json:"angle_error"`
	Reference float64    `json:"reference_precision"`
	Decisive  bool       `json:"decisive"`
	Pass      bool       `json:"pass"`
}

func exactCheck(out []Outcome) ExactCheck {
	ec := ExactCheck{Goal: exactAngleGoal, Pass: true, Cases: []ExactAngle{}}
	for _, o := range out {
		c := o.Case
		if c.Class != hull.Circle || c.Noise != 0 || c.Spec.Sites != 2000 || c.Spec.Missing != 0 {
			continue
		}
		e := ExactAngle{Name: c.Name, Reported: o.Reported, Error: o.AngleError, Reference: c.AngleRef,
			Decisive: c.AngleRef <= exactAngleGoal/10}
		e.Pass = o.Reported == hull.Circle && o.AngleError != nil && *o.AngleError <= exactAngleGoal+c.AngleRef
		if e.Decisive && !e.Pass {
			ec.Pass = false
		}
		ec.Cases = append(ec.Cases, e)
	}
	return ec
}

// CRBCheck is the angle RMSE of a noisy one-harmonic circle over many
// noise draws against the Cramér–Rao bound.
type CRBCheck struct {
	Sites     int     `json:"sites"`
	Amplitude float64 `json:"amplitude"`
	Theta     float64 `json:"theta"`
	Sigma     float64 `json:"sigma"`
	Draws     int     `json:"draws"`
	// Circles is the number of draws classified circle; the RMSE, bias and
	// mean uncertainty are over those. Misses lists the other draws and
	// what they were classified.
	Circles  int      `json:"circles"`
	Misses   []string `json:"misses"`
	RMSE     float64  `json:"rmse"`
	RMSEStd  float64  `json:"rmse_standard_error"`
	Bias     float64  `json:"bias"`
	SqrtCRB  float64  `json:"sqrt_crb"`       // kayCRB
	SqrtCRBx float64  `json:"sqrt_crb_exact"` // exactCRB, with the trend
	Ratio    float64  `json:"rmse_over_sqrt_crb"`
	MeanUnc  float64  `json:"mean_uncertainty"`
	UncRatio float64  `json:"mean_uncertainty_over_rmse"`
	Goal     float64  `json:"goal"`
	Pass     bool     `json:"pass"`
}

func crbCheck(n int, a, sigma float64, draws int, seed uint64) (CRBCheck, error) {
	const phase = 0.13
	c := CRBCheck{Sites: n, Amplitude: a, Theta: sqrt2m1, Sigma: sigma, Draws: draws, Goal: crbGoal, Misses: []string{}}
	c.SqrtCRB = math.Sqrt(kayCRB(n, a, sigma))
	x, err := exactCRB(n, a, sqrt2m1, phase, sigma)
	if err != nil {
		return c, err
	}
	c.SqrtCRBx = math.Sqrt(x)
	var se, sum, su float64
	for d := range draws {
		name := fmt.Sprintf("crb/N%d/%s/draw%d", n, noiseLabel(sigma), d)
		s := caseSeed(seed, name)
		p, err := design.Generate(design.Spec{Family: "modulated", Sites: n, Theta: sqrt2m1, Sin: []float64{a}, Phase: phase, Noise: sigma, Seed: s})
		if err != nil {
			return c, fmt.Errorf("%s: %w", name, err)
		}
		r, err := hull.Analyze(p, hull.Options{Seed: s})
		switch {
		case err != nil:
			c.Misses = append(c.Misses, fmt.Sprintf("%s (seed %d): error: %v", name, s, err))
			continue
		case r.Hull.Class != hull.Circle:
			c.Misses = append(c.Misses, fmt.Sprintf("%s (seed %d): %s, Betti %v, H1 %s above τ %.3g", name, s, r.Hull.Class, r.Hull.Betti, fmtList(barcodeOf(r).H1), r.Persistence.Threshold))
			continue
		}
		e := r.Angles[0] - sqrt2m1
		se += e * e
		sum += e
		su += r.AngleUncertainty[0]
		c.Circles++
	}
	if c.Circles == 0 {
		return c, nil
	}
	m := float64(c.Circles)
	c.RMSE = math.Sqrt(se / m)
	// The standard error of an RMSE from m Gaussian errors is about
	// RMSE/√(2m).
	c.RMSEStd = c.RMSE / math.Sqrt(2*m)
	c.Bias = sum / m
	c.Ratio = c.RMSE / c.SqrtCRB
	c.MeanUnc = su / m
	c.UncRatio = c.MeanUnc / c.RMSE
	// The goal is on the precision; the misclassified draws are reported
	// beside it.
	c.Pass = c.Ratio <= crbGoal
	return c, nil
}

// Calibration summarises error/uncertainty over the noisy circle and torus
// cases of the grid: for calibrated Gaussian errors the median ratio is
// about 0.67 and 95% of the ratios lie below 2 (common practice).
type Calibration struct {
	Cases   int     `json:"cases"`
	Median  float64 `json:"median_ratio"`
	Below2  float64 `json:"fraction_below_2"`
	Below3  float64 `json:"fraction_below_3"`
	Largest float64 `json:"largest_ratio"`
	Worst   string  `json:"worst_case"`
}

func calibration(out []Outcome) Calibration {
	var rs []float64
	var cal Calibration
	for _, o := range out {
		if o.Ratio == nil || o.Case.Noise == 0 || !o.Correct {
			continue
		}
		rs = append(rs, *o.Ratio)
		if *o.Ratio > cal.Largest {
			cal.Largest, cal.Worst = *o.Ratio, o.Case.Name
		}
	}
	if len(rs) == 0 {
		return cal
	}
	slices.Sort(rs)
	cal.Cases = len(rs)
	cal.Median = median(rs)
	for _, r := range rs {
		if r <= 2 {
			cal.Below2++
		}
		if r <= 3 {
			cal.Below3++
		}
	}
	cal.Below2 /= float64(len(rs))
	cal.Below3 /= float64(len(rs))
	return cal
}

func median(sorted []float64) float64 {
	n := len(sorted)
	if n%2 == 1 {
		return sorted[n/2]
	}
	return (sorted[n/2-1] + sorted[n/2]) / 2
}

// TimingCheck is the wall time of Analyze on 2000 sites of a noisy circle.
type TimingCheck struct {
	Sites  int       `json:"sites"`
	Runs   []float64 `json:"seconds"`
	Median float64   `json:"median_seconds"`
	Goal   float64   `json:"goal_seconds"`
	Pass   bool      `json:"pass"`
}

func timingCheck(seed uint64, runs int) (TimingCheck, error) {
	tc := TimingCheck{Sites: 2000, Goal: timeGoal}
	c := prototype(hull.Circle, 2000, 0.01)
	c.Spec.Seed = caseSeed(seed, "timing")
	p, err := design.Generate(c.Spec)
	if err != nil {
		return tc, err
	}
	for range runs {
		t0 := time.Now()
		if _, err := hull.Analyze(p, hull.Options{Seed: c.Spec.Seed}); err != nil {
			return tc, err
		}
		tc.Runs = append(tc.Runs, time.Since(t0).Seconds())
	}
	s := slices.Clone(tc.Runs)
	slices.Sort(s)
	tc.Median = median(s)
	tc.Pass = tc.Median < timeGoal
	return tc, nil
}

// --- summaries ----------------------------------------------------------------

func confusion(out []Outcome) Confusion {
	cf := Confusion{Rows: trueClasses, Cols: reportedClasses}
	cf.Counts = make([][]int, len(trueClasses))
	for i := range cf.Counts {
		cf.Counts[i] = make([]int, len(reportedClasses))
	}
	for _, o := range out {
		i, j := slices.Index(trueClasses, o.Case.Class), slices.Index(reportedClasses, o.Reported)
		if j < 0 {
			j = slices.Index(reportedClasses, failed)
		}
		cf.Counts[i][j]++
	}
	return cf
}

// Breakdown is where a class stops being recognised in the sweeps.
type Breakdown struct {
	Class hull.Class `json:"class"`
	// Criterion is "correct" (the true class reported) or, for the
	// negative classes, also "no false hull".
	Criterion string      `json:"criterion"`
	Sizes     []SizeSweep `json:"size_sweeps"`
	Noise     *NoiseSweep `json:"noise_sweep"`
}

// SizeSweep is one size sweep at a fixed noise. Smallest is the smallest
// size from which on every larger size passes (0 when the largest fails).
type SizeSweep struct {
	Noise    float64 `json:"noise"`
	Sizes    []int   `json:"sizes"`
	Pass     []bool  `json:"pass"`
	Smallest int     `json:"smallest_size"`
}

// NoiseSweep is the noise sweep at a fixed size. Largest is the largest
// noise up to which every smaller noise passes (−1 when the noise-free
// case fails).
type NoiseSweep struct {
	Sites   int       `json:"sites"`
	Noises  []float64 `json:"noises"`
	Pass    []bool    `json:"pass"`
	Largest float64   `json:"largest_noise"`
}

func breakdowns(out []Outcome) []Breakdown {
	var bs []Breakdown
	for _, class := range trueClasses {
		crits := []string{"correct"}
		if class == cantor || class == disordered {
			crits = append(crits, "no false hull")
		}
		for _, crit := range crits {
			pass := func(o Outcome) bool {
				if crit == "correct" {
					return o.Correct
				}
				return !o.FalseHull && o.Reported != failed
			}
			b := Breakdown{Class: class, Criterion: crit}
			for _, noise := range []float64{0, sweepNoise} {
				sw := SizeSweep{Noise: noise}
				for _, o := range out {
					if o.Case.Class == class && o.Case.SizeSweep && o.Case.Noise == noise {
						sw.Sizes = append(sw.Sizes, o.Case.Spec.Sites)
						sw.Pass = append(sw.Pass, pass(o))
					}
				}
				if len(sw.Sizes) == 0 {
					continue
				}
				for i := len(sw.Sizes) - 1; i >= 0 && sw.Pass[i]; i-- {
					sw.Smallest = sw.Sizes[i]
				}
				b.Sizes = append(b.Sizes, sw)
			}
			type pt struct {
				noise float64
				ok    bool
				sites int
			}
			var pts []pt
			for _, o := range out {
				if o.Case.Class == class && o.Case.NoiseSweep {
					pts = append(pts, pt{o.Case.Noise, pass(o), o.Case.Spec.Sites})
				}
			}
			slices.SortStableFunc(pts, func(x, y pt) int {
				switch {
				case x.noise < y.noise:
					return -1
				case x.noise > y.noise:
					return 1
				}
				return 0
			})
			if len(pts) > 0 {
				ns := &NoiseSweep{Sites: pts[0].sites, Largest: -1}
				for _, p := range pts {
					ns.Noises = append(ns.Noises, p.noise)
					ns.Pass = append(ns.Pass, p.ok)
				}
				for i := 0; i < len(ns.Noises) && ns.Pass[i]; i++ {
					ns.Largest = ns.Noises[i]
				}
				b.Noise = ns
			}
			bs = append(bs, b)
		}
	}
	return bs
}

// --- output ---------------------------------------------------------------------

func writeJSON(w io.Writer, rep *Report) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(rep)
}

func verdict(pass bool) string {
	if pass {
		return "PASS"
	}
	return "FAIL"
}

func fmtE(v *float64) string {
	if v == nil {
		return "-"
	}
	return strconv.FormatFloat(*v, 'e', 2, 64)
}

func fmtList(v []float64) string {
	s := make([]string, len(v))
	for i, x := range v {
		s[i] = strconv.FormatFloat(x, 'g', 3, 64)
	}
	return "[" + strings.Join(s, " ") + "]"
}

func classLabel(c hull.Class, period int) string {
	if c == hull.Finite {
		return fmt.Sprintf("finite/%d", period)
	}
	return string(c)
}

// writeText writes the report as tables.
func writeText(w io.Writer, rep *Report) error {
	var b strings.Builder
	mode := "full"
	if rep.Quick {
		mode = "quick"
	}
	fmt.Fprintf(&b, "hull analysis suite (%s): %d cases, seed %d, %.0f s\n\n", mode, len(rep.Outcomes), rep.Seed, rep.Seconds)

	b.WriteString("Confusion matrix (rows: true class, columns: reported class)\n")
	tw := tabwriter.NewWriter(&b, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprint(tw, "true\\reported\t")
	for _, c := range rep.Confusion.Cols {
		fmt.Fprintf(tw, "%s\t", c)
	}
	fmt.Fprintln(tw, "correct\t")
	for i, r := range rep.Confusion.Rows {
		fmt.Fprintf(tw, "%s\t", r)
		for _, n := range rep.Confusion.Counts[i] {
			fmt.Fprintf(tw, "%d\t", n)
		}
		ok, all := 0, 0
		for _, o := range rep.Outcomes {
			if o.Case.Class == r {
				all++
				if o.Correct {
					ok++
				}
			}
		}
		fmt.Fprintf(tw, "%d/%d\t\n", ok, all)
	}
	tw.Flush()
	b.WriteString("(a finite hull with the wrong period counts under finite but not as correct)\n\n")

	b.WriteString("Cases (noise in mean spacings; angle error and uncertainty in turns)\n")
	tw = tabwriter.NewWriter(&b, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "case\tsites\tnoise\ttrue\treported\tok\tconf\tangle err\tuncert.\terr/unc\tresidual\ttime")
	for _, o := range rep.Outcomes {
		ok := "yes"
		switch {
		case !o.Correct && o.FalseHull:
			ok = "NO (false hull)"
		case !o.Correct:
			ok = "NO"
		}
		ratio := "-"
		if o.Ratio != nil {
			ratio = strconv.FormatFloat(*o.Ratio, 'f', 2, 64)
		}
		resid := "-"
		if o.Residual != nil {
			resid = fmt.Sprintf("%.2f%%", 100**o.Residual)
		}
		fmt.Fprintf(tw, "%s\t%d\t%.1f%%\t%s\t%s\t%s\t%.2f\t%s\t%s\t%s\t%s\t%.2fs\n", o.Case.Name, o.Sites, 100*o.Case.Noise,
			classLabel(o.Case.Class, o.Case.Period), classLabel(o.Reported, o.Period), ok, o.Confidence,
			fmtE(o.AngleError), fmtE(o.Uncertainty), ratio, resid, o.Seconds)
	}
	tw.Flush()
	b.WriteString("(noise-free rows: error and uncertainty near 1e-16 are rounding, and their ratio means little;\n residual: the scatter about the fitted hull, in mean spacings)\n\n")

	b.WriteString("Misclassified cases: barcode figures (whitened units)\n")
	any, expected := false, 0
	for _, o := range rep.Outcomes {
		if o.Correct {
			continue
		}
		if (o.Case.Class == cantor || o.Case.Class == disordered) && o.Reported == hull.Unresolved {
			expected++ // listed in the JSON report
			continue
		}
		any = true
		if o.Err != "" {
			fmt.Fprintf(&b, "  %s: error: %s\n", o.Case.Name, o.Err)
			continue
		}
		bc := o.Barcode
		fmt.Fprintf(&b, "  %s: %s, Betti %v, subsamples %v; τ %.3g (cover %.3g, sampling gap %.3g, noise scale %.3g); H1 %s, H2 %s; window %d, %d components, %d landmarks\n      %s\n",
			o.Case.Name, classLabel(o.Reported, o.Period), o.Betti, bc.Subsamples, bc.Threshold, bc.CoverRadius, bc.SamplingGap, bc.NoiseScale,
			fmtList(bc.H1), fmtList(bc.H2), bc.Window, bc.Components, bc.Landmarks, o.Reason)
	}
	if !any {
		b.WriteString("  none\n")
	}
	if expected > 0 {
		fmt.Fprintf(&b, "  and %d cantor or disordered cases reported unresolved, as expected while the analysis has no such class (figures in -json)\n", expected)
	}
	b.WriteString("\n")

	b.WriteString("Breakdown (+ passes, - fails; smallest size from which on every larger size passes, largest noise up to which every smaller noise passes)\n")
	for _, bd := range rep.Breakdown {
		fmt.Fprintf(&b, "  %s (%s):\n", bd.Class, bd.Criterion)
		for _, sw := range bd.Sizes {
			var marks []string
			for i, n := range sw.Sizes {
				marks = append(marks, fmt.Sprintf("%d%s", n, plus(sw.Pass[i])))
			}
			lim := "none"
			if sw.Smallest > 0 {
				lim = fmt.Sprintf("≥ %d sites", sw.Smallest)
			}
			fmt.Fprintf(&b, "    sizes at noise %.1f%%: %-14s  %s\n", 100*sw.Noise, lim, strings.Join(marks, " "))
		}
		if ns := bd.Noise; ns != nil {
			var marks []string
			for i, v := range ns.Noises {
				marks = append(marks, fmt.Sprintf("%g%%%s", 100*v, plus(ns.Pass[i])))
			}
			lim := "none"
			if ns.Largest >= 0 {
				lim = fmt.Sprintf("≤ %g%%", 100*ns.Largest)
			}
			fmt.Fprintf(&b, "    noise at %d sites:   %-14s  %s\n", ns.Sites, lim, strings.Join(marks, " "))
		}
	}
	b.WriteString("\n")

	b.WriteString("Angle precision\n")
	ec := rep.Exact
	fmt.Fprintf(&b, "  noise-free circles, 2000 sites, |angle error| ≤ %g: %s\n", ec.Goal, verdict(ec.Pass))
	for _, e := range ec.Cases {
		note := ""
		if !e.Decisive {
			note = fmt.Sprintf(" (not decisive: the true angle is known to ±%.1e)", e.Reference)
		}
		fmt.Fprintf(&b, "    %-34s %-10s error %s  %s%s\n", e.Name, e.Reported, fmtE(e.Error), verdict(e.Pass), note)
	}
	for _, c := range rep.CRB {
		fmt.Fprintf(&b, "  one harmonic, N = %d, a = %g, θ = √2−1, σ = %g%%: %d/%d draws circle; RMSE %.3e ± %.1e (bias %.1e), √CRB %.3e (with trend %.3e), RMSE/√CRB %.2f, goal ≤ %g: %s\n",
			c.Sites, c.Amplitude, 100*c.Sigma, c.Circles, c.Draws, c.RMSE, c.RMSEStd, c.Bias, c.SqrtCRB, c.SqrtCRBx, c.Ratio, c.Goal, verdict(c.Pass))
		fmt.Fprintf(&b, "    mean reported uncertainty %.3e, %.2f × the RMSE\n", c.MeanUnc, c.UncRatio)
		for _, m := range c.Misses {
			fmt.Fprintf(&b, "    not a circle: %s\n", m)
		}
	}
	if rep.Quick {
		b.WriteString("    (quick: too few draws for a firm verdict; the goal asks for ≥ 50)\n")
	}
	cal := rep.Calib
	fmt.Fprintf(&b, "  error/uncertainty over %d correctly classified noisy circle and torus cases: median %.2f, %.0f%% ≤ 2, %.0f%% ≤ 3, largest %.2f (%s)\n",
		cal.Cases, cal.Median, 100*cal.Below2, 100*cal.Below3, cal.Largest, cal.Worst)
	tc := rep.Timing
	fmt.Fprintf(&b, "\nTiming: analyze of %d sites (circle, 1%% noise), median of %d runs %.3f s (runs %s), goal < %g s: %s\n",
		tc.Sites, len(tc.Runs), tc.Median, fmtList(tc.Runs), tc.Goal, verdict(tc.Pass))
	_, err := io.WriteString(w, b.String())
	return err
}

func plus(ok bool) string {
	if ok {
		return "+"
	}
	return "-"
}
