package design

import (
	"math"
	"strings"
)

// Family names a design family. Its values are the family names of the
// JSON spec and of "phasonhull generate".
type Family string

// The design families, in documentation order.
const (
	Periodic     Family = "periodic"
	Modulated    Family = "modulated"
	Decorated    Family = "decorated"
	Loop         Family = "loop"
	CircleMap    Family = "circle-map"
	TwoAngle     Family = "two-angle"
	MultiAngle   Family = "multi-angle"
	Sturmian     Family = "sturmian"
	Substitution Family = "substitution"
	Random       Family = "random"
	// The two-dimensional families: plates of sites (GeneratePlane).
	Plate   Family = "plate"
	Twisted Family = "twisted"
)

// family is one entry of the family table: everything the package and its
// users know about a family is here, in one place.
type family struct {
	name Family
	// uses lists the family's parameters (JSON and flag names).
	uses map[string]bool
	// formula is the construction, for the notes of a generated pattern;
	// help says what the family is and what its parameters mean, for help
	// texts (continuation lines start with "\n").
	formula, help string
	// defaults fills in the family's defaults beyond spacing; nil when
	// there are none.
	defaults func(*Spec)
	// dim is 2 for a family of plates, 0 (read as 1) for chains.
	dim int
	// check refuses parameters out of range (on a spec with defaults);
	// build makes the unperturbed design of a chain, plane the
	// unperturbed sites of a plate (the one or the other, by dim).
	check func(Spec) error
	build func(Spec) (base, error)
	plane func(Spec) [][2]float64
	// closed is what a spec of the family fixes in closed form (on a spec
	// with defaults); nil when it fixes nothing.
	closed func(Spec) ClosedForm
	// phase names the parameter that moves the pattern along its hull,
	// one turn for one unit ("" when the family has none), and field
	// points at it in a spec.
	phase string
	field func(*Spec) *float64
}

// table returns the family table, in documentation order.
func table() []family {
	phase := func(s *Spec) *float64 { return &s.Phase }
	return []family{
		{
			name: Periodic, uses: uses("cell"),
			formula: "a repeated cell of spacings",
			help:    "a repeated cell of spacings (--cell)",
			check:   checkPeriodic, build: buildPeriodic,
			closed: func(s Spec) ClosedForm { return ClosedForm{Period: cellPeriod(s.Cell)} },
		},
		{
			name: Modulated, uses: uses("spacing", "theta", "phase", "sin", "cos", "amp"),
			formula:  "x_n = n·L + Σ_k (a_k sin 2πk(nθ+φ) + b_k cos 2πk(nθ+φ))",
			help:     "x_n = n·L + Σ_k (a_k sin 2πk(nθ+φ) + b_k cos 2πk(nθ+φ))",
			defaults: defaultsModulated,
			check:    checkModulated, build: buildModulated,
			closed: closedModulated,
			phase:  "phase", field: phase,
		},
		{
			name: Decorated, uses: uses("cell", "theta", "phase", "sin", "cos", "thetas", "amps", "phases"),
			formula: "x_n = Σ_{m<n} cell[m mod p] + Σ_k (a_k sin 2πk(nθ+φ) + b_k cos 2πk(nθ+φ)) (one angle) or + Σ_k a_k sin 2π(nθ_k+φ+φ_k) (thetas), p spacings in the cell",
			help: "a repeated cell of p spacings (--cell) decorating a modulation:\n" +
				"x_n = Σ_{m<n} cell[m mod p] + Σ_k (a_k sin 2πk(nθ+φ) + b_k cos 2πk(nθ+φ));\n" +
				"its hull is p circles. With --thetas, --amps (--phases) instead of\n" +
				"--theta, --sin, --cos: x_n = Σ_{m<n} cell[m mod p] + Σ_k a_k sin 2π(nθ_k+φ+φ_k),\n" +
				"one to three angles; its hull is p d-tori",
			defaults: defaultsMultiAngle,
			check:    checkDecorated, build: buildDecorated,
			closed: closedDecorated,
			phase:  "phase", field: phase,
		},
		{
			name: Loop, uses: uses("spacing", "phase", "amp", "radius-cos", "radius-sin", "step"),
			formula: "x_n = n·L + amp·X_n/R, X_n the first coordinate of points an arc step·perimeter apart on r(φ) = R(1 + Σ_k (c_k cos kφ + s_k sin kφ))",
			help: "sites an arc --step·perimeter apart on r(φ) = R(1 + Σ_k (c_k cos kφ\n" +
				"+ s_k sin kφ)); x_n = n·L + amp·X_n/R; rotation number = --step",
			check: checkLoop, build: buildLoop,
			closed: func(s Spec) ClosedForm { return oneAngle(s.Amp, s.Step) },
			phase:  "phase", field: phase,
		},
		{
			name: CircleMap, uses: uses("spacing", "phase", "amp", "omega", "k"),
			formula: "x_n = n·L + amp·sin 2πψ_n, ψ_{n+1} = ψ_n + Ω − (K/2π) sin 2πψ_n, ψ_0 = phase",
			help:    "x_n = n·L + amp·sin 2πψ_n, ψ_{n+1} = ψ_n + Ω − (K/2π) sin 2πψ_n",
			check:   checkCircleMap, build: buildCircleMap,
			closed: closedCircleMap,
			phase:  "phase", field: phase,
		},
		{
			name: TwoAngle, uses: uses("spacing", "theta", "phase", "amp", "theta2", "phase2", "amp2"),
			formula: "x_n = n·L + amp·sin 2π(nθ1+φ1) + amp2·sin 2π(nθ2+φ2)",
			help:    "x_n = n·L + a sin 2π(nθ1+φ1) + a2 sin 2π(nθ2+φ2)",
			check:   checkTwoAngle, build: buildTwoAngle,
			closed: closedTwoAngle,
			phase:  "phase", field: phase,
		},
		{
			name: MultiAngle, uses: uses("spacing", "thetas", "amps", "phases"),
			formula: "x_n = n·L + Σ_k a_k sin 2π(nθ_k+φ_k), k = 1..d, d ≤ 3",
			help: "x_n = n·L + Σ_k a_k sin 2π(nθ_k+φ_k) over one to three angles\n" +
				"(--thetas, --amps, --phases); its hull is a d-torus",
			defaults: defaultsMultiAngle,
			check:    checkMultiAngle, build: buildMultiAngle,
			closed: closedMultiAngle,
			phase:  "phases", field: firstPhase,
		},
		{
			name: Sturmian, uses: uses("tiles", "theta", "intercept"),
			formula: "tile n is the second letter when ⌊(n+1)θ+ρ⌋ − ⌊nθ+ρ⌋ = 1, else the first",
			help: "two tiles in the mechanical word of slope θ and intercept ρ; the\n" +
				"letter that sorts second has frequency θ",
			defaults: defaultsSturmian,
			check:    checkSturmian, build: buildSturmian,
			closed: func(s Spec) ClosedForm { return ClosedForm{Angles: []float64{s.Theta}, Tiling: true} },
			phase:  "intercept", field: func(s *Spec) *float64 { return &s.Intercept },
		},
		{
			name: Substitution, uses: uses("tiles", "rule"),
			formula:  "the tile word of a substitution rule iterated from its first letter",
			help:     "the tile word of a substitution rule, iterated from its first letter",
			defaults: defaultsSubstitution,
			check:    checkSubstitution, build: buildSubstitution,
			closed: closedSubstitution,
		},
		{
			name: Random, uses: uses("spacing", "dist", "spread"),
			formula: "independent random spacings",
			help: "independent spacings: uniform on [L(1−spread), L(1+spread)],\n" +
				"exponential L(1−spread) + L·spread·E (mean L, sd L·spread), or\n" +
				"gaussian L(1 + spread·Z), Z normal cut at ±4 (spread < 0.25)",
			defaults: defaultsRandom,
			check:    checkRandom, build: buildRandom,
		},
		{
			name: Plate, dim: 2, uses: uses("spacing", "lattice", "rotation", "amps", "phases", "polar"),
			formula: "x_n = n1·a1 + n2·a2 + Σ_k amps[k]·ê_k·sin 2πψ_k, ψ = phases + A·n mod 1, A = rotation (d × 2), on a Sites × Sites patch",
			help: "a square or hex lattice (--lattice, step --spacing) displaced by d = 0..3\n" +
				"waves: x_n = n1·a1 + n2·a2 + Σ_k a_k ê_k sin 2πψ_k, ψ = ψ0 + A·n mod 1,\n" +
				"A = --rotation (d rows of 2, turns per lattice step), a_k = --amps,\n" +
				"ψ0 = --phases, ê_k along wave k or at --polar degrees; --sites per side",
			defaults: defaultsPlane,
			check:    checkPlate, plane: buildPlate,
			phase: "phases", field: firstPlanePhase,
		},
		{
			name: Twisted, dim: 2, uses: uses("spacing", "lattice", "twist", "scale", "amp", "phases"),
			formula: "x_n = n1·a1 + n2·a2 + amp·(ê1 sin 2πψ1 + ê2 sin 2πψ2), ψ = phases + A·n mod 1, A = scale·R(twist), ê_k the axes turned by twist, on a Sites × Sites patch",
			help: "a square or hex lattice on a periodic potential turned by --twist\n" +
				"degrees: A = s·R(twist) (s = --scale, default 1), x_n = n1·a1 + n2·a2\n" +
				"+ amp·(ê1 sin 2πψ1 + ê2 sin 2πψ2), ê the x and y axes turned by the\n" +
				"twist; --sites per side",
			defaults: defaultsPlane,
			check:    checkTwisted, plane: buildTwisted,
			phase: "phases", field: firstPlanePhase,
		},
	}
}

// lookupFamily returns the table entry of the given family.
func lookupFamily(name Family) (family, bool) {
	for _, f := range table() {
		if f.name == name {
			return f, true
		}
	}
	return family{}, false
}

// Families returns the design families of chains (Generate), in
// documentation order; PlaneFamilies those of plates.
func Families() []Family { return familiesOf(1) }

// PlaneFamilies returns the two-dimensional design families
// (GeneratePlane), in documentation order.
func PlaneFamilies() []Family { return familiesOf(2) }

func familiesOf(dim int) []Family {
	var out []Family
	for _, f := range table() {
		if max(f.dim, 1) == dim {
			out = append(out, f.name)
		}
	}
	return out
}

// Dimension is 1 for a family of chains (Generate), 2 for a family of
// plates (GeneratePlane), 0 for an unknown family.
func (f Family) Dimension() int {
	fam, ok := lookupFamily(f)
	if !ok {
		return 0
	}
	return max(fam.dim, 1)
}

// FamilyNames returns the names of the design families, those of chains
// and then those of plates, joined by ", ", for messages and help texts.
func FamilyNames() string {
	var b strings.Builder
	for i, f := range append(Families(), PlaneFamilies()...) {
		if i > 0 {
			b.WriteString(", ")
		}
		b.WriteString(string(f))
	}
	return b.String()
}

// Help describes the family and its parameters in a line or two for help
// texts (lines after the first are separated by "\n"); "" for an unknown
// family.
func (f Family) Help() string {
	fam, _ := lookupFamily(f)
	return fam.help
}

// PhaseParam names the parameter that moves the family's pattern along its
// hull, one unit for one turn: "phase" (φ of modulated, decorated and
// two-angle, ψ_0 of circle-map, the starting arc fraction of loop),
// "phases" (its first entry, φ_1 of multi-angle) or "intercept"
// (sturmian). It is "" for a family without one.
func (f Family) PhaseParam() string {
	fam, _ := lookupFamily(f)
	return fam.phase
}

// ShiftPhase returns the spec with its phase parameter (see
// Family.PhaseParam) advanced by the given turns and reduced into [0, 1).
// It reports false, and returns s unchanged, for a family without a phase.
func (s Spec) ShiftPhase(turns float64) (Spec, bool) {
	fam, ok := lookupFamily(s.Family)
	if !ok || fam.field == nil {
		return s, false
	}
	p := fam.field(&s)
	u := *p + turns
	*p = u - math.Floor(u)
	return s, true
}

// ClosedForm is what a design spec fixes of its pattern in closed form.
// At most one of Period and Angles is set; neither when the spec fixes
// nothing, and Note then says why when there is a reason to give.
type ClosedForm struct {
	// Period is the number of sites per cell of a periodic design: 1 for
	// a lattice (a modulation whose amplitudes are all zero, say).
	Period int
	// Angles are the construction's rotation numbers in turns, exact by
	// construction and not folded: one for a circle, two for a torus,
	// three for a 3-torus.
	Angles []float64
	// Components is the number of components of a hull with angles: p
	// for a cell of p spacings decorating a modulation (p circles); 0
	// stands for one.
	Components int
	// Tiling reports that the angles are those of a tile word (the slope
	// of a Sturmian word, a letter frequency of a substitution): they
	// name the word's rotation but not the shape of its hull.
	Tiling bool
	// Note says why nothing is fixed, or "".
	Note string
}

// ClosedForm returns what the spec fixes in closed form, with its
// family's defaults applied. The entries of the family table say, per
// family:
//
//   - periodic: the smallest period of the cell;
//   - modulated: g·θ, g the greatest common divisor of the harmonic orders
//     with a nonzero amplitude (a modulation in harmonics 2, 4, ... of θ
//     turns with angle 2θ); period 1 when every amplitude is zero;
//   - decorated: g·θ as for modulated, on as many components as the
//     cell's smallest period p; period p when every amplitude is zero;
//   - two-angle: θ and θ2, or the one whose amplitude is nonzero;
//   - multi-angle: the angles θ_k whose amplitude is nonzero;
//   - loop: the arc step; circle-map with K = 0: Ω, a rigid rotation (a
//     circle map with K > 0 has a rotation number that depends on Ω and K
//     and is not fixed); period 1 for either when amp is zero;
//   - sturmian: the slope θ; substitution "fibonacci": the frequency 1/φ²
//     of its letter B, the slope of the Fibonacci word (both tilings);
//   - random: nothing.
func (s Spec) ClosedForm() ClosedForm {
	c := s.WithDefaults()
	fam, ok := lookupFamily(c.Family)
	if !ok || fam.closed == nil {
		return ClosedForm{}
	}
	return fam.closed(c)
}

// params lists the family's parameters in documentation order.
func (f family) params() []string {
	var names []string
	for _, p := range familyParams() {
		if f.uses[p.name] {
			names = append(names, p.name)
		}
	}
	return names
}

// takes lists the family's parameters for messages.
func (f family) takes() string { return strings.Join(f.params(), ", ") }

func defaultsModulated(s *Spec) {
	if s.Amp != 0 && len(s.Sin) == 0 {
		s.Sin, s.Amp = []float64{s.Amp}, 0
	}
}

func defaultsSturmian(s *Spec) {
	if len(s.Tiles) == 0 {
		s.Tiles = defaultTiles()
	}
}

func defaultsSubstitution(s *Spec) {
	if len(s.Tiles) == 0 {
		if r, err := parseRule(s.Rule); err == nil && r.alphabet == "AB" {
			s.Tiles = defaultTiles()
		}
	}
}

func defaultsRandom(s *Spec) {
	if s.Dist == "" {
		s.Dist = "uniform"
	}
	if s.Spread == 0 {
		s.Spread = 0.5
	}
}

// oneAngle is the closed form of a lattice modulated along one rotation:
// the angle, or period 1 when the modulation's amplitude is zero.
func oneAngle(amp, angle float64) ClosedForm {
	if amp == 0 {
		return ClosedForm{Period: 1}
	}
	return ClosedForm{Angles: []float64{angle}}
}

func closedModulated(s Spec) ClosedForm {
	g := 0
	for k := 1; k <= max(len(s.Sin), len(s.Cos)); k++ {
		if at(s.Sin, k-1) != 0 || at(s.Cos, k-1) != 0 {
			g = gcd(g, k)
		}
	}
	if g == 0 {
		return ClosedForm{Period: 1}
	}
	return ClosedForm{Angles: []float64{float64(g) * s.Theta}}
}

func closedCircleMap(s Spec) ClosedForm {
	if s.Amp != 0 && s.K != 0 {
		return ClosedForm{Note: "the rotation number of a circle map with K > 0 depends on Ω and K: the spec does not fix it"}
	}
	return oneAngle(s.Amp, s.Omega)
}

func closedTwoAngle(s Spec) ClosedForm {
	switch {
	case s.Amp != 0 && s.Amp2 != 0:
		return ClosedForm{Angles: []float64{s.Theta, s.Theta2}}
	case s.Amp2 != 0:
		return ClosedForm{Angles: []float64{s.Theta2}}
	}
	return oneAngle(s.Amp, s.Theta)
}

func closedSubstitution(s Spec) ClosedForm {
	if s.Rule != "fibonacci" {
		return ClosedForm{Note: "the spec fixes no angle for the substitution rule " + s.Rule}
	}
	phi := (1 + math.Sqrt(5)) / 2
	return ClosedForm{Angles: []float64{1 / (phi * phi)}, Tiling: true}
}

func at(v []float64, i int) float64 {
	if i < len(v) {
		return v[i]
	}
	return 0
}

func gcd(a, b int) int {
	for b != 0 {
		a, b = b, a%b
	}
	return a
}

// cellPeriod returns the smallest p dividing len(cell) for which the cell
// repeats itself every p entries.
func cellPeriod(cell []float64) int {
	n := len(cell)
	for p := 1; p < n; p++ {
		if n%p != 0 {
			continue
		}
		ok := true
		for i := p; i < n && ok; i++ {
			ok = cell[i] == cell[i-p]
		}
		if ok {
			return p
		}
	}
	return max(n, 1)
}
