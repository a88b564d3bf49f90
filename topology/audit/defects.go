package audit

import (
	"cmp"
	"slices"
)

// Defect kinds, as Defects names them.
const (
	DefectMissing        = "missing"          // a design site with no measured site
	DefectExtra          = "extra"            // a measured site with no design site
	DefectMerged         = "merged"           // two design sites measured as one
	DefectSwapped        = "swapped"          // two neighbours measured in each other's order
	DefectOutlier        = "outlier"          // a residual beyond the outlier threshold
	DefectOutOfTolerance = "out of tolerance" // a residual beyond --tolerance
)

// A Defect is one flagged site, in the form a person fixing a sample
// looks it up: its design index, its row in the measured file and where
// it is.
type Defect struct {
	Kind string
	// Design are the design indices involved (none for an extra site).
	Design []int
	// Measured are the measured indices involved: 0-based data rows of the
	// measured file, in its order (none for a missing site).
	Measured []int
	// Position is where the site is, in the sample's frame and unit: the
	// measured position, or for a missing site where the calibration puts
	// the design site.
	Position float64
	// Residual is the measured minus the calibrated design position, for
	// outliers and sites out of tolerance (0 otherwise); for a plate, the
	// length of the residual vector.
	Residual float64
	// Point is where the site is on a plate (Position is then 0).
	Point *[2]float64
}

// Defects lists every flagged site of the report, ordered by position. A
// site that is both an outlier and out of tolerance is listed once, as out
// of tolerance.
func (r *Report) Defects() []Defect {
	if r.reg2 != nil {
		return r.planeDefects()
	}
	var out []Defect
	for i, p := range r.MissingAt() {
		out = append(out, Defect{Kind: DefectMissing, Design: []int{r.Missing[i]}, Position: p})
	}
	for _, k := range r.Extra {
		if k >= 0 && k < len(r.measuredPos) {
			out = append(out, Defect{Kind: DefectExtra, Measured: []int{k}, Position: r.measuredPos[k]})
		}
	}
	for _, m := range r.Merged {
		out = append(out, Defect{Kind: DefectMerged, Design: m.Design[:], Measured: []int{m.Measured}, Position: m.Position})
	}
	for _, s := range r.Swapped {
		pos := 0.0
		if k := s.Measured[0]; k >= 0 && k < len(r.measuredPos) {
			pos = r.measuredPos[k]
		}
		out = append(out, Defect{Kind: DefectSwapped, Design: s.Design[:], Measured: s.Measured[:], Position: pos})
	}
	out = append(out, r.siteDefects()...)
	slices.SortStableFunc(out, func(a, b Defect) int { return cmp.Compare(a.Position, b.Position) })
	return out
}

// planeDefects is Defects for a plate, ordered by y, then x.
func (r *Report) planeDefects() []Defect {
	var out []Defect
	for i, p := range r.missingAtPlane() {
		out = append(out, Defect{Kind: DefectMissing, Design: []int{r.Missing[i]}, Point: &p})
	}
	for _, k := range r.Extra {
		p := r.measuredPts[k]
		out = append(out, Defect{Kind: DefectExtra, Measured: []int{k}, Point: &p})
	}
	out = append(out, r.siteDefects()...)
	slices.SortStableFunc(out, func(a, b Defect) int {
		return cmp.Or(cmp.Compare(a.Point[1], b.Point[1]), cmp.Compare(a.Point[0], b.Point[0]))
	})
	return out
}

// siteDefects are the matched sites that are out of tolerance or
// outliers, in the order of Sites (a chain's carry their position, a
// plate's their point).
func (r *Report) siteDefects() []Defect {
	var out []Defect
	for _, s := range r.Sites {
		kind := ""
		switch {
		case s.WithinTolerance != nil && !*s.WithinTolerance:
			kind = DefectOutOfTolerance
		case s.Outlier:
			kind = DefectOutlier
		default:
			continue
		}
		d := Defect{Kind: kind, Measured: []int{s.Measured}, Position: s.Position, Point: s.Point, Residual: s.Residual}
		if s.Design != nil {
			d.Design = []int{*s.Design}
		}
		out = append(out, d)
	}
	return out
}
