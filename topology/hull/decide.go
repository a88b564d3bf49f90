package hull

import (
	"context"
	"fmt"
	"math"
	"phasonhull/topology/notation"
	"strings"
)

// verdict is a rule's proposal of a class, with what Result.Hull reports
// about it.
type verdict struct {
	class  Class
	period int
	// components is p of a hull of p components × a d-torus (0: one, or
	// the period for point and finite).
	components int
	// word marks a verdict read through the tile word: the checks of the
	// readings of continuous modulations leave it alone.
	word bool
	// betti nil means the class's own (see ClassInfo); the barcode rules
	// give the numbers they read.
	betti      []int
	confidence float64
	band       []float64
	reason     string
}

// rule looks at the analysis and proposes a verdict, or nil to leave the
// decision to the rules after it. A rule may record what it measured on
// the way (warnings, the tiling, a disorder figure), never the class: the
// class is set in one place, decide.
type rule func(a *analysis, ctx context.Context) (*verdict, error)

// rules is the decision list, in order; the first verdict stands.
var rules = []rule{
	// An exact period of the spacings: point or finite (or, for equal
	// spacings that vary independently, disordered).
	(*analysis).periodRule,
	// A tiling of a few tile lengths, read through its word: finite,
	// cantor, disordered; a word too short to tell leaves it undecided,
	// and the delay-cloud rules after it do not run.
	(*analysis).tilingRule,
	// From here on the class rests on the delay cloud; this rule decides
	// nothing and only reports what the cloud was built around.
	(*analysis).cloudWarnings,
	// No direction above the noise floor: point (or disordered).
	(*analysis).noiseOnlyRule,
	// Barcodes of the cloud: the class whose Betti numbers they show
	// (circle, torus); otherwise undecided.
	(*analysis).barcodeRule,
	// Undecided so far; a lattice shaken beyond the noise tolerance:
	// point.
	(*analysis).shakenLatticeRule,
	// Spacings that carry no information about their neighbours, filling
	// every direction of the window: disordered.
	(*analysis).disorderRule,
	// Nothing decided: the undecided verdict, unresolved, with what would
	// decide.
	(*analysis).unresolvedRule,
}

// check examines the verdict of the decision list and confirms it (it
// returns v) or overrules it with an unresolved verdict saying what each
// reading found. Like a rule it never sets the class itself.
type check func(a *analysis, ctx context.Context, v *verdict) (*verdict, error)

// checks run, in order, on the first verdict of the decision list: a
// class stands only when every check confirms it.
var checks = []check{
	// A class with angles: the angles measured on it must reproduce the
	// positions (the model check), else neither angles nor class.
	(*analysis).anglesCheck,
	// A hull of p components × a d-torus: the spectral lines of the
	// spacings must show the same p and d (the algebraic reading).
	(*analysis).algebraCheck,
	// A chain of fewer than shortSites sites: the calibrated short-chain
	// decision must name the same hull.
	(*analysis).shortCheck,
}

// decide walks the decision list, runs the checks on the first verdict
// and sets the class from what stands: the one place where Result.Hull is
// set.
func (a *analysis) decide(ctx context.Context) error {
	for _, r := range rules {
		if err := ctx.Err(); err != nil {
			return err
		}
		v, err := r(a, ctx)
		if err != nil {
			return err
		}
		if v == nil {
			continue
		}
		for _, c := range checks {
			if err := ctx.Err(); err != nil {
				return err
			}
			if v, err = c(a, ctx, v); err != nil {
				return err
			}
		}
		a.res.setHull(v)
		return nil
	}
	panic("hull: the decision list ended without a verdict")
}

// setHull sets Result.Hull from the verdict that stood: the one place
// where the class of a chain or a plane is set.
func (r *Result) setHull(v *verdict) {
	ci := info(v.class)
	p, d := v.components, ci.TorusDimension
	if p == 0 {
		p = max(v.period, 1)
	}
	if d < 0 {
		p, d = 0, 0
	}
	betti := v.betti
	if betti == nil {
		betti = ci.betti(p)
	}
	r.Hull = Hull{Class: v.class, Betti: betti, Period: v.period, Components: p, TorusDimension: d, Confidence: v.confidence, ScaleBand: v.band, Reason: v.reason}
}

// planeRule and planeCheck are rule and check for a plane
// (AnalyzePlane).
type (
	planeRule  func(a *planeAnalysis, ctx context.Context) (*verdict, error)
	planeCheck func(a *planeAnalysis, ctx context.Context, v *verdict) (*verdict, error)
)

// planeRules is the decision list of a plane, in order; the first verdict
// stands. The algebraic reading of the displacement field (its spectral
// lines) and the barcodes of the patch cloud must agree before a class
// with angles stands.
var planeRules = []planeRule{
	// No spectral line above the noise: point (a shaken lattice), or
	// disordered when the scatter washes the lattice out, unresolved in
	// between.
	(*planeAnalysis).flatFieldRule,
	// Every line rational and the displacements repeating over the period
	// lattice: finite, with the supercell index as the period.
	(*planeAnalysis).supercellRule,
	// Barcodes of the patch cloud naming a d-torus, d the rank of the
	// lines: circle, torus, torus3; otherwise undecided.
	(*planeAnalysis).patchBarcodeRule,
	// Nothing decided: unresolved, with what would decide.
	(*planeAnalysis).planeUnresolvedRule,
}

// planeChecks run, in order, on the first verdict of planeRules.
var planeChecks = []planeCheck{
	// A class with angles: the rotation matrix fitted to the displacement
	// field must reproduce it within the measured noise, else neither A
	// nor class.
	(*planeAnalysis).rotationCheck,
}

// decide walks the plane's decision list and checks and sets the class
// from what stands.
func (a *planeAnalysis) decide(ctx context.Context) error {
	for _, r := range planeRules {
		if err := ctx.Err(); err != nil {
			return err
		}
		v, err := r(a, ctx)
		if err != nil {
			return err
		}
		if v == nil {
			continue
		}
		for _, c := range planeChecks {
			if err := ctx.Err(); err != nil {
				return err
			}
			if v, err = c(a, ctx, v); err != nil {
				return err
			}
		}
		a.res.setHull(v)
		return nil
	}
	panic("hull: the plane's decision list ended without a verdict")
}

// anglesCheck measures the angles of a class with angles (see
// measureAngles) and keeps the class only when they pass the model check.
func (a *analysis) anglesCheck(ctx context.Context, v *verdict) (*verdict, error) {
	ci := info(v.class)
	if ci.angles == 0 || a.reading == nil {
		return v, nil
	}
	why, err := a.measureAngles(ctx, ci.angles, max(v.components, 1))
	if err != nil {
		return nil, err
	}
	if why == "" {
		why = a.rationalAngle()
	}
	if why == "" {
		return v, nil
	}
	a.res.Angles, a.res.AngleUncertainty, a.res.AngleMethod = []float64{}, []float64{}, ""
	a.res.Trace.Coordinates = nil
	return &verdict{class: Unresolved, betti: v.betti, confidence: v.confidence, band: v.band,
		reason: fmt.Sprintf("the barcodes show %s %s, but %s", torusHull(v.components, ci.angles), notation.Tuple(v.betti), why)}, nil
}

// rationalAngle says why a measured angle does not establish a hull with
// angles when it equals a fraction k/q, q ≤ MaxPeriod, within three of its
// standard uncertainties: a modulation by k/q is periodic with period q
// (a finite hull), and at this precision the two cannot be told apart.
// Empty when no angle is that close to a fraction.
func (a *analysis) rationalAngle() string {
	for i, t := range a.res.Angles {
		tol := 3 * a.res.AngleUncertainty[i]
		for q := 1; q <= a.opt.MaxPeriod; q++ {
			k := math.Round(t * float64(q))
			if d := math.Abs(t - k/float64(q)); d <= tol {
				return fmt.Sprintf("the angle %.6g ± %.2g equals %d/%d within its uncertainty: a periodic chain of period %d and a circle cannot be told apart at this precision; less noise or more sites would decide", t, a.res.AngleUncertainty[i], int(k), q, q)
			}
		}
	}
	return ""
}

// torusHull names p components × a d-torus.
func torusHull(p, d int) string {
	if p <= 1 {
		return torusName(d)
	}
	return fmt.Sprintf("%d copies of %s", p, torusName(d))
}

// periodRule: an exact period of the spacings, checked against the
// positions (see spacingPeriod and cellFits).
func (a *analysis) periodRule(context.Context) (*verdict, error) {
	nu := a.res.Embedding.NoiseVariance
	maxP := min(a.opt.MaxPeriod, len(a.u)/3)
	pt := spacingPeriod(a.indexedSpacings(), nu, maxP)
	if pt.Period == 0 || !a.cellFits(pt.Period, nu) {
		return nil, nil
	}
	a.res.Warnings = append(a.res.Warnings, a.siteWarnings...)
	if pt.Period > 1 {
		return &verdict{class: Finite, period: pt.Period, confidence: 1,
			reason: fmt.Sprintf("the spacings repeat with period %d up to the measured noise (mean squared difference %.3g times its noise expectation)", pt.Period, pt.Ratio)}, nil
	}
	if classifyNoise(a.cleanSpacings()) == independentSpacings {
		return a.independent(), nil
	}
	return &verdict{class: Point, period: 1, confidence: 1,
		reason: "all spacings are equal up to the measured noise: a periodic chain with one site per period"}, nil
}

// cloudWarnings reports what the delay cloud was built around: the sites
// left out and a window that did not settle. It decides nothing.
func (a *analysis) cloudWarnings(context.Context) (*verdict, error) {
	if a.undecided != nil {
		return nil, nil
	}
	a.res.Warnings = append(a.res.Warnings, a.siteWarnings...)
	if c := a.em.Choice; c != nil && !c.Settled {
		a.res.Warnings = append(a.res.Warnings, fmt.Sprintf("the delay window did not settle up to %d: the spacings keep filling new directions, as independent random spacings do", c.Cap))
	}
	return nil, nil
}

// noiseOnlyRule: a cloud with no direction above the noise floor.
func (a *analysis) noiseOnlyRule(context.Context) (*verdict, error) {
	if a.undecided != nil || a.em.Whitened.Kept != 0 {
		return nil, nil
	}
	if classifyNoise(a.cleanSpacings()) == independentSpacings {
		return a.independent(), nil
	}
	return &verdict{class: Point, period: 1, confidence: 1,
		reason: "the delay vectors show no direction above the noise floor: all windows of spacings agree up to noise"}, nil
}

// barcodeRule reads the barcodes of the delay cloud (see readBarcodes) and
// proposes the class whose Betti numbers they show, if any; otherwise the
// chain is undecided with the Betti numbers read.
func (a *analysis) barcodeRule(ctx context.Context) (*verdict, error) {
	if a.undecided != nil {
		return nil, nil
	}
	c := &cloud{points: a.pool, landmarkIdx: a.em.Landmarks, landmarks: a.em.LandmarkCloud, cover: a.em.CoverRadius, components: a.em.Whitened.Kept, noise: a.cloudNoise()}
	r, err := readBarcodes(ctx, c, a.opt)
	if err != nil {
		return nil, err
	}
	a.cloud, a.reading = c, r
	a.em.Landmarks, a.em.LandmarkCloud, a.em.CoverRadius = c.landmarkIdx, c.landmarks, c.cover
	a.res.Embedding.Landmarks, a.res.Embedding.CoverRadius = len(c.landmarkIdx), c.cover
	a.res.Persistence = r.persistence
	var v *verdict
	if ci, p, ok := namedByBetti(r.betti); ok {
		v = &verdict{class: ci.Class, components: p, betti: r.betti[:], confidence: r.confidence, band: r.band, reason: ci.reason}
		if p > 1 {
			v.reason = fmt.Sprintf("%d components, each with %s: the shift visits the components in turn and turns %d copies of %s", p, torusCycles(ci.angles), p, torusName(ci.angles))
		}
		if ci.angles == 1 && p == 1 {
			if second := kthLargest(h1Persistences(r.diagram.Bars), 2); second > r.persistence.Threshold/2 {
				a.res.Warnings = append(a.res.Warnings, fmt.Sprintf("a second loop (persistence %.3g) stands above half the significance threshold %.3g: the hull may be a torus seen through noise; more sites or less noise would decide", second, r.persistence.Threshold))
			}
		}
	}
	if r.confidence < 1 {
		a.res.Warnings = append(a.res.Warnings, fmt.Sprintf("the Betti numbers changed across landmark subsamples (%s): the class is uncertain; more sites or less noise would settle it", tuples(r.persistence.Subsamples)))
	}
	if v == nil {
		a.undecided = &verdict{class: Unresolved, betti: r.betti[:], confidence: r.confidence, band: r.band, reason: unresolvedReason(r.betti)}
	}
	return v, nil
}

// shakenLatticeRule: a chain left undecided whose spacings are those of a
// uniform lattice with position noise beyond the embedding's tolerance is
// a point hull; its scatter about the lattice is the disorder figure. The
// scale band of barcodes read on the way is kept.
func (a *analysis) shakenLatticeRule(context.Context) (*verdict, error) {
	u := a.cleanSpacings()
	if classifyNoise(u) != jitteredLattice || !a.latticeFits(u) {
		return nil, nil
	}
	a.periodicResiduals()
	return &verdict{class: Point, period: 1, confidence: 1, band: a.undecided.band,
		reason: "the spacings are those of a uniform lattice with independent position noise (autocorrelation −1/2 at lag 1, none beyond): a periodic chain with one site per period, shaken"}, nil
}

// disorderRule: spacings that carry no information about their neighbours,
// with delay vectors filling every direction of a window that did not
// settle, are disordered. It sets the disorder figure of a chain without a
// hull model on the way.
func (a *analysis) disorderRule(context.Context) (*verdict, error) {
	a.spacingSpread()
	mi, dim, ok := a.disorderFigures()
	if !ok {
		return nil, nil
	}
	a.res.Disorder.MutualInformation, a.res.Disorder.IntrinsicDimension = mi, dim
	c := a.em.Choice
	if c == nil || c.Settled || a.em.Whitened.Kept != a.em.Window || mi >= independentMI {
		return nil, nil
	}
	u := a.undecided
	return &verdict{class: Disordered, confidence: u.confidence, band: u.band,
		reason: fmt.Sprintf("consecutive spacings share almost no information (%.3f nats) and the delay vectors fill every direction of the window (dimension %.1f of %d): no low-dimensional hull at the resolution of the data", mi, dim, a.em.Window)}, nil
}

// unresolvedRule closes the list: the undecided verdict stands.
func (a *analysis) unresolvedRule(context.Context) (*verdict, error) {
	return a.undecided, nil
}

// independent is the verdict on independent spacings that are nearly
// equal: small enough to pass for noise, but with no trace of a lattice.
// The spread of the spacings is the disorder figure.
func (a *analysis) independent() *verdict {
	a.spacingSpread()
	return &verdict{class: Disordered, confidence: 1,
		reason: "the spacings vary independently of one another (no autocorrelation at any lag): the positions wander from any lattice like a random walk, so there is no hull at all; the spread of the spacings is the disorder"}
}

// torusCycles says what the barcodes show on one component of a d-torus.
func torusCycles(d int) string {
	switch d {
	case 1:
		return "one persistent loop"
	case 2:
		return "two persistent loops and one persistent 2-cycle"
	}
	return "three persistent loops and three persistent 2-cycles"
}

// torusName names the d-torus.
func torusName(d int) string {
	switch d {
	case 1:
		return "a circle"
	case 2:
		return "a two-torus"
	}
	return "a three-torus"
}

// cloudNoise propagates the measured noise variance of one dimensionless
// spacing to the whitened cloud: each kept component is a unit direction
// in the window, along which the noise has about that variance, scaled by
// one over the square root of the component's eigenvalue; the root of the
// sum over the kept components is the displacement of a point.
func (a *analysis) cloudNoise() float64 {
	w := a.em.Whitened
	var s float64
	for k := range w.Kept {
		if w.Spectrum[k] > 0 {
			s += a.em.NoiseVariance / w.Spectrum[k]
		}
	}
	return math.Sqrt(s)
}

// tuples writes lists of Betti numbers as "(1, 1, 0), (1, 2, 1)".
func tuples(v [][]int) string {
	out := make([]string, len(v))
	for i, b := range v {
		out[i] = notation.Tuple(b)
	}
	return strings.Join(out, ", ")
}
