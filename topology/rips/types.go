package rips

import (
	"cmp"
	"encoding/json"
	"math"
)

// Bar is one interval [Birth, Death) of a barcode in homology dimension Dim.
// Death is +Inf for an essential class (one that never dies below the
// threshold).
type Bar struct {
	Dim   int
	Birth float64
	Death float64
}

// Persistence returns Death − Birth (+Inf for an essential class).
func (b Bar) Persistence() float64 { return b.Death - b.Birth }

// Essential reports whether the bar never dies.
func (b Bar) Essential() bool { return math.IsInf(b.Death, 1) }

// barJSON is the JSON form of a Bar: death is null for an essential bar,
// since JSON has no infinity.
type barJSON struct {
	Dim   int      `json:"dim"`
	Birth float64  `json:"birth"`
	Death *float64 `json:"death"`
}

// MarshalJSON writes the bar as {"dim": …, "birth": …, "death": …}, with
// death null for an essential bar.
func (b Bar) MarshalJSON() ([]byte, error) {
	j := barJSON{Dim: b.Dim, Birth: b.Birth}
	if !b.Essential() {
		j.Death = &b.Death
	}
	return json.Marshal(j)
}

// UnmarshalJSON reads the form MarshalJSON writes; a null or missing death
// is +Inf.
func (b *Bar) UnmarshalJSON(data []byte) error {
	var j barJSON
	if err := json.Unmarshal(data, &j); err != nil {
		return err
	}
	*b = Bar{Dim: j.Dim, Birth: j.Birth, Death: math.Inf(1)}
	if j.Death != nil {
		b.Death = *j.Death
	}
	return nil
}

// ComparePersistence orders bars by dimension, then by persistence,
// longest first, then by birth: the order in which a barcode is listed.
// Use it with slices.SortStableFunc.
func ComparePersistence(a, b Bar) int {
	if a.Dim != b.Dim {
		return cmp.Compare(a.Dim, b.Dim)
	}
	if c := cmp.Compare(b.Persistence(), a.Persistence()); c != 0 {
		return c
	}
	return cmp.Compare(a.Birth, b.Birth)
}

// CocycleEdge is one edge {I, J} (I < J, indices into the point cloud) of a
// representative 1-cocycle with its coefficient. Value is the integer lift
// of the Z/p coefficient into the symmetric range (−p/2, p/2].
type CocycleEdge struct {
	I, J  int
	Value int
}

// Cocycle is a representative cocycle of an H1 class, given on the edges
// where it is non-zero.
type Cocycle struct {
	// Bar is the index in Diagram.Bars of the H1 bar it represents.
	Bar   int
	Edges []CocycleEdge
}
