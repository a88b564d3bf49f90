package design

import (
	"reflect"
	"slices"
	"testing"
)

// full is a spec with every parameter set (not a valid design: Override
// copies, it does not check).
func full() Spec {
	return Spec{Family: Loop, Sites: 7, Spacing: 2, Unit: "um", Cell: []float64{1, 2}, Theta: 0.3, Phase: 0.1,
		Sin: []float64{0.1, 0.2}, Cos: []float64{0.3}, Amp: 0.4, Theta2: 0.6, Phase2: 0.2, Amp2: 0.05,
		Thetas: []float64{0.4, 0.27}, Amps: []float64{0.1, 0.2}, Phases: []float64{0.3},
		RadiusCos: []float64{0.1}, RadiusSin: []float64{0.2}, Step: 0.38, Omega: 0.3, K: 0.9,
		Tiles: map[string]float64{"A": 1, "B": 2}, Intercept: 0.5, Rule: "fibonacci", Dist: "exponential", Spread: 0.3,
		Lattice: "hex", Matrix: [][]float64{{0.1, 0.2}}, Polar: []float64{30}, Twist: 5, Scale: 1.1,
		Noise: 0.01, Missing: 0.02, Extra: 0.03, Drift: 0.004, Seed: 9}
}

// Every parameter given is copied, by its JSON name; none given leaves
// the spec as it was; the family is never a parameter.
func TestOverrideEveryField(t *testing.T) {
	s := NewSpec(Periodic)
	s.Override(full(), func(string) bool { return true })
	want := full()
	want.Family = Periodic
	if !reflect.DeepEqual(s, want) {
		t.Errorf("all given:\n%+v\nwant\n%+v", s, want)
	}
	s = NewSpec(Periodic)
	s.Override(full(), func(string) bool { return false })
	if !reflect.DeepEqual(s, NewSpec(Periodic)) {
		t.Errorf("none given: %+v", s)
	}
	// One at a time: exactly that field changes.
	v := reflect.ValueOf(full())
	for i := range v.NumField() {
		name := jsonName(v.Type().Field(i))
		if name == "family" {
			continue
		}
		s := Spec{Family: Periodic}
		s.Override(full(), func(n string) bool { return n == name })
		got := reflect.ValueOf(s)
		for j := range got.NumField() {
			changed := !got.Field(j).IsZero()
			if j == 0 {
				continue
			}
			if changed != (j == i) {
				t.Errorf("given %s: field %s changed %v", name, v.Type().Field(j).Name, changed)
			}
		}
	}
}

// Lists and tile maps are copies: changing the source later does not
// change the spec.
func TestOverrideCopies(t *testing.T) {
	o := full()
	var s Spec
	s.Override(o, func(string) bool { return true })
	o.Sin[0], o.Tiles["A"], o.Matrix[0][0] = 99, 99, 99
	if s.Sin[0] != 0.1 || s.Tiles["A"] != 1 || s.Matrix[0][0] != 0.1 {
		t.Errorf("spec shares the source's storage: sin %v tiles %v rotation %v", s.Sin, s.Tiles, s.Matrix)
	}
}

// For the modulated family amp is shorthand for a_1: it replaces the
// first sine amplitude and keeps the others, or stays amp on a spec with
// neither.
func TestOverrideAmpShorthand(t *testing.T) {
	amp := func(n string) bool { return n == "amp" }
	for _, c := range []struct {
		before  Spec
		sin     []float64
		wantAmp float64
	}{
		{Spec{Family: Modulated}, nil, 0.5},
		{Spec{Family: Modulated, Sin: []float64{0.1, 0.03}}, []float64{0.5, 0.03}, 0},
		{Spec{Family: Modulated, Amp: 0.2}, []float64{0.5}, 0},
		{Spec{Family: TwoAngle, Amp: 0.2}, nil, 0.5},
	} {
		s := c.before
		s.Sin = slices.Clone(c.before.Sin)
		s.Override(Spec{Amp: 0.5}, amp)
		if !slices.Equal(s.Sin, c.sin) || s.Amp != c.wantAmp {
			t.Errorf("%s sin %v amp %g: got sin %v amp %g, want sin %v amp %g", c.before.Family, c.before.Sin, c.before.Amp, s.Sin, s.Amp, c.sin, c.wantAmp)
		}
	}
}
