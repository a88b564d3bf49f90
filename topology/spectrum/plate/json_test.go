package plate

import (
	"context"
	"encoding/json"

	"phasonhull/topology/spectrum"
	"testing"
)

// The JSON form carries the fields the spectrum's 2D output names: method,
// moments, vectors, resolution, and per gap ids, ids_error, lower, upper,
// width, label ({coeffs, ids} or null) and confirmed.
func TestResultJSONFields(t *testing.T) {
	pts, l := grid(30, 30, square)
	op := build(t, pts, l, Model{Flux: Rational(1, 3), Ends: spectrum.Periodic})
	res, err := Analyze(context.Background(), op, Options{Method: KPM, KPM: KPMOptions{Moments: 128, Vectors: 4}, Generators: []float64{1.0 / 3}})
	if err != nil {
		t.Fatal(err)
	}
	b, err := json.Marshal(res)
	if err != nil {
		t.Fatal(err)
	}
	var top map[string]json.RawMessage
	if err := json.Unmarshal(b, &top); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"method", "moments", "vectors", "resolution", "gaps"} {
		if _, ok := top[k]; !ok {
			t.Errorf("no %q in %s", k, b)
		}
	}
	var gaps []map[string]json.RawMessage
	if err := json.Unmarshal(top["gaps"], &gaps); err != nil || len(gaps) == 0 {
		t.Fatalf("gaps %s: %v", top["gaps"], err)
	}
	for _, k := range []string{"ids", "ids_error", "lower", "upper", "width", "label", "confirmed"} {
		if _, ok := gaps[0][k]; !ok {
			t.Errorf("no %q in gap %s", k, b)
		}
	}
	var label map[string]json.RawMessage
	if err := json.Unmarshal(gaps[0]["label"], &label); err == nil && label != nil {
		for _, k := range []string{"coeffs", "ids"} {
			if _, ok := label[k]; !ok {
				t.Errorf("no %q in label %s", k, gaps[0]["label"])
			}
		}
	}
	if string(top["method"]) != `"kpm"` {
		t.Errorf("method %s, want \"kpm\"", top["method"])
	}
}
