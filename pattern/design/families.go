package design

import (
	"fmt"
	"math"
	"math/rand/v2"

	"phasonhull/pattern"
)

// base is an unperturbed design: its positions and, for tile families, its
// tile word (word[i] is the tile between pos[i] and pos[i+1]).
type base struct {
	pos  []float64
	word string
}

// Random streams: each random choice draws from its own PCG stream of the
// spec's seed, so that turning one perturbation on or off leaves the
// others' draws unchanged.
const (
	streamFamily  = 1 // the random family's spacings
	streamMissing = 2 // which sites are removed
	streamExtra   = 3 // where spurious sites are inserted
	streamNoise   = 4 // position noise
)

func newRand(seed, stream uint64) *rand.Rand { return rand.New(rand.NewPCG(seed, stream)) }

// maxHarmonics bounds the length of the amplitude and coefficient lists.
const maxHarmonics = 64

func uses(names ...string) map[string]bool {
	m := make(map[string]bool, len(names))
	for _, n := range names {
		m[n] = true
	}
	return m
}

// checkTurn refuses an angle outside the open interval (0, 1) turns.
func checkTurn(name string, v float64) error {
	if !(v > 0 && v < 1) {
		return fmt.Errorf("%s = %s: must lie strictly between 0 and 1 (an angle in turns)", name, formatFloat(v))
	}
	return nil
}

func checkHarmonics(name string, v []float64) error {
	if len(v) > maxHarmonics {
		return fmt.Errorf("%s: %d values, at most %d harmonics", name, len(v), maxHarmonics)
	}
	return nil
}

func checkPeriodic(s Spec) error {
	if len(s.Cell) == 0 {
		return fmt.Errorf("cell: missing; the periodic family needs the spacings of its cell, e.g. cell = 1,1.5")
	}
	if len(s.Cell) >= s.Sites {
		return fmt.Errorf("cell: %d spacings, more than the %d sites can show", len(s.Cell), s.Sites)
	}
	for i, d := range s.Cell {
		if d <= 0 {
			return fmt.Errorf("cell[%d] = %s: spacings must be positive", i, formatFloat(d))
		}
	}
	return nil
}

// buildPeriodic places site n = q·m + r at q·C + prefix_r, C the cell's
// length, which keeps rounding from accumulating along the chain.
func buildPeriodic(s Spec) (base, error) {
	m := len(s.Cell)
	prefix := make([]float64, m)
	cellLen := 0.0
	for i, d := range s.Cell {
		prefix[i] = cellLen
		cellLen += d
	}
	pos := make([]float64, s.Sites)
	for n := range pos {
		pos[n] = float64(n/m)*cellLen + prefix[n%m]
	}
	return base{pos: pos}, nil
}

func checkModulated(s Spec) error {
	if err := checkTurn("theta", s.Theta); err != nil {
		return err
	}
	if err := checkHarmonics("sin", s.Sin); err != nil {
		return err
	}
	return checkHarmonics("cos", s.Cos)
}

// turnFrac returns the fractional part of v in [0, 1).
func turnFrac(v float64) float64 {
	f := v - math.Floor(v)
	if f >= 1 { // v just below an integer rounds up
		f = 0
	}
	return f
}

// modulation evaluates Σ_k (a_k sin 2πkt + b_k cos 2πkt), reducing each kt
// to a fraction of a turn first so that large arguments keep their digits.
func modulation(t float64, sin, cos []float64) float64 {
	v := 0.0
	for k := 1; k <= max(len(sin), len(cos)); k++ {
		u := 2 * math.Pi * turnFrac(float64(k)*t)
		if k <= len(sin) {
			v += sin[k-1] * math.Sin(u)
		}
		if k <= len(cos) {
			v += cos[k-1] * math.Cos(u)
		}
	}
	return v
}

func buildModulated(s Spec) (base, error) {
	pos := make([]float64, s.Sites)
	for n := range pos {
		pos[n] = float64(n)*s.Spacing + modulation(turnFrac(float64(n)*s.Theta+s.Phase), s.Sin, s.Cos)
	}
	if i, d, bad := firstBadSpacing(pos); bad {
		// Harmonic k changes the spacing by 2 sin(πkθ)·(a_k cos − b_k sin)
		// of the mid-point phase, so its largest effect is
		// 2|sin πkθ|·√(a_k²+b_k²).
		swing := 0.0
		for k := 1; k <= max(len(s.Sin), len(s.Cos)); k++ {
			var a, b float64
			if k <= len(s.Sin) {
				a = s.Sin[k-1]
			}
			if k <= len(s.Cos) {
				b = s.Cos[k-1]
			}
			swing += 2 * math.Abs(math.Sin(math.Pi*float64(k)*s.Theta)) * math.Hypot(a, b)
		}
		return base{}, fmt.Errorf("sin/cos amplitudes too large: spacing %d (between sites %d and %d) would be %.6g, not positive; "+
			"the harmonics change a spacing by up to %.6g (Σ_k 2|sin πkθ|·√(a_k²+b_k²)) against spacing = %s", i, i, i+1, d, swing, formatFloat(s.Spacing))
	}
	return base{pos: pos}, nil
}

// firstBadSpacing returns the smallest spacing and its index (1-based: the
// spacing between sites i and i+1) when it is too small for the Pattern
// invariant.
func firstBadSpacing(pos []float64) (i int, d float64, bad bool) {
	n := len(pos)
	tol := pattern.DuplicateTolerance * math.Abs(pos[n-1]-pos[0]) / float64(n-1)
	d = math.Inf(1)
	for j := 1; j < n; j++ {
		if dj := pos[j] - pos[j-1]; dj < d {
			i, d = j, dj
		}
	}
	return i, d, !(d > tol)
}

// ampDesign places x_n = n·L + amp·f_n and, when a spacing would not be
// positive, says how large amp may be for the given shape f.
func ampDesign(s Spec, f []float64) (base, error) {
	pos := make([]float64, len(f))
	for n := range pos {
		pos[n] = float64(n)*s.Spacing + s.Amp*f[n]
	}
	i, d, bad := firstBadSpacing(pos)
	if !bad {
		return base{pos: pos}, nil
	}
	// spacing_n = L + amp·(f_n − f_{n−1}) stays positive while
	// |amp| < L / max(−sign(amp)·Δf).
	worst := 0.0
	for n := 1; n < len(f); n++ {
		worst = max(worst, -math.Copysign(1, s.Amp)*(f[n]-f[n-1]))
	}
	return base{}, fmt.Errorf("amp = %s too large: spacing %d (between sites %d and %d) would be %.6g, not positive; with these parameters |amp| must stay below %.6g",
		formatFloat(s.Amp), i, i, i+1, d, s.Spacing/worst)
}

func checkCircleMap(s Spec) error {
	if !(s.Omega >= 0 && s.Omega < 1) {
		return fmt.Errorf("omega = %s: must lie in [0, 1) (a rotation in turns)", formatFloat(s.Omega))
	}
	if !(s.K >= 0 && s.K <= 1) {
		return fmt.Errorf("k = %s: must lie in [0, 1]; for k > 1 the circle map folds and its orbits have no single rotation number", formatFloat(s.K))
	}
	return nil
}

// circleOrbit returns the lifted orbit ψ_0..ψ_{n−1} of the sine circle map
// ψ ↦ ψ + Ω − (K/2π) sin 2πψ. The orbit is iterated as a winding count and
// a fraction in [0, 1), so the fraction keeps full precision however many
// turns the orbit has made.
func circleOrbit(omega, k, psi0 float64, n int) (wind []float64, frac []float64) {
	wind, frac = make([]float64, n), make([]float64, n)
	w, f := math.Floor(psi0), turnFrac(psi0)
	for i := range n {
		wind[i], frac[i] = w, f
		f += omega - k/(2*math.Pi)*math.Sin(2*math.Pi*f)
		fl := math.Floor(f)
		w, f = w+fl, f-fl
		if f >= 1 {
			w, f = w+1, 0
		}
	}
	return wind, frac
}

func buildCircleMap(s Spec) (base, error) {
	_, frac := circleOrbit(s.Omega, s.K, s.Phase, s.Sites)
	f := make([]float64, s.Sites)
	for n, psi := range frac {
		f[n] = math.Sin(2 * math.Pi * psi)
	}
	return ampDesign(s, f)
}

func checkTwoAngle(s Spec) error {
	if err := checkTurn("theta", s.Theta); err != nil {
		return err
	}
	if err := checkTurn("theta2", s.Theta2); err != nil {
		return err
	}
	if s.Theta2 == s.Theta || s.Theta2 == 1-s.Theta {
		return fmt.Errorf("theta2 = %s: the same angle as theta = %s up to sign; use the modulated family for one angle", formatFloat(s.Theta2), formatFloat(s.Theta))
	}
	return nil
}

func buildTwoAngle(s Spec) (base, error) {
	pos := make([]float64, s.Sites)
	for n := range pos {
		u1 := 2 * math.Pi * turnFrac(float64(n)*s.Theta+s.Phase)
		u2 := 2 * math.Pi * turnFrac(float64(n)*s.Theta2+s.Phase2)
		pos[n] = float64(n)*s.Spacing + s.Amp*math.Sin(u1) + s.Amp2*math.Sin(u2)
	}
	if i, d, bad := firstBadSpacing(pos); bad {
		return base{}, fmt.Errorf("amp = %s and amp2 = %s too large: spacing %d (between sites %d and %d) would be %.6g, not positive; "+
			"the two terms change a spacing by up to %.6g (2|amp·sin πθ1| + 2|amp2·sin πθ2|) against spacing = %s",
			formatFloat(s.Amp), formatFloat(s.Amp2), i, i, i+1, d,
			2*math.Abs(s.Amp*math.Sin(math.Pi*s.Theta))+2*math.Abs(s.Amp2*math.Sin(math.Pi*s.Theta2)), formatFloat(s.Spacing))
	}
	return base{pos: pos}, nil
}

// gaussCut is where the gaussian spacing law is cut, in standard
// deviations: a draw beyond it is drawn again.
const gaussCut = 4

func checkRandom(s Spec) error {
	if s.Dist != "uniform" && s.Dist != "exponential" && s.Dist != "gaussian" {
		return fmt.Errorf("dist %q: unknown; choose uniform, exponential or gaussian", s.Dist)
	}
	if !(s.Spread > 0 && s.Spread < 1) {
		return fmt.Errorf("spread = %s: must lie in (0, 1) so that no spacing reaches 0", formatFloat(s.Spread))
	}
	if s.Dist == "gaussian" && !(s.Spread < 1.0/gaussCut) {
		return fmt.Errorf("spread = %s: a gaussian spread must stay below %s so that no spacing reaches 0 (the law is cut at %d standard deviations)",
			formatFloat(s.Spread), formatFloat(1.0/gaussCut), gaussCut)
	}
	return nil
}

// buildRandom draws independent spacings of mean L, none below L(1−spread).
func buildRandom(s Spec) (base, error) {
	rng := newRand(s.Seed, streamFamily)
	pos := make([]float64, s.Sites)
	for n := 1; n < s.Sites; n++ {
		var d float64
		switch s.Dist {
		case "uniform":
			d = s.Spacing * (1 - s.Spread + 2*s.Spread*rng.Float64())
		case "exponential":
			d = s.Spacing * (1 - s.Spread + s.Spread*rng.ExpFloat64())
		case "gaussian":
			z := rng.NormFloat64()
			for math.Abs(z) > gaussCut {
				z = rng.NormFloat64()
			}
			d = s.Spacing * (1 + s.Spread*z)
		}
		pos[n] = pos[n-1] + d
	}
	return base{pos: pos}, nil
}
