package pattern

import (
	"fmt"
	"math"
)

// Plane is a two-dimensional point set: the sites of a plate of pillars,
// resonators or rods, in the order the input lists them.
//
// Invariant (established by NewPlane and by every reader): Points holds at
// least MinSites finite points and no two points are closer than
// DuplicateTolerance times the typical nearest-neighbour distance, taken
// as sqrt(A/N) over the box A holding the central 96% of the points in
// each coordinate.
type Plane struct {
	// Points are the site coordinates (x, y) in Unit.
	Points [][2]float64
	// Unit is the length unit of Points ("" when unknown).
	Unit string
	// Source says where the set came from: a file name, "-" for standard
	// input, or "generated".
	Source string
	// Notes record what was done to the input on the way in, one sentence
	// each, for the report.
	Notes []string
	// Rows maps each point to the data row it came from (0-based, in the
	// input's own order).
	Rows []int
}

// NewPlane builds a Plane from points, checking the Plane invariant. The
// slice is copied.
func NewPlane(points [][2]float64, unit, source string) (*Plane, error) {
	return newPlane(points, unit, source, true)
}

// newPlane is NewPlane; a reader that has looked for close pairs already
// (to name their lines) leaves checkClose false.
func newPlane(points [][2]float64, unit, source string, checkClose bool) (*Plane, error) {
	if len(points) < MinSites {
		return nil, fmt.Errorf("%w: %d, need at least %d", ErrTooFew, len(points), MinSites)
	}
	p := &Plane{Points: append([][2]float64(nil), points...), Unit: unit, Source: source, Rows: make([]int, len(points))}
	for i, q := range p.Points {
		if math.IsNaN(q[0]) || math.IsInf(q[0], 0) || math.IsNaN(q[1]) || math.IsInf(q[1], 0) {
			return nil, fmt.Errorf("site %d: point (%v, %v) is not finite", i+1, q[0], q[1])
		}
		p.Rows[i] = i
	}
	if !checkClose {
		return p, nil
	}
	if i, j, ok := closePair(p.Points); ok {
		return nil, fmt.Errorf("%w: sites %d and %d at (%v, %v)", ErrDuplicate, i+1, j+1, p.Points[j][0], p.Points[j][1])
	}
	return p, nil
}

// Len returns the number of sites.
func (p *Plane) Len() int { return len(p.Points) }
