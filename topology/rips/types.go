package rips

import "math"

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
