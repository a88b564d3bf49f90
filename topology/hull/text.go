package hull

import (
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"unicode/utf8"

	"phasonhull/topology"
	"phasonhull/topology/notation"
)

// labelsShown bounds the gap labels WriteText lists unless asked for all.
const labelsShown = 12

// barsShown bounds the bars of dimension ≥ 1 WriteText lists.
const barsShown = 6

// WriteText writes the result for a reader, as "phasonhull analyze"
// prints it: the pattern, the class with its Betti numbers (for the
// classes read off barcodes) and reason, the tiles of a tiling, the
// angle(s), the disorder with its model, the gap-label group and its
// first labels, lowest order first (every label when allLabels is set;
// the JSON form always lists all, by IDS), the embedding, the significant
// barcodes, the notes and the warnings. Every value with an uncertainty
// is written to the digits it justifies (notation.PlusMinus); a label
// whose IDS is uncertain by more than half the distance to its nearest
// neighbour is marked "?".
func (r *Result) WriteText(w io.Writer, allLabels bool) error {
	var b strings.Builder
	unit := r.Unit
	if unit == "" {
		unit = "(no unit)"
	}
	if r.Dimension == 2 {
		fmt.Fprintf(&b, "pattern     %s: %d sites on a plane, lattice spacing |a1| = %.6g %s\n", r.Source, r.Sites, r.MeanSpacing, unit)
		r.writeLattice(&b)
	} else {
		fmt.Fprintf(&b, "pattern     %s: %d sites, mean spacing %.6g %s\n", r.Source, r.Sites, r.MeanSpacing, unit)
	}
	h := r.Hull
	fmt.Fprintf(&b, "hull        %s", h.Class)
	if h.Components > 1 && h.TorusDimension > 0 {
		fmt.Fprintf(&b, " × %d components", h.Components)
	}
	if h.Period > 0 {
		fmt.Fprintf(&b, ", period %d", h.Period)
	}
	if len(h.Betti) > 0 {
		// Classes not read off barcodes (cantor, disordered) have none.
		fmt.Fprintf(&b, " (Betti %s, confidence %.2f)", notation.Tuple(h.Betti), h.Confidence)
	}
	b.WriteString("\n")
	fmt.Fprintf(&b, "            %s\n", h.Reason)
	r.writeTiles(&b)
	switch len(r.Angles) {
	case 0:
	case 1:
		fmt.Fprintf(&b, "angle       θ = %s turns (folded into [0, 1/2])\n", notation.PlusMinus(r.Angles[0], r.AngleUncertainty[0]))
	default:
		for i, a := range r.Angles {
			fmt.Fprintf(&b, "angle %d     θ%d = %s turns\n", i+1, i+1, notation.PlusMinus(a, r.AngleUncertainty[i]))
		}
	}
	r.writeRotation(&b)
	if r.AngleMethod != "" {
		fmt.Fprintf(&b, "            %s\n", r.AngleMethod)
	}
	r.writeDisorder(&b)
	r.writeLabels(&b, allLabels)
	e := r.Embedding
	if r.Dimension == 2 {
		fmt.Fprintf(&b, "embedding   patches of %d×%d lattice steps, %d component(s), %d vectors", e.Window, e.Window, e.Components, e.Vectors)
	} else {
		fmt.Fprintf(&b, "embedding   window %d, %d component(s), %d vectors", e.Window, e.Components, e.Vectors)
	}
	if e.Excluded > 0 {
		fmt.Fprintf(&b, " (%d left out)", e.Excluded)
	}
	fmt.Fprintf(&b, ", %d landmarks, cover radius %.3g\n", e.Landmarks, e.CoverRadius)
	if pr := r.Persistence; pr.Threshold > 0 || len(pr.Bars) > 0 {
		fmt.Fprintf(&b, "barcodes    significance threshold %.3g (whitened units)", pr.Threshold)
		if len(h.ScaleBand) == 2 {
			fmt.Fprintf(&b, "; Betti numbers hold on [%.3g, %.3g)", h.ScaleBand[0], h.ScaleBand[1])
		}
		b.WriteString("\n")
		shown := 0
		for _, bar := range pr.Bars {
			if bar.Dim == 0 || shown >= barsShown {
				continue
			}
			death := "∞"
			if !bar.Essential() {
				death = fmt.Sprintf("%.4g", bar.Death)
			}
			mark := ""
			if bar.Significant {
				mark = "  significant"
			}
			fmt.Fprintf(&b, "            H%d [%.4g, %s)%s\n", bar.Dim, bar.Birth, death, mark)
			shown++
		}
	}
	for _, n := range r.Notes {
		fmt.Fprintf(&b, "note        %s\n", n)
	}
	for _, n := range r.Warnings {
		fmt.Fprintf(&b, "warning     %s\n", n)
	}
	_, err := io.WriteString(w, b.String())
	return err
}

// writeLattice writes the average lattice of a plane.
func (r *Result) writeLattice(b *strings.Builder) {
	l := r.Lattice
	if l == nil {
		return
	}
	vec := func(i int) string {
		return fmt.Sprintf("(%s, %s)", notation.PlusMinus(l.Basis[i][0], l.BasisUncertainty[i][0]), notation.PlusMinus(l.Basis[i][1], l.BasisUncertainty[i][1]))
	}
	fmt.Fprintf(b, "lattice     a1 = %s, a2 = %s%s; %d sites on it, %d missing, %d off it\n", vec(0), vec(1), notation.Unit(r.Unit), l.Sites, l.Missing, l.OffLattice)
}

// writeRotation writes the rotation matrix of a plane's hull, one row per
// torus coordinate, each entry with its uncertainty.
func (r *Result) writeRotation(b *strings.Builder) {
	if len(r.Rotation) == 0 {
		return
	}
	fmt.Fprintf(b, "rotation    A in turns per lattice step (rows: torus coordinates; columns: a1, a2), reduced: any V·A·U + N with V, U, N integer and V, U invertible over Z is the same hull\n")
	cells := make([][2]string, len(r.Rotation))
	w := 0
	for k, row := range r.Rotation {
		for j := range 2 {
			u := 0.0
			if k < len(r.RotationUncertainty) {
				u = r.RotationUncertainty[k][j]
			}
			cells[k][j] = notation.PlusMinus(row[j], u)
			w = max(w, utf8.RuneCountInString(cells[k][j]))
		}
	}
	for _, c := range cells {
		fmt.Fprintf(b, "            ( %s%s   %s%s )\n", strings.Repeat(" ", w-utf8.RuneCountInString(c[0])), c[0], strings.Repeat(" ", w-utf8.RuneCountInString(c[1])), c[1])
	}
}

// planeGroup writes the gap-label group of a d-torus moved by Z².
func planeGroup(d int) string {
	switch d {
	case 1:
		return "Z + Z·A11 + Z·A12"
	case 2:
		return "Z + Σ Z·A_ij + Z·det A (det A: the second-Chern term)"
	}
	return "Z + Σ Z·A_ij + Σ Z·(2×2 minors of A)"
}

// writeTiles writes the tiles of a chain read as a tiling and the class
// of its word.
func (r *Result) writeTiles(b *strings.Builder) {
	t := r.Tiles
	if t == nil {
		return
	}
	unit := notation.Unit(r.Unit)
	tiles := make([]string, len(t.Lengths))
	for i, l := range t.Lengths {
		tiles[i] = fmt.Sprintf("%c = %.6g%s (%d)", []rune(t.Letters)[i], l, unit, t.Counts[i])
	}
	fmt.Fprintf(b, "tiles       %s", strings.Join(tiles, ", "))
	if t.Missing > 0 {
		fmt.Fprintf(b, "; %d spacing(s) read as two tiles with a site missing", t.Missing)
	}
	fmt.Fprintf(b, "\n            word %s", t.WordClass)
	if n := len(t.Complexity); n > 0 {
		fmt.Fprintf(b, ", complexity p(%d) = %d", n, t.Complexity[n-1])
	}
	if t.ModuleRank > 0 {
		fmt.Fprintf(b, ", factor frequencies of rank %d", t.ModuleRank)
	}
	b.WriteString("\n")
}

// writeDisorder writes the scatter of the sites about the model of the
// hull, and what the delay cloud showed of it when that was measured.
func (r *Result) writeDisorder(b *strings.Builder) {
	d := r.Disorder
	if d == nil {
		return
	}
	unit := notation.Unit(r.Unit)
	fmt.Fprintf(b, "disorder    %.3g of the mean spacing (RMS %.3g%s)", d.Relative, d.RMS, unit)
	if rest, ok := strings.CutPrefix(d.Model, "none: "); ok {
		fmt.Fprintf(b, ": no model of the hull, %s", rest)
	} else {
		fmt.Fprintf(b, " about the model: %s", d.Model)
	}
	if d.IntrinsicDimension > 0 {
		fmt.Fprintf(b, "; mutual information of consecutive spacings %.2g nats, dimension of the delay cloud %.2g", d.MutualInformation, d.IntrinsicDimension)
	}
	b.WriteString("\n")
}

// writeLabels writes the gap-label group and its first labels, lowest
// order first.
func (r *Result) writeLabels(b *strings.Builder, all bool) {
	h, g := r.Hull, r.GapLabels
	switch {
	case r.Dimension == 2 && len(r.Rotation) > 0 && h.Class != Finite:
		fmt.Fprintf(b, "gap labels  %s, reduced over Z to the generators %s: IDS = c0 + Σ c_i·g_i in (0, 1), |c_i| ≤ %d (%d labels, lowest order first)\n", planeGroup(len(r.Rotation)), floats(g.Generators[1:]), g.MaxCoeff, len(g.Labels))
	case h.Class == Finite:
		fmt.Fprintf(b, "gap labels  Z + Z/%d: IDS = k/%d, k = 1..%d\n", h.Period, h.Period, h.Period-1)
	case len(r.Angles) > 0 && h.Components > 1:
		fmt.Fprintf(b, "gap labels  (1/%d)Z + %s: IDS = n + k/%d + m·θ in (0, 1), |k|, |m| ≤ %d (%d labels)\n", h.Components, angleTerms(len(r.Angles)), h.Components, g.MaxCoeff, len(g.Labels))
	case len(r.Angles) == 3:
		fmt.Fprintf(b, "gap labels  Z + Zθ1 + Zθ2 + Zθ3: IDS = n + m·θ in (0, 1), |m| ≤ %d (%d labels)\n", g.MaxCoeff, len(g.Labels))
	case len(r.Angles) == 1:
		fmt.Fprintf(b, "gap labels  Z + Zθ: IDS = n + m·θ in (0, 1), |m| ≤ %d (%d labels, lowest order first)\n", g.MaxCoeff, len(g.Labels))
	case len(r.Angles) == 2:
		fmt.Fprintf(b, "gap labels  Z + Zθ1 + Zθ2: IDS = n + m1·θ1 + m2·θ2 in (0, 1), |m| ≤ %d (%d labels, lowest order first)\n", g.MaxCoeff, len(g.Labels))
	case h.Class == Cantor && len(g.Labels) > 0:
		fmt.Fprintf(b, "gap labels  the group generated by %s (factor frequencies of the word): %d labels\n", floats(g.Generators), len(g.Labels))
	case h.Class == Cantor:
		fmt.Fprintf(b, "gap labels  not resolved at this length (see the warnings)\n")
	default:
		fmt.Fprintf(b, "gap labels  none (the group is Z: no gap inside the spectrum is forced to a label)\n")
	}
	if len(g.Labels) == 0 {
		return
	}
	type row struct{ ids, pm, coeffs, flag string }
	rows := []row{{ids: "IDS", coeffs: "coefficients"}}
	blurred := false
	listed := r.ListLabels()
	if !all && len(listed) > labelsShown {
		listed = listed[:labelsShown]
	}
	for _, l := range listed {
		rw := row{coeffs: l.CoeffString()}
		var u string
		if rw.ids, u = r.LabelIDS(l); u != "" {
			rw.pm = "± " + u
		}
		if l.Blurred {
			rw.flag, blurred = " ?", true
		}
		rows = append(rows, rw)
	}
	// The values right-aligned, their uncertainties left-aligned after
	// them, the coefficients right-aligned.
	var w [3]int
	for _, rw := range rows {
		for i, c := range []string{rw.ids, rw.pm, rw.coeffs} {
			w[i] = max(w[i], utf8.RuneCountInString(c))
		}
	}
	pad := func(s string, n int) string { return strings.Repeat(" ", n-utf8.RuneCountInString(s)) }
	for _, rw := range rows {
		b.WriteString("            ")
		b.WriteString(pad(rw.ids, w[0]) + rw.ids)
		if w[1] > 0 {
			b.WriteString(" " + rw.pm + pad(rw.pm, w[1]))
		}
		b.WriteString("  " + pad(rw.coeffs, w[2]) + rw.coeffs + rw.flag + "\n")
	}
	if n := len(g.Labels) - len(listed); n > 0 {
		fmt.Fprintf(b, "            … %d more, of higher order (--all-labels or --json)\n", n)
	}
	if blurred {
		fmt.Fprintf(b, "            ? uncertain by more than half the distance to the nearest label: a gap there may carry either\n")
	}
}

// ListLabels returns the gap labels as the text and the report list them:
// lowest order first, each with the uncertainty of its IDS from the
// angles' uncertainties and whether it is blurred with its nearest
// neighbour (topology.List). A period's labels are exact; those of the
// factor frequencies of a word carry no uncertainty (none is measured).
func (r *Result) ListLabels() []topology.Listed {
	g := r.GapLabels
	var sigma []float64
	if len(g.Labels) > 0 && len(r.AngleUncertainty) == len(g.Labels[0].Coeffs)-1 {
		sigma = r.AngleUncertainty
	}
	return topology.List(g.Labels, sigma)
}

// LabelIDS writes the IDS of a label of ListLabels as the text and the
// report do: to the digits its uncertainty justifies, with that
// uncertainty (notation.Rounded) when the angles were measured; as k/p
// for a finite hull; with six decimals (and no uncertainty) otherwise.
func (r *Result) LabelIDS(l topology.Listed) (value, uncertainty string) {
	switch h := r.Hull; {
	case h.Class == Finite && h.Period > 1:
		return fmt.Sprintf("%d/%d", int(math.Round(l.IDS*float64(h.Period))), h.Period), ""
	case len(r.AngleUncertainty) == len(l.Coeffs)-1:
		return notation.Rounded(l.IDS, l.Uncertainty)
	}
	return fmt.Sprintf("%.6f", l.IDS), ""
}

// floats writes numbers with 10 significant digits, comma-separated.
func floats(v []float64) string {
	s := make([]string, len(v))
	for i, x := range v {
		s[i] = strconv.FormatFloat(x, 'g', 10, 64)
	}
	return strings.Join(s, ", ")
}

// angleTerms writes Zθ (one angle) or Zθ1 + … + Zθd.
func angleTerms(d int) string {
	if d == 1 {
		return "Zθ"
	}
	t := make([]string, d)
	for i := range t {
		t[i] = fmt.Sprintf("Zθ%d", i+1)
	}
	return strings.Join(t, " + ")
}
