package spectrum

import (
	"math"
	"strings"
	"testing"
)

// The closed forms of the two laws (their definitions): T0 at the mean
// spacing, a factor e^{−decay} one mean spacing further, and (d/d̄)^−p.
func TestLawsClosedForm(t *testing.T) {
	e := Exp{T0: 2, Decay: 3}
	for _, c := range []struct{ d, want float64 }{{1.5, 2}, {3, 2 * math.Exp(-3)}, {0.75, 2 * math.Exp(1.5)}} {
		if got, _ := e.Coupling(c.d, 1.5); math.Abs(got-c.want) > 1e-15*c.want {
			t.Errorf("exp law at %g: %g, want %g", c.d, got, c.want)
		}
	}
	p := Power{T0: 1.5, Power: 2}
	for _, c := range []struct{ d, want float64 }{{2, 1.5}, {4, 1.5 / 4}, {1, 6}} {
		if got, _ := p.Coupling(c.d, 2); math.Abs(got-c.want) > 1e-15*c.want {
			t.Errorf("power law at %g: %g, want %g", c.d, got, c.want)
		}
	}
}

func TestTableInterpolatesAndRefuses(t *testing.T) {
	tab := Table{D: []float64{1, 2, 4}, T: []float64{3, 1, 0}}
	for _, c := range []struct{ d, want float64 }{{1, 3}, {1.5, 2}, {2, 1}, {3, 0.5}, {4, 0}} {
		got, err := tab.Coupling(c.d, 0)
		if err != nil || math.Abs(got-c.want) > 1e-15 {
			t.Errorf("table at %g: %g, %v; want %g", c.d, got, err, c.want)
		}
	}
	// Rounding past an end is taken as the end.
	if got, err := tab.Coupling(4*(1+1e-12), 0); err != nil || got != 0 {
		t.Errorf("table just past its end: %g, %v; want the end's 0", got, err)
	}
	for _, d := range []float64{0.999, 4.001, math.NaN()} {
		if _, err := tab.Coupling(d, 0); err == nil || (!math.IsNaN(d) && !strings.Contains(err.Error(), "outside")) {
			t.Errorf("table at %g: error %v, want a refusal outside the range", d, err)
		}
	}
}
