package pattern

import (
	"errors"
	"fmt"
	"math"
	"sort"
)

// MinSites is the smallest number of sites a Pattern may hold: fewer leave
// no room for a delay window and its neighbours.
const MinSites = 8

// DuplicateTolerance is the distance, relative to the mean spacing, below
// which two sites count as the same site.
const DuplicateTolerance = 1e-9

// Pattern is an ordered chain of sites.
//
// Invariant (established by New and by every reader): Positions is sorted
// strictly ascending, holds at least MinSites finite values, and no two
// consecutive positions are closer than DuplicateTolerance times the mean
// spacing.
type Pattern struct {
	// Positions are the site coordinates along the chain, ascending.
	Positions []float64
	// Unit is the length unit of Positions ("" when unknown).
	Unit string
	// Source says where the pattern came from: a file name, "-" for
	// standard input, or "generated".
	Source string
	// Notes record what was done to the input on the way in (sorting,
	// tilt removal, ...), one sentence each, for the report.
	Notes []string
	// Scan describes the removed geometry when the input was two- or
	// three-dimensional centroids; nil otherwise.
	Scan *Scan
	// Rows maps each site to the data row it came from: Rows[i] is the
	// 0-based position, in the input's own order, of the site now at
	// Positions[i] (the identity when the input was already in ascending
	// order). It lets a report name sites in the order a file lists them.
	Rows []int
	// Word is the tile word when the pattern was built from tile letters
	// (read or generated); empty otherwise. Word[i] is the tile between
	// Positions[i] and Positions[i+1].
	Word string
}

// Scan reports how centroids from a planar or spatial scan were reduced to
// positions along the chain's principal axis.
type Scan struct {
	// Dim is the number of coordinates per centroid (2 or 3).
	Dim int
	// Axis is the unit direction of the principal axis in scan coordinates.
	Axis []float64
	// TiltDeg is the angle in degrees between the principal axis and the
	// scan's first coordinate axis: the tilt that was removed.
	TiltDeg float64
	// TransverseRMS is the root-mean-square distance of the centroids from
	// the principal axis, in the pattern's unit.
	TransverseRMS float64
	// TransverseMax is the largest such distance.
	TransverseMax float64
}

// ErrTooFew is wrapped by errors for patterns with fewer than MinSites sites.
var ErrTooFew = errors.New("too few sites")

// ErrDuplicate is wrapped by errors for two sites at the same position.
var ErrDuplicate = errors.New("two sites at the same position")

// New builds a Pattern from positions, sorting them when needed (and noting
// it) and checking the Pattern invariant. The slice is copied.
func New(positions []float64, unit, source string) (*Pattern, error) {
	p := &Pattern{Positions: append([]float64(nil), positions...), Unit: unit, Source: source}
	for i, x := range p.Positions {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return nil, fmt.Errorf("site %d: position %v is not a finite number", i+1, x)
		}
	}
	if len(p.Positions) < MinSites {
		return nil, fmt.Errorf("%w: %d, need at least %d", ErrTooFew, len(p.Positions), MinSites)
	}
	p.Rows = make([]int, len(p.Positions))
	for i := range p.Rows {
		p.Rows[i] = i
	}
	if !sort.Float64sAreSorted(p.Positions) {
		sort.SliceStable(p.Rows, func(a, b int) bool { return positions[p.Rows[a]] < positions[p.Rows[b]] })
		for i, r := range p.Rows {
			p.Positions[i] = positions[r]
		}
		p.Notes = append(p.Notes, "positions were not in ascending order and have been sorted")
	}
	if err := p.checkDuplicates(); err != nil {
		return nil, err
	}
	return p, nil
}

// checkDuplicates enforces the minimum-separation part of the invariant on
// sorted positions. It also catches spreads that overflow float64.
func (p *Pattern) checkDuplicates() error {
	n := len(p.Positions)
	span := p.Positions[n-1] - p.Positions[0]
	if math.IsInf(span, 0) {
		return fmt.Errorf("the span of the positions overflows a float64")
	}
	tol := DuplicateTolerance * span / float64(n-1)
	for i := 1; i < n; i++ {
		if p.Positions[i]-p.Positions[i-1] <= tol {
			return fmt.Errorf("%w: sites %d and %d at %v", ErrDuplicate, i, i+1, p.Positions[i])
		}
	}
	return nil
}

// Len returns the number of sites.
func (p *Pattern) Len() int { return len(p.Positions) }

// Spacings returns the n−1 distances between consecutive sites.
func (p *Pattern) Spacings() []float64 {
	d := make([]float64, len(p.Positions)-1)
	for i := range d {
		d[i] = p.Positions[i+1] - p.Positions[i]
	}
	return d
}

// MeanSpacing returns the mean distance between consecutive sites.
func (p *Pattern) MeanSpacing() float64 {
	n := len(p.Positions)
	return (p.Positions[n-1] - p.Positions[0]) / float64(n-1)
}
