package audit

import (
	"bytes"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"phasonhull/topology/hull"
	"phasonhull/topology/notation"
)

// maxListed bounds the entries of each defect list in the text.
const maxListed = 20

// WriteText writes the report for a reader, as "phasonhull audit" prints
// it: the sites, the calibration, the residuals, each defect list (at most
// maxListed entries; the JSON form lists all), the hulls, the notes and
// the verdict with its reasons.
func (r *Report) WriteText(w io.Writer) error {
	var b bytes.Buffer
	u := notation.Unit(r.Unit)
	if r.Design != "" {
		fmt.Fprintf(&b, "audit       %s against the design %s (%s)\n", r.Measured, r.Design, r.DesignKind)
		fmt.Fprintf(&b, "sites       design %d, measured %d: %d matched, %d missing, %d extra\n", r.DesignSites, r.MeasuredSites, r.Matched, len(r.Missing), len(r.Extra))
	} else {
		fmt.Fprintf(&b, "audit       %s against its own hull (no design given)\n", r.Measured)
		fmt.Fprintf(&b, "sites       %d, %d in the hull model, %d left out as spurious\n", r.MeasuredSites, r.Matched, len(r.Extra))
	}
	if t := r.Transform; t != nil {
		fmt.Fprintf(&b, "calibration offset (%s, %s)%s, rotation %s°, scale %s (%s ppm)\n",
			notation.PlusMinus(t.Offset[0], t.OffsetErr[0]), notation.PlusMinus(t.Offset[1], t.OffsetErr[1]), u,
			notation.PlusMinus(t.Rotation, t.RotationErr), notation.PlusMinus(t.Scale, t.ScaleErr), signed(notation.PlusMinus((t.Scale-1)*1e6, t.ScaleErr*1e6)))
		if t.Mirrored {
			fmt.Fprintf(&b, "            x = offset + scale·R(rotation)·F·d, F the reflection (x, y) → (x, −y): the sample is the design's mirror image\n")
		} else {
			fmt.Fprintf(&b, "            x = offset + scale·R(rotation)·d\n")
		}
	} else if r.Scale != nil {
		ppm := notation.PlusMinus((math.Abs(*r.Scale)-1)*1e6, *r.ScaleErr*1e6)
		if !strings.HasPrefix(ppm, "-") {
			ppm = "+" + ppm
		}
		fmt.Fprintf(&b, "calibration offset %s%s, scale %s (%s ppm)\n",
			notation.PlusMinus(*r.Offset, *r.OffsetErr), u, notation.PlusMinus(*r.Scale, *r.ScaleErr), ppm)
		if r.Drift != nil {
			fmt.Fprintf(&b, "            drift %s: the local scale goes from %.9g at the first design site to %.9g at the last\n",
				notation.PlusMinus(*r.Drift, *r.DriftErr), *r.Scale, *r.Scale*(1+2**r.Drift))
			fmt.Fprintf(&b, "            x = offset + scale·d + scale·drift·(d − d0)²/span\n")
		} else {
			fmt.Fprintf(&b, "            x = offset + scale·d (--fit-drift fits a drift of the scale too)\n")
		}
		if *r.Scale < 0 {
			fmt.Fprintf(&b, "            the sample runs opposite to the design (negative scale)\n")
		}
	}
	if r.Matched > 0 {
		outliers := 0
		for _, s := range r.Sites {
			if s.Outlier {
				outliers++
			}
		}
		fmt.Fprintf(&b, "residuals   RMS %.4g%s, max %.4g%s; robust sigma %.3g%s; outliers beyond 4 sigma = %.3g%s: %d\n",
			r.RMS, u, r.Max, u, r.Sigma, u, r.OutlierThreshold, u, outliers)
	}
	if r.Tolerance != nil {
		n := 0
		for _, s := range r.Sites {
			if s.WithinTolerance != nil && !*s.WithinTolerance {
				n++
			}
		}
		if n == 0 {
			fmt.Fprintf(&b, "tolerance   %.4g%s: every site within\n", *r.Tolerance, u)
		} else {
			fmt.Fprintf(&b, "tolerance   %.4g%s: %d site(s) beyond\n", *r.Tolerance, u, n)
		}
	}
	pt := func(q [2]float64) string { return fmt.Sprintf("(%.6g, %.6g)%s", q[0], q[1], u) }
	if at := r.missingAtPlane(); at != nil {
		list(&b, "missing", len(r.Missing), func(i int) string {
			j := r.Missing[i]
			return fmt.Sprintf("design #%d at %s, expected at %s", j, pt(r.designPts[j]), pt(at[i]))
		})
	}
	if at := r.MissingAt(); at != nil {
		list(&b, "missing", len(r.Missing), func(i int) string {
			j := r.Missing[i]
			return fmt.Sprintf("design #%d at %.6g%s, expected at %.6g%s", j, r.designPos[j], u, at[i], u)
		})
	}
	list(&b, "extra", len(r.Extra), func(i int) string {
		k := r.Extra[i]
		if r.measuredPts != nil {
			return fmt.Sprintf("measured #%d at %s", k, pt(r.measuredPts[k]))
		}
		return fmt.Sprintf("measured #%d at %.6g%s", k, r.measuredPos[k], u)
	})
	list(&b, "merged", len(r.Merged), func(i int) string {
		m := r.Merged[i]
		return fmt.Sprintf("design #%d and #%d as measured #%d at %.6g%s", m.Design[0], m.Design[1], m.Measured, m.Position, u)
	})
	list(&b, "swapped", len(r.Swapped), func(i int) string {
		s := r.Swapped[i]
		return fmt.Sprintf("measured #%d and #%d (design #%d and #%d)", s.Measured[0], s.Measured[1], s.Design[0], s.Design[1])
	})
	var flagged []Site
	for _, s := range r.Sites {
		if s.Flagged() {
			flagged = append(flagged, s)
		}
	}
	name := "outliers"
	if r.Tolerance != nil {
		name = "flagged" // beyond 4 sigma or beyond the tolerance
	}
	list(&b, name, len(flagged), func(i int) string {
		s := flagged[i]
		at := fmt.Sprintf("measured #%d", s.Measured)
		if s.Design != nil {
			at = fmt.Sprintf("design #%d (measured #%d)", *s.Design, s.Measured)
		}
		if s.Point != nil {
			return fmt.Sprintf("%s at %s: residual (%+.4g, %+.4g)%s, length %.4g%s (%.1f sigma)", at, pt(*s.Point), s.ResidualXY[0], s.ResidualXY[1], u, s.Residual, u, s.Residual/r.Sigma)
		}
		return fmt.Sprintf("%s at %.6g%s: residual %+.4g%s (%.1f sigma)", at, s.Position, u, s.Residual, u, math.Abs(s.Residual)/r.Sigma)
	})
	h := r.Hull
	label := "hull       "
	if h.Design != nil {
		fmt.Fprintf(&b, "%s design: %s\n", label, hullLine(h.Design))
		label = "           "
	}
	if h.Measured != nil {
		fmt.Fprintf(&b, "%s sample: %s\n", label, hullLine(h.Measured))
		for _, n := range h.Measured.Warnings {
			fmt.Fprintf(&b, "            warning: %s\n", n)
		}
	}
	if h.Reference != nil && len(h.Reference.Angles) > 0 {
		s := make([]string, len(h.Reference.Angles))
		for i, x := range h.Reference.Angles {
			s[i] = strconv.FormatFloat(x, 'g', 10, 64)
		}
		fmt.Fprintf(&b, "            spec:   angle(s) %s exactly (%s family)\n", strings.Join(s, ", "), h.Reference.Family)
	}
	if h.Reference != nil && len(h.Reference.Rotation) > 0 {
		rows := make([]string, len(h.Reference.Rotation))
		for i, row := range h.Reference.Rotation {
			e := make([]string, len(row))
			for j, x := range row {
				e[j] = strconv.FormatFloat(x, 'g', 10, 64)
			}
			rows[i] = "(" + strings.Join(e, ", ") + ")"
		}
		fmt.Fprintf(&b, "            spec:   A = %s exactly (%s family)\n", strings.Join(rows, "; "), h.Reference.Family)
	}
	if c := h.Comparison; c != nil {
		fmt.Fprintf(&b, "            %s\n", c.Verdict)
		for _, n := range c.Notes {
			fmt.Fprintf(&b, "            note: %s\n", n)
		}
	}
	for _, n := range r.Notes {
		fmt.Fprintf(&b, "note        %s\n", n)
	}
	if r.Passed() {
		fmt.Fprintf(&b, "verdict     PASS\n")
	} else {
		fmt.Fprintf(&b, "verdict     FAIL: %s\n", strings.Join(r.Reasons, "; "))
	}
	_, err := w.Write(b.Bytes())
	return err
}

// signed puts a plus sign before a non-negative number.
func signed(s string) string {
	if strings.HasPrefix(s, "-") {
		return s
	}
	return "+" + s
}

// list writes up to maxListed entries of a defect list.
func list(b *bytes.Buffer, name string, n int, entry func(i int) string) {
	if n == 0 {
		return
	}
	fmt.Fprintf(b, "%-11s %d:\n", name, n)
	for i := 0; i < n; i++ {
		if i == maxListed {
			fmt.Fprintf(b, "            … %d more (--json lists all)\n", n-maxListed)
			break
		}
		fmt.Fprintf(b, "            %s\n", entry(i))
	}
}

// hullLine sums up a hull analysis on one line.
func hullLine(r *hull.Result) string {
	s := string(r.Hull.Class)
	if r.Hull.Period > 0 {
		s += fmt.Sprintf(", period %d", r.Hull.Period)
	}
	if len(r.Rotation) > 0 {
		rows := make([]string, len(r.Rotation))
		for i, row := range r.Rotation {
			e := make([]string, len(row))
			for j, x := range row {
				e[j] = notation.PlusMinus(x, r.RotationUncertainty[i][j])
			}
			rows[i] = "(" + strings.Join(e, ", ") + ")"
		}
		s += ", A = " + strings.Join(rows, "; ")
	}
	for i, a := range r.Angles {
		sub := ""
		if len(r.Angles) > 1 {
			sub = strconv.Itoa(i + 1)
		}
		s += fmt.Sprintf(", θ%s = %s", sub, notation.PlusMinus(a, r.AngleUncertainty[i]))
	}
	if r.Disorder != nil {
		s += fmt.Sprintf(", disorder %.3g of the mean spacing", r.Disorder.Relative)
	}
	return s
}
