package design

import (
	"math"
	"testing"
)

func mustGenerate(t *testing.T, s Spec) []float64 {
	t.Helper()
	p, err := Generate(s)
	if err != nil {
		t.Fatal(err)
	}
	return p.Positions
}

// TestPeriodic checks that the cell repeats: spacing i is cell[i mod m].
func TestPeriodic(t *testing.T) {
	s := NewSpec("periodic")
	s.Cell, s.Sites = []float64{1, 1.5, 0.7}, 301
	pos := mustGenerate(t, s)
	for i := 1; i < len(pos); i++ {
		if d, want := pos[i]-pos[i-1], s.Cell[(i-1)%3]; math.Abs(d-want) > 1e-12 {
			t.Fatalf("spacing %d = %v, want %v", i, d, want)
		}
	}
	if pos[300] != 100*3.2 {
		t.Errorf("site 300 at %v, want 100 cells of length 3.2 = 320", pos[300])
	}
}

// TestModulatedSpacings checks the spacings against the closed-form
// difference: harmonic k adds a_k[sin 2πk(t+θ) − sin 2πkt] + b_k[cos … −
// cos …] = 2 sin(πkθ)[a_k cos 2πk(t+θ/2) − b_k sin 2πk(t+θ/2)] with
// t = nθ+φ (sum-to-product identities).
func TestModulatedSpacings(t *testing.T) {
	s := NewSpec("modulated")
	s.Sites, s.Spacing, s.Theta, s.Phase = 1000, 2, (math.Sqrt(5)-1)/2, 0.3
	s.Sin, s.Cos = []float64{0.2, -0.05, 0.01}, []float64{0.1, 0, 0.03}
	pos := mustGenerate(t, s)
	for n := 0; n+1 < len(pos); n++ {
		want := s.Spacing
		mid := (float64(n)+0.5)*s.Theta + s.Phase
		for k := 1; k <= 3; k++ {
			fk := float64(k)
			u := 2 * math.Pi * fk * mid
			want += 2 * math.Sin(math.Pi*fk*s.Theta) * (s.Sin[k-1]*math.Cos(u) - s.Cos[k-1]*math.Sin(u))
		}
		if d := pos[n+1] - pos[n]; math.Abs(d-want) > 1e-10 {
			t.Fatalf("spacing %d = %.15g, closed form %.15g", n, d, want)
		}
	}
	// amp is the first sine amplitude.
	a := NewSpec("modulated")
	a.Theta, a.Amp = 0.2763, 0.12
	b := a
	b.Amp, b.Sin = 0, []float64{0.12}
	pa, pb := mustGenerate(t, a), mustGenerate(t, b)
	for i := range pa {
		if pa[i] != pb[i] {
			t.Fatalf("amp = 0.12 and sin = [0.12] differ at site %d", i)
		}
	}
}

// TestTwoAngle checks the positions against the formula.
func TestTwoAngle(t *testing.T) {
	s := NewSpec("two-angle")
	s.Theta, s.Phase, s.Amp = math.Sqrt(2)-1, 0.1, 0.1
	s.Theta2, s.Phase2, s.Amp2 = math.Sqrt(3)-1, 0.7, 0.05
	pos := mustGenerate(t, s)
	for n, x := range pos {
		fn := float64(n)
		want := fn + 0.1*math.Sin(2*math.Pi*(fn*s.Theta+0.1)) + 0.05*math.Sin(2*math.Pi*(fn*s.Theta2+0.7))
		if math.Abs(x-want) > 1e-11 {
			t.Fatalf("site %d at %.15g, want %.15g", n, x, want)
		}
	}
}

// TestDecorated checks the positions against the formula, and the
// dimerised chain against its closed form: a cell 1−δ, 1+δ puts site n at
// n − δ/2 + (δ/2)(−1)^n (common practice).
func TestDecorated(t *testing.T) {
	s := NewSpec(Decorated)
	s.Sites, s.Cell, s.Theta, s.Phase = 1001, []float64{0.88, 1.12}, math.Sqrt(2)-1, 0.3
	s.Sin = []float64{0.1}
	pos := mustGenerate(t, s)
	for n, x := range pos {
		fn := float64(n)
		want := fn - 0.06 + 0.06*math.Pow(-1, fn) + 0.1*math.Sin(2*math.Pi*(fn*s.Theta+s.Phase))
		if math.Abs(x-want) > 1e-10 {
			t.Fatalf("dimerised site %d at %.15g, want %.15g", n, x, want)
		}
	}
	// A cell of three with two harmonics: every spacing is the cell's
	// spacing plus the modulation's difference.
	s.Cell, s.Sin, s.Cos = []float64{0.9, 1.3, 0.8}, []float64{0.05, 0.02}, []float64{0, 0.01}
	pos = mustGenerate(t, s)
	for n := 0; n+1 < len(pos); n++ {
		m := func(n int) float64 {
			u := 2 * math.Pi * (float64(n)*s.Theta + s.Phase)
			return 0.05*math.Sin(u) + 0.02*math.Sin(2*u) + 0.01*math.Cos(2*u)
		}
		want := s.Cell[n%3] + m(n+1) - m(n)
		if d := pos[n+1] - pos[n]; math.Abs(d-want) > 1e-10 {
			t.Fatalf("cell of 3: spacing %d = %.15g, want %.15g", n, d, want)
		}
	}
	// A cell of three decorating two angles, phases φ + φ_k.
	s.Theta, s.Sin, s.Cos = 0, nil, nil
	s.Thetas, s.Amps, s.Phases = []float64{math.Sqrt2 - 1, 2 - math.Sqrt(3)}, []float64{0.05, 0.04}, []float64{0.1, 0.7}
	pos = mustGenerate(t, s)
	for n := 0; n+1 < len(pos); n++ {
		m := func(n int) float64 {
			fn := float64(n)
			return 0.05*math.Sin(2*math.Pi*(fn*s.Thetas[0]+s.Phase+0.1)) + 0.04*math.Sin(2*math.Pi*(fn*s.Thetas[1]+s.Phase+0.7))
		}
		want := s.Cell[n%3] + m(n+1) - m(n)
		if d := pos[n+1] - pos[n]; math.Abs(d-want) > 1e-10 {
			t.Fatalf("cell of 3, two angles: spacing %d = %.15g, want %.15g", n, d, want)
		}
	}
}

// TestMultiAngle checks the positions against the formula for three
// angles, and that two angles give the two-angle family's sites bit for bit.
func TestMultiAngle(t *testing.T) {
	s := NewSpec(MultiAngle)
	s.Sites, s.Spacing = 500, 1.5
	s.Thetas, s.Amps, s.Phases = []float64{math.Sqrt2 - 1, 2 - math.Sqrt(3), (math.Sqrt(5) - 1) / 2}, []float64{0.1, 0.08, 0.06}, []float64{0.1, 0.7}
	pos := mustGenerate(t, s)
	for n, x := range pos {
		fn := float64(n)
		want := 1.5*fn + 0.1*math.Sin(2*math.Pi*(fn*s.Thetas[0]+0.1)) + 0.08*math.Sin(2*math.Pi*(fn*s.Thetas[1]+0.7)) + 0.06*math.Sin(2*math.Pi*fn*s.Thetas[2])
		if math.Abs(x-want) > 1e-10 {
			t.Fatalf("site %d at %.15g, want %.15g", n, x, want)
		}
	}
	two := NewSpec(TwoAngle)
	two.Theta, two.Phase, two.Amp, two.Theta2, two.Phase2, two.Amp2 = 0.4142, 0.1, 0.1, 0.7320508, 0.7, 0.05
	multi := NewSpec(MultiAngle)
	multi.Thetas, multi.Amps, multi.Phases = []float64{0.4142, 0.7320508}, []float64{0.1, 0.05}, []float64{0.1, 0.7}
	a, b := mustGenerate(t, two), mustGenerate(t, multi)
	for i := range a {
		if math.Float64bits(a[i]) != math.Float64bits(b[i]) {
			t.Fatalf("site %d: two-angle %v, multi-angle %v", i, a[i], b[i])
		}
	}
}

// TestGaussLegendre checks that the 20-point rule integrates x^38 over
// [−1, 1] exactly (2/39) and that its weights sum to 2: an n-point rule is
// exact to degree 2n − 1 (common practice).
func TestGaussLegendre(t *testing.T) {
	x, w := gaussLegendre(glOrder)
	sum, m38 := 0.0, 0.0
	for i := range x {
		sum += w[i]
		m38 += w[i] * math.Pow(x[i], 38)
	}
	if math.Abs(sum-2) > 1e-14 || math.Abs(m38-2.0/39) > 1e-14 {
		t.Errorf("Σw = %v, ∫x^38 = %v, want 2 and %v", sum, m38, 2.0/39)
	}
}

// completeE returns the complete elliptic integral of the second kind E(k)
// by the arithmetic–geometric mean (Abramowitz & Stegun, Handbook of
// Mathematical Functions, 17.6): E = K·(1 − Σ_n 2^(n−1) c_n²),
// K = π/(2·AGM(1, √(1−k²))).
func completeE(k float64) float64 {
	a, b, c := 1.0, math.Sqrt(1-k*k), k
	sum, pow := c*c/2, 0.5
	for range 40 {
		a, b, c = (a+b)/2, math.Sqrt(a*b), (a-b)/2
		pow *= 2
		sum += pow * c * c
	}
	return math.Pi / (2 * a) * (1 - sum)
}

// TestLoopPerimeter checks the perimeter against closed forms: a circle of
// radius R has length 2πR, and the limaçon r = R(1 + c cos φ), whose speed
// is R√(1 + c² + 2c cos φ), has length 4R(1+c)·E(2√c/(1+c)).
func TestLoopPerimeter(t *testing.T) {
	for _, r0 := range []float64{1, 2.5} {
		if p := newCurve(r0, nil, nil).perimeter(); math.Abs(p-2*math.Pi*r0) > 1e-13*r0 {
			t.Errorf("circle of radius %v: perimeter %.17g, want 2πR = %.17g", r0, p, 2*math.Pi*r0)
		}
	}
	for _, c := range []float64{0.1, 0.3, 0.6, 0.9} {
		want := 4 * (1 + c) * completeE(2*math.Sqrt(c)/(1+c))
		if p := newCurve(1, []float64{c}, nil).perimeter(); math.Abs(p-want) > 1e-12*want {
			t.Errorf("limaçon c = %v: perimeter %.17g, closed form %.17g", c, p, want)
		}
	}
}

// simpson integrates f on [a, b] by adaptive Simpson quadrature, an
// integrator independent of the curve's Gauss–Legendre panels.
func simpson(f func(float64) float64, a, b, tol float64) float64 {
	var rec func(a, b, fa, fm, fb, whole, tol float64, depth int) float64
	rec = func(a, b, fa, fm, fb, whole, tol float64, depth int) float64 {
		m := (a + b) / 2
		lm, rm := (a+m)/2, (m+b)/2
		flm, frm := f(lm), f(rm)
		left := (m - a) / 6 * (fa + 4*flm + fm)
		right := (b - m) / 6 * (fm + 4*frm + fb)
		if depth > 40 || math.Abs(left+right-whole) <= 15*tol {
			return left + right + (left+right-whole)/15
		}
		return rec(a, m, fa, flm, fm, left, tol/2, depth+1) + rec(m, b, fm, frm, fb, right, tol/2, depth+1)
	}
	fa, fm, fb := f(a), f((a+b)/2), f(b)
	return rec(a, b, fa, fm, fb, (b-a)/6*(fa+4*fm+fb), tol, 0)
}

// TestLoopArcSteps checks that consecutive loop sites are step·perimeter
// apart along the curve, measuring each arc with adaptive Simpson
// quadrature.
func TestLoopArcSteps(t *testing.T) {
	c, s := []float64{0.2, -0.1, 0.05}, []float64{0, 0.15}
	cv := newCurve(1, c, s)
	// The perimeter by the trapezoidal rule, which converges exponentially
	// for a smooth periodic integrand (common practice).
	const m = 4096
	trap := 0.0
	for i := range m {
		trap += cv.speed(2 * math.Pi * float64(i) / m)
	}
	trap *= 2 * math.Pi / m
	if math.Abs(trap-cv.perimeter()) > 1e-12*trap {
		t.Errorf("perimeter %.17g, trapezoidal rule %.17g", cv.perimeter(), trap)
	}
	const step, phase = 0.3819660112501051, 0.1
	phi := loopAngles(cv, phase, step, 60)
	for n := 0; n+1 < len(phi); n++ {
		a, b := phi[n], phi[n+1]
		if b < a {
			b += 2 * math.Pi
		}
		arc := simpson(cv.speed, a, b, 1e-14)
		if want := step * trap; math.Abs(arc-want) > 1e-10 {
			t.Errorf("arc from site %d to %d = %.15g, want step·perimeter = %.15g", n, n+1, arc, want)
		}
	}
	// Site 0 sits at the arc fraction phase.
	if arc := simpson(cv.speed, 0, phi[0], 1e-14); math.Abs(arc-phase*trap) > 1e-10 {
		t.Errorf("site 0 at arc length %v, want phase·perimeter = %v", arc, phase*trap)
	}
}

// TestLoopCircle checks the loop family on a circle, where equal arcs are
// equal angles: x_n = n·L + amp·cos 2π(phase + n·step).
func TestLoopCircle(t *testing.T) {
	s := NewSpec("loop")
	s.Step, s.Phase, s.Amp, s.Spacing = 0.2763, 0.05, 0.15, 1.5
	pos := mustGenerate(t, s)
	for n, x := range pos {
		want := float64(n)*1.5 + 0.15*math.Cos(2*math.Pi*(0.05+float64(n)*0.2763))
		if math.Abs(x-want) > 1e-11 {
			t.Fatalf("site %d at %.15g, want %.15g", n, x, want)
		}
	}
}

// rotation estimates the rotation number (ψ_n − ψ_0)/n of a lifted orbit.
func rotation(omega, k float64, n int) float64 {
	w, f := circleOrbit(omega, k, 0.1, n+1)
	return (w[n] + f[n] - w[0] - f[0]) / float64(n)
}

// TestCircleMapRotation checks closed-form facts of the sine circle map:
// for K = 0 the orbit is ψ_n = ψ_0 + nΩ, so the rotation number is Ω; for
// |Ω| ≤ K/2π the map has a fixed point (sin 2πψ* = 2πΩ/K) and the rotation
// number is 0; and conjugating by ψ → −ψ maps Ω to −Ω, so the rotation
// numbers of Ω and 1 − Ω add up to 1.
func TestCircleMapRotation(t *testing.T) {
	const n = 20000
	for _, omega := range []float64{0.1, 0.2763, (math.Sqrt(5) - 1) / 2, 0.9} {
		w, f := circleOrbit(omega, 0, 0.1, n+1)
		for i := 0; i <= n; i += 997 {
			if psi := w[i] + f[i]; math.Abs(psi-(0.1+float64(i)*omega)) > 1e-15*float64(i+1) {
				t.Fatalf("K = 0, Ω = %v: ψ_%d = %.17g, want ψ_0 + nΩ = %.17g", omega, i, psi, 0.1+float64(i)*omega)
			}
		}
		if r := rotation(omega, 0, n); math.Abs(r-omega) > 1e-14 {
			t.Errorf("K = 0: rotation number %v, want Ω = %v", r, omega)
		}
	}
	if r := rotation(0.05, 0.5, n); math.Abs(r) >= 1.0/n {
		t.Errorf("Ω = 0.05 ≤ K/2π = %.4f: rotation number %v, want 0 (locked to a fixed point)", 0.5/(2*math.Pi), r)
	}
	if r := rotation(0.1, 0.5, n); r < 0.01 {
		t.Errorf("Ω = 0.1 > K/2π: rotation number %v, want it positive (no fixed point)", r)
	}
	for _, omega := range []float64{0.13, 0.3, 0.41} {
		if sum := rotation(omega, 0.8, n) + rotation(1-omega, 0.8, n); math.Abs(sum-1) > 2.0/n {
			t.Errorf("ρ(%v) + ρ(1 − %v) = %v, want 1", omega, omega, sum)
		}
	}
}

// TestRandomSpacings checks the distributions' ranges and moments within
// sampling error (5 standard errors).
func TestRandomSpacings(t *testing.T) {
	const n = 20001
	for _, c := range []struct {
		dist     string
		spread   float64
		sd       float64 // standard deviation in units of L
		lo, hiOK float64 // bounds in units of L; hiOK 0: unbounded
	}{
		{"uniform", 0.3, 0.3 / math.Sqrt(3), 0.7, 1.3},
		{"exponential", 0.4, 0.4, 0.6, 0},
		// Cut at ±4 standard deviations: the sd falls short of the
		// spread by 0.1% (common practice for a truncated normal).
		{"gaussian", 0.2, 0.2, 1 - gaussCut*0.2, 1 + gaussCut*0.2},
	} {
		s := NewSpec("random")
		s.Sites, s.Spacing, s.Dist, s.Spread = n, 2, c.dist, c.spread
		p, err := Generate(s)
		if err != nil {
			t.Fatal(err)
		}
		d := p.Spacings()
		mean, m2 := 0.0, 0.0
		for _, v := range d {
			v /= 2
			if v < c.lo || (c.hiOK > 0 && v > c.hiOK) {
				t.Fatalf("%s: spacing %v·L outside [%v, %v]", c.dist, v, c.lo, c.hiOK)
			}
			mean += v
			m2 += v * v
		}
		mean /= float64(len(d))
		sd := math.Sqrt(m2/float64(len(d)) - mean*mean)
		se := c.sd / math.Sqrt(float64(len(d)))
		if math.Abs(mean-1) > 5*se {
			t.Errorf("%s: mean spacing %v·L, want 1 within %v", c.dist, mean, 5*se)
		}
		if math.Abs(sd-c.sd) > 0.05*c.sd {
			t.Errorf("%s: spacing standard deviation %v·L, want %v", c.dist, sd, c.sd)
		}
	}
}
