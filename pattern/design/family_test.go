package design

import (
	"math"
	"slices"
	"strings"
	"testing"
)

// Every family has one table entry with a help text, a check and a
// builder, and the names are distinct.
func TestFamilyTable(t *testing.T) {
	seen := map[Family]bool{}
	for _, f := range table() {
		if seen[f.name] {
			t.Errorf("%s: two table entries", f.name)
		}
		seen[f.name] = true
		if f.help == "" || f.formula == "" || f.check == nil || (f.build == nil) != (f.dim == 2) || (f.plane == nil) != (f.dim != 2) || len(f.uses) == 0 {
			t.Errorf("%s: incomplete entry", f.name)
		}
		if (f.phase == "") != (f.field == nil) || (f.phase != "" && !f.uses[f.phase]) {
			t.Errorf("%s: phase parameter %q does not match its field or is not a parameter of the family", f.name, f.phase)
		}
	}
	if got := FamilyNames(); got != "periodic, modulated, decorated, loop, circle-map, two-angle, multi-angle, sturmian, substitution, random, plate, twisted" {
		t.Errorf("FamilyNames() = %q", got)
	}
	if Family("helix").Help() != "" || Family("helix").PhaseParam() != "" {
		t.Error("an unknown family has a help text or a phase")
	}
}

// ShiftPhase moves exactly the family's phase parameter, modulo one turn,
// and a shift by a whole turn gives the same pattern back.
func TestShiftPhase(t *testing.T) {
	for _, s := range allFamilies() {
		name := s.Family.PhaseParam()
		c, ok := s.ShiftPhase(1.25)
		if ok != (name != "") {
			t.Fatalf("%s: ShiftPhase ok = %v with phase parameter %q", s.Family, ok, name)
		}
		if !ok {
			continue
		}
		before, after := s.floatFields(), c.floatFields()
		for field, v := range before {
			w := after[field]
			if field == name {
				want := v[0] + 0.25 - math.Floor(v[0]+0.25)
				if math.Abs(w[0]-want) > 1e-15 {
					t.Errorf("%s: %s = %v after a shift of 1.25 turns from %v, want %v", s.Family, field, w[0], v[0], want)
				}
			} else if !slices.Equal(v, w) {
				t.Errorf("%s: the shift changed %s from %v to %v", s.Family, field, v, w)
			}
		}
		whole, _ := s.ShiftPhase(1)
		p, err1 := Generate(s)
		q, err2 := Generate(whole)
		if err1 != nil || err2 != nil {
			t.Fatalf("%s: %v, %v", s.Family, err1, err2)
		}
		for i := range p.Positions {
			if math.Abs(p.Positions[i]-q.Positions[i]) > 1e-9 {
				t.Fatalf("%s: site %d at %v after a whole turn, %v before", s.Family, i, q.Positions[i], p.Positions[i])
			}
		}
	}
	if _, ok := NewSpec(Periodic).ShiftPhase(0.5); ok {
		t.Error("the periodic family has no phase, but ShiftPhase moved one")
	}
}

// The closed forms that follow from a spec's parameters alone (common
// practice: the harmonics k·g of θ rotate by g·θ; a cell that repeats a
// shorter one has the shorter period).
func TestClosedForm(t *testing.T) {
	mod := NewSpec(Modulated)
	mod.Theta, mod.Sin, mod.Cos = 0.2, []float64{0, 0.1}, []float64{0, 0, 0, 0.02}
	if c := mod.ClosedForm(); len(c.Angles) != 1 || math.Abs(c.Angles[0]-0.4) > 1e-15 || c.Tiling {
		t.Errorf("modulated in harmonics 2 and 4: %+v, want the angle 2θ = 0.4", c)
	}
	per := NewSpec(Periodic)
	per.Cell = []float64{1, 2, 1, 2}
	if c := per.ClosedForm(); c.Period != 2 || c.Angles != nil {
		t.Errorf("cell 1,2,1,2: %+v, want period 2", c)
	}
	cm := NewSpec(CircleMap)
	cm.Omega, cm.K, cm.Amp = 0.3, 0.5, 0.1
	if c := cm.ClosedForm(); c.Angles != nil || !strings.Contains(c.Note, "K > 0") {
		t.Errorf("circle map with K > 0: %+v, want no angle and a note", c)
	}
	// A cell of p spacings decorating a modulation: p circles turned by
	// g·θ (see decorated.go); without amplitudes the cell's period.
	dec := NewSpec(Decorated)
	dec.Cell, dec.Theta, dec.Sin = []float64{1, 1.1, 0.9, 1, 1.1, 0.9}, 0.2, []float64{0, 0.05}
	if c := dec.ClosedForm(); len(c.Angles) != 1 || math.Abs(c.Angles[0]-0.4) > 1e-15 || c.Components != 3 || c.Period != 0 {
		t.Errorf("decorated, cell of period 3, harmonic 2: %+v, want the angle 0.4 on 3 components", c)
	}
	dec.Sin = nil
	if c := dec.ClosedForm(); c.Period != 3 || c.Angles != nil {
		t.Errorf("decorated without amplitudes: %+v, want period 3", c)
	}
	// The same cell decorating two angles: 3 tori of the angles with a
	// nonzero amplitude.
	dec.Theta, dec.Thetas, dec.Amps = 0, []float64{0.4142, 0.2679}, []float64{0.05, 0.04}
	if c := dec.ClosedForm(); len(c.Angles) != 2 || c.Angles[0] != 0.4142 || c.Angles[1] != 0.2679 || c.Components != 3 || c.Period != 0 {
		t.Errorf("decorated, cell of period 3, two angles: %+v, want the angles 0.4142, 0.2679 on 3 components", c)
	}
	dec.Amps = []float64{0, 0}
	if c := dec.ClosedForm(); c.Period != 3 || c.Angles != nil {
		t.Errorf("decorated, two angles without amplitudes: %+v, want period 3", c)
	}
	// Up to three angles; a zero amplitude drops its angle.
	ma := NewSpec(MultiAngle)
	ma.Thetas, ma.Amps = []float64{0.4142, 0.2679, 0.618}, []float64{0.1, 0, 0.05}
	if c := ma.ClosedForm(); !slices.Equal(c.Angles, []float64{0.4142, 0.618}) || c.Components != 0 {
		t.Errorf("multi-angle with a zero amplitude: %+v, want the angles 0.4142, 0.618", c)
	}
	ma.Amps = []float64{0, 0, 0}
	if c := ma.ClosedForm(); c.Period != 1 {
		t.Errorf("multi-angle without amplitudes: %+v, want period 1", c)
	}
	if c := NewSpec(Random).ClosedForm(); c.Period != 0 || c.Angles != nil || c.Note != "" {
		t.Errorf("random: %+v, want nothing fixed", c)
	}
}
