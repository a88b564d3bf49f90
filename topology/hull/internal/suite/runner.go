package main

import (
	"cmp"
	"encoding/json"
	"fmt"
	"math"
	"slices"
	"time"

	"phasonhull/pattern/design"
	"phasonhull/topology"
	"phasonhull/topology/hull"
)

// Outcome is what the analysis made of one case.
type Outcome struct {
	Case     Case       `json:"case"`
	Sites    int        `json:"sites"`
	Reported hull.Class `json:"reported_class"`
	Period   int        `json:"reported_period,omitempty"`
	// Components is the number of components the analysis reports for a
	// hull with angles (hull.components of its JSON form; 0 for one).
	Components int     `json:"reported_components,omitempty"`
	Betti      []int   `json:"betti"`
	Confidence float64 `json:"confidence"`
	// Correct: the true class (and period) was reported. FalseHull: a
	// negative case (cantor, disordered) was given a point, finite, circle
	// or torus hull.
	Correct   bool `json:"correct"`
	FalseHull bool `json:"false_hull,omitempty"`
	// ConfidentWrong: a class was named and it is wrong (class, period or
	// components), or its angles miss the truth by more than
	// wrongAngleFactor stated uncertainties; Wrong says which.
	ConfidentWrong bool   `json:"confident_wrong"`
	Wrong          string `json:"wrong,omitempty"`
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
	// Rotation is a plane's reported A; BasisRatio the largest error of
	// its lattice basis in stated uncertainties (nil for a chain).
	Rotation   [][]float64 `json:"rotation,omitempty"`
	BasisRatio *float64    `json:"basis_error_over_uncertainty,omitempty"`
	Seconds    float64     `json:"seconds"`
	Barcode    Barcode     `json:"barcode"`
	Reason     string      `json:"reason"`
	Err        string      `json:"error,omitempty"`
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
	Seed      uint64    `json:"seed"`
	Quick     bool      `json:"quick"`
	Plane     bool      `json:"plane,omitempty"`
	Confusion Confusion `json:"confusion"`
	// ConfidentWrong counts the confident wrong answers; FalseCalls gives
	// their rate at each size.
	ConfidentWrong int         `json:"confident_wrong_answers"`
	FalseCalls     []FalseCall `json:"false_calls_by_size"`
	Outcomes       []Outcome   `json:"cases"`
	Breakdown      []Breakdown `json:"breakdown"`
	Exact          ExactCheck  `json:"exact_angles"`
	CRB            []CRBCheck  `json:"cramer_rao"`
	Calib          Calibration `json:"uncertainty_calibration"`
	Timing         TimingCheck `json:"timing"`
	Seconds        float64     `json:"total_seconds"`
}

// Confusion counts cases by true hull (rows) and reported hull
// (columns). A hull of p > 1 components with angles is labelled with its
// class and ×p ("circle×2": two circles); a finite hull is "finite"
// whatever its period.
type Confusion struct {
	Rows   []string `json:"true"`
	Cols   []string `json:"reported"`
	Counts [][]int  `json:"counts"`
	// Correct and Wrong count, per row, the correct answers and the
	// confident wrong ones.
	Correct []int `json:"correct"`
	Wrong   []int `json:"confident_wrong"`
}

// FalseCall is the rate of confident wrong answers among the cases of one
// size (sites before perturbation).
type FalseCall struct {
	Sites int     `json:"sites"`
	Cases int     `json:"cases"`
	Wrong int     `json:"confident_wrong"`
	Rate  float64 `json:"rate"`
}

// wrongAngleFactor: an angle misses the truth confidently when its error
// exceeds this many stated uncertainties (beyond the reference's own
// precision and rounding, angleSlack).
const (
	wrongAngleFactor = 5
	angleSlack       = 1e-12
)

// Run builds the grid, analyses every case in order and runs the precision
// checks.
func Run(cfg Config) (*Report, error) {
	start := time.Now()
	if cfg.Plane {
		return runPlanes(cfg, start)
	}
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
	rep.ConfidentWrong, rep.FalseCalls = falseCalls(rep.Outcomes)
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

// runPlanes runs the two-dimensional families and their summaries.
func runPlanes(cfg Config, start time.Time) (*Report, error) {
	rep := &Report{Seed: cfg.Seed, Quick: cfg.Quick, Plane: true}
	for _, c := range planeGrid(cfg) {
		o, err := runPlaneCase(c, cfg.Seed)
		if err != nil {
			return nil, err
		}
		rep.Outcomes = append(rep.Outcomes, o)
	}
	rep.Confusion = confusion(rep.Outcomes)
	rep.ConfidentWrong, rep.FalseCalls = falseCalls(rep.Outcomes)
	rep.Seconds = time.Since(start).Seconds()
	return rep, nil
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
	if o.Components, err = reportedComponents(r.Hull); err != nil {
		return Outcome{}, fmt.Errorf("case %s: %w", c.Name, err)
	}
	o.Barcode = barcodeOf(r)
	if r.Disorder != nil {
		v := r.Disorder.Relative
		o.Residual = &v
	}
	o.assess(r.AngleUncertainty)
	return o, nil
}

// assess compares what was reported (class, period, components, angles
// with their uncertainties) with the truth of the case: it sets Correct,
// FalseHull, the angle error and its ratio, and ConfidentWrong with what
// was wrong.
func (o *Outcome) assess(angleUnc []float64) {
	c := o.Case
	right := o.Reported == c.Class && max(o.Components, 1) == max(c.Components, 1)
	if c.Class == hull.Point || c.Class == hull.Finite {
		right = right && o.Period == c.Period
	}
	o.Correct = right || c.Undecidable() && o.Reported == hull.Unresolved
	if c.Class == cantor || c.Class == disordered {
		switch o.Reported {
		case hull.Point, hull.Finite, hull.Circle, hull.Torus, torus3:
			o.FalseHull = true
		}
	}
	if named := o.Reported != hull.Unresolved && o.Reported != failed; named && !right {
		o.ConfidentWrong = true
		o.Wrong = fmt.Sprintf("named %s, the hull is %s", label(o.Reported, o.Period, o.Components), label(c.Class, c.Period, c.Components))
	}
	switch {
	case len(c.Angles) > 0 && len(o.Angles) == len(c.Angles):
		e := angleDistance(c.Angles, o.Angles, max(c.Components, 1))
		var v float64
		for _, u := range angleUnc {
			v += u * u
		}
		u := math.Sqrt(v)
		o.AngleError, o.Uncertainty = &e, &u
		if u > 0 {
			q := e / u
			o.Ratio = &q
		}
		if right && e > wrongAngleFactor*u+c.AngleRef+angleSlack {
			o.ConfidentWrong = true
			o.Wrong = fmt.Sprintf("angles %s miss the true %s by %.2g, %.3g stated uncertainties", fmtList(o.Angles), fmtList(c.Angles), e, e/u)
		}
	case right && len(c.Angles) > 0 && c.Class != cantor:
		o.ConfidentWrong = true
		o.Wrong = fmt.Sprintf("%d angles reported for a hull of %d", len(o.Angles), len(c.Angles))
	}
}

// reportedComponents reads the number of components of the reported hull
// with angles from its JSON form ("components"; absent or 0 stands for
// one), the form the analysis documents it in. A hull without angles
// (torus_dimension 0: point, finite) carries its p as the period.
func reportedComponents(h hull.Hull) (int, error) {
	js, err := json.Marshal(h)
	if err != nil {
		return 0, fmt.Errorf("the hull does not marshal: %w", err)
	}
	var shape struct {
		Components int `json:"components"`
		Dimension  int `json:"torus_dimension"`
	}
	if err := json.Unmarshal(js, &shape); err != nil {
		return 0, fmt.Errorf("the hull's JSON form does not read back: %w", err)
	}
	if shape.Components == 1 || shape.Dimension == 0 {
		return 0, nil
	}
	return shape.Components, nil
}

// label names a hull for the confusion matrix and the case rows: the class,
// with ×p for p > 1 components of a hull with angles, and the period of a
// finite one where it is given.
func label(c hull.Class, period, components int) string {
	switch {
	case c == hull.Finite && period > 0:
		return fmt.Sprintf("finite/%d", period)
	case components > 1:
		return fmt.Sprintf("%s×%d", c, components)
	}
	return string(c)
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
		p := bar.Persistence()
		switch {
		case bar.Dim == 1 && len(b.H1) < 4:
			b.H1 = append(b.H1, p)
		case bar.Dim == 2 && len(b.H2) < 3:
			b.H2 = append(b.H2, p)
		}
	}
	return b
}

// angleDistance is |a − b| for one angle each (both folded) on a hull of
// one component; otherwise it is the smallest tolerance at which
// topology.SameModule accepts the two bases with coefficients up to
// hull.DefaultMaxCoeff, by bisection (acceptance only grows with the
// tolerance). Any basis of the right module is a correct answer, so bases
// are never compared entry by entry. On p components the module is
// (1/p)Z + Zθ_1 + ...: both bases are scaled by p, which makes it
// Z + Z·pθ_1 + ..., and the distance scaled back.
func angleDistance(a, b []float64, p int) float64 {
	if len(a) == 1 && p == 1 {
		return math.Abs(topology.Fold(a[0]) - topology.Fold(b[0]))
	}
	if p > 1 {
		scale := func(v []float64) []float64 {
			out := make([]float64, len(v))
			for i, x := range v {
				out[i] = float64(p) * x
			}
			return out
		}
		return angleDistance(scale(a), scale(b), 1) / float64(p)
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
	type key struct {
		class      hull.Class
		components int
	}
	order := func(classes []hull.Class, keys map[key]bool) []key {
		var ks []key
		for _, c := range classes {
			ks = append(ks, key{c, 0})
		}
		for k := range keys {
			if k.components > 1 {
				ks = append(ks, k)
			}
		}
		slices.SortStableFunc(ks, func(x, y key) int {
			return cmp.Or(cmp.Compare(slices.Index(classes, x.class), slices.Index(classes, y.class)), cmp.Compare(x.components, y.components))
		})
		return ks
	}
	rowKey := func(o Outcome) key {
		if o.Case.Class == hull.Finite {
			return key{hull.Finite, 0}
		}
		return key{o.Case.Class, o.Case.Components}
	}
	colKey := func(o Outcome) key {
		r := o.Reported
		if !slices.Contains(reportedClasses, r) {
			r = failed
		}
		if r == hull.Finite {
			return key{r, 0}
		}
		return key{r, o.Components}
	}
	rowSet, colSet := map[key]bool{}, map[key]bool{}
	for _, o := range out {
		rowSet[rowKey(o)], colSet[colKey(o)] = true, true
	}
	rows, cols := order(trueClasses, rowSet), order(reportedClasses, colSet)
	var cf Confusion
	for _, k := range rows {
		cf.Rows = append(cf.Rows, label(k.class, 0, k.components))
	}
	for _, k := range cols {
		cf.Cols = append(cf.Cols, label(k.class, 0, k.components))
	}
	cf.Counts = make([][]int, len(rows))
	for i := range cf.Counts {
		cf.Counts[i] = make([]int, len(cols))
	}
	cf.Correct, cf.Wrong = make([]int, len(rows)), make([]int, len(rows))
	for _, o := range out {
		i := slices.Index(rows, rowKey(o))
		cf.Counts[i][slices.Index(cols, colKey(o))]++
		if o.Correct {
			cf.Correct[i]++
		}
		if o.ConfidentWrong {
			cf.Wrong[i]++
		}
	}
	return cf
}

// falseCalls counts the confident wrong answers, in all and by size.
func falseCalls(out []Outcome) (int, []FalseCall) {
	bySize := map[int]*FalseCall{}
	total := 0
	for _, o := range out {
		n := o.Case.size()
		if bySize[n] == nil {
			bySize[n] = &FalseCall{Sites: n}
		}
		bySize[n].Cases++
		if o.ConfidentWrong {
			bySize[n].Wrong++
			total++
		}
	}
	var fc []FalseCall
	for _, f := range bySize {
		f.Rate = float64(f.Wrong) / float64(f.Cases)
		fc = append(fc, *f)
	}
	slices.SortFunc(fc, func(x, y FalseCall) int { return cmp.Compare(x.Sites, y.Sites) })
	return total, fc
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
	for _, class := range sweepClasses {
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
			slices.SortStableFunc(pts, func(x, y pt) int { return cmp.Compare(x.noise, y.noise) })
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
