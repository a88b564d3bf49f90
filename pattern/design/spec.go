package design

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"slices"
	"sort"
	"strconv"
	"strings"
	"unicode"

	"phasonhull/pattern"
)

// Defaults and limits of a Spec.
const (
	DefaultSites = 200 // sites when none are asked for
	// DefaultSitesPerSide is the sites per side of a plate (a 2D family)
	// when none are asked for: 40 × 40 = 1600 sites.
	DefaultSitesPerSide = 40
	DefaultSeed         = 1          // seed of the random choices when none is given
	MaxSites            = 10_000_000 // most sites a design may hold, perturbations included
	MaxSpecBytes        = 1 << 20    // largest spec file ReadSpec reads
)

// Spec describes one generated design. Its JSON names are the flag names of
// "phasonhull generate". A zero numeric field means "not given": the family
// default applies where it has one (see WithDefaults), and a field the
// family does not use must be left zero.
type Spec struct {
	// Family is one of Families().
	Family Family `json:"family"`
	// Sites is the number of sites of the design before perturbation; for
	// the two-dimensional families (plate, twisted) it is the sites per
	// side of the patch, rows × columns = Sites × Sites.
	Sites int `json:"sites"`
	// Spacing is the mean spacing L (default 1) of the periodic-lattice
	// families: modulated, loop, circle-map, two-angle, multi-angle and
	// random.
	Spacing float64 `json:"spacing,omitempty"`
	// Unit is the length unit of the positions; "" leaves it unknown.
	Unit string `json:"unit,omitempty"`

	// Cell is the repeated cell of spacings of the periodic and decorated
	// families.
	Cell []float64 `json:"cell,omitempty"`

	// Theta is the angle θ, in turns, of the modulated, decorated,
	// two-angle and sturmian families; it must lie in (0, 1).
	Theta float64 `json:"theta,omitempty"`
	// Phase is the starting phase in turns: φ of modulated, decorated and
	// two-angle, ψ_0 of circle-map, the starting arc fraction of loop.
	Phase float64 `json:"phase,omitempty"`
	// Sin and Cos are the amplitudes a_k and b_k of the harmonics
	// k = 1, 2, ... of the modulated and decorated families.
	Sin []float64 `json:"sin,omitempty"`
	Cos []float64 `json:"cos,omitempty"`
	// Amp is an amplitude in the unit: a_1 of modulated (shorthand for
	// Sin[0]), a of two-angle, and the amplitude of loop and circle-map.
	Amp float64 `json:"amp,omitempty"`
	// Theta2, Phase2 and Amp2 are the second angle, phase and amplitude of
	// the two-angle family.
	Theta2 float64 `json:"theta2,omitempty"`
	Phase2 float64 `json:"phase2,omitempty"`
	Amp2   float64 `json:"amp2,omitempty"`

	// Thetas, Amps and Phases are the angles θ_k (in turns, in (0, 1)),
	// amplitudes a_k and phases φ_k (in turns; missing ones are 0) of the
	// one to three terms of the multi-angle family.
	Thetas []float64 `json:"thetas,omitempty"`
	Amps   []float64 `json:"amps,omitempty"`
	Phases []float64 `json:"phases,omitempty"`

	// RadiusCos and RadiusSin are the Fourier coefficients c_k and s_k,
	// k = 1, 2, ..., of the loop family's radius, relative to R.
	RadiusCos []float64 `json:"radius-cos,omitempty"`
	RadiusSin []float64 `json:"radius-sin,omitempty"`
	// Step is the loop family's arc step as a fraction of the perimeter,
	// in (0, 1): the construction's rotation number.
	Step float64 `json:"step,omitempty"`

	// Omega and K are the circle-map family's Ω, in [0, 1), and K, in
	// [0, 1].
	Omega float64 `json:"omega,omitempty"`
	K     float64 `json:"k,omitempty"`

	// Tiles maps each tile letter (one ASCII letter) to its length, for
	// the sturmian and substitution families. Default {"A": 1, "B": φ}
	// (φ the golden ratio) when the letters are A and B.
	Tiles map[string]float64 `json:"tiles,omitempty"`
	// Intercept is the sturmian family's intercept ρ, in [0, 1).
	Intercept float64 `json:"intercept,omitempty"`
	// Rule is the substitution family's rule: "fibonacci" (A=AB,B=A),
	// "thue-morse" (A=AB,B=BA), "period-doubling" (A=AB,B=AA), or a rule
	// written like "A=AB,B=A".
	Rule string `json:"rule,omitempty"`

	// Dist is the random family's spacing distribution: "uniform" (the
	// default) on [L(1−spread), L(1+spread)], or "exponential", a shifted
	// exponential L(1−spread) + L·spread·E with E of mean 1, so that the
	// mean is L, the standard deviation L·spread and no spacing is below
	// L(1−spread), or "gaussian", L(1 + spread·Z) with Z standard normal
	// cut at ±4 (drawn again beyond), so that the mean is L, the standard
	// deviation L·spread to within 0.1%, and spread must stay below 1/4.
	Dist string `json:"dist,omitempty"`
	// Spread is the random family's relative spread, in (0, 1); 0 stands
	// for the default 0.5.
	Spread float64 `json:"spread,omitempty"`

	// Lattice is the lattice of the two-dimensional families: "square"
	// (the default) or "hex" (hexagonal), of step "spacing" (default 1).
	Lattice string `json:"lattice,omitempty"`
	// Matrix is the plate family's matrix A ("rotation"), d rows (d = 0 to 3) of 2
	// numbers in turns per lattice step: ψ_n = ψ0 + A·n mod 1 on the
	// d-torus, for the lattice index n = (n1, n2); "amps" gives one
	// amplitude per row and "phases" ψ0 (missing entries 0).
	Matrix [][]float64 `json:"rotation,omitempty"`
	// Polar gives the plate family's polarisation of each row of A, in
	// degrees from the x axis; without it each displacement runs along its
	// wave (longitudinal).
	Polar []float64 `json:"polar,omitempty"`
	// Twist and Scale make the twisted family's matrix A = s·R(twist)
	// (twist in degrees, s default 1), R the rotation matrix.
	Twist float64 `json:"twist,omitempty"`
	Scale float64 `json:"scale,omitempty"`

	// Noise is the standard deviation of the Gaussian position noise, in
	// the unit; in two dimensions, of each coordinate (isotropic).
	Noise float64 `json:"noise,omitempty"`
	// Missing is the fraction of the design's sites removed, in [0, 1).
	Missing float64 `json:"missing,omitempty"`
	// Extra is the number of spurious sites inserted, as a fraction of the
	// design's sites.
	Extra float64 `json:"extra,omitempty"`
	// Drift is the linear scale drift, greater than −1/2 (see the package
	// documentation).
	Drift float64 `json:"drift,omitempty"`
	// Seed seeds every random choice. NewSpec and ReadSpec start it at
	// DefaultSeed; every value, 0 included, is a seed of its own.
	Seed uint64 `json:"seed"`
}

// NewSpec returns the spec of the given family with the default number of
// sites and the default seed; the family's own parameters are left for the
// caller to set.
func NewSpec(family Family) Spec {
	return Spec{Family: family, Sites: defaultSites(family), Seed: DefaultSeed}
}

// defaultSites is the family's number of sites when none is given: sites
// per side for a two-dimensional family.
func defaultSites(family Family) int {
	if family.Dimension() == 2 {
		return DefaultSitesPerSide
	}
	return DefaultSites
}

// unsetSites marks a spec read without "sites", so that ReadSpec can give
// it its family's default.
const unsetSites = math.MinInt

// ReadSpecFile reads the JSON design spec at path, as ReadSpec does; a
// file that cannot be opened gives the error of os.Open.
func ReadSpecFile(path string) (Spec, error) {
	file, err := os.Open(path)
	if err != nil {
		return Spec{}, err
	}
	defer file.Close()
	return ReadSpec(file, path)
}

// ReadSpec reads a JSON design spec from r; name is used in messages.
// Fields not given take NewSpec's defaults. Unknown fields, trailing data,
// values of the wrong type, inputs over MaxSpecBytes and specs Validate
// refuses are refused with a *pattern.InputError that names the file, the
// line and column where they are known, and the field.
func ReadSpec(r io.Reader, name string) (Spec, error) {
	data, err := io.ReadAll(io.LimitReader(r, MaxSpecBytes+1))
	if err != nil {
		return Spec{}, &pattern.InputError{File: name, Err: err}
	}
	if len(data) > MaxSpecBytes {
		return Spec{}, &pattern.InputError{File: name, Err: fmt.Errorf("a design spec is at most %d bytes", MaxSpecBytes)}
	}
	s := Spec{Sites: unsetSites, Seed: DefaultSeed}
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&s); err != nil {
		line, col, msg := describeJSONError(data, err)
		return Spec{}, &pattern.InputError{File: name, Line: line, Col: col, Err: msg}
	}
	if s.Sites == unsetSites {
		s.Sites = defaultSites(s.Family)
	}
	rest := int(dec.InputOffset())
	for rest < len(data) && strings.ContainsRune(" \t\r\n", rune(data[rest])) {
		rest++
	}
	if rest < len(data) {
		line, col := lineCol(data, rest)
		return Spec{}, &pattern.InputError{File: name, Line: line, Col: col, Err: errors.New("unexpected data after the spec object")}
	}
	if err := s.Validate(); err != nil {
		return Spec{}, &pattern.InputError{File: name, Err: err}
	}
	return s, nil
}

// describeJSONError turns a decoding error into a message naming the
// offending field, with the line and column of the problem (0 when there
// is no position to give).
func describeJSONError(data []byte, err error) (line, col int, msg error) {
	var syn *json.SyntaxError
	var typ *json.UnmarshalTypeError
	switch {
	case errors.As(err, &syn):
		// The decoder stopped after reading Offset bytes: the last one
		// read is the bad one.
		line, col = lineCol(data, int(syn.Offset)-1)
		return line, col, syn
	case errors.As(err, &typ):
		// Offset is just past the bad value: point at its last byte.
		line, col = lineCol(data, int(typ.Offset)-1)
		return line, col, fmt.Errorf("field %q: a JSON %s cannot be a %v", typ.Field, typ.Value, typ.Type)
	case errors.Is(err, io.EOF):
		return 0, 0, errors.New("the file is empty: a design spec is one JSON object")
	case errors.Is(err, io.ErrUnexpectedEOF):
		return 0, 0, errors.New("the JSON object is not closed")
	}
	// Unknown fields come back as plain errors: json: unknown field "x".
	if msg := err.Error(); strings.HasPrefix(msg, "json: unknown field ") {
		return 0, 0, fmt.Errorf("unknown field %s (the fields are the flag names of phasonhull generate)", strings.TrimPrefix(msg, "json: unknown field "))
	}
	return 0, 0, err
}

// lineCol returns the 1-based line and column of the byte at index off.
func lineCol(data []byte, off int) (line, col int) {
	off = min(max(off, 0), len(data))
	line = 1 + bytes.Count(data[:off], []byte("\n"))
	col = off - bytes.LastIndexByte(data[:off], '\n')
	return line, col
}

// param describes one family-specific field: its JSON name, whether it is
// set, and its value as a flag would write it.
type param struct {
	name string
	set  func(*Spec) bool
	text func(*Spec) string
	list bool // a list of values, empty when not given
}

// familyParams lists the family-specific fields in the order Comments
// writes them.
func familyParams() []param {
	num := func(name string, get func(*Spec) float64) param {
		return param{name, func(s *Spec) bool { return get(s) != 0 }, func(s *Spec) string { return formatFloat(get(s)) }, false}
	}
	list := func(name string, get func(*Spec) []float64) param {
		return param{name, func(s *Spec) bool { return len(get(s)) > 0 }, func(s *Spec) string { return formatList(get(s)) }, true}
	}
	word := func(name string, get func(*Spec) string) param {
		return param{name, func(s *Spec) bool { return get(s) != "" }, get, false}
	}
	return []param{
		num("spacing", func(s *Spec) float64 { return s.Spacing }),
		list("cell", func(s *Spec) []float64 { return s.Cell }),
		num("theta", func(s *Spec) float64 { return s.Theta }),
		num("phase", func(s *Spec) float64 { return s.Phase }),
		list("sin", func(s *Spec) []float64 { return s.Sin }),
		list("cos", func(s *Spec) []float64 { return s.Cos }),
		num("amp", func(s *Spec) float64 { return s.Amp }),
		num("theta2", func(s *Spec) float64 { return s.Theta2 }),
		num("phase2", func(s *Spec) float64 { return s.Phase2 }),
		num("amp2", func(s *Spec) float64 { return s.Amp2 }),
		list("thetas", func(s *Spec) []float64 { return s.Thetas }),
		list("amps", func(s *Spec) []float64 { return s.Amps }),
		list("phases", func(s *Spec) []float64 { return s.Phases }),
		list("radius-cos", func(s *Spec) []float64 { return s.RadiusCos }),
		list("radius-sin", func(s *Spec) []float64 { return s.RadiusSin }),
		num("step", func(s *Spec) float64 { return s.Step }),
		num("omega", func(s *Spec) float64 { return s.Omega }),
		num("k", func(s *Spec) float64 { return s.K }),
		{"tiles", func(s *Spec) bool { return len(s.Tiles) > 0 }, func(s *Spec) string { return formatTiles(s.Tiles) }, true},
		num("intercept", func(s *Spec) float64 { return s.Intercept }),
		word("rule", func(s *Spec) string { return s.Rule }),
		word("dist", func(s *Spec) string { return s.Dist }),
		num("spread", func(s *Spec) float64 { return s.Spread }),
		word("lattice", func(s *Spec) string { return s.Lattice }),
		{"rotation", func(s *Spec) bool { return len(s.Matrix) > 0 }, func(s *Spec) string { return formatRows(s.Matrix) }, true},
		list("polar", func(s *Spec) []float64 { return s.Polar }),
		num("twist", func(s *Spec) float64 { return s.Twist }),
		num("scale", func(s *Spec) float64 { return s.Scale }),
	}
}

// floatFields lists every float parameter with its name, for the check
// that all of them are finite.
func (s *Spec) floatFields() map[string][]float64 {
	return map[string][]float64{
		"spacing": {s.Spacing}, "cell": s.Cell, "theta": {s.Theta}, "phase": {s.Phase},
		"sin": s.Sin, "cos": s.Cos, "amp": {s.Amp}, "theta2": {s.Theta2}, "phase2": {s.Phase2},
		"amp2": {s.Amp2}, "thetas": s.Thetas, "amps": s.Amps, "phases": s.Phases, "radius-cos": s.RadiusCos, "radius-sin": s.RadiusSin, "step": {s.Step},
		"omega": {s.Omega}, "k": {s.K}, "intercept": {s.Intercept}, "spread": {s.Spread},
		"noise": {s.Noise}, "missing": {s.Missing}, "extra": {s.Extra}, "drift": {s.Drift},
		"rotation": slices.Concat(s.Matrix...), "polar": s.Polar, "twist": {s.Twist}, "scale": {s.Scale},
	}
}

// Validate reports the first reason the spec cannot be generated: an
// unknown family, rule or letter, too few or too many sites, a parameter
// outside its range, a parameter the family does not use, or amplitudes so
// large that a spacing would not be positive (the error says which spacing
// and by how much).
func (s Spec) Validate() error {
	_, _, err := s.prepare()
	return err
}

// WithDefaults returns the spec with every family default written out and
// the modulated family's shorthand amp moved into Sin[0]. It does not
// validate; call Validate first.
func (s Spec) WithDefaults() Spec {
	s.Cell = cloneFloats(s.Cell)
	s.Sin = cloneFloats(s.Sin)
	s.Cos = cloneFloats(s.Cos)
	s.RadiusCos = cloneFloats(s.RadiusCos)
	s.RadiusSin = cloneFloats(s.RadiusSin)
	s.Thetas = cloneFloats(s.Thetas)
	s.Amps = cloneFloats(s.Amps)
	s.Phases = cloneFloats(s.Phases)
	s.Polar = cloneFloats(s.Polar)
	if s.Matrix != nil {
		rows := make([][]float64, len(s.Matrix))
		for i, r := range s.Matrix {
			rows[i] = cloneFloats(r)
		}
		s.Matrix = rows
	}
	if s.Tiles != nil {
		t := make(map[string]float64, len(s.Tiles))
		for k, v := range s.Tiles {
			t[k] = v
		}
		s.Tiles = t
	}
	fam, ok := lookupFamily(s.Family)
	if !ok {
		return s
	}
	if fam.uses["spacing"] && s.Spacing == 0 {
		s.Spacing = 1
	}
	if fam.defaults != nil {
		fam.defaults(&s)
	}
	return s
}

// defaultTiles are the tile lengths used when a two-letter design gives
// none: A = 1 and B = the golden ratio.
func defaultTiles() map[string]float64 {
	return map[string]float64{"A": 1, "B": (1 + math.Sqrt(5)) / 2}
}

// prepare validates the spec and builds the unperturbed design. It returns
// the spec with its defaults and the base design.
func (s Spec) prepare() (Spec, base, error) {
	fam, ok := lookupFamily(s.Family)
	if !ok {
		if s.Family == "" {
			return s, base{}, fmt.Errorf("family: missing; choose one of %s", FamilyNames())
		}
		return s, base{}, fmt.Errorf("family %q: unknown; choose one of %s", s.Family, FamilyNames())
	}
	if fam.dim == 2 {
		if s.Sites < minSitesPerSide || s.Sites > maxSitesPerSide {
			return s, base{}, fmt.Errorf("sites = %d: a plate has %d to %d sites per side (%d × %d at most, %d sites)", s.Sites, minSitesPerSide, maxSitesPerSide, maxSitesPerSide, maxSitesPerSide, MaxSites)
		}
	} else {
		if s.Sites < pattern.MinSites {
			return s, base{}, fmt.Errorf("sites = %d: a design needs at least %d sites", s.Sites, pattern.MinSites)
		}
		if s.Sites > MaxSites {
			return s, base{}, fmt.Errorf("sites = %d: at most %d sites can be generated", s.Sites, MaxSites)
		}
	}
	fields := s.floatFields()
	names := make([]string, 0, len(fields))
	for name := range fields {
		names = append(names, name)
	}
	sort.Strings(names)
	for _, name := range names {
		for _, v := range fields[name] {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return s, base{}, fmt.Errorf("%s = %v: not a finite number", name, v)
			}
		}
	}
	for letter, v := range s.Tiles {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return s, base{}, fmt.Errorf("tiles: length of %q = %v: not a finite number", letter, v)
		}
	}
	if err := checkUnit(s.Unit); err != nil {
		return s, base{}, err
	}
	for _, p := range familyParams() {
		if p.set(&s) && !fam.uses[p.name] {
			return s, base{}, fmt.Errorf("%s = %s has no effect on the %s family (it takes %s)", p.name, p.text(&s), s.Family, fam.takes())
		}
	}
	if s.Family == Modulated && s.Amp != 0 && len(s.Sin) > 0 {
		return s, base{}, fmt.Errorf("amp = %s and sin = %s: amp is shorthand for the first sine amplitude; give one of them", formatFloat(s.Amp), formatList(s.Sin))
	}
	c := s.WithDefaults()
	if fam.uses["spacing"] && c.Spacing <= 0 {
		return s, base{}, fmt.Errorf("spacing = %s: must be positive", formatFloat(c.Spacing))
	}
	if err := fam.check(c); err != nil {
		return s, base{}, err
	}
	if err := c.checkPerturbations(); err != nil {
		return s, base{}, err
	}
	if fam.dim == 2 {
		return c, base{}, nil // GeneratePlane builds the sites
	}
	b, err := fam.build(c)
	if err != nil {
		return s, base{}, err
	}
	// The last check, whatever the family: spacings large enough for the
	// Pattern invariant (tile lengths a billion times apart fail it).
	if i, d, bad := firstBadSpacing(b.pos); bad {
		return s, base{}, fmt.Errorf("the %s parameters make spacing %d (between sites %d and %d) %.6g: too small for distinct sites", c.Family, i, i, i+1, d)
	}
	return c, b, nil
}

// checkUnit refuses units that could not be written into a CSV header.
func checkUnit(u string) error {
	if len(u) > 32 {
		return fmt.Errorf("unit %q: at most 32 bytes", u)
	}
	for _, r := range u {
		if !unicode.IsLetter(r) && !unicode.IsDigit(r) && r != '_' && r != '/' && r != '.' {
			return fmt.Errorf("unit %q: only letters, digits, '_', '/' and '.' may appear in a unit", u)
		}
	}
	return nil
}

// checkPerturbations checks the perturbation fields.
func (s Spec) checkPerturbations() error {
	if s.Noise < 0 {
		return fmt.Errorf("noise = %s: a standard deviation cannot be negative", formatFloat(s.Noise))
	}
	if s.Missing < 0 || s.Missing >= 1 {
		return fmt.Errorf("missing = %s: the fraction of missing sites must lie in [0, 1)", formatFloat(s.Missing))
	}
	sites := s.designSites()
	if left := sites - countOf(s.Missing, sites); left < pattern.MinSites {
		return fmt.Errorf("missing = %s: removes %d of %d sites and leaves %d, fewer than %d", formatFloat(s.Missing), sites-left, sites, left, pattern.MinSites)
	}
	if s.Extra < 0 {
		return fmt.Errorf("extra = %s: the fraction of extra sites cannot be negative", formatFloat(s.Extra))
	}
	if total := float64(sites-countOf(s.Missing, sites)) + math.Round(s.Extra*float64(sites)); total > MaxSites {
		return fmt.Errorf("extra = %s: the design would hold %.0f sites, more than %d", formatFloat(s.Extra), total, MaxSites)
	}
	if s.Drift != 0 && s.Family.Dimension() == 2 {
		return fmt.Errorf("drift = %s: a scale drift is a perturbation of chains; the %s family is two-dimensional", formatFloat(s.Drift), s.Family)
	}
	if s.Drift <= -0.5 {
		return fmt.Errorf("drift = %s: must be greater than -0.5, or the drift would reverse the order of the sites", formatFloat(s.Drift))
	}
	return nil
}

// designSites is the number of sites of the design before perturbation:
// Sites, or Sites × Sites for a two-dimensional family.
func (s Spec) designSites() int {
	if s.Family.Dimension() == 2 {
		return s.Sites * s.Sites
	}
	return s.Sites
}

// countOf is the number of sites a fraction f of n sites stands for.
func countOf(f float64, n int) int { return int(math.Round(f * float64(n))) }

// Comments returns the lines "key = value" for every parameter of the
// spec (its defaults written out), then "spec: " and the spec as one line
// of JSON, so that a generated file documents its own design.
func (s Spec) Comments() []string {
	c := s.WithDefaults()
	lines := []string{"family = " + string(c.Family), "sites = " + strconv.Itoa(c.Sites)}
	if c.Unit != "" {
		lines = append(lines, "unit = "+c.Unit)
	}
	if fam, ok := lookupFamily(c.Family); ok {
		for _, p := range familyParams() {
			// Empty lists, and amp once WithDefaults has moved it into
			// sin, would only say "nothing": leave them out.
			if fam.uses[p.name] && (p.set(&c) || !p.list) && (p.name != "amp" || c.Family != Modulated) {
				lines = append(lines, p.name+" = "+p.text(&c))
			}
		}
	}
	lines = append(lines,
		"noise = "+formatFloat(c.Noise),
		"missing = "+formatFloat(c.Missing),
		"extra = "+formatFloat(c.Extra))
	if c.Family.Dimension() != 2 {
		lines = append(lines, "drift = "+formatFloat(c.Drift))
	}
	lines = append(lines, "seed = "+strconv.FormatUint(c.Seed, 10))
	js, err := json.Marshal(c)
	if err != nil {
		// A Spec holds only strings, numbers, lists and a string map: it
		// always marshals.
		panic(err)
	}
	return append(lines, "spec: "+string(js))
}

func formatFloat(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

func formatList(vs []float64) string {
	s := make([]string, len(vs))
	for i, v := range vs {
		s[i] = formatFloat(v)
	}
	return strings.Join(s, ",")
}

// formatRows writes the rows of a matrix as "a,b;c,d".
func formatRows(rows [][]float64) string {
	s := make([]string, len(rows))
	for i, r := range rows {
		s[i] = formatList(r)
	}
	return strings.Join(s, ";")
}

func formatTiles(t map[string]float64) string {
	letters := make([]string, 0, len(t))
	for l := range t {
		letters = append(letters, l)
	}
	sort.Strings(letters)
	s := make([]string, len(letters))
	for i, l := range letters {
		s[i] = l + "=" + formatFloat(t[l])
	}
	return strings.Join(s, ",")
}

func cloneFloats(v []float64) []float64 {
	if v == nil {
		return nil
	}
	return append([]float64(nil), v...)
}
