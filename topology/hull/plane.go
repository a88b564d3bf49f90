package hull

import (
	"context"
	"errors"
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat/distuv"

	"phasonhull/embed"
	"phasonhull/pattern/lattice"
	"phasonhull/topology"
	"phasonhull/topology/notation"
)

// defaultPatch is the side of the square window of lattice steps whose
// displacements make one point of the patch cloud of a plane.
const defaultPatch = 3

// LatticeReport is the average lattice of a plane, as AnalyzePlane
// reports it.
type LatticeReport struct {
	// Basis holds a1 = Basis[0] and a2 = Basis[1] as (x, y) in the unit:
	// Lagrange–Gauss reduced and right-handed; BasisUncertainty one
	// standard uncertainty of each component.
	Basis            [2][2]float64 `json:"basis"`
	BasisUncertainty [2][2]float64 `json:"basis_uncertainty"`
	// Sites is the number of sites on the lattice, Missing the lattice
	// points inside the patch with no site, OffLattice the sites on no
	// lattice point.
	Sites      int `json:"sites"`
	Missing    int `json:"missing"`
	OffLattice int `json:"off_lattice"`
}

// planeAnalysis carries the state shared by the steps of AnalyzePlane.
type planeAnalysis struct {
	opt     Options
	l       *lattice.Lattice
	res     *Result
	spacing float64
	f       *field
	lines   []fieldLine
	noise   float64 // variance of one displacement component, in spacings²
	spread  float64 // RMS of one displacement component, in spacings
	mod     *lineModule
	// The patch cloud: corner[i] is the index in f of the site at the
	// corner of the patch behind point i of cloud.points.
	cloud     *cloud
	corner    []int
	reading   *reading
	undecided *verdict
	// resid holds the displacement residuals of the model that stood, per
	// site of f, in spacings; model names it.
	resid [][2]float64
	model string
}

// AnalyzePlane runs the hull analysis of a plane of sites on the average
// lattice l (the lattice's basis, each site's index n and its displacement
// u_n from its lattice point). It stops with an error wrapping ctx.Err()
// once ctx is done. The Result has Dimension 2, the lattice, the class and
// for a circle, torus or three-torus the rotation matrix A with its
// uncertainties; Angles stay empty. Source is left for the caller, who
// knows where the plane came from.
//
// The steps, each reported in the Result:
//
//  1. The displacement field of the sites on the lattice, in units of
//     |a1|, less its mean and linear trend (a basis a little off).
//  2. The algebraic reading (planelines.go): the spectral lines of the
//     field over the 2D index and the Z-module their frequencies generate
//     modulo Z² — its rank d and whether it is rational — and the noise
//     variance of one displacement component from the periodogram floor.
//  3. The patch cloud: for each site n whose w×w window n + e,
//     e ∈ {0…w−1}², lies on the lattice, the vector of the displacements
//     u_{n+e} — the 2D analogue of a delay vector (w = Options.Window,
//     default 3). Raw displacements rather than differences: they are
//     measured from a fitted lattice and carry no drift, and they keep the
//     noise isotropic. The cloud is whitened on the directions above the
//     noise floor and fed to the same landmark, barcode and significance
//     stage as a chain's delay cloud (cloud.go).
//  4. The class, from the ordered rules of decide.go (planeRules): a field
//     with no line (point, or disordered when the scatter washes the
//     lattice out), rational lines (finite, with the index of the period
//     lattice as the period), the barcodes of the patch cloud, which must
//     agree with the rank of the lines (circle, torus, torus3), or
//     unresolved with what would decide.
//  5. The check of a class with angles (rotationCheck): A from the
//     circular coordinates of the patch cloud, refined by a least-squares
//     fit of the displacement field (planefit.go), must reproduce the
//     displacements within the measured noise, else neither A nor class.
//  6. The gap labels from topology.PlaneGenerators.
//
// A is reported with rows the torus coordinates and columns the lattice
// steps a1, a2 of the reported basis, in turns per lattice step. Any
// V·A·U + N with V ∈ GL(d, Z), U ∈ GL(2, Z) and N integer describes the
// same hull; the one reported keeps the lattice's reduced basis (U = 1)
// and is reduced in V and N: each entry in (−½, ½], the rows made as short
// as adding and subtracting other rows makes them, each row's first entry
// non-negative, shortest row first.
func AnalyzePlane(ctx context.Context, l *lattice.Lattice, opt Options) (*Result, error) {
	opt, err := opt.withDefaults()
	if err != nil {
		return nil, fmt.Errorf("plane hull analysis: %w", err)
	}
	if l == nil {
		return nil, errors.New("plane hull analysis: no lattice")
	}
	if err := ctx.Err(); err != nil {
		return nil, fmt.Errorf("plane hull analysis: %w", err)
	}
	if len(l.OnLattice) != len(l.Index) || len(l.Displacement) != len(l.Index) {
		return nil, fmt.Errorf("plane hull analysis: the lattice has %d indices, %d on-lattice flags and %d displacements", len(l.Index), len(l.OnLattice), len(l.Displacement))
	}
	spacing := math.Hypot(l.Basis[0][0], l.Basis[0][1])
	if !(spacing > 0) || math.IsInf(spacing, 0) {
		return nil, fmt.Errorf("plane hull analysis: basis vector a1 = %v has no length", l.Basis[0])
	}
	on := 0
	for _, o := range l.OnLattice {
		if o {
			on++
		}
	}
	res := &Result{
		Schema: Schema, Dimension: 2, Sites: len(l.Index), Unit: l.Unit, MeanSpacing: spacing,
		Notes: append([]string{}, l.Notes...), Warnings: append([]string{}, l.Warnings...),
		Angles: []float64{}, AngleUncertainty: []float64{}, Trace: &Trace{},
		Lattice: &LatticeReport{Basis: l.Basis, BasisUncertainty: l.BasisUncertainty, Sites: on, Missing: l.Missing, OffLattice: len(l.Index) - on},
	}
	a, err := newPlaneAnalysis(ctx, l, opt, res)
	if err != nil {
		return nil, fmt.Errorf("plane hull analysis: %w", err)
	}
	if err := a.decide(ctx); err != nil {
		return nil, fmt.Errorf("plane hull analysis: %w", err)
	}
	a.setResiduals()
	a.labels()
	if a.cloud != nil {
		res.Trace.Cloud, res.Trace.Landmarks = a.cloud.points, a.cloud.landmarkIdx
		res.Trace.Rows = make([]int, len(a.corner))
		for i, c := range a.corner {
			res.Trace.Rows[i] = a.f.site[c]
		}
	}
	if a.reading != nil {
		res.Trace.Bars = a.reading.diagram.Bars
	}
	return res, nil
}

// minPlaneSites is the least number of sites on the lattice AnalyzePlane
// reads, and minPlaneSide the least extent of the index box along each
// basis step.
const (
	minPlaneSites = 16
	minPlaneSide  = 4
)

func newPlaneAnalysis(ctx context.Context, l *lattice.Lattice, opt Options, res *Result) (*planeAnalysis, error) {
	a := &planeAnalysis{opt: opt, l: l, res: res, spacing: res.MeanSpacing, f: &field{}}
	f := a.f
	hi := [2]int{math.MinInt, math.MinInt}
	f.lo = [2]int{math.MaxInt, math.MaxInt}
	for i, n := range l.Index {
		u := l.Displacement[i]
		if !l.OnLattice[i] || math.IsNaN(u[0]+u[1]) || math.IsInf(u[0]+u[1], 0) {
			continue
		}
		f.n = append(f.n, n)
		f.u = append(f.u, [2]float64{u[0] / a.spacing, u[1] / a.spacing})
		f.site = append(f.site, i)
		for j := range 2 {
			f.lo[j], hi[j] = min(f.lo[j], n[j]), max(hi[j], n[j])
		}
	}
	if len(f.n) < minPlaneSites {
		return nil, fmt.Errorf("%d sites on the lattice, need at least %d", len(f.n), minPlaneSites)
	}
	f.size = [2]int{hi[0] - f.lo[0] + 1, hi[1] - f.lo[1] + 1}
	if f.size[0] < minPlaneSide || f.size[1] < minPlaneSide {
		return nil, fmt.Errorf("the sites span %d×%d lattice steps, need at least %d along each", f.size[0], f.size[1], minPlaneSide)
	}
	if err := f.detrend(); err != nil {
		return nil, err
	}
	var ss float64
	for _, u := range f.u {
		ss += u[0]*u[0] + u[1]*u[1]
	}
	a.spread = math.Sqrt(ss / float64(2*len(f.u)))
	var err error
	if a.lines, a.noise, err = readLines(ctx, f); err != nil {
		return nil, err
	}
	a.mod = moduleOf(a.lines, f.size, opt.MaxPeriod)
	if err := a.patchCloud(); err != nil {
		return nil, err
	}
	return a, nil
}

// detrend removes the mean and the linear trend c + B·n of each
// displacement component by least squares.
func (f *field) detrend() error {
	X := mat.NewDense(len(f.n), 3, nil)
	Y := mat.NewDense(len(f.n), 2, nil)
	for i, n := range f.n {
		X.Set(i, 0, 1)
		X.Set(i, 1, float64(n[0]-f.lo[0]))
		X.Set(i, 2, float64(n[1]-f.lo[1]))
		Y.Set(i, 0, f.u[i][0])
		Y.Set(i, 1, f.u[i][1])
	}
	var beta, fit mat.Dense
	if err := beta.Solve(X, Y); err != nil {
		return fmt.Errorf("removing the displacement trend: %w", err)
	}
	fit.Mul(X, &beta)
	for i := range f.u {
		f.u[i][0] -= fit.At(i, 0)
		f.u[i][1] -= fit.At(i, 1)
	}
	return nil
}

// patchCloud builds the whitened patch cloud and its landmarks (see
// AnalyzePlane, step 3). The noise floor of the whitening is the measured
// noise variance of one displacement, raised by the Marchenko–Pastur edge
// (1 + √(k/N))² of the largest eigenvalue of a white cloud of N points in
// k dimensions and by half again for the uncertainty of the measured
// noise.
func (a *planeAnalysis) patchCloud() error {
	w := defaultPatch
	if a.opt.Window > 0 {
		w = a.opt.Window
	}
	f := a.f
	at := make(map[[2]int]int, len(f.n))
	for i, n := range f.n {
		at[n] = i
	}
	k := 2 * w * w
	var rows []float64
	for i, n := range f.n {
		vec := make([]float64, 0, k)
		for e1 := range w {
			for e2 := range w {
				j, ok := at[[2]int{n[0] + e1, n[1] + e2}]
				if !ok {
					break
				}
				vec = append(vec, f.u[j][0], f.u[j][1])
			}
		}
		if len(vec) == k && len(a.corner) < poolSize {
			rows = append(rows, vec...)
			a.corner = append(a.corner, i)
		}
	}
	e := &a.res.Embedding
	e.ChosenWindow, e.Window, e.WindowSettled = w, w, true
	e.NoiseVariance = a.noise
	e.Excluded = len(f.n) - len(a.corner)
	if len(a.corner) < minPlaneSites {
		a.res.Warnings = append(a.res.Warnings, fmt.Sprintf("only %d sites have their whole %d×%d window of lattice steps on the lattice: no patch cloud", len(a.corner), w, w))
		a.corner = nil
		e.Spectrum = []float64{}
		return nil
	}
	N := len(a.corner)
	floor := a.noise * math.Pow(1+math.Sqrt(float64(k)/float64(N)), 2) * 1.5
	wh, err := embed.Whiten(mat.NewDense(N, k, rows), floor)
	if err != nil {
		return err
	}
	e.Spectrum, e.Components, e.Vectors = wh.Spectrum, wh.Kept, len(wh.Cloud)
	c := &cloud{points: wh.Cloud, components: wh.Kept}
	var s float64
	for i := range wh.Kept {
		if wh.Spectrum[i] > 0 {
			s += a.noise / wh.Spectrum[i]
		}
	}
	c.noise = math.Sqrt(s)
	if wh.Kept > 0 {
		idx, cover, err := embed.Landmarks(c.points, a.opt.Landmarks, a.opt.Seed)
		if err != nil {
			return err
		}
		c.landmarkIdx, c.landmarks, c.cover = idx, pick(c.points, idx), cover
		e.Landmarks, e.CoverRadius = len(idx), cover
	}
	a.cloud = c
	return nil
}

// The Debye–Waller factor exp(−4π²σ²) of the first Bragg peaks, σ the RMS
// of one displacement component in spacings, tells a shaken lattice from
// no lattice when the field has no line: at or above shakenDW the lattice
// stands (point), below washedDW it is washed out (disordered), and in
// between the data cannot tell (unresolved).
const (
	shakenDW = 0.5
	washedDW = 0.1
)

// flatFieldRule: no spectral line stands above the noise.
func (a *planeAnalysis) flatFieldRule(context.Context) (*verdict, error) {
	if len(a.lines) > 0 {
		return nil, nil
	}
	dw := math.Exp(-4 * math.Pi * math.Pi * a.spread * a.spread)
	what := fmt.Sprintf("no spectral line of the displacement field stands above the noise floor (false-alarm rate %g per field), and the displacements scatter by %.3g spacings RMS per component (Debye–Waller factor %.2g)", lineFalseAlarm, a.spread, dw)
	switch {
	case dw < washedDW:
		return &verdict{class: Disordered, confidence: 1,
			reason: what + ": the scatter washes the lattice out; no hull at the resolution of the data"}, nil
	case dw < shakenDW:
		return &verdict{class: Unresolved, betti: []int{}, confidence: 1,
			reason: what + ": between a shaken lattice and none; less scatter or a field with lines would decide"}, nil
	case a.cloud != nil && a.cloud.components > 0:
		return nil, nil // the patch cloud sees a direction the lines do not: the barcodes decide
	}
	a.model = "lattice with independent displacements"
	a.resid = a.f.u
	return &verdict{class: Point, period: 1, confidence: 1,
		reason: what + ": a lattice shaken by independent displacements, one site per cell"}, nil
}

// supercellRule: every line at a rational frequency is a periodic pattern
// whose supercell is the period lattice {n : A·n ∈ Z^d}; the displacements
// must repeat over it within the measured noise.
func (a *planeAnalysis) supercellRule(context.Context) (*verdict, error) {
	all, _ := a.mod.rational()
	if len(a.lines) == 0 || !all || a.mod.beyond > 0 {
		return nil, nil
	}
	A := make([][]float64, len(a.mod.basis))
	unc := make([][]float64, len(a.mod.basis))
	Q := 1
	for k, b := range a.mod.basis {
		q := a.mod.denominators[k]
		A[k] = []float64{math.Round(b[0]*float64(q)) / float64(q), math.Round(b[1]*float64(q)) / float64(q)}
		unc[k] = []float64{a.mod.se[k][0], a.mod.se[k][1]}
		Q = lcm(Q, q)
	}
	cell := func(n [2]int) [3]int { // A·n mod 1, in units of 1/Q
		var key [3]int
		for k, r := range A {
			v := int(math.Round(float64(Q) * (r[0]*float64(n[0]) + r[1]*float64(n[1]))))
			key[k] = ((v % Q) + Q) % Q
		}
		return key
	}
	index := supercellIndex(A, Q)
	// The cell means and the linear trend, fitted together by
	// backfitting (the field's trend was removed before the cell was
	// known, which leaves a ramp when the patch is not a whole number of
	// cells).
	resid := slices.Clone(a.f.u)
	var rss float64
	cells := 0
	for range 20 {
		sum := map[[3]int][3]float64{}
		for i, n := range a.f.n {
			s := sum[cell(n)]
			sum[cell(n)] = [3]float64{s[0] + resid[i][0], s[1] + resid[i][1], s[2] + 1}
		}
		cells = len(sum)
		for i, n := range a.f.n {
			s := sum[cell(n)]
			resid[i][0] -= s[0] / s[2]
			resid[i][1] -= s[1] / s[2]
		}
		tf := &field{n: a.f.n, u: resid, lo: a.f.lo}
		if err := tf.detrend(); err != nil {
			return nil, err
		}
		prev := rss
		rss = 0
		for _, r := range resid {
			rss += r[0]*r[0] + r[1]*r[1]
		}
		if math.Abs(prev-rss) <= 1e-12*rss {
			break
		}
	}
	if why := a.withinNoise(rss, 2*cells+4); why != "" {
		return &verdict{class: Unresolved, betti: []int{}, confidence: 1,
			reason: fmt.Sprintf("the spectral lines of the displacement field sit at rational frequencies (a supercell of %d sites), but %s", index, why)}, nil
	}
	a.res.Rotation, a.res.RotationUncertainty = A, unc
	a.resid, a.model = resid, "periodic supercell of the lattice"
	class := Finite
	if index == 1 {
		class = Point
	}
	return &verdict{class: class, period: index, confidence: 1,
		reason: fmt.Sprintf("every spectral line of the displacement field sits at a rational frequency and the displacements repeat over the period lattice {n : A·n ∈ Z^%d} within the measured noise: a periodic plate with a supercell of %d sites", len(A), index)}, nil
}

// supercellIndex returns the index in Z² of the period lattice
// {n : A·n ∈ Z^d} of a rational A with common denominator Q: the number of
// distinct values of A·n mod 1 over n ∈ [0, Q)², since QZ² lies in the
// period lattice.
func supercellIndex(A [][]float64, Q int) int {
	seen := map[[3]int]bool{}
	for n1 := range Q {
		for n2 := range Q {
			var key [3]int
			for k, r := range A {
				v := int(math.Round(float64(Q) * (r[0]*float64(n1) + r[1]*float64(n2))))
				key[k] = ((v % Q) + Q) % Q
			}
			seen[key] = true
		}
	}
	return len(seen)
}

func lcm(a, b int) int {
	x, y := a, b
	for y != 0 {
		x, y = y, x%y
	}
	return a / x * b
}

// withinNoise applies the model check to a fit of the displacement field
// with params parameters and residual sum of squares rss (in spacings²):
// rss over the measured noise variance of one component (floored at
// minModelNoise²) must stay below modelSlack times the 0.999 quantile of
// χ² with 2N − params degrees of freedom, as for a chain (see checkModel).
// It returns why not, empty when it does.
func (a *planeAnalysis) withinNoise(rss float64, params int) string {
	sigma2 := math.Max(a.noise, minModelNoise*minModelNoise)
	dof := float64(2*len(a.f.n) - params)
	if dof < 1 {
		return fmt.Sprintf("%d displacements are too few for a model of %d parameters", 2*len(a.f.n), params)
	}
	bound := modelSlack * distuv.ChiSquared{K: dof}.Quantile(modelQuantile)
	if chi2 := rss / sigma2; !(chi2 <= bound) {
		return fmt.Sprintf("the model leaves residuals of %.3g spacings RMS per component, %.3g times the measured noise %.3g (χ² %.4g over %g degrees of freedom, bound %.4g)", math.Sqrt(rss/float64(2*len(a.f.n))), math.Sqrt(chi2/dof), math.Sqrt(sigma2), chi2, dof, bound)
	}
	return ""
}

// patchBarcodeRule reads the barcodes of the patch cloud and names the
// class they show when the rank of the lines agrees with it.
func (a *planeAnalysis) patchBarcodeRule(ctx context.Context) (*verdict, error) {
	all, d := a.mod.rational()
	switch {
	case a.mod.unsure() >= 0:
		k := a.mod.unsure()
		b, se := a.mod.basis[k], a.mod.se[k]
		a.undecided = &verdict{class: Unresolved, betti: []int{}, reason: fmt.Sprintf("the spectral line at (%.4g, %.4g) ± (%.2g, %.2g) turns per step sits within its uncertainty of a fraction of small denominator but is not measured finely enough to tell which (a supercell) or none (a torus); more sites or less noise would decide", b[0], b[1], se[0], se[1])}
		return nil, nil
	case a.mod.beyond > 0:
		a.undecided = &verdict{class: Unresolved, betti: []int{}, reason: fmt.Sprintf("the displacement field shows more than three independent spectral lines (%d lines): no hull of dimension three or less at this resolution, or lines too close to resolve; more sites would decide", len(a.lines))}
		return nil, nil
	case !all && d < len(a.mod.basis):
		a.undecided = &verdict{class: Unresolved, betti: []int{}, reason: "the displacement field shows both rational and incommensurate spectral lines (a supercell modulated by an incommensurate wave), which the plane analysis does not model"}
		return nil, nil
	case a.cloud == nil || a.cloud.components == 0:
		a.undecided = &verdict{class: Unresolved, betti: []int{}, reason: fmt.Sprintf("the spectral lines generate a module of rank %d, but the patch cloud shows no direction above the noise floor; more sites or less noise would decide", d)}
		return nil, nil
	}
	r, err := readBarcodes(ctx, a.cloud, a.opt)
	if err != nil {
		return nil, err
	}
	a.reading = r
	a.res.Persistence = r.persistence
	a.res.Embedding.Landmarks, a.res.Embedding.CoverRadius = len(a.cloud.landmarkIdx), a.cloud.cover
	if r.confidence < 1 {
		a.res.Warnings = append(a.res.Warnings, fmt.Sprintf("the Betti numbers changed across landmark subsamples (%s): the class is uncertain; more sites or less noise would settle it", tuples(r.persistence.Subsamples)))
	}
	ci, p, ok := namedByBetti(r.betti)
	switch {
	case !ok:
		a.undecided = &verdict{class: Unresolved, betti: r.betti[:], confidence: r.confidence, band: r.band,
			reason: fmt.Sprintf("the barcodes of the patch cloud show Betti numbers %s, which match no hull of low dimension, while the spectral lines generate a module of rank %d; more sites or less noise would decide", tupleOf(r.betti), d)}
		return nil, nil
	case p > 1 || ci.angles != d:
		a.undecided = &verdict{class: Unresolved, betti: r.betti[:], confidence: r.confidence, band: r.band,
			reason: fmt.Sprintf("the barcodes of the patch cloud show %s %s, but the spectral lines of the displacement field generate a module of rank %d: the two readings disagree; more sites or less noise would decide", torusHull(p, ci.angles), tupleOf(r.betti), d)}
		return nil, nil
	}
	return &verdict{class: ci.Class, components: 1, betti: r.betti[:], confidence: r.confidence, band: r.band,
		reason: fmt.Sprintf("the patch cloud shows %s and the spectral lines of the displacement field generate a module of rank %d: the lattice translations move %s", torusCycles(d), d, torusName(d))}, nil
}

func tupleOf(b [3]int) string { return tuples([][]int{b[:]}) }

// planeUnresolvedRule closes the plane's list.
func (a *planeAnalysis) planeUnresolvedRule(context.Context) (*verdict, error) {
	if a.undecided != nil {
		return a.undecided, nil
	}
	return &verdict{class: Unresolved, betti: []int{}, reason: "no rule decided"}, nil
}

// rotationCheck measures the rotation matrix of a class with angles and
// keeps the class only when the fit reproduces the displacements within
// the measured noise and A is not rational within its uncertainty.
func (a *planeAnalysis) rotationCheck(ctx context.Context, v *verdict) (*verdict, error) {
	d := info(v.class).angles
	if d == 0 || a.reading == nil {
		return v, nil
	}
	coords, err := a.reading.coordinates(ctx, a.cloud, d, a.opt)
	if err != nil {
		return nil, err
	}
	a.res.Trace.Coordinates = coords
	starts := [][][]float64{a.roughRotation(coords)}
	methods := []string{"circular coordinates of the patch cloud"}
	basis := make([][]float64, d)
	for k := range d {
		basis[k] = []float64{a.mod.basis[k][0], a.mod.basis[k][1]}
	}
	starts, methods = append(starts, basis), append(methods, "the strongest independent spectral lines")
	why := ""
	for i, A0 := range starts {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		fit, err := bestPlaneFit(a.f, A0, a.opt.Seed)
		if err != nil {
			why = "the least-squares fit of the displacement field failed (" + err.Error() + ")"
			continue
		}
		if w := a.withinNoise(fit.rss, fit.params); w != "" {
			why = w
			continue
		}
		A, unc := reduceRotation(fit.A, fit.cov)
		if w := a.inLineModule(A, unc); w != "" {
			why = w
			continue
		}
		if w := a.rationalRow(A, unc); w != "" {
			why = w
			break
		}
		a.res.Rotation, a.res.RotationUncertainty = A, unc
		a.res.AngleMethod = fmt.Sprintf("%s, refined by a least-squares fit of the displacement field with tones up to order %d", methods[i], fit.h)
		a.resid, a.model = fit.resid, fmt.Sprintf("lattice plus tones up to order %d of the rotation matrix", fit.h)
		return v, nil
	}
	a.res.Trace.Coordinates = nil
	return &verdict{class: Unresolved, betti: v.betti, confidence: v.confidence, band: v.band,
		reason: fmt.Sprintf("the barcodes show %s %s, but %s: the rotation matrix is not established", torusName(d), notation.Tuple(v.betti), why)}, nil
}

// inLineModule says why A does not describe the hull the lines show when
// a row of A is not an integer combination of the lines' basis: the fit
// then found a finer module (a covering torus) whose tones include the
// lines, which reproduces the field as well but is not its rotation
// matrix. The lines lie in A's module by the fit; this checks the
// converse, so the two modules are equal.
func (a *planeAnalysis) inLineModule(A, unc [][]float64) string {
	floor := [2]float64{1e-3 / float64(a.f.size[0]), 1e-3 / float64(a.f.size[1])}
	for k, r := range A {
		if _, ok := a.mod.express(fieldLine{q: [2]float64{r[0], r[1]}, se: [2]float64{unc[k][0], unc[k][1]}}, floor); !ok {
			return fmt.Sprintf("row %d of the fitted rotation matrix, (%.6g, %.6g), is no integer combination of the spectral lines of the displacement field: the fit found a finer module than the lines show", k+1, r[0], r[1])
		}
	}
	return ""
}

// rationalRow says why A does not establish an incommensurate hull when a
// row equals a rational vector k/Q, Q ≤ MaxPeriod, within three standard
// uncertainties: such a modulation is periodic, and at this precision a
// supercell and a torus cannot be told apart.
func (a *planeAnalysis) rationalRow(A, unc [][]float64) string {
	for k, r := range A {
		for Q := 1; Q <= a.opt.MaxPeriod; Q++ {
			ok := true
			for j := range 2 {
				v := float64(Q) * r[j]
				ok = ok && math.Abs(v-math.Round(v)) <= 3*float64(Q)*unc[k][j]
			}
			if ok {
				return fmt.Sprintf("row %d of the rotation matrix, (%.6g, %.6g), is a rational vector with denominator %d within its uncertainty: a supercell and a torus cannot be told apart at this precision; more sites or less noise would decide", k+1, r[0], r[1], Q)
			}
		}
	}
	return ""
}

// roughRotation reads A off circular coordinates of the patch cloud: row k
// is the circular mean of the increments of coordinate k from the patch at
// n to the patch at n + a_j. Each row is then replaced by the nearest
// spectral line (modulo Z², up to sign) within two resolutions, which is
// far more precise.
func (a *planeAnalysis) roughRotation(coords [][]float64) [][]float64 {
	at := make(map[[2]int]int, len(a.corner))
	for i, c := range a.corner {
		at[a.f.n[c]] = i
	}
	A := make([][]float64, len(coords))
	for k, th := range coords {
		A[k] = make([]float64, 2)
		for j := range 2 {
			var s complex128
			for i, c := range a.corner {
				n := a.f.n[c]
				n[j]++
				if o, ok := at[n]; ok {
					sn, cs := math.Sincos(2 * math.Pi * (th[o] - th[i]))
					s += complex(cs, sn)
				}
			}
			A[k][j] = math.Atan2(imag(s), real(s)) / (2 * math.Pi)
		}
		bd := math.Inf(1)
		for _, l := range a.lines {
			for _, sg := range []float64{1, -1} {
				d0, d1 := wrap(sg*l.q[0]-A[k][0])*float64(a.f.size[0]), wrap(sg*l.q[1]-A[k][1])*float64(a.f.size[1])
				if dd := math.Hypot(d0, d1); dd < bd && dd < 2 {
					bd = dd
					A[k] = []float64{A[k][0] + wrap(sg*l.q[0]-A[k][0]), A[k][1] + wrap(sg*l.q[1]-A[k][1])}
				}
			}
		}
	}
	return A
}

// reduceRotation puts A in the reduced form AnalyzePlane describes and
// propagates the covariance of its entries (cov indexed 2k+j) to one
// standard uncertainty of each entry of the result.
func reduceRotation(A [][]float64, cov *mat.SymDense) ([][]float64, [][]float64) {
	d := len(A)
	R := clone2(A)
	V := make([][]int, d)
	for i := range V {
		V[i] = make([]int, d)
		V[i][i] = 1
	}
	norm := func(r []float64) float64 { return math.Hypot(wrap(r[0]), wrap(r[1])) }
	for i := range R {
		R[i] = []float64{wrap(R[i][0]), wrap(R[i][1])}
	}
	for changed := true; changed; {
		changed = false
		for i := range d {
			for j := range d {
				if i == j {
					continue
				}
				for _, s := range []int{1, -1} {
					c := []float64{wrap(R[i][0] + float64(s)*R[j][0]), wrap(R[i][1] + float64(s)*R[j][1])}
					if norm(c) < norm(R[i])-1e-12 {
						R[i] = c
						for k := range d {
							V[i][k] += s * V[j][k]
						}
						changed = true
					}
				}
			}
		}
	}
	for i := range R {
		if R[i][0] < 0 || (R[i][0] == 0 && R[i][1] < 0) {
			R[i] = []float64{wrap(-R[i][0]), wrap(-R[i][1])}
			for k := range d {
				V[i][k] = -V[i][k]
			}
		}
	}
	order := make([]int, d)
	for i := range order {
		order[i] = i
	}
	slices.SortStableFunc(order, func(x, y int) int {
		if nx, ny := norm(R[x]), norm(R[y]); nx != ny {
			if nx < ny {
				return -1
			}
			return 1
		}
		return 0
	})
	out := make([][]float64, d)
	unc := make([][]float64, d)
	for o, i := range order {
		out[o] = R[i]
		unc[o] = make([]float64, 2)
		for j := range 2 {
			var s float64
			for k := range d {
				for l := range d {
					s += float64(V[i][k]*V[i][l]) * cov.At(2*k+j, 2*l+j)
				}
			}
			unc[o][j] = math.Sqrt(math.Max(s, 0))
		}
	}
	return out, unc
}

// setResiduals stores the per-site residuals and the disorder figure of
// the model that stood.
func (a *planeAnalysis) setResiduals() {
	if a.resid == nil {
		return
	}
	out := make([]float64, len(a.l.Index))
	for i := range out {
		out[i] = math.NaN()
	}
	var ss float64
	for i, r := range a.resid {
		d := math.Hypot(r[0], r[1]) * a.spacing
		out[a.f.site[i]] = d
		ss += d * d
	}
	rms := math.Sqrt(ss / float64(len(a.resid)))
	a.res.SiteResiduals = out
	a.res.Disorder = &Disorder{RMS: rms, Relative: rms / a.spacing, Model: a.model}
}

// labels fills in the gap-label group: k/P for a supercell of P sites, the
// group of topology.PlaneGenerators for a hull with a rotation matrix.
func (a *planeAnalysis) labels() {
	g := &a.res.GapLabels
	g.MaxCoeff = a.opt.MaxCoeff
	g.Generators = []float64{1}
	g.Labels = []topology.Label{}
	h := a.res.Hull
	switch {
	case h.Class == Finite:
		g.Generators = append(g.Generators, 1/float64(h.Period))
		g.Labels = topology.PeriodicLabels(h.Period)
	case info(h.Class).angles > 0 && len(a.res.Rotation) > 0:
		eps := 1e-12
		for _, r := range a.res.RotationUncertainty {
			for _, u := range r {
				eps = math.Max(eps, lineSigmas*u)
			}
		}
		gens, err := topology.PlaneGenerators(a.res.Rotation, eps)
		if errors.Is(err, topology.ErrPrecision) && gens != nil {
			a.res.Warnings = append(a.res.Warnings, fmt.Sprintf("the rank of the gap-label group is not established: %v; more sites or less noise would establish it", err))
		} else if err != nil {
			a.res.Warnings = append(a.res.Warnings, fmt.Sprintf("the gap-label group is not resolved: %v; more sites or less noise would resolve it", err))
			return
		}
		g.Generators = gens
		labels, m := topology.PlaneLabels(gens, a.opt.MaxCoeff)
		g.MaxCoeff = m
		if labels != nil {
			g.Labels = labels
		}
	}
}
