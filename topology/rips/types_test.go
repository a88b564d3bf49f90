package rips

import (
	"encoding/json"
	"math"
	"reflect"
	"slices"
	"testing"
)

// A bar's JSON form writes an essential bar's death as null and reads it
// back as +Inf.
func TestBarJSON(t *testing.T) {
	bars := []Bar{{Dim: 0, Birth: 0, Death: math.Inf(1)}, {Dim: 1, Birth: 0.25, Death: 1.5}}
	b, err := json.Marshal(bars)
	if err != nil {
		t.Fatal(err)
	}
	if want := `[{"dim":0,"birth":0,"death":null},{"dim":1,"birth":0.25,"death":1.5}]`; string(b) != want {
		t.Errorf("JSON %s, want %s", b, want)
	}
	var back []Bar
	if err := json.Unmarshal(b, &back); err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(back, bars) {
		t.Errorf("round trip %v, want %v", back, bars)
	}
	if err := json.Unmarshal([]byte(`{"dim":"one"}`), &back[0]); err == nil {
		t.Error("a bar with a string dimension was read")
	}
}

// ComparePersistence lists bars by dimension, longest first, earlier
// birth first among equally long ones.
func TestComparePersistence(t *testing.T) {
	inf := math.Inf(1)
	bars := []Bar{
		{1, 0.5, 1}, {0, 0, 0.2}, {1, 0.25, 0.75}, {0, 0, inf}, {2, 1, 1.1}, {1, 0.2, 0.4}, {0, 0, 0.7},
	}
	slices.SortStableFunc(bars, ComparePersistence)
	want := []Bar{
		{0, 0, inf}, {0, 0, 0.7}, {0, 0, 0.2}, {1, 0.25, 0.75}, {1, 0.5, 1}, {1, 0.2, 0.4}, {2, 1, 1.1},
	}
	if !reflect.DeepEqual(bars, want) {
		t.Errorf("sorted %v, want %v", bars, want)
	}
}
