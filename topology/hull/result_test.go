package hull

import (
	"encoding/json"
	"math"
	"testing"

	"phasonhull/topology/rips"
)

// A bar's JSON is rips.Bar's form with "significant" added, and reads back
// to the same bar.
func TestBarJSON(t *testing.T) {
	for _, c := range []struct {
		bar  Bar
		want string
	}{
		{Bar{rips.Bar{Dim: 1, Birth: 0.25, Death: 1.5}, true}, `{"dim":1,"birth":0.25,"death":1.5,"significant":true}`},
		{Bar{rips.Bar{Dim: 0, Birth: 0, Death: math.Inf(1)}, false}, `{"dim":0,"birth":0,"death":null,"significant":false}`},
	} {
		got, err := json.Marshal(c.bar)
		if err != nil {
			t.Fatal(err)
		}
		if string(got) != c.want {
			t.Errorf("Marshal(%+v) = %s, want %s", c.bar, got, c.want)
		}
		var back Bar
		if err := json.Unmarshal(got, &back); err != nil {
			t.Fatal(err)
		}
		if back != c.bar {
			t.Errorf("%s read back as %+v", got, back)
		}
	}
}
