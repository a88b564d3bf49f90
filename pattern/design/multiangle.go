package design

import (
	"fmt"
	"math"
)

// The multi-angle family: a lattice modulated along one to three angles,
//
//	x_n = n·L + Σ_{k=1..d} a_k sin 2π(nθ_k + φ_k),  d ≤ 3.
//
// When 1, θ_1, ..., θ_d are rationally independent the hull is the d-torus
// T^d (Kronecker's theorem: the orbit of n(θ_1, ..., θ_d) is dense in T^d;
// common practice) and the frequency module is Z + Zθ_1 + ... + Zθ_d.

// maxAngles is the most angles a multi-angle design takes.
const maxAngles = 3

func defaultsMultiAngle(s *Spec) {
	for len(s.Phases) < len(s.Thetas) {
		s.Phases = append(s.Phases, 0)
	}
}

// firstPhase points at φ_1 in a copy of the spec's phases (padded with
// zeros to one per angle), so that moving it leaves the caller's list alone.
func firstPhase(s *Spec) *float64 {
	s.Phases = cloneFloats(s.Phases)
	defaultsMultiAngle(s)
	if len(s.Phases) == 0 {
		s.Phases = []float64{0}
	}
	return &s.Phases[0]
}

func checkMultiAngle(s Spec) error {
	d := len(s.Thetas)
	if d == 0 || d > maxAngles {
		return fmt.Errorf("thetas: %d angles; the multi-angle family takes 1 to %d, e.g. thetas = 0.4142,0.2679", d, maxAngles)
	}
	if len(s.Amps) != d {
		return fmt.Errorf("amps: %d amplitudes for %d angles; give one amplitude per angle", len(s.Amps), d)
	}
	if len(s.Phases) > d {
		return fmt.Errorf("phases: %d phases for %d angles; give at most one phase per angle", len(s.Phases), d)
	}
	for i, t := range s.Thetas {
		if err := checkTurn(fmt.Sprintf("thetas[%d]", i), t); err != nil {
			return err
		}
		for j, u := range s.Thetas[:i] {
			if t == u || t == 1-u {
				return fmt.Errorf("thetas[%d] = %s: the same angle as thetas[%d] = %s up to sign; give each angle once", i, formatFloat(t), j, formatFloat(u))
			}
		}
	}
	return nil
}

func buildMultiAngle(s Spec) (base, error) {
	pos := make([]float64, s.Sites)
	for n := range pos {
		x := float64(n) * s.Spacing
		for k, t := range s.Thetas {
			x += s.Amps[k] * math.Sin(2*math.Pi*turnFrac(float64(n)*t+s.Phases[k]))
		}
		pos[n] = x
	}
	if i, d, bad := firstBadSpacing(pos); bad {
		swing := 0.0
		for k, t := range s.Thetas {
			swing += 2 * math.Abs(s.Amps[k]*math.Sin(math.Pi*t))
		}
		return base{}, fmt.Errorf("amps = %s too large: spacing %d (between sites %d and %d) would be %.6g, not positive; "+
			"the terms change a spacing by up to %.6g (Σ_k 2|a_k sin πθ_k|) against spacing = %s",
			formatList(s.Amps), i, i, i+1, d, swing, formatFloat(s.Spacing))
	}
	return base{pos: pos}, nil
}

// closedMultiAngle: the angles whose amplitude is nonzero; period 1 when
// every amplitude is zero.
func closedMultiAngle(s Spec) ClosedForm {
	var angles []float64
	for k, t := range s.Thetas {
		if s.Amps[k] != 0 {
			angles = append(angles, t)
		}
	}
	if len(angles) == 0 {
		return ClosedForm{Period: 1}
	}
	return ClosedForm{Angles: angles}
}
