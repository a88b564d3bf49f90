package audit

import (
	"fmt"
	"math"
	"phasonhull/topology/notation"
)

// A rule is one check of the verdict: it returns why the sample fails it,
// or "" when the sample passes it or it does not apply.
type rule struct {
	name  string
	check func(a *audit) string
}

// rules are the verdict rules, in the order their reasons are listed (the
// package documentation says them in words). They read what Run measured;
// they decide, nothing else does.
var rules = [...]rule{
	{"sample hull", func(a *audit) string {
		if a.measuredErr == nil {
			return ""
		}
		return fmt.Sprintf("the sample's hull could not be analysed: %v", a.measuredErr)
	}},
	{"hull model", func(a *audit) string {
		if !a.noModel {
			return ""
		}
		h := a.rep.Hull.Measured.Hull
		return fmt.Sprintf("the sample's hull is %s: there is no model of it to screen the sites against (%s)", h.Class, h.Reason)
	}},
	{"screening", func(a *audit) string {
		if a.screenErr == nil {
			return ""
		}
		return fmt.Sprintf("the hull model left no site to screen: %v", a.screenErr)
	}},
	{"registration", func(a *audit) string {
		if a.registerErr == nil {
			return ""
		}
		return fmt.Sprintf("the sample could not be registered on the design: %v", a.registerErr)
	}},
	{"scale", func(a *audit) string {
		if !a.registered {
			return ""
		}
		scale, scaleErr := *a.rep.Scale, *a.rep.ScaleErr
		maxErr := *a.rep.MaxScaleError
		if math.Abs(math.Abs(scale)-1) <= maxErr {
			return ""
		}
		reason := fmt.Sprintf("the registration scale %.6g ± %.2g is outside 1 ± %g (--max-scale-error)", scale, scaleErr, maxErr)
		if hint := likelyUnits(scale, scaleErr, maxErr, a.designUnit, a.sampleUnit); hint != "" {
			reason += ": " + hint
		}
		return reason
	}},
	{"missing", func(a *audit) string {
		if !a.registered || len(a.rep.Missing) <= a.opt.AllowMissing {
			return ""
		}
		return fmt.Sprintf("%d design site(s) missing, %d allowed", len(a.rep.Missing), a.opt.AllowMissing)
	}},
	{"extra", func(a *audit) string {
		n := len(a.rep.Extra)
		switch {
		case n <= a.opt.AllowExtra:
			return ""
		case a.registered:
			return fmt.Sprintf("%d extra measured site(s), %d allowed", n, a.opt.AllowExtra)
		case a.screen != nil:
			return fmt.Sprintf("%d site(s) look spurious to the hull analysis (left out of its model), %d allowed", n, a.opt.AllowExtra)
		}
		return ""
	}},
	{"tolerance", func(a *audit) string {
		beyond := 0
		for _, s := range a.rep.Sites {
			if s.WithinTolerance != nil && !*s.WithinTolerance {
				beyond++
			}
		}
		u := notation.Unit(a.rep.Unit)
		switch {
		case beyond == 0:
			return ""
		case a.registered:
			return fmt.Sprintf("%d matched site(s) beyond the tolerance of %g%s (largest residual %.4g%s)", beyond, a.tol, u, a.rep.Max, u)
		}
		return fmt.Sprintf("%d site(s) beyond the tolerance of %g%s from the sample's own hull model (largest %.4g%s)", beyond, a.tol, u, a.rep.Max, u)
	}},
	{"design hull", func(a *audit) string {
		if a.design == nil || a.design.HullErr == nil {
			return ""
		}
		return fmt.Sprintf("the design's hull could not be analysed: %v", a.design.HullErr)
	}},
	{"hull agreement", func(a *audit) string {
		if c := a.rep.Hull.Comparison; c != nil && !c.Agree {
			return "hull: " + c.Verdict
		}
		return ""
	}},
}
