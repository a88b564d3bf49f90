package rips

import (
	"bufio"
	"fmt"
	"io"
	"slices"
	"strconv"
	"text/tabwriter"
)

// Barcode is a diagram as a report lists it: its bars at least
// MinPersistence long, in the order of ComparePersistence, with their
// number per dimension. Its JSON form is what "phasonhull barcode --json"
// prints.
type Barcode struct {
	Source         string  `json:"source"`
	Points         int     `json:"points"`
	Dim            int     `json:"dim"`
	Prime          int     `json:"prime"`
	Threshold      float64 `json:"threshold"`
	Radius         float64 `json:"radius"`
	MinPersistence float64 `json:"min_persistence"`
	// Counts[k] is the number of bars of dimension k listed.
	Counts []int `json:"counts"`
	Bars   []Bar `json:"bars"`
}

// Barcode lists the bars of d in dimensions 0 to maxDim that are at least
// minPersistence long, longest first in each dimension; source names the
// point cloud.
func (d *Diagram) Barcode(source string, maxDim int, minPersistence float64) *Barcode {
	r := &Barcode{
		Source: source, Points: d.Points, Dim: maxDim, Prime: d.Prime, Threshold: d.Threshold,
		Radius: d.Radius, MinPersistence: minPersistence,
		Counts: make([]int, maxDim+1), Bars: []Bar{},
	}
	for _, b := range d.Bars {
		if b.Dim <= maxDim && b.Persistence() >= minPersistence {
			r.Bars = append(r.Bars, b)
			r.Counts[b.Dim]++
		}
	}
	slices.SortStableFunc(r.Bars, ComparePersistence)
	return r
}

// WriteText writes the barcode as a table, as "phasonhull barcode" prints
// it: a heading with the cloud, the field and the scale the complex was
// built to, the number of bars per dimension, then one row per bar with
// its birth, death and persistence ("inf" for an essential bar).
func (r *Barcode) WriteText(w io.Writer) error {
	bw := bufio.NewWriter(w)
	fmt.Fprintf(bw, "barcode of %s: %d points, coefficients Z/%d, dimensions 0 to %d\n", r.Source, r.Points, r.Prime, r.Dim)
	if r.Threshold < r.Radius {
		fmt.Fprintf(bw, "edges up to length %.6g, short of the cloud's radius %.6g: bars alive there are reported as never ending\n", r.Threshold, r.Radius)
	} else {
		fmt.Fprintf(bw, "edges up to the cloud's radius %.6g, past which no bar changes (one point is joined to all others)\n", r.Radius)
	}
	for k, c := range r.Counts {
		s := "s"
		if c == 1 {
			s = ""
		}
		fmt.Fprintf(bw, "H%d: %d bar%s", k, c, s)
		if k < len(r.Counts)-1 {
			fmt.Fprint(bw, ", ")
		}
	}
	if r.MinPersistence > 0 {
		fmt.Fprintf(bw, " (at least %.6g long)", r.MinPersistence)
	}
	fmt.Fprintln(bw)
	fmt.Fprintln(bw)
	length := func(x float64) string { return strconv.FormatFloat(x, 'g', 6, 64) }
	tw := tabwriter.NewWriter(bw, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "dim\tbirth\tdeath\tpersistence\t")
	for _, b := range r.Bars {
		death, pers := "inf", "inf"
		if !b.Essential() {
			death, pers = length(b.Death), length(b.Persistence())
		}
		fmt.Fprintf(tw, "%d\t%s\t%s\t%s\t\n", b.Dim, length(b.Birth), death, pers)
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	return bw.Flush()
}
