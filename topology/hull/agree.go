package hull

import (
	"context"
	"fmt"
	"math"
	"slices"

	"phasonhull/topology"
	"phasonhull/topology/notation"
	"phasonhull/topology/shortchain"
	"phasonhull/topology/tones"
)

// pd returns p and d of a verdict's hull of p components × a d-torus, and
// false for the classes without that form or read through the tile word.
func (v *verdict) pd() (p, d int, ok bool) {
	ci := info(v.class)
	if ci.TorusDimension < 0 || v.word {
		return 0, 0, false
	}
	p = v.components
	if p == 0 {
		p = max(v.period, 1)
	}
	return p, ci.TorusDimension, true
}

// algebraCheck compares the verdict with the algebraic reading of the
// spacings (package tones): the strong spectral lines, the rational part
// 1/p and the rank d of the module they generate. A class of p components
// × a d-torus stands only when the two readings agree: the lines give the
// same p and d, or every line lies in the module (1/p)Z + Zθ1 + … + Zθd of
// the verdict's measured angles (within three standard errors, with
// coefficients up to maxLineCoeff) and the lines use every angle (see
// inModule). Otherwise the chain is unresolved and the reason says what
// each reading found. It runs after the angles are measured and checked.
func (a *analysis) algebraCheck(ctx context.Context, v *verdict) (*verdict, error) {
	p, d, ok := v.pd()
	if !ok {
		return v, nil
	}
	u := a.filledSpacings()
	if len(u) < tones.MinSpacings {
		return v, nil // too short for lines; the short-chain check decides
	}
	r, err := tones.Read(ctx, u, tones.Options{Seed: a.opt.Seed})
	if err != nil {
		return nil, fmt.Errorf("algebraic reading: %w", err)
	}
	a.tones = r
	if r.Period == p && r.Rank == d {
		return v, nil
	}
	if len(a.res.Angles) == d && inModule(resolvedLines(r.Lines), p, a.res.Angles, a.res.AngleUncertainty, len(u)) {
		return v, nil
	}
	// A line too imprecise to place in the module leaves the reading
	// partial: its period divides the true one and its rank is at most
	// the true one (package tones). A partial reading that allows the
	// verdict's p and d does not contradict it: the verdict stands, with
	// a warning that the lines do not establish it.
	if partial(r) && p%r.Period == 0 && r.Rank <= d {
		a.res.Warnings = append(a.res.Warnings, fmt.Sprintf("the spectral lines of the spacings allow %s but do not establish it (%s)", torusHullPD(p, d), r.Reason))
		return v, nil
	}
	a.res.Angles, a.res.AngleUncertainty, a.res.AngleMethod = []float64{}, []float64{}, ""
	a.res.Trace.Coordinates = nil
	a.res.Disorder, a.res.SiteResiduals = nil, nil
	return &verdict{class: Unresolved, betti: v.betti, confidence: v.confidence, band: v.band,
		reason: fmt.Sprintf("the two readings disagree: the %s reads %s, the spectral lines of the spacings read %s (%s); more sites or less noise would decide", v.source(), torusHullPD(p, d), torusHullPD(r.Period, r.Rank), r.Reason)}, nil
}

// Placing a line in the verdict's module: coefficients up to
// maxLineCoeff are tried, smallest Σ|m_i| first, but a match at order k
// counts only while the chance that a frequency drawn at random in
// (0, ½] falls within the tolerance of one of the candidates of order ≤ k
// stays below lineChance (a look-elsewhere bound: candidates × 2·tol / ½).
// The tolerance is three combined standard errors plus a hundredth of the
// Rayleigh resolution 1/L, which covers the bias that lines too weak to
// fit leave on the others.
const (
	maxLineCoeff = 30
	lineChance   = 0.01
)

// inModule tells whether every line lies in (1/p)Z + Σ Zθ_i, up to sign and
// mod 1, within the tolerance (see maxLineCoeff); and whether the
// coefficient vectors m of the lines span all d angles (the lines show
// every angle the verdict names, rank d). L is the length of the chain in
// sites.
func inModule(lines []tones.Line, p int, theta, thetaErr []float64, L int) bool {
	d := len(theta)
	var used [][]int
	for _, l := range lines {
		found := false
		candidates := 0
		forEachVector(d, maxLineCoeff, func(m []int) bool {
			var g, ge float64
			for i, c := range m {
				g += float64(c) * theta[i]
				ge += math.Abs(float64(c)) * thetaErr[i]
			}
			tol := 3*(l.FreqErr+ge) + 0.01/float64(L)
			candidates += p
			if float64(candidates)*4*tol > lineChance {
				return false
			}
			for j := range p {
				if math.Abs(topology.Fold(g+float64(j)/float64(p))-l.Freq) <= tol {
					found = true
					used = append(used, slices.Clone(m))
					return false
				}
			}
			return true
		})
		if !found {
			return false
		}
	}
	return topology.IntRank(used, d) == d
}

// forEachVector calls fn with every integer vector of length d and entries
// in [−M, M], smallest Σ|m_i| first, until fn returns false.
func forEachVector(d, M int, fn func(m []int) bool) {
	m := make([]int, d)
	for total := 0; total <= d*M; total++ {
		var walk func(i, left int) bool
		walk = func(i, left int) bool {
			if i == d {
				return left != 0 || fn(m)
			}
			for v := -min(left, M); v <= min(left, M); v++ {
				m[i] = v
				if !walk(i+1, left-abs(v)) {
					return false
				}
			}
			return true
		}
		if !walk(0, total) {
			return
		}
	}
}

// source names the reading behind a verdict.
func (v *verdict) source() string {
	if v.betti != nil {
		return fmt.Sprintf("barcodes (Betti %s)", notation.Tuple(v.betti))
	}
	return "spacing test"
}

// torusHullPD names p components × a d-torus in words.
func torusHullPD(p, d int) string {
	switch {
	case d == 0 && p == 1:
		return "a point (one site per period)"
	case d == 0:
		return fmt.Sprintf("%d points (period %d)", p, p)
	}
	return torusHull(p, d)
}

// shortSites is the size below which a chain is read by the calibrated
// short-chain decision (package shortchain) as well: the barcodes and the
// noise measured from the same few spacings are not calibrated there.
const shortSites = 200

// shortCheck: a chain below shortSites sites must also be read so by the
// calibrated short-chain decision (package shortchain), whose false-call
// rate was measured by simulation; a class it does not establish is not
// called, and when it cannot decide, the reason gives the smallest size
// that would.
func (a *analysis) shortCheck(ctx context.Context, v *verdict) (*verdict, error) {
	if a.p.Len() >= shortSites || v.word || v.class == Cantor {
		return v, nil
	}
	if a.p.Len() < shortchain.Smallest {
		a.res.Angles, a.res.AngleUncertainty, a.res.AngleMethod = []float64{}, []float64{}, ""
		return &verdict{class: Unresolved, betti: v.betti, confidence: v.confidence, band: v.band,
			reason: fmt.Sprintf("%d sites are too few for any calibrated decision: at least %d sites would decide", a.p.Len(), shortchain.Smallest)}, nil
	}
	run := a.cleanRun()
	if len(run) < shortchain.Smallest {
		a.res.Angles, a.res.AngleUncertainty, a.res.AngleMethod = []float64{}, []float64{}, ""
		return &verdict{class: Unresolved, betti: v.betti, confidence: v.confidence, band: v.band,
			reason: fmt.Sprintf("the longest run of consecutive sites without a missing, spurious or outlying site has %d sites, too few for a calibrated decision on a chain of %d sites: at least %d clean consecutive sites would decide", len(run), a.p.Len(), shortchain.Smallest)}, nil
	}
	dec, err := shortchain.Decide(ctx, run, shortchain.Options{})
	if err != nil {
		return nil, fmt.Errorf("short-chain decision: %w", err)
	}
	said := fmt.Sprintf("the short-chain test (calibrated false-call rate %.2g%%) reads %s: %s", 100*dec.FalseCallRate, shortKind(dec), dec.Reason)
	if dec.Kind == shortchain.Undecided {
		need := "more sites"
		if dec.MinSites > 0 {
			need = fmt.Sprintf("at least %d sites at the measured noise", dec.MinSites)
		}
		if v.class == Unresolved {
			v.reason += fmt.Sprintf("; the short-chain test cannot decide either: %s would", need)
			return v, nil
		}
		a.res.Angles, a.res.AngleUncertainty, a.res.AngleMethod = []float64{}, []float64{}, ""
		return &verdict{class: Unresolved, betti: v.betti, confidence: v.confidence, band: v.band,
			reason: fmt.Sprintf("%d sites are too few to establish %s: the short-chain test cannot decide (%s); %s would decide", a.p.Len(), v.class, dec.Reason, need)}, nil
	}
	if v.class == Unresolved {
		v.reason += "; " + said
		return v, nil
	}
	if agrees(v, dec, a.res) {
		v.reason += "; " + said
		v.confidence = math.Min(v.confidence, 1-dec.FalseCallRate)
		return v, nil
	}
	a.res.Angles, a.res.AngleUncertainty, a.res.AngleMethod = []float64{}, []float64{}, ""
	return &verdict{class: Unresolved, betti: v.betti, confidence: v.confidence, band: v.band,
		reason: fmt.Sprintf("the readings disagree on %d sites: the analysis reads %s, but %s; more sites would decide", a.p.Len(), v.class, said)}, nil
}

// cleanRun returns the positions of the longest run of consecutive sites
// (site indices one apart) with no spurious site and no site the angle fit
// left out as an outlier: the short-chain decision assumes a chain whose
// sites differ from its model by position noise only.
func (a *analysis) cleanRun() []float64 {
	bad := map[int]bool{}
	for _, n := range a.outliers {
		bad[n] = true
	}
	var best, cur []float64
	prev := -2
	for j, x := range a.p.Positions {
		if a.spurious[j] || bad[a.index[j]] {
			cur, prev = nil, -2
			continue
		}
		if a.index[j] != prev+1 {
			cur = nil
		}
		cur = append(cur, x)
		prev = a.index[j]
		if len(cur) > len(best) {
			best = cur
		}
	}
	return best
}

// shortKind names a short-chain decision.
func shortKind(d shortchain.Decision) string {
	switch d.Kind {
	case shortchain.Cell:
		return fmt.Sprintf("a periodic cell of %d sites", d.Period)
	case shortchain.Harmonic:
		return fmt.Sprintf("a harmonic modulation of angle %.4g ± %.2g", d.Angle, d.AngleErr)
	case shortchain.Lattice:
		return "a lattice with position noise"
	case shortchain.Independent:
		return "independent spacings"
	}
	return string(d.Kind)
}

// agrees tells whether the short-chain decision names the verdict's hull:
// a lattice a point, a cell of p sites a finite hull of period p,
// independent spacings a disordered chain, and a harmonic modulation a
// circle whose measured angle lies within three combined uncertainties of
// the decision's.
func agrees(v *verdict, d shortchain.Decision, res *Result) bool {
	switch d.Kind {
	case shortchain.Lattice:
		return v.class == Point
	case shortchain.Cell:
		return v.class == Finite && v.period == d.Period
	case shortchain.Independent:
		return v.class == Disordered
	case shortchain.Harmonic:
		if v.class != Circle || max(v.components, 1) != 1 || len(res.Angles) != 1 {
			return false
		}
		diff := math.Abs(res.Angles[0] - topology.Fold(d.Angle))
		return diff <= 3*math.Hypot(res.AngleUncertainty[0], d.AngleErr)
	}
	return false
}

// filledSpacings returns the dimensionless spacings by site index, a
// spacing across k missing sites split into k + 1 equal ones and spurious
// sites left out, so that spacing i belongs to site index i.
func (a *analysis) filledSpacings() []float64 {
	var out []float64
	prev := -1
	for j, pos := range a.p.Positions {
		if a.spurious[j] {
			continue
		}
		if prev >= 0 {
			steps := a.index[j] - a.index[prev]
			gap := (pos - a.p.Positions[prev]) / a.res.MeanSpacing
			for range max(steps, 1) {
				out = append(out, gap/float64(max(steps, 1)))
			}
		}
		prev = j
	}
	return out
}

// minLineAmp is the smallest line amplitude, in mean spacings, the
// comparison of the readings takes into account: a millionth of the mean
// spacing, which no measurement resolves (embed.AbsoluteCut is the same
// bound on a variance); weaker lines of exact data are rounding.
const minLineAmp = 1e-6

// resolvedLines returns the lines of amplitude at least minLineAmp.
func resolvedLines(lines []tones.Line) []tones.Line {
	var out []tones.Line
	for _, l := range lines {
		if l.Amp >= minLineAmp {
			out = append(out, l)
		}
	}
	return out
}

// partial tells whether a reading left a line out of the module (a line
// without integer coordinates): its period and rank are then lower bounds.
func partial(r *tones.Reading) bool {
	for i := range r.Lines {
		if i >= len(r.Coeffs) || r.Coeffs[i] == nil {
			return true
		}
	}
	return false
}
