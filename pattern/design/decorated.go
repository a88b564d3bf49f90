package design

import (
	"fmt"
	"math"
)

// The decorated family: a periodic cell of p spacings decorating a
// modulation of one angle,
//
//	x_n = Σ_{m<n} cell[m mod p] + Σ_k (a_k sin 2πk(nθ+φ) + b_k cos 2πk(nθ+φ)).
//
// The pair (n mod p, nθ mod 1) moves by (1, θ) from one site to the next;
// for irrational θ its orbit is dense in Z_p × T (the closed subgroup it
// generates holds p·(1, θ) = (0, pθ), hence {0} × T, hence everything), so
// the hull is p circles, one per position in the cell (common practice). A
// dimerised chain, cell 0.88,1.12 with sin 0.1, has
// x_n = n − 0.06 + 0.06·(−1)^n + 0.1 sin 2π(nθ+φ).
//
// The cell may decorate a modulation of one to three angles instead
// ("thetas", "amps", "phases", as the multi-angle family takes them):
//
//	x_n = Σ_{m<n} cell[m mod p] + Σ_k a_k sin 2π(nθ_k + φ + φ_k).
//
// By the same argument, with 1, θ_1, …, θ_d rationally independent, the
// orbit of (n mod p, nθ_1, …, nθ_d) is dense in Z_p × T^d: the hull is p
// d-tori (common practice). The phase φ shifts every term, so the phase
// sweep of the spectrum moves along the diagonal of the torus.

func checkDecorated(s Spec) error {
	if err := checkPeriodic(s); err != nil {
		return err
	}
	if len(s.Thetas) == 0 && len(s.Amps) == 0 && len(s.Phases) == 0 {
		return checkModulated(s)
	}
	switch {
	case s.Theta != 0:
		return fmt.Errorf("theta = %s with thetas: give the angles of a decorated design either as theta with sin/cos (one angle, harmonics) or as thetas with amps (one to %d angles), not both", formatFloat(s.Theta), maxAngles)
	case len(s.Sin) > 0 || len(s.Cos) > 0:
		return fmt.Errorf("sin/cos with thetas: give the amplitudes of a decorated design of several angles as amps, one per angle")
	}
	return checkMultiAngle(s)
}

// multiTerms evaluates Σ_k a_k sin 2π(nθ_k + φ + φ_k).
func multiTerms(s Spec, n float64) float64 {
	var v float64
	for k, t := range s.Thetas {
		v += s.Amps[k] * math.Sin(2*math.Pi*turnFrac(n*t+s.Phase+at(s.Phases, k)))
	}
	return v
}

// buildDecorated places the cell part of site n = q·p + r at q·C + prefix_r,
// C the cell's length, as buildPeriodic does, and adds the modulation.
func buildDecorated(s Spec) (base, error) {
	cell, err := buildPeriodic(s)
	if err != nil {
		return base{}, err
	}
	pos := cell.pos
	for n := range pos {
		if len(s.Thetas) > 0 {
			pos[n] += multiTerms(s, float64(n))
			continue
		}
		pos[n] += modulation(turnFrac(float64(n)*s.Theta+s.Phase), s.Sin, s.Cos)
	}
	if i, d, bad := firstBadSpacing(pos); bad && len(s.Thetas) > 0 {
		swing := 0.0
		for k, t := range s.Thetas {
			swing += 2 * math.Abs(s.Amps[k]*math.Sin(math.Pi*t))
		}
		return base{}, fmt.Errorf("amps = %s too large: spacing %d (between sites %d and %d) would be %.6g, not positive; "+
			"the terms change a spacing by up to %.6g (Σ_k 2|a_k sin πθ_k|) against the smallest cell spacing %s",
			formatList(s.Amps), i, i, i+1, d, swing, formatFloat(minOf(s.Cell)))
	} else if bad {
		// Harmonic k changes a spacing by at most 2|sin πkθ|·√(a_k²+b_k²)
		// (see buildModulated); the cell's smallest spacing must exceed
		// their sum.
		swing := 0.0
		for k := 1; k <= max(len(s.Sin), len(s.Cos)); k++ {
			swing += 2 * math.Abs(math.Sin(math.Pi*float64(k)*s.Theta)) * math.Hypot(at(s.Sin, k-1), at(s.Cos, k-1))
		}
		return base{}, fmt.Errorf("sin/cos amplitudes too large: spacing %d (between sites %d and %d) would be %.6g, not positive; "+
			"the harmonics change a spacing by up to %.6g (Σ_k 2|sin πkθ|·√(a_k²+b_k²)) against the smallest cell spacing %s",
			i, i, i+1, d, swing, formatFloat(minOf(s.Cell)))
	}
	return base{pos: pos}, nil
}

// closedDecorated: p circles turned by g·θ, p the cell's smallest period
// and g the greatest common divisor of the harmonic orders present (as for
// the modulated family), or p tori of the angles θ_k with a nonzero
// amplitude (as for the multi-angle family); p points (period p) when
// every amplitude is zero.
func closedDecorated(s Spec) ClosedForm {
	p := cellPeriod(s.Cell)
	c := closedModulated(s)
	if len(s.Thetas) > 0 {
		c = closedMultiAngle(s)
	}
	if c.Period != 0 {
		return ClosedForm{Period: p}
	}
	c.Components = p
	return c
}

func minOf(v []float64) float64 {
	m := math.Inf(1)
	for _, x := range v {
		m = min(m, x)
	}
	return m
}
