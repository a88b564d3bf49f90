package tones

import (
	"context"
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/mat"
)

// anchor is the number of steps an oscillator is rotated before it is
// recomputed from math.Sincos: rounding then grows to about 10⁻¹⁴, far
// under any noise a chain is measured with.
const anchor = 512

// sinusoid is one fitted line: a·cos 2πft + b·sin 2πft with t the site
// index measured from the middle of the sequence, or, at ½, a·(−1)^n.
type sinusoid struct {
	f, a, b float64
	nyq     bool
}

// amp returns the amplitude of the sinusoid.
func (l sinusoid) amp() float64 {
	if l.nyq {
		return math.Abs(l.a)
	}
	return math.Hypot(l.a, l.b)
}

// model is the spacing sequence (divided by its mean, minus one) and its
// fit: a straight line in t plus the sinusoids; resid holds the data
// minus the fit.
type model struct {
	n        int
	t        []float64
	y, resid []float64
	c0, c1   float64 // the straight line c0 + c1·t
	lines    []sinusoid
	cs, sn   []float64 // scratch oscillators
}

func newModel(s []float64, mean float64) *model {
	n := len(s)
	m := &model{n: n, t: make([]float64, n), y: make([]float64, n), resid: make([]float64, n),
		cs: make([]float64, n), sn: make([]float64, n)}
	mid := 0.5 * float64(n-1)
	var sy, sty, stt float64
	for i, v := range s {
		m.t[i] = float64(i) - mid
		m.y[i] = v/mean - 1
		sy += m.y[i]
		sty += m.t[i] * m.y[i]
		stt += m.t[i] * m.t[i]
	}
	// t is centred, so the two columns are orthogonal.
	m.c0, m.c1 = sy/float64(n), sty/stt
	for i := range m.y {
		m.resid[i] = m.y[i] - m.c0 - m.c1*m.t[i]
	}
	return m
}

func (m *model) freqs() []float64 {
	f := make([]float64, len(m.lines))
	for i, l := range m.lines {
		f[i] = l.f
	}
	return f
}

// oscillate fills cs and sn with cos 2πft_n and sin 2πft_n.
func (m *model) oscillate(f float64) {
	w := 2 * math.Pi * f
	cw, sw := math.Cos(w), math.Sin(w)
	var c, s float64
	for i := range m.n {
		if i%anchor == 0 {
			s, c = math.Sincos(w * m.t[i])
		} else {
			c, s = c*cw-s*sw, s*cw+c*sw
		}
		m.cs[i], m.sn[i] = c, s
	}
}

// apply adds sign times the contribution of l to the residual.
func (m *model) apply(l sinusoid, sign float64) {
	if l.nyq {
		a := sign * l.a
		for i := range m.resid {
			if i%2 == 1 {
				m.resid[i] -= a
			} else {
				m.resid[i] += a
			}
		}
		return
	}
	m.oscillate(l.f)
	a, b := sign*l.a, sign*l.b
	for i := range m.resid {
		m.resid[i] += a*m.cs[i] + b*m.sn[i]
	}
}

// applyTrend adds sign times the straight line to the residual.
func (m *model) applyTrend(sign float64) {
	for i := range m.resid {
		m.resid[i] += sign * (m.c0 + m.c1*m.t[i])
	}
}

// add fits a new line near f0 and subtracts it, unless keep says its
// fit is not a line; it reports whether the line was kept.
func (m *model) add(f0, s, alpha float64, keep func(sinusoid) bool) bool {
	saved := slices.Clone(m.resid)
	c0, c1 := m.c0, m.c1
	m.lines = append(m.lines, sinusoid{})
	m.fitLine(len(m.lines)-1, f0, s, alpha)
	if keep(m.lines[len(m.lines)-1]) {
		return true
	}
	m.lines = m.lines[:len(m.lines)-1]
	m.resid, m.c0, m.c1 = saved, c0, c1
	return false
}

// remove puts line i back into the residual and drops it.
func (m *model) remove(i int) {
	m.apply(m.lines[i], 1)
	m.lines = slices.Delete(m.lines, i, i+1)
}

// refit fits line i again from where it is and returns the fall of the
// residual sum of squares.
func (m *model) refit(i int, s, alpha float64) float64 {
	before := m.rss()
	m.fitLine(i, m.lines[i].f, s, alpha)
	return before - m.rss()
}

// sweep refits each line on the residual without it, in turn, until a
// sweep lowers the residual sum of squares by less than 10⁻¹² of itself
// or after 8 sweeps; it checks the context between lines.
func (m *model) sweep(ctx context.Context, fl *noiseFloor, alpha float64) error {
	for range 8 {
		var fall float64
		for i := range m.lines {
			if err := ctx.Err(); err != nil {
				return fmt.Errorf("reading tones: %w", err)
			}
			fall += m.refit(i, fl.at(m.lines[i].f), alpha)
		}
		if !(fall > 1e-12*m.rss()) {
			return nil
		}
	}
	return nil
}

// fitLine puts line i and the straight line back into the residual,
// fits both together near f0 and subtracts the new fit: the straight line
// is refitted with every line, so the two never absorb part of each
// other.
func (m *model) fitLine(i int, f0, s, alpha float64) {
	if m.lines[i].a != 0 || m.lines[i].b != 0 {
		m.apply(m.lines[i], 1)
	}
	m.applyTrend(1)
	l, c0, c1 := m.fit(m.resid, f0, s, alpha)
	m.lines[i], m.c0, m.c1 = l, c0, c1
	m.apply(l, -1)
	m.applyTrend(-1)
}

// fit fits one sinusoid and a straight line to z starting from f0.
// Within one natural bin of ½ the free fit is compared with the
// alternation (−1)^n alone: the free fit has two parameters more (the
// frequency and a second amplitude), so under the alternation its gain in
// the residual sum of squares, over the noise power s, is χ²₂-distributed,
// and the line is put at ½ exactly unless the gain exceeds the χ²₂
// quantile −2 ln α.
func (m *model) fit(z []float64, f0, s, alpha float64) (sinusoid, float64, float64) {
	nf := float64(m.n)
	if f0 > 0.5-1/nf {
		a, c0, c1, rssNyq := m.alternation(z)
		free, fc0, fc1, rss, ok := m.gaussNewton(z, math.Min(f0, 0.5-0.5/nf))
		if !ok || free.f >= 0.5-0.1/nf || rssNyq-rss <= -2*math.Log(alpha)*s {
			return sinusoid{f: 0.5, a: a, nyq: true}, c0, c1
		}
		return free, fc0, fc1
	}
	l, c0, c1, _, ok := m.gaussNewton(z, f0)
	if !ok {
		l, c0, c1, _, _ = m.project(z, f0, nil)
	}
	return l, c0, c1
}

// alternation fits c0 + c1·t + a·(−1)^n to z and returns a, c0, c1 and
// the residual sum of squares minus Σz².
func (m *model) alternation(z []float64) (a, c0, c1, rss float64) {
	var g [9]float64
	var rhs [3]float64
	for i, v := range z {
		t, alt := m.t[i], 1-2*float64(i%2)
		col := [3]float64{1, t, alt}
		for p := range 3 {
			rhs[p] += col[p] * v
			for q := range 3 {
				g[3*p+q] += col[p] * col[q]
			}
		}
	}
	beta, _, ok := solveSmall(g[:], rhs[:], 3)
	if !ok {
		return 0, 0, 0, 0
	}
	return beta[2], beta[0], beta[1], -(beta[0]*rhs[0] + beta[1]*rhs[1] + beta[2]*rhs[2])
}

// sums holds what one pass over the data gives at a trial frequency.
type sums struct {
	g    [16]float64 // Gram matrix of the columns 1, t, c, s
	rhs  [4]float64  // their products with z
	t    [8]float64  // Σtc, Σts, Σt²c, Σt²s, Σtcs, Σtcc, Σtss, (unused)
	t2   [3]float64  // Σt²cc, Σt²ss, Σt²cs
	tz   [2]float64  // Σtcz, Σtsz
	beta []float64
	ginv []float64
}

// project solves the linear part at frequency f: the straight line and
// the amplitudes, returning the fit, the residual sum of squares minus
// Σz², and (when ps is not nil) the sums for a Gauss–Newton step.
func (m *model) project(z []float64, f float64, ps *sums) (sinusoid, float64, float64, float64, bool) {
	m.oscillate(f)
	var q sums
	var sc, ss, scc, sss, scs, szc, szs, sz, stz float64
	var stc, sts, st2c, st2s, stcs, stcc, stss, st2cc, st2ss, st2cs, stcz, stsz float64
	for i, v := range z {
		c, s, t := m.cs[i], m.sn[i], m.t[i]
		cc, s2, cs := c*c, s*s, c*s
		sc += c
		ss += s
		scc += cc
		sss += s2
		scs += cs
		szc += v * c
		szs += v * s
		sz += v
		stz += t * v
		tc, ts := t*c, t*s
		stc += tc
		sts += ts
		st2c += t * tc
		st2s += t * ts
		stcs += t * cs
		stcc += t * cc
		stss += t * s2
		t2 := t * t
		st2cc += t2 * cc
		st2ss += t2 * s2
		st2cs += t2 * cs
		stcz += tc * v
		stsz += ts * v
	}
	var st2 float64
	for _, t := range m.t {
		st2 += t * t
	}
	nf := float64(m.n)
	q.g = [16]float64{
		nf, 0, sc, ss,
		0, st2, stc, sts,
		sc, stc, scc, scs,
		ss, sts, scs, sss,
	}
	q.rhs = [4]float64{sz, stz, szc, szs}
	q.t = [8]float64{stc, sts, st2c, st2s, stcs, stcc, stss}
	q.t2 = [3]float64{st2cc, st2ss, st2cs}
	q.tz = [2]float64{stcz, stsz}
	beta, ginv, ok := solveSmall(q.g[:], q.rhs[:], 4)
	if !ok {
		return sinusoid{}, 0, 0, 0, false
	}
	q.beta, q.ginv = beta, ginv
	if ps != nil {
		*ps = q
	}
	var rss float64
	for k := range 4 {
		rss -= beta[k] * q.rhs[k]
	}
	return sinusoid{f: f, a: beta[2], b: beta[3]}, beta[0], beta[1], rss, true
}

// gaussNewton fits c0 + c1·t + a·cos 2πft + b·sin 2πft to z by
// Gauss–Newton, the linear parameters solved exactly at each trial f
// (variable projection, Golub & Pereyra, SIAM J. Numer. Anal. 10, 1973),
// the frequency step from the normal equations of the full Jacobian
// (the Schur complement of the linear block). A large step that raises
// the residual is halved. It stops when a step moves the phase across the
// chain by less than 10⁻¹³ radian or is within a few units in the last
// place of f, and fails when the frequency leaves
// f0 ± 1/N (then f0 was not in a line's main lobe). It returns the fit
// and its residual sum of squares minus Σz².
func (m *model) gaussNewton(z []float64, f0 float64) (sinusoid, float64, float64, float64, bool) {
	nf := float64(m.n)
	const tp = 2 * math.Pi
	f, prevF := f0, f0
	var best sinusoid
	var bc0, bc1 float64
	bestRSS := math.Inf(1)
	for range 60 {
		if math.Abs(f-f0) > 1/nf || f >= 0.5 || f <= 0 {
			return sinusoid{}, 0, 0, 0, false
		}
		var q sums
		l, c0, c1, rss, ok := m.project(z, f, &q)
		if !ok {
			return sinusoid{}, 0, 0, 0, false
		}
		// The residual sum of squares is Σz² minus a projection, so it
		// is known to about 10⁻¹⁶·Σz²: it can judge only steps large
		// enough to change it by more (steps under 1% of a natural bin
		// are inside the quadratic basin of the minimum, and taken).
		if rss > bestRSS && math.Abs(f-prevF)*nf > 0.01 {
			// The step overshot: go half-way back.
			if math.Abs(f-prevF)*nf*tp < 1e-13 || math.Abs(f-prevF) <= 4*ulp(f) {
				break
			}
			f = prevF + 0.5*(f-prevF)
			continue
		}
		best, bc0, bc1, bestRSS = l, c0, c1, math.Min(rss, bestRSS)
		a, b := l.a, l.b
		// The column d = 2πt(−a·s + b·c) against 1, t, c, s and itself.
		gd := [4]float64{
			tp * (-a*q.t[1] + b*q.t[0]),
			tp * (-a*q.t[3] + b*q.t[2]),
			tp * (-a*q.t[4] + b*q.t[5]),
			tp * (-a*q.t[6] + b*q.t[4]),
		}
		dd := tp * tp * (a*a*q.t2[1] - 2*a*b*q.t2[2] + b*b*q.t2[0])
		de := tp * (-a*q.tz[1] + b*q.tz[0])
		for k := range 4 {
			de -= q.beta[k] * gd[k]
		}
		schur := dd
		for p := range 4 {
			for r := range 4 {
				schur -= gd[p] * q.ginv[4*p+r] * gd[r]
			}
		}
		if !(schur > 0) {
			break
		}
		df := de / schur
		prevF = f
		f += df
		if math.Abs(df)*nf*tp < 1e-13 || math.Abs(df) <= 4*ulp(f) {
			break
		}
	}
	if math.IsInf(bestRSS, 1) {
		return sinusoid{}, 0, 0, 0, false
	}
	return best, bc0, bc1, bestRSS, true
}

// ulp returns the spacing of float64 values at f.
func ulp(f float64) float64 { return math.Nextafter(f, math.Inf(1)) - f }

// solveSmall solves the symmetric positive definite k×k system g·x = b
// and returns x and g⁻¹ (row-major).
func solveSmall(g, b []float64, k int) ([]float64, []float64, bool) {
	sym := mat.NewSymDense(k, nil)
	for p := range k {
		for r := p; r < k; r++ {
			sym.SetSym(p, r, g[k*p+r])
		}
	}
	var chol mat.Cholesky
	if !chol.Factorize(sym) {
		return nil, nil, false
	}
	var x mat.VecDense
	if err := chol.SolveVecTo(&x, mat.NewVecDense(k, slices.Clone(b))); err != nil {
		return nil, nil, false
	}
	var inv mat.SymDense
	if err := chol.InverseTo(&inv); err != nil {
		return nil, nil, false
	}
	out := make([]float64, k*k)
	for p := range k {
		for r := range k {
			out[k*p+r] = inv.At(p, r)
		}
	}
	return slices.Clone(x.RawVector().Data), out, true
}

func (m *model) rss() float64 {
	var s float64
	for _, v := range m.resid {
		s += v * v
	}
	return s
}

func (m *model) rms() float64 {
	var s float64
	for _, v := range m.resid {
		s += v * v
	}
	return math.Sqrt(s / float64(m.n))
}

// result returns the lines with their standard errors: the frequency
// block of (JᵀJ)⁻¹ of the joint model (the straight line and every line's
// columns), times the noise floor at the line, which for a sinusoid in
// locally white noise is the Cramér–Rao bound. A line at ½ has no
// frequency parameter; its error is the closed-form bound
// √(6/N³)·σ/(π·A) of a sinusoid of the same power (A = √2·|a|), the
// offset from ½ it could have unnoticed.
func (m *model) result(fl *noiseFloor) []Line {
	if len(m.lines) == 0 {
		return nil
	}
	// Parameter layout: c0, c1, then per line a, b, f (or a alone at ½).
	idx := make([]int, len(m.lines)) // index of each line's first column
	p := 2
	for i, l := range m.lines {
		idx[i] = p
		if l.nyq {
			p++
		} else {
			p += 3
		}
	}
	jtj := make([]float64, p*p)
	row := make([]float64, p)
	type osc struct{ w, c, s, cw, sw float64 }
	o := make([]osc, len(m.lines))
	for i, l := range m.lines {
		w := 2 * math.Pi * l.f
		o[i] = osc{w: w, cw: math.Cos(w), sw: math.Sin(w)}
	}
	for n := range m.n {
		t := m.t[n]
		row[0], row[1] = 1, t
		for i, l := range m.lines {
			j := idx[i]
			if l.nyq {
				row[j] = 1 - 2*float64(n%2)
				continue
			}
			q := &o[i]
			if n%anchor == 0 {
				q.s, q.c = math.Sincos(q.w * t)
			} else {
				q.c, q.s = q.c*q.cw-q.s*q.sw, q.s*q.cw+q.c*q.sw
			}
			row[j], row[j+1] = q.c, q.s
			row[j+2] = 2 * math.Pi * t * (-l.a*q.s + l.b*q.c)
		}
		for a := range p {
			ra := row[a]
			if ra == 0 {
				continue
			}
			r := jtj[a*p : a*p+p]
			for b := a; b < p; b++ {
				r[b] += ra * row[b]
			}
		}
	}
	sym := mat.NewSymDense(p, nil)
	for a := range p {
		for b := a; b < p; b++ {
			sym.SetSym(a, b, jtj[a*p+b])
		}
	}
	var chol mat.Cholesky
	ok := chol.Factorize(sym)
	var inv mat.SymDense
	if ok {
		ok = chol.InverseTo(&inv) == nil
	}
	nf := float64(m.n)
	out := make([]Line, len(m.lines))
	defer func() {
		// A frequency is a float64 in (0, ½]: it, and the integer
		// combinations the relation search forms of it, are rounded to
		// about ε = 2⁻⁵² absolute, so it is not known better.
		for i := range out {
			out[i].FreqErr = math.Max(out[i].FreqErr, 0x1p-52)
		}
	}()
	for i, l := range m.lines {
		s := fl.at(l.f)
		if l.nyq {
			amp := math.Abs(l.a)
			out[i] = Line{Freq: 0.5, Amp: amp, FreqErr: math.Sqrt(6/(nf*nf*nf)) * math.Sqrt(s) / (math.Pi * math.Sqrt2 * amp)}
			continue
		}
		amp := math.Hypot(l.a, l.b)
		fe := math.Sqrt(6/(nf*nf*nf)) * math.Sqrt(s) / (math.Pi * amp)
		if ok {
			if v := inv.At(idx[i]+2, idx[i]+2); v > 0 {
				fe = math.Sqrt(s * v)
			}
		}
		out[i] = Line{Freq: l.f, Amp: amp, FreqErr: fe}
	}
	return out
}
