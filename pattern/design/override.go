package design

import (
	"maps"
	"reflect"
	"slices"
	"strings"
)

// Override copies into s the parameters of o that given names, by their
// JSON names (which are the flag names of "phasonhull generate"); lists
// and tile maps are copied, not shared. For the modulated family, amp is
// shorthand for the first sine amplitude: given with a spec that already
// has sine amplitudes (or an amp), it replaces a_1 and keeps the other
// harmonics. The family is not a parameter: it stays s's.
func (s *Spec) Override(o Spec, given func(name string) bool) {
	shorthand := s.Family == Modulated && given("amp")
	dst, src := reflect.ValueOf(s).Elem(), reflect.ValueOf(o)
	for i := range dst.NumField() {
		name := jsonName(dst.Type().Field(i))
		if name == "family" || !given(name) || shorthand && name == "amp" {
			continue
		}
		v := src.Field(i)
		switch x := v.Interface().(type) {
		case []float64:
			v = reflect.ValueOf(slices.Clone(x))
		case map[string]float64:
			v = reflect.ValueOf(maps.Clone(x))
		case [][]float64:
			if x == nil {
				break
			}
			rows := make([][]float64, len(x))
			for i, r := range x {
				rows[i] = slices.Clone(r)
			}
			v = reflect.ValueOf(rows)
		}
		dst.Field(i).Set(v)
	}
	if !shorthand {
		return
	}
	if len(s.Sin) == 0 && s.Amp == 0 {
		s.Amp = o.Amp
		return
	}
	if len(s.Sin) == 0 {
		s.Sin = []float64{0}
	}
	s.Sin[0], s.Amp = o.Amp, 0
}

// jsonName is the name of a field in the JSON form.
func jsonName(f reflect.StructField) string {
	name, _, _ := strings.Cut(f.Tag.Get("json"), ",")
	return name
}
