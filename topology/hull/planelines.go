package hull

import (
	"cmp"
	"context"
	"math"
	"math/cmplx"
	"slices"

	"gonum.org/v1/gonum/dsp/fourier"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat/distuv"
)

// The algebraic reading of a plane: the spectral lines of its displacement
// field u_n over the lattice index n ∈ Z², and the Z-module their
// frequencies generate modulo Z². A hull that is a d-torus moved by A
// displaces the sites by a function of ψ_n = ψ0 + A·n, so every line sits
// at a frequency m·A (mod Z², up to sign) with m ∈ Z^d; the lines of
// lowest order give A's rows, and the rank of the module they generate is
// d. In the structure factor the same frequencies are the satellites
// k = G + Aᵀm of the Bragg peaks G.
//
// The lines are found one at a time, strongest first (a CLEAN-like
// search): the Hann-tapered periodogram of the residual field on a
// zero-padded grid gives the highest peak, its frequency is refined on the
// exact tapered transform, the sinusoid of that frequency is fitted to
// each displacement component by least squares and subtracted. A peak
// counts as a line when it stands above the false-alarm threshold of the
// noise floor (see lineThreshold); the search stops at the first that does
// not.
const (
	// lineFalseAlarm is the expected number of noise peaks per field
	// that pass the line threshold.
	lineFalseAlarm = 0.01
	// maxFieldLines bounds the lines read.
	maxFieldLines = 12
	// lineCoeff bounds the integer coordinates |m_k| of a line over the
	// module's basis, and lineOrder their sum.
	lineCoeff = 4
	lineOrder = 6
	// lineSigmas is how many standard errors a line may lie from an
	// element of the module and still belong to it.
	lineSigmas = 5
	// gammaMedian is the median of the Gamma(2, 1) distribution: the
	// periodogram of two white components, in units of their variance.
	gammaMedian = 1.6783469900166608
	// searchFactor scales the number of independent frequencies, half the
	// sites of the index box, to the effective number of tries of a search
	// over the continuous spectrum, with the noise floor itself measured:
	// calibrated on white fields (TestLineFalseAlarmRate: with 1, 12 of 300
	// fields of 24×24 sites showed a line instead of 3).
	searchFactor = 4
	// roundingPower is the power, relative to the strongest line's, below
	// which a peak of exact data is rounding, not a line.
	roundingPower = 1e-10
	// roundingField is the RMS displacement, in spacings, below which a
	// field is rounding of exact sites (float64 positions and a fitted
	// lattice leave about 1e-13), not a measurement: it has no lines.
	roundingField = 1e-9
)

// field is the displacement field of the on-lattice sites, dimensionless
// (in units of the spacing), with its mean and linear trend removed.
type field struct {
	n    [][2]int
	u    [][2]float64
	site []int // site[i] is the index in the lattice of point i
	lo   [2]int
	size [2]int
}

// fieldLine is one spectral line of the displacement field.
type fieldLine struct {
	// q is the frequency in turns per lattice step, in (−½, ½]², with the
	// sign that makes its first non-zero component positive.
	q [2]float64
	// amp is the amplitude of the sinusoid over both components (the
	// root of the sum of their squared amplitudes), in spacings.
	amp float64
	// se is the standard error of each component of q.
	se [2]float64
}

// wrap reduces x to (−½, ½].
func wrap(x float64) float64 {
	x -= math.Round(x)
	if x <= -0.5 {
		x += 1
	}
	return x
}

// canonical reduces q modulo Z² and up to sign.
func canonical(q [2]float64) [2]float64 {
	q = [2]float64{wrap(q[0]), wrap(q[1])}
	if q[0] < 0 || (q[0] == 0 && q[1] < 0) {
		q = [2]float64{wrap(-q[0]), wrap(-q[1])}
	}
	return q
}

// readLines finds the spectral lines of f and measures the noise variance
// of one displacement component per site from the periodogram floor of
// what the lines leave. Each new line's frequency comes from the peak of the
// field less the lines found so far, fitted jointly with the mean and trend
// (so that neither a trend nor an earlier line leaks into the search);
// after each new line, and once no line is left, each frequency is refined
// again on the field less all the others (cyclicRefine), and the
// amplitudes come from the joint fit.
func readLines(ctx context.Context, f *field) ([]fieldLine, float64, error) {
	M := [2]int{nextPow2(2 * f.size[0]), nextPow2(2 * f.size[1])}
	bin := [2]float64{1 / float64(M[0]), 1 / float64(M[1])}
	taper := make([]float64, len(f.n))
	var w2 float64
	for i, n := range f.n {
		t := 1.0
		for j := range 2 {
			s := math.Sin(math.Pi * (float64(n[j]-f.lo[j]) + 0.5) / float64(f.size[j]))
			t *= s * s
		}
		taper[i] = t
		w2 += t * t
	}
	N := float64(len(f.n))
	var ss float64
	for _, u := range f.u {
		ss += u[0]*u[0] + u[1]*u[1]
	}
	if ss/(2*N) < roundingField*roundingField {
		// Exact sites: what is left is rounding, which has no lines.
		return nil, ss / (2 * N), nil
	}
	thr := lineThreshold(searchFactor * float64(f.size[0]*f.size[1]) / 2)
	var qs [][2]float64
	var noise, first float64
	for {
		if err := ctx.Err(); err != nil {
			return nil, 0, err
		}
		r, _ := jointResidual(f, qs)
		pow := periodogram(f, r, taper, w2, M)
		noise = median(pow) / gammaMedian
		if len(qs) == maxFieldLines {
			break
		}
		k := 0
		for i, p := range pow {
			if p > pow[k] {
				k = i
			}
		}
		if !(pow[k] > thr*noise) || !(pow[k] > roundingPower*first) {
			break
		}
		if first == 0 {
			first = pow[k]
		}
		q := refinePeak(f, r, [2]float64{float64(k/M[1]) * bin[0], float64(k%M[1]) * bin[1]}, bin)
		c := canonical(q)
		if slices.ContainsFunc(qs, func(o [2]float64) bool {
			return math.Abs(wrap(o[0]-c[0])) < 0.5/float64(f.size[0]) && math.Abs(wrap(o[1]-c[1])) < 0.5/float64(f.size[1])
		}) {
			break // what is left of a line already read: the search has converged
		}
		qs = append(qs, c)
		if len(qs) > 1 {
			cyclicRefine(f, qs, bin, -1)
		}
	}
	cyclicRefine(f, qs, bin, noise)
	_, amps := jointResidual(f, qs)
	lines := make([]fieldLine, len(qs))
	for i, q := range qs {
		l := fieldLine{q: q, amp: amps[i]}
		for j := range 2 {
			// Cramér–Rao bound of a sinusoid's frequency in white noise
			// (Rife & Boorstyn 1974), along each axis of the index box.
			l.se[j] = math.Sqrt(12*noise/(N*l.amp*l.amp)) / (2 * math.Pi * float64(f.size[j]))
		}
		lines[i] = l
	}
	return lines, noise, nil
}

// jointResidual fits the mean, the linear trend and a sinusoid at each
// frequency of qs to both displacement components by least squares and
// returns the residual field and each sinusoid's amplitude over both
// components. At a frequency in ½Z² the sine vanishes on the lattice and
// only the cosine is fitted.
func jointResidual(f *field, qs [][2]float64) ([][2]float64, []float64) {
	type col struct {
		line int
		v    []float64
	}
	cols := []col{{-1, make([]float64, len(f.n))}, {-1, make([]float64, len(f.n))}, {-1, make([]float64, len(f.n))}}
	for i, n := range f.n {
		cols[0].v[i], cols[1].v[i], cols[2].v[i] = 1, float64(n[0]-f.lo[0]), float64(n[1]-f.lo[1])
	}
	for li, q := range qs {
		s, c := make([]float64, len(f.n)), make([]float64, len(f.n))
		var ss float64
		for i, n := range f.n {
			s[i], c[i] = math.Sincos(2 * math.Pi * math.Mod(q[0]*float64(n[0])+q[1]*float64(n[1]), 1))
			ss += s[i] * s[i]
		}
		if ss > 1e-6*float64(len(f.n)) {
			cols = append(cols, col{li, s})
		}
		cols = append(cols, col{li, c})
	}
	X := mat.NewDense(len(f.n), len(cols), nil)
	Y := mat.NewDense(len(f.n), 2, nil)
	for i := range f.n {
		for j, c := range cols {
			X.Set(i, j, c.v[i])
		}
		Y.Set(i, 0, f.u[i][0])
		Y.Set(i, 1, f.u[i][1])
	}
	r := slices.Clone(f.u)
	amps := make([]float64, len(qs))
	var qr mat.QR
	qr.Factorize(X)
	var beta mat.Dense
	if err := qr.SolveTo(&beta, false, Y); err != nil {
		return r, amps
	}
	var fit mat.Dense
	fit.Mul(X, &beta)
	for i := range r {
		r[i][0] -= fit.At(i, 0)
		r[i][1] -= fit.At(i, 1)
	}
	for j, c := range cols {
		if c.line >= 0 {
			amps[c.line] += beta.At(j, 0)*beta.At(j, 0) + beta.At(j, 1)*beta.At(j, 1)
		}
	}
	for i := range amps {
		amps[i] = math.Sqrt(amps[i])
	}
	return r, amps
}

// cyclicRefine refines each frequency of qs in turn on the field less all
// the other lines; with noise ≥ 0 it then puts components near 0 or ½ on
// them (snapSpecial). Run after each new line, it lets an earlier line
// that was read off a peak blended with a neighbour's move to its own
// frequency before the next search, so that the blend does not leave
// side lines behind.
func cyclicRefine(f *field, qs [][2]float64, bin [2]float64, noise float64) {
	for i := range qs {
		others := slices.Delete(slices.Clone(qs), i, i+1)
		r, _ := jointResidual(f, others)
		qs[i] = canonical(refinePeak(f, r, qs[i], bin))
		if noise >= 0 {
			qs[i] = snapSpecial(f, r, qs[i], noise)
		}
	}
}

// snapSpecial puts a component of q that lies within two resolutions of 0
// or ½ on it when the fit there explains the field as well, within what
// noise explains with one parameter more (the 0.999 quantile of χ² with
// one degree of freedom, 10.83 noise variances) or within rounding. At 0
// and ½ the sine of that axis vanishes on the lattice, so the free fit
// drifts off them by fitting noise with the sine it gains.
func snapSpecial(f *field, r [][2]float64, q [2]float64, noise float64) [2]float64 {
	p := projected(f, r, q)
	for j := range 2 {
		for _, s := range []float64{0, 0.5} {
			if math.Abs(wrap(q[j]-s)) >= 2/float64(f.size[j]) {
				continue
			}
			t := q
			t[j] = s
			if pt := projected(f, r, t); p-pt <= math.Max(10.83*noise, 1e-12*p) {
				q, p = canonical(t), pt
			}
		}
	}
	return q
}

// lineThreshold returns t with n·P(Gamma(2,1) > t) = lineFalseAlarm: the
// periodogram of two white components over their variance exceeds t at
// one of n independent frequencies with probability about lineFalseAlarm.
func lineThreshold(n float64) float64 {
	g := distuv.Gamma{Alpha: 2, Beta: 1}
	return g.Quantile(1 - lineFalseAlarm/math.Max(n, 1))
}

func nextPow2(n int) int {
	p := 16
	for p < n {
		p *= 2
	}
	return p
}

// periodogram returns the tapered periodogram of the residual field r on
// the M[0]×M[1] frequency grid (row-major): Σ_c |Σ_n w_n r_c,n e^{−2πi q·n}|²
// / Σ w², whose mean is the noise variance of one component.
func periodogram(f *field, r [][2]float64, taper []float64, w2 float64, M [2]int) []float64 {
	pow := make([]float64, M[0]*M[1])
	rows, cols := fourier.NewCmplxFFT(M[1]), fourier.NewCmplxFFT(M[0])
	grid := make([]complex128, M[0]*M[1])
	col := make([]complex128, M[0])
	for c := range 2 {
		clear(grid)
		for i, n := range f.n {
			grid[(n[0]-f.lo[0])*M[1]+n[1]-f.lo[1]] = complex(taper[i]*r[i][c], 0)
		}
		for i := range f.size[0] {
			row := grid[i*M[1] : (i+1)*M[1]]
			rows.Coefficients(row, row)
		}
		for j := range M[1] {
			for i := range M[0] {
				col[i] = grid[i*M[1]+j]
			}
			cols.Coefficients(col, col)
			for i := range M[0] {
				v := col[i]
				pow[i*M[1]+j] += (real(v)*real(v) + imag(v)*imag(v)) / w2
			}
		}
	}
	return pow
}

// projected returns how much a sinusoid of frequency q lowers the
// residual sum of squares of the field r when fitted by least squares
// together with a mean and a linear trend, summed over both components:
// bᵀG⁻¹b over the columns 1, n1, n2, sin 2πq·n, cos 2πq·n (G their Gram
// matrix on the sites, b their inner products with r), less the same over
// the first three alone. Unlike a periodogram it accounts for the columns
// not being orthogonal on a finite patch (the mirror line at −q, a trend
// left by a line), so its maximum sits on the least-squares frequency.
func projected(f *field, r [][2]float64, q [2]float64) float64 {
	e := [2][]complex128{axisPhases(f.lo[0], f.size[0], q[0]), axisPhases(f.lo[1], f.size[1], q[1])}
	var G [5][5]float64
	var b [5][2]float64
	var v [5]float64
	for i, n := range f.n {
		z := e[0][n[0]-f.lo[0]] * e[1][n[1]-f.lo[1]]
		v = [5]float64{1, float64(n[0]-f.lo[0]) / float64(f.size[0]), float64(n[1]-f.lo[1]) / float64(f.size[1]), imag(z), real(z)}
		for j := range 5 {
			for k := j; k < 5; k++ {
				G[j][k] += v[j] * v[k]
			}
			b[j][0] += v[j] * r[i][0]
			b[j][1] += v[j] * r[i][1]
		}
	}
	return explained(G, b, 5) - explained(G, b, 3)
}

// explained returns Σ_c b_cᵀG⁻¹b_c over the first m columns (G upper
// triangle given), by a Cholesky factorisation that skips a column whose
// pivot falls below 10⁻¹⁰ of its diagonal: a column the others already
// span (the sine at q ∈ ½Z²).
func explained(G [5][5]float64, b [5][2]float64, m int) float64 {
	var L [5][5]float64
	var y [5][2]float64
	var p float64
	for j := range m {
		d := G[j][j]
		for k := range j {
			d -= L[j][k] * L[j][k]
		}
		if !(d > 1e-10*G[j][j]) {
			continue // L[j] stays zero: the column is skipped
		}
		L[j][j] = math.Sqrt(d)
		for i := j + 1; i < m; i++ {
			s := G[j][i]
			for k := range j {
				s -= L[i][k] * L[j][k]
			}
			L[i][j] = s / L[j][j]
		}
		for c := range 2 {
			s := b[j][c]
			for k := range j {
				s -= L[j][k] * y[k][c]
			}
			y[j][c] = s / L[j][j]
			p += y[j][c] * y[j][c]
		}
	}
	return p
}

// axisPhases returns e^{−2πi q·k} for k = lo … lo+size−1.
func axisPhases(lo, size int, q float64) []complex128 {
	out := make([]complex128, size)
	for k := range out {
		out[k] = cmplx.Rect(1, -2*math.Pi*math.Mod(q*float64(lo+k), 1))
	}
	return out
}

// refinePeak climbs the projected power of r from the frequency q, one
// axis at a time: three values a step h apart give a parabola whose vertex
// is the next point (the step then shrinks to twice the move), or, when
// the power still rises at one end, the search moves there; it stops once
// every step is below 10⁻¹⁰ of a grid bin.
func refinePeak(f *field, r [][2]float64, q [2]float64, bin [2]float64) [2]float64 {
	p0 := projected(f, r, q)
	h := [2]float64{bin[0] / 4, bin[1] / 4}
	for range 200 {
		if h[0] < 1e-10*bin[0] && h[1] < 1e-10*bin[1] {
			break
		}
		for j := range 2 {
			if h[j] < 1e-10*bin[j] {
				continue
			}
			lo, hi := q, q
			lo[j] -= h[j]
			hi[j] += h[j]
			pl, ph := projected(f, r, lo), projected(f, r, hi)
			switch {
			case ph > p0 && ph >= pl:
				q, p0 = hi, ph
			case pl > p0:
				q, p0 = lo, pl
			default:
				den := pl - 2*p0 + ph
				step := 0.0
				if den < 0 {
					step = math.Max(-h[j], math.Min(h[j], h[j]*(pl-ph)/(2*den)))
				}
				t := q
				t[j] += step
				if pt := projected(f, r, t); pt >= p0 {
					q, p0 = t, pt
				}
				h[j] = math.Max(2*math.Abs(step), h[j]/16)
			}
		}
	}
	return q
}

func median(v []float64) float64 {
	s := slices.Clone(v)
	slices.Sort(s)
	return s[len(s)/2]
}

// lineModule is the Z-module generated modulo Z² by the lines'
// frequencies.
type lineModule struct {
	// basis holds independent frequencies, strongest line first; every
	// line is an integer combination of them modulo Z² (coords).
	basis  [][2]float64
	se     [][2]float64
	coords [][]int
	// beyond counts the lines that would have raised the rank past 3.
	beyond int
	// denominators[k] is the least Q ≤ the bound with Q·basis[k] ∈ Z²
	// within its uncertainty, 0 when basis[k] is not rational, and
	// ambiguous when it is within its uncertainty of such a fraction but
	// not measured finely enough to tell it from the others (see
	// moduleOf).
	denominators []int
}

// ambiguous marks a basis frequency that sits within its uncertainty of a
// fraction of small denominator without the precision that would make it
// one: neither rational nor established as irrational.
const ambiguous = -1

// moduleOf builds the module of the lines, taking them strongest first: a
// line that is an integer combination m of the basis so far (|m_k| ≤
// lineCoeff, Σ|m_k| ≤ lineOrder), modulo Z² and up to sign, within
// lineSigmas of its standard errors (and a thousandth of a grid bin for
// exact data) joins with its coordinates; otherwise it joins the basis.
// Rational basis frequencies (Q·q ∈ Z², Q ≤ maxQ) are marked — only
// when the window of the frequency, ±(lineSigmas·se + floor) along each
// axis, is narrower than 1/(2Q²): two distinct fractions of denominator
// at most Q lie at least 1/Q² apart (neighbours in the Farey sequence of
// order Q; common practice), so the window then holds no other, and the
// supercell is measured rather than guessed. A frequency within its window
// of a fraction without that precision is marked ambiguous: on a small or
// noisy plate almost every frequency is near some fraction of
// denominator up to maxQ.
func moduleOf(lines []fieldLine, size [2]int, maxQ int) *lineModule {
	sorted := slices.Clone(lines)
	slices.SortStableFunc(sorted, func(a, b fieldLine) int { return cmp.Compare(b.amp, a.amp) })
	mod := &lineModule{}
	floor := [2]float64{1e-3 / float64(size[0]), 1e-3 / float64(size[1])}
	for _, l := range sorted {
		m, ok := mod.express(l, floor)
		if ok {
			mod.coords = append(mod.coords, m)
			continue
		}
		if len(mod.basis) == 3 {
			mod.beyond++
			continue
		}
		mod.basis = append(mod.basis, l.q)
		mod.se = append(mod.se, l.se)
		for i := range mod.coords {
			mod.coords[i] = append(mod.coords[i], 0)
		}
		c := make([]int, len(mod.basis))
		c[len(c)-1] = 1
		mod.coords = append(mod.coords, c)
	}
	for k, b := range mod.basis {
		q := 0
		for Q := 1; Q <= maxQ && q == 0; Q++ {
			ok, unique := true, true
			for j := range 2 {
				v := float64(Q) * b[j]
				tol := lineSigmas*mod.se[k][j] + floor[j]
				ok = ok && math.Abs(v-math.Round(v)) <= float64(Q)*tol
				unique = unique && tol < 1/(2*float64(Q*Q))
			}
			switch {
			case ok && unique:
				q = Q
			case ok:
				q = ambiguous
			}
		}
		mod.denominators = append(mod.denominators, q)
	}
	return mod
}

// express writes line l over the basis, if it can (see moduleOf).
func (mod *lineModule) express(l fieldLine, floor [2]float64) ([]int, bool) {
	d := len(mod.basis)
	if d == 0 {
		return nil, false
	}
	var best []int
	bestOrder := math.MaxInt
	m := make([]int, d)
	var walk func(i, left int)
	walk = func(i, left int) {
		if i == d {
			order := 0
			for _, v := range m {
				order += abs(v)
			}
			if order == 0 || order >= bestOrder {
				return
			}
			for _, sign := range []float64{1, -1} {
				ok := true
				for j := range 2 {
					var s, e float64
					for k, v := range m {
						s += float64(v) * mod.basis[k][j]
						e += float64(abs(v)) * mod.se[k][j]
					}
					ok = ok && math.Abs(wrap(sign*l.q[j]-s)) <= lineSigmas*(l.se[j]+e)+floor[j]
				}
				if ok {
					best, bestOrder = slices.Clone(m), order
					return
				}
			}
			return
		}
		for v := -min(lineCoeff, left); v <= min(lineCoeff, left); v++ {
			m[i] = v
			walk(i+1, left-abs(v))
		}
	}
	walk(0, lineOrder)
	return best, best != nil
}

// rational reports whether every basis frequency is rational, and
// irrational the number that are established as irrational (ambiguous
// ones are neither).
func (mod *lineModule) rational() (all bool, irrational int) {
	all = true
	for _, q := range mod.denominators {
		all = all && q > 0
		if q == 0 {
			irrational++
		}
	}
	return all, irrational
}

// unsure returns the index of the first ambiguous basis frequency, −1 when
// there is none.
func (mod *lineModule) unsure() int {
	return slices.Index(mod.denominators, ambiguous)
}
