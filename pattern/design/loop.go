package design

import (
	"fmt"
	"math"
	"sort"
)

// curve is the closed star-shaped plane curve r(φ) = R(1 + Σ_k (c_k cos kφ
// + s_k sin kφ)), parametrised by arc length.
//
// The arc length S(φ) = ∫_0^φ √(r² + r'²) dφ' is integrated with
// 20-point Gauss–Legendre quadrature on panels refined adaptively until
// halving a panel changes its integral by less than a part in 10^13 (the
// halves, whose error falls as the panel width to the 40th power, are then
// accurate to rounding);
// inverting S (from arc length back to φ) is Newton's method on S(φ) − s,
// whose derivative is the speed √(r² + r'²) > 0, safeguarded by bisection
// inside the panel that holds s.
type curve struct {
	r0   float64   // R
	c, s []float64 // c_k, s_k for k = 1, 2, ...

	edges []float64 // panel boundaries in φ, edges[0] = 0, last = 2π
	cum   []float64 // cum[j] = S(edges[j]); the last is the perimeter

	gl func(a, b float64) float64 // Gauss–Legendre ∫_a^b speed, b − a within a panel
}

// Gauss–Legendre rule of glOrder points on [−1, 1].
const glOrder = 20

// gaussLegendre returns the nodes and weights of the n-point
// Gauss–Legendre rule, by Newton's method on the Legendre polynomial P_n
// from the usual first guesses cos(π(i − 1/4)/(n + 1/2)) (common practice;
// e.g. Press et al., Numerical Recipes, §4.6).
func gaussLegendre(n int) (x, w []float64) {
	x, w = make([]float64, n), make([]float64, n)
	for i := range (n + 1) / 2 {
		z := math.Cos(math.Pi * (float64(i) + 0.75) / (float64(n) + 0.5))
		var dp float64
		for range 100 {
			// Three-term recurrence for P_n(z) and its derivative.
			p0, p1 := 1.0, z
			for k := 2; k <= n; k++ {
				p0, p1 = p1, (float64(2*k-1)*z*p1-float64(k-1)*p0)/float64(k)
			}
			dp = float64(n) * (z*p1 - p0) / (z*z - 1)
			dz := p1 / dp
			z -= dz
			if math.Abs(dz) < 1e-16 {
				break
			}
		}
		x[i], x[n-1-i] = -z, z
		w[i] = 2 / ((1 - z*z) * dp * dp)
		w[n-1-i] = w[i]
	}
	return x, w
}

// newCurve builds the curve and its arc-length table. The radius must be
// positive everywhere (see minRadius).
func newCurve(r0 float64, c, s []float64) *curve {
	cv := &curve{r0: r0, c: c, s: s}
	nodes, weights := gaussLegendre(glOrder)
	gl := func(a, b float64) float64 {
		h, m := (b-a)/2, (a+b)/2
		sum := 0.0
		for i, x := range nodes {
			sum += weights[i] * cv.speed(m+h*x)
		}
		return h * sum
	}
	// Refine a panel until its two halves agree with it; keep the halves.
	var refine func(a, b, whole float64, depth int)
	refine = func(a, b, whole float64, depth int) {
		m := (a + b) / 2
		left, right := gl(a, m), gl(m, b)
		if depth >= 20 || math.Abs(left+right-whole) <= 1e-13*(left+right) {
			cv.edges = append(cv.edges, m, b)
			last := cv.cum[len(cv.cum)-1]
			cv.cum = append(cv.cum, last+left, last+left+right)
			return
		}
		refine(a, m, left, depth+1)
		refine(m, b, right, depth+1)
	}
	cv.edges, cv.cum = []float64{0}, []float64{0}
	panels := 8 * (1 + max(len(c), len(s)))
	for j := range panels {
		a, b := 2*math.Pi*float64(j)/float64(panels), 2*math.Pi*float64(j+1)/float64(panels)
		refine(a, b, gl(a, b), 0)
	}
	cv.edges[len(cv.edges)-1] = 2 * math.Pi
	cv.gl = gl
	return cv
}

// radius returns r(φ) and r'(φ).
func (cv *curve) radius(phi float64) (r, dr float64) {
	r = 1
	for k := 1; k <= max(len(cv.c), len(cv.s)); k++ {
		sk, ck := math.Sincos(float64(k) * phi)
		if k <= len(cv.c) {
			r += cv.c[k-1] * ck
			dr -= float64(k) * cv.c[k-1] * sk
		}
		if k <= len(cv.s) {
			r += cv.s[k-1] * sk
			dr += float64(k) * cv.s[k-1] * ck
		}
	}
	return cv.r0 * r, cv.r0 * dr
}

// speed is |dγ/dφ| = √(r² + r'²) for γ(φ) = r(φ)(cos φ, sin φ).
func (cv *curve) speed(phi float64) float64 { return math.Hypot(cv.radius(phi)) }

// perimeter returns the curve's length.
func (cv *curve) perimeter() float64 { return cv.cum[len(cv.cum)-1] }

// arcAt returns φ ∈ [0, 2π) with S(φ) = s, for s in [0, perimeter).
func (cv *curve) arcAt(s float64) float64 {
	// Panel j holds s: cum[j] ≤ s < cum[j+1].
	j := sort.SearchFloat64s(cv.cum, s)
	if j == len(cv.cum) || cv.cum[j] > s {
		j--
	}
	j = min(max(j, 0), len(cv.cum)-2)
	lo, hi := cv.edges[j], cv.edges[j+1]
	a, base := lo, cv.cum[j]
	// Start from linear interpolation inside the panel.
	phi := lo + (s-base)/(cv.cum[j+1]-base)*(hi-lo)
	for range 60 {
		g := base + cv.gl(a, phi) - s
		// Keep the bracket [lo, hi] around the root: S is increasing.
		if g > 0 {
			hi = phi
		} else {
			lo = phi
		}
		next := phi - g/cv.speed(phi)
		if math.Abs(next-phi) <= 1e-14 {
			return next
		}
		if !(next > lo && next < hi) {
			next = (lo + hi) / 2 // Newton left the bracket: bisect
		}
		phi = next
	}
	return phi
}

// minRadius returns the smallest value of r(φ)/R and where it is reached:
// a grid fine enough for the highest harmonic, then golden-section search
// around the smallest grid value.
func minRadius(c, s []float64) (rmin, at float64) {
	cv := &curve{r0: 1, c: c, s: s}
	n := 64 * (1 + max(len(c), len(s)))
	h := 2 * math.Pi / float64(n)
	best, bi := math.Inf(1), 0
	for i := range n {
		if r, _ := cv.radius(float64(i) * h); r < best {
			best, bi = r, i
		}
	}
	a, b := float64(bi-1)*h, float64(bi+1)*h
	g := (math.Sqrt(5) - 1) / 2
	for range 100 {
		x1, x2 := b-g*(b-a), a+g*(b-a)
		r1, _ := cv.radius(x1)
		r2, _ := cv.radius(x2)
		if r1 < r2 {
			b = x2
		} else {
			a = x1
		}
	}
	at = (a + b) / 2
	r, _ := cv.radius(at)
	return min(r, best), math.Mod(at+2*math.Pi, 2*math.Pi)
}

func checkLoop(s Spec) error {
	if err := checkTurn("step", s.Step); err != nil {
		return err
	}
	if err := checkHarmonics("radius-cos", s.RadiusCos); err != nil {
		return err
	}
	if err := checkHarmonics("radius-sin", s.RadiusSin); err != nil {
		return err
	}
	// The quadrature's accuracy needs the radius comfortably away from 0.
	if rmin, at := minRadius(s.RadiusCos, s.RadiusSin); rmin < 1e-3 {
		return fmt.Errorf("radius-cos/radius-sin: the radius falls to %.6g·R at φ = %.6g turns; the coefficients must keep it above 0.001·R",
			rmin, at/(2*math.Pi))
	}
	return nil
}

// loopAngles returns the curve angles φ_n of the n sites: site n sits at
// the arc length frac(phase + n·step)·perimeter from φ = 0.
func loopAngles(cv *curve, phase, step float64, n int) []float64 {
	p := cv.perimeter()
	phi := make([]float64, n)
	for i := range phi {
		phi[i] = cv.arcAt(turnFrac(phase+float64(i)*step) * p)
	}
	return phi
}

func buildLoop(s Spec) (base, error) {
	// R cancels from amp·X_n/R: build the curve with R = 1.
	cv := newCurve(1, s.RadiusCos, s.RadiusSin)
	phi := loopAngles(cv, s.Phase, s.Step, s.Sites)
	f := make([]float64, s.Sites)
	for n, p := range phi {
		r, _ := cv.radius(p)
		f[n] = r * math.Cos(p)
	}
	return ampDesign(s, f)
}
