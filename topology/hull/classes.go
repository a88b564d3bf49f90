package hull

import (
	"fmt"

	"phasonhull/topology"
)

// ClassInfo is one class of hull as the analysis knows it: what it means,
// the Betti numbers its hull shows, and what generates its gap labels.
// Classes lists every class once; a new class is one entry there and one
// rule in the decision list (see rules in decide.go).
type ClassInfo struct {
	Class Class
	// Summary says what the class means, in a phrase short enough for one
	// line of a help text.
	Summary string
	// Betti gives the Betti numbers (b0, b1, b2) the class reports.
	Betti string
	// TorusDimension is the dimension d of the torus each component of the hull
	// is (0 for points); -1 for the classes that are not p components ×
	// a d-torus (cantor, disordered, unresolved).
	TorusDimension int
	// Generators names the generators of its gap-label group.
	Generators string

	// betti returns the Betti numbers reported for a hull of the class
	// with p components; the classes with angles are the ones the
	// barcodes name, and they name them by these numbers.
	betti func(p int) []int
	// angles is the number of angles of the hull, its torus dimension
	// (0 for the classes the barcodes do not name).
	angles int
	// reason is the reason given when the barcodes name the class.
	reason string
	// labels fills in the gap-label group of a decided hull (nil: the
	// group is Z, no label).
	labels func(a *analysis, g *GapLabels)
}

// classTable is the class table, in the order the classes are listed.
var classTable = []ClassInfo{
	{
		Class: Point, Summary: "periodic, one site per period",
		Betti: "(1, 0, 0)", TorusDimension: 0, Generators: "1: no label inside the spectrum",
		betti: torusBetti(0),
	},
	{
		Class: Finite, Summary: "periodic with p > 1 sites per period: the hull is p points",
		Betti: "(p, 0, 0)", TorusDimension: 0, Generators: "1 and 1/p: IDS = k/p",
		betti:  torusBetti(0),
		labels: periodLabels,
	},
	{
		Class: Circle, Summary: "one angle θ: the shift turns p circles (p = 1 plain)",
		Betti: "(p, p, 0)", TorusDimension: 1, Generators: "1, 1/p and θ",
		betti: torusBetti(1), angles: 1,
		reason: "one connected component and one persistent loop: the shift turns a circle",
		labels: angleLabels,
	},
	{
		Class: Torus, Summary: "two angles θ1, θ2: the shift turns p two-tori",
		Betti: "(p, 2p, p)", TorusDimension: 2, Generators: "1, 1/p, θ1 and θ2",
		betti: torusBetti(2), angles: 2,
		reason: "one component, two persistent loops and one persistent 2-cycle: the shift turns a two-torus",
		labels: angleLabels,
	},
	{
		Class: Torus3, Summary: "three angles θ1, θ2, θ3: the shift turns p three-tori",
		Betti: "(p, 3p, 3p); b3 = p is not computed", TorusDimension: 3, Generators: "1, 1/p, θ1, θ2 and θ3",
		betti: torusBetti(3), angles: 3,
		reason: "one component, three persistent loops and three persistent 2-cycles: the shift turns a three-torus",
		labels: angleLabels,
	},
	{
		Class: Cantor, Summary: "tiles whose aperiodic word has low complexity: a Cantor set",
		Betti: "none (read from the tile word, not the barcodes)", TorusDimension: -1, Generators: "1 and the factor frequencies of the word",
		betti:  noBetti,
		labels: wordLabels,
	},
	{
		Class: Disordered, Summary: "no low-dimensional hull at the resolution of the data",
		Betti: "none", TorusDimension: -1, Generators: "1: no label",
		betti: noBetti,
	},
	{
		Class: Unresolved, Summary: "the data cannot decide; the reason says what would",
		Betti: "as the barcodes show them", TorusDimension: -1, Generators: "1: no label",
		betti: noBetti,
	},
}

func noBetti(int) []int { return []int{} }

// torusBetti returns the Betti numbers b0, b1, b2 of p disjoint copies of
// the d-torus: p·C(d, k) (Künneth formula; common practice). b3 is left
// out: the barcodes are computed up to H2.
func torusBetti(d int) func(p int) []int {
	return func(p int) []int {
		b := make([]int, 3)
		for k := range b {
			b[k] = max(p, 1) * binomial(d, k)
		}
		return b
	}
}

// binomial returns C(n, k), 0 outside 0 ≤ k ≤ n.
func binomial(n, k int) int {
	if k < 0 || k > n {
		return 0
	}
	c := 1
	for i := 1; i <= k; i++ {
		c = c * (n - k + i) / i
	}
	return c
}

// maxComponents bounds the number of components p the barcodes name.
const maxComponents = 8

// classOf returns the class of p components × a d-torus.
func classOf(p, d int) Class {
	switch d {
	case 0:
		if p == 1 {
			return Point
		}
		return Finite
	case 1:
		return Circle
	case 2:
		return Torus
	}
	return Torus3
}

// Classes returns the classes of hull Analyze can name, with what each
// means, in the order they are listed in help texts and tables.
func Classes() []ClassInfo {
	return append([]ClassInfo(nil), classTable...)
}

// info returns the table entry of class c.
func info(c Class) ClassInfo {
	for _, ci := range classTable {
		if ci.Class == c {
			return ci
		}
	}
	panic(fmt.Sprintf("hull: class %q is not in the class table", c))
}

// namedByBetti returns the class with angles the barcodes name by Betti
// numbers b, and its number of components p: every hypothesis of p
// components × a d-torus, 1 ≤ p ≤ maxComponents and 1 ≤ d ≤ 3, is compared
// with b.
func namedByBetti(b [3]int) (ClassInfo, int, bool) {
	for _, ci := range classTable {
		if ci.angles == 0 {
			continue
		}
		for p := 1; p <= maxComponents; p++ {
			if [3]int(ci.betti(p)) == b {
				return ci, p, true
			}
		}
	}
	return ClassInfo{}, 0, false
}

// periodLabels: the group Z + Z/p of a periodic chain.
func periodLabels(a *analysis, g *GapLabels) {
	p := a.res.Hull.Period
	g.Generators = append(g.Generators, 1/float64(p))
	g.Labels = topology.PeriodicLabels(p)
}

// angleLabels: the group (1/p)Z + Zθ1 + … + Zθd of p components × a
// d-torus, generated by 1, 1/p (when p > 1) and the measured angles; the
// labels are n + k/p + m·θ with |k|, |m_i| ≤ MaxCoeff.
func angleLabels(a *analysis, g *GapLabels) {
	gens := a.res.Angles
	if p := a.res.Hull.Components; p > 1 {
		gens = append([]float64{1 / float64(p)}, gens...)
	}
	g.Generators = append(g.Generators, gens...)
	if len(gens) == 0 {
		return
	}
	g.Labels = topology.Labels(gens, a.opt.MaxCoeff)
}

// wordLabels: the group generated by 1 and the factor frequencies of the
// tile word, through the slope of a Sturmian word or the module found by
// integer-relation detection.
func wordLabels(a *analysis, g *GapLabels) {
	switch m := a.module; {
	case len(a.res.Angles) > 0:
		angleLabels(a, g)
	case m != nil && m.Rank == 1:
		g.Generators = []float64{1, m.Basis[0]}
		g.Labels = topology.PeriodicLabels(m.Denominator)
	case m != nil:
		gens := m.Basis[1:]
		if m.Denominator > 1 {
			gens = m.Basis
		}
		g.Generators = append(g.Generators, gens...)
		if len(gens) <= maxLabelGenerators {
			g.Labels = topology.Labels(gens, a.opt.MaxCoeff)
		} else {
			a.res.Warnings = append(a.res.Warnings, fmt.Sprintf("the factor frequencies show too few integer relations at the precision %d letters allow (rank %d): the gap-label group is not resolved and no labels are listed; more sites would resolve it", a.p.Len()-1, m.Rank))
		}
	}
}
