package hull

import (
	"fmt"
	"math"
	"slices"
	"strings"

	"phasonhull/pattern/design"
	"phasonhull/topology"
)

// compareSigmas is the number of combined standard uncertainties within
// which two angles agree (common practice: a 3σ test).
const compareSigmas = 3

// Comparison is the hull-level verdict on a measured sample against its
// design: whether the two hulls are of the same class and, for a circle or
// a torus, whether the angles generate the same frequency module within
// their uncertainties.
type Comparison struct {
	DesignClass   Class `json:"design_class"`
	MeasuredClass Class `json:"measured_class"`
	SameClass     bool  `json:"same_class"`
	// Periods of point and finite hulls (0 otherwise).
	DesignPeriod   int `json:"design_period,omitempty"`
	MeasuredPeriod int `json:"measured_period,omitempty"`
	// Angles holds the angle checks, the measured sample against the
	// design's analysis and, when a Reference fixes the angles, against
	// the reference.
	Angles []AngleCheck `json:"angles"`
	// Agree is the verdict; Verdict says it in a sentence, Notes add what
	// the reader should know (a design whose own analysis differs from
	// its spec, say).
	Agree   bool     `json:"agree"`
	Verdict string   `json:"verdict"`
	Notes   []string `json:"notes"`
}

// AngleCheck is one comparison of angles.
//
// For a circle, Difference is |Fold(θ) − Fold(θ′)|. For a torus it is the
// smallest tolerance at which topology.SameModule accepts the two bases
// (coefficients up to DefaultMaxCoeff): zero for the same module given in
// two bases. Allowed is compareSigmas·σ plus ModelTolerance, σ the
// combined standard uncertainty √(Σσ_i²) of the angles on both sides (the
// sample's alone against a reference, which is exact), and ModelTolerance
// the distance between the design's analysis and its reference: the
// analysis's own error on the design, 0 without a reference.
type AngleCheck struct {
	// Against is "design" (the analysis of the design) or "reference"
	// (the values a design spec fixes).
	Against        string    `json:"against"`
	Expected       []float64 `json:"expected"`
	ExpectedErr    []float64 `json:"expected_uncertainty"`
	Measured       []float64 `json:"measured"`
	MeasuredErr    []float64 `json:"measured_uncertainty"`
	Difference     float64   `json:"difference"`
	Sigma          float64   `json:"sigma"`
	ModelTolerance float64   `json:"model_tolerance"`
	Allowed        float64   `json:"allowed"`
	Within         bool      `json:"within"`
}

// Reference is what a design spec fixes of its hull in closed form.
type Reference struct {
	Family design.Family `json:"family"`
	// Class is the hull class the spec implies, "" when it does not fix
	// one; Period goes with the point and finite classes.
	Class  Class `json:"class,omitempty"`
	Period int   `json:"period,omitempty"`
	// Angles are the exact angles, folded into [0, ½] and sorted; nil when
	// the spec does not fix them.
	Angles []float64 `json:"angles,omitempty"`
	// Rotation is the exact rotation matrix of a plate family's spec
	// (design.Spec.Rotation), d rows of 2 numbers in turns per lattice
	// step; nil for a chain.
	Rotation [][]float64 `json:"rotation,omitempty"`
	// Note says why something is not fixed ("" when all is).
	Note string `json:"note,omitempty"`
}

// SpecReference returns what a design spec fixes of its hull: the class
// and angles of its closed form (design.Spec.ClosedForm, which says per
// family what the construction fixes). A period makes a point or finite
// hull; one angle a circle and two a torus, except for the angles of a
// tile word (Sturmian, substitution), which fix no class: a word of two
// tile lengths may look like clusters to the analysis.
//
// An angle within 10⁻⁹ of a rational p/q with q no larger than the number
// of sites makes the design periodic over its length, and the reference
// then fixes nothing.
func SpecReference(s design.Spec) Reference {
	c := s.WithDefaults()
	ref := Reference{Family: c.Family}
	fixed := c.ClosedForm()
	switch {
	case fixed.Period == 1:
		ref.Class, ref.Period = Point, 1
		return ref
	case fixed.Period > 1:
		ref.Class, ref.Period = Finite, fixed.Period
		return ref
	case fixed.Note != "":
		ref.Note = fixed.Note
		return ref
	case len(fixed.Angles) == 0:
		ref.Note = "the " + string(c.Family) + " family fixes no hull"
		return ref
	}
	class := Circle
	switch {
	case fixed.Tiling:
		class = ""
	case len(fixed.Angles) == 2:
		class = Torus
	}
	for _, a := range fixed.Angles {
		if p, q, ok := nearRational(a, c.Sites); ok {
			ref.Note = fmt.Sprintf("the angle %.10g is the rational %d/%d: the design is periodic over its length, and the spec fixes nothing else", a, p, q)
			return ref
		}
	}
	ref.Class, ref.Angles = class, topology.CanonicalBasis(fixed.Angles)
	return ref
}

// nearRational reports whether a lies within 10⁻⁹ of p/q for some q ≤ maxQ
// (the smallest such q).
func nearRational(a float64, maxQ int) (p, q int, ok bool) {
	for q = 1; q <= maxQ; q++ {
		p = int(math.Round(a * float64(q)))
		if math.Abs(a-float64(p)/float64(q)) <= 1e-9 {
			return p, q, true
		}
	}
	return 0, 0, false
}

// Compare compares the hull analysis of a measured sample with that of its
// design. It is CompareWith without a reference.
func Compare(design, measured *Result) Comparison {
	return CompareWith(design, measured, nil)
}

// CompareWith compares the hull analysis of a measured sample with that of
// its design and, when ref fixes angles, with those too.
//
// The hulls agree when their classes are the same and: for point and
// finite hulls, the periods are equal; for a circle or a torus, every
// angle check is within its allowance (see AngleCheck). Two unresolved
// hulls agree on class, and the verdict says that this confirms little.
func CompareWith(design, measured *Result, ref *Reference) Comparison {
	c := Comparison{
		DesignClass: design.Hull.Class, MeasuredClass: measured.Hull.Class,
		DesignPeriod: design.Hull.Period, MeasuredPeriod: measured.Hull.Period,
		Angles: []AngleCheck{}, Notes: []string{},
	}
	c.SameClass = c.DesignClass == c.MeasuredClass
	if ref != nil && ref.Class != "" && (ref.Class != design.Hull.Class || ref.Period != design.Hull.Period) {
		c.Notes = append(c.Notes, fmt.Sprintf("the analysis of the design itself finds a %s hull where its %s spec implies %s", describeClass(design.Hull.Class, design.Hull.Period), ref.Family, describeClass(ref.Class, ref.Period)))
	}
	if ref != nil && ref.Note != "" {
		c.Notes = append(c.Notes, ref.Note)
	}
	if !c.SameClass {
		c.Verdict = fmt.Sprintf("the sample's hull is %s, the design's %s: the sample does not have the intended hull",
			describeClass(c.MeasuredClass, c.MeasuredPeriod), describeClass(c.DesignClass, c.DesignPeriod))
		return c
	}
	switch c.DesignClass {
	case Point, Finite:
		c.Agree = c.DesignPeriod == c.MeasuredPeriod
		if c.Agree {
			c.Verdict = fmt.Sprintf("both hulls are %s", describeClass(c.DesignClass, c.DesignPeriod))
		} else {
			c.Verdict = fmt.Sprintf("both hulls are finite, but the sample repeats every %d sites and the design every %d", c.MeasuredPeriod, c.DesignPeriod)
		}
		return c
	case Unresolved:
		c.Agree = true
		c.Verdict = "neither hull is resolved: the classes agree, which confirms little; the reasons in the two analyses say what would decide"
		return c
	}

	if design.Dimension == 2 && measured.Dimension == 2 {
		return comparePlanes(c, design, measured, ref)
	}
	// Circle or torus: angles against the design's analysis, and against
	// the reference when it fixes them.
	modelTol := 0.0
	useRef := ref != nil && len(ref.Angles) == len(design.Angles) && len(ref.Angles) > 0
	if useRef {
		modelTol = angleDistance(ref.Angles, design.Angles)
	}
	chk := checkAngles("design", design.Angles, design.AngleUncertainty, measured, modelTol)
	c.Angles = append(c.Angles, chk)
	c.Agree = chk.Within
	if useRef {
		// The reference is exact: only the sample's uncertainty and the
		// analysis's own error on the design enter the allowance.
		rc := checkAngles("reference", ref.Angles, make([]float64, len(ref.Angles)), measured, modelTol)
		c.Angles = append(c.Angles, rc)
		c.Agree = c.Agree && rc.Within
	}
	what, plural := "angle", "circles"
	if c.DesignClass == Torus {
		what, plural = "frequency module", "two-tori"
	}
	var parts []string
	for _, a := range c.Angles {
		of := "the design's analysis"
		if a.Against == "reference" {
			of = "the exact value of the spec"
		}
		rel := "allowed"
		if !a.Within {
			rel = "beyond the allowed"
		}
		parts = append(parts, fmt.Sprintf("%.3g from %s (%s %.3g)", a.Difference, of, rel, a.Allowed))
	}
	if c.Agree {
		c.Verdict = fmt.Sprintf("both hulls are %s; the sample's %s is %s", plural, what, strings.Join(parts, " and "))
	} else {
		c.Verdict = fmt.Sprintf("both hulls are %s, but the sample's %s is %s: the sample does not have the intended angle", plural, what, strings.Join(parts, " and "))
	}
	return c
}

// checkAngles compares expected angles (with uncertainties) with the
// measured ones.
func checkAngles(against string, exp, expErr []float64, m *Result, modelTol float64) AngleCheck {
	a := AngleCheck{
		Against: against, Expected: slices.Clone(exp), ExpectedErr: slices.Clone(expErr),
		Measured: slices.Clone(m.Angles), MeasuredErr: slices.Clone(m.AngleUncertainty),
		ModelTolerance: modelTol,
	}
	var v float64
	for _, e := range expErr {
		v += e * e
	}
	for _, e := range m.AngleUncertainty {
		v += e * e
	}
	a.Sigma = math.Sqrt(v)
	a.Difference = angleDistance(exp, m.Angles)
	a.Allowed = compareSigmas*a.Sigma + modelTol
	a.Within = a.Difference <= a.Allowed
	return a
}

// angleDistance is |Fold(a) − Fold(b)| for one angle each, and for more
// the smallest tolerance at which topology.SameModule accepts the two
// bases with coefficients up to DefaultMaxCoeff, found by bisection
// (acceptance only grows with the tolerance). Bases of different lengths
// are ½ apart, the largest distance there is.
func angleDistance(a, b []float64) float64 {
	if len(a) != len(b) || len(a) == 0 {
		return 0.5
	}
	if len(a) == 1 {
		return math.Abs(topology.Fold(a[0]) - topology.Fold(b[0]))
	}
	if topology.SameModule(a, b, DefaultMaxCoeff, 0) {
		return 0
	}
	lo, hi := 0.0, 0.5
	if !topology.SameModule(a, b, DefaultMaxCoeff, hi) {
		return hi
	}
	for range 60 {
		mid := (lo + hi) / 2
		if topology.SameModule(a, b, DefaultMaxCoeff, mid) {
			hi = mid
		} else {
			lo = mid
		}
	}
	return hi
}

func describeClass(c Class, period int) string {
	switch c {
	case Point:
		return "a point (periodic, one site per period)"
	case Finite:
		return fmt.Sprintf("finite (periodic, %d sites per period)", period)
	case Circle:
		return "a circle"
	case Torus:
		return "a two-torus"
	case "":
		return "no class"
	}
	return string(c)
}
