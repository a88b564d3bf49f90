package budget

import (
	"bufio"
	"fmt"
	"io"
	"strings"
	"text/tabwriter"

	"phasonhull/topology/notation"
)

// Caution is printed with every budget.
const Caution = "A survival probability is a share of simulated samples, with its 95% Wilson interval: it holds for the error model given " +
	"(independent Gaussian position errors, sites missing at random, a linear scale drift) and the operator given, nothing else. " +
	"The budget is the largest σ whose estimated survival reaches the confidence asked for; between its low and high ends the trials cannot tell, " +
	"so a go/no-go should be read against the low end."

// WriteText writes the result for a reader: the design's gaps, one row
// per level and gap, and the budget.
func (r *Result) WriteText(out io.Writer) error {
	w := bufio.NewWriter(out)
	u := notation.Unit(r.Unit)
	fmt.Fprintf(w, "budget      %s: %d sites, %d trials per level (seed %d); a gap is open when wider than %.3g\n", r.Source, r.Sites, r.Trials, r.Seed, r.MinWidth)
	if r.Design.Class != "" {
		fmt.Fprintf(w, "design      hull %s", r.Design.Class)
		if len(r.Design.Angles) > 0 {
			fmt.Fprintf(w, ", θ = %.7g", r.Design.Angles[0])
		}
		fmt.Fprintln(w)
	}
	fmt.Fprintf(w, "gaps        %d labelled gap(s) open in the design:", len(r.Design.Gaps))
	for _, g := range r.Design.Gaps {
		fmt.Fprintf(w, " %s width %.4g;", g.Label.CoeffString(), g.Width)
	}
	fmt.Fprintln(w)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "    σ\tmissing\tdrift\tlabel\topen\t95% interval\twidth median\t5–95%\tcentre median\tedge modes\t")
	for _, l := range r.Levels {
		for _, g := range l.Gaps {
			centre := "–"
			if g.Centre != nil {
				centre = fmt.Sprintf("%.4g", g.Centre.Median)
			}
			edges := "–"
			if g.Edges != nil {
				edges = fmt.Sprintf("%d/%d", g.Edges.Count, g.Edges.Trials)
			}
			fmt.Fprintf(tw, "    %.4g%s\t%.3g\t%.3g\t%s\t%d/%d\t[%.3f, %.3f]\t%.4g\t[%.4g, %.4g]\t%s\t%s\t\n",
				l.Sigma, u, l.Missing, l.Drift, g.Label.CoeffString(), g.Open.Count, g.Open.Trials, g.Open.Low, g.Open.High,
				g.Width.Median, g.Width.P05, g.Width.P95, centre, edges)
		}
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	if r.HullTrials > 0 {
		fmt.Fprintln(w, "hull        the design's class kept, and the spread of the first angle over the trials that kept it:")
		for _, l := range r.Levels {
			if l.Hull == nil {
				continue
			}
			fmt.Fprintf(w, "            σ = %.4g%s: %d/%d [%.3f, %.3f]", l.Sigma, u, l.Hull.Kept.Count, l.Hull.Kept.Trials, l.Hull.Kept.Low, l.Hull.Kept.High)
			if l.Hull.Angle != nil {
				fmt.Fprintf(w, "; θ median %.7g, sd %.2g", l.Hull.Angle.Median, l.Hull.AngleSD)
			}
			fmt.Fprintln(w)
		}
	}
	if b := r.Budget; b != nil {
		fmt.Fprintf(w, "budget      gap %s stays open with probability ≥ %g ", b.Gap.Label.CoeffString(), b.Confidence)
		switch {
		case b.Sigma == 0 && !b.Bracketed:
			fmt.Fprintf(w, "at no position error: the missing sites and drift alone close it too often\n")
		case !b.Bracketed:
			fmt.Fprintf(w, "up to σ = %.3g%s at least: no error tried closed it\n", b.Sigma, u)
		default:
			fmt.Fprintf(w, "up to σ = %.3g%s\n", b.Sigma, u)
			fmt.Fprintf(w, "            Monte Carlo error: between σ = %.3g%s and %s the %g%% Wilson interval of %d trials straddles %g\n",
				b.Low, u, highText(b.High, u), 100*r.IntervalLevel, r.Trials, b.Confidence)
		}
	}
	for _, n := range r.Notes {
		fmt.Fprintln(w, "note        "+n)
	}
	for _, n := range r.Warnings {
		fmt.Fprintln(w, "warning     "+n)
	}
	fmt.Fprintln(w, "caution     "+Caution)
	return w.Flush()
}

func highText(h float64, u string) string {
	if h == 0 {
		return "beyond the largest σ tried"
	}
	return strings.TrimSpace(fmt.Sprintf("%.3g%s", h, u))
}
