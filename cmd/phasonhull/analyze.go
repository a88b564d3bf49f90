package main

import (
	"fmt"
	"io"
	"strconv"
	"strings"
	"text/tabwriter"

	"github.com/spf13/cobra"

	"phasonhull/topology/hull"
)

// analyzeFlags holds the flags of "phasonhull analyze".
type analyzeFlags struct {
	in        inputFlags
	opt       hull.Options
	memory    string
	json      bool
	allLabels bool
	plot      plotFlags
}

// newAnalyzeCmd builds "phasonhull analyze", the main job.
func newAnalyzeCmd() *cobra.Command {
	var f analyzeFlags
	cmd := &cobra.Command{
		Use:   "analyze FILE",
		Short: "Classify the hull of a pattern, measure its step angle(s), list its gap labels",
		Long: `analyze reads a pattern (FILE, or - for standard input: any format the
readers take) and reports its hull — the space of its local configurations —
with the effective step angle of the shift on it and the gap labels it allows.

Classes:
` + classList() + `
The angle is the rotation number of the shift on the recovered hull, in turns,
folded into [0, 1/2]; it is measured from circular coordinates and refined by
a least-squares fit of the positions, with a one-sigma uncertainty. Gap labels
are the values n + m·θ (+ m2·θ2) in (0, 1) with |m| ≤ --max-coeff, or k/p for
a finite hull: by the gap-labelling theorem, the integrated density of states
in any spectral gap of a pattern-equivariant operator on this chain takes one
of these values. They say where gaps may open, not that they do.

--json prints one object (schema phasonhull.analysis/1, documented in the
README).`,
		Example: `  phasonhull analyze testdata/demo/lw0412_cmm.csv
  phasonhull analyze sample.csv --json > sample.analysis.json
  phasonhull generate modulated --sites 600 --theta 0.4142136 --amp 0.1 | phasonhull analyze -
  phasonhull analyze word.txt --tiles A=1,B=1.618`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			return runAnalyze(cmd, args[0], &f)
		},
	}
	fs := cmd.Flags()
	f.in.register(fs)
	fs.IntVar(&f.opt.Window, "window", 0, "delay window (0: choose it from the data)")
	fs.IntVar(&f.opt.Landmarks, "landmarks", hull.DefaultLandmarks, "landmarks for the barcodes")
	fs.IntVar(&f.opt.Subsamples, "subsamples", hull.DefaultSubsamples, "landmark subsamples whose Betti numbers must agree")
	fs.IntVar(&f.opt.MaxCoeff, "max-coeff", hull.DefaultMaxCoeff, "largest |m| of the listed gap labels")
	fs.Uint64Var(&f.opt.Seed, "seed", hull.DefaultSeed, "seed of every random choice")
	fs.Float64Var(&f.opt.Noise, "tolerance", 0, "position noise tolerated, as a fraction of the mean spacing (0: the embedding's default)")
	fs.StringVar(&f.memory, "memory", "", "memory budget of the persistence computation, e.g. 4GiB (default: the engine's)")
	fs.BoolVar(&f.json, "json", false, "print the result as one JSON object")
	fs.BoolVar(&f.allLabels, "all-labels", false, "list every gap label in the text output (default: the first 12)")
	f.plot.register(fs)
	fileArgs(cmd)
	return cmd
}

// classList lists the hull classes for the help text, one a line, from
// the analysis's class table.
func classList() string {
	var b strings.Builder
	for _, c := range hull.Classes() {
		fmt.Fprintf(&b, "  %-11s %s\n", c.Class, c.Summary)
	}
	return b.String()
}

func runAnalyze(cmd *cobra.Command, path string, f *analyzeFlags) error {
	p, err := f.in.load(path, cmd.InOrStdin())
	if err != nil {
		return err
	}
	if err := f.plot.validate(); err != nil {
		return err
	}
	opt := f.opt
	if f.memory != "" {
		if opt.MemoryBudget, err = parseBytes(f.memory); err != nil {
			return fmt.Errorf("--memory: %w", err)
		}
	}
	res, err := hull.AnalyzeContext(cmd.Context(), p, opt)
	if err != nil {
		return err
	}
	if err := f.plot.writeAnalysis(cmd.ErrOrStderr(), res); err != nil {
		return err
	}
	out := cmd.OutOrStdout()
	if f.json {
		return writeJSON(out, res)
	}
	return printAnalysis(out, res, f.allLabels)
}

// printAnalysis writes the human summary of a hull analysis.
func printAnalysis(w io.Writer, r *hull.Result, all bool) error {
	var b strings.Builder
	unit := r.Unit
	if unit == "" {
		unit = "(no unit)"
	}
	fmt.Fprintf(&b, "pattern     %s: %d sites, mean spacing %.6g %s\n", r.Source, r.Sites, r.MeanSpacing, unit)
	h := r.Hull
	fmt.Fprintf(&b, "hull        %s", h.Class)
	if h.Period > 0 {
		fmt.Fprintf(&b, ", period %d", h.Period)
	}
	fmt.Fprintf(&b, " (Betti %s, confidence %.2f)\n", ints(h.Betti), h.Confidence)
	fmt.Fprintf(&b, "            %s\n", h.Reason)
	switch len(r.Angles) {
	case 0:
	case 1:
		fmt.Fprintf(&b, "angle       θ = %.9f ± %.2g turns (folded into [0, 1/2])\n", r.Angles[0], r.AngleUncertainty[0])
	default:
		for i, a := range r.Angles {
			fmt.Fprintf(&b, "angle %d     θ%d = %.9f ± %.2g turns\n", i+1, i+1, a, r.AngleUncertainty[i])
		}
	}
	if r.AngleMethod != "" {
		fmt.Fprintf(&b, "            %s\n", r.AngleMethod)
	}
	g := r.GapLabels
	switch {
	case h.Class == hull.Finite:
		fmt.Fprintf(&b, "gap labels  Z + Z/%d: IDS = k/%d, k = 1..%d\n", h.Period, h.Period, h.Period-1)
	case len(r.Angles) == 1:
		fmt.Fprintf(&b, "gap labels  Z + Zθ: IDS = n + m·θ in (0, 1), |m| ≤ %d (%d labels)\n", g.MaxCoeff, len(g.Labels))
	case len(r.Angles) == 2:
		fmt.Fprintf(&b, "gap labels  Z + Zθ1 + Zθ2: IDS = n + m1·θ1 + m2·θ2 in (0, 1), |m| ≤ %d (%d labels)\n", g.MaxCoeff, len(g.Labels))
	case h.Class == hull.Cantor && len(g.Labels) > 0:
		fmt.Fprintf(&b, "gap labels  the group generated by %s (factor frequencies of the word): %d labels\n", floats(g.Generators), len(g.Labels))
	case h.Class == hull.Cantor:
		fmt.Fprintf(&b, "gap labels  not resolved at this length (see the warnings)\n")
	default:
		fmt.Fprintf(&b, "gap labels  none (the group is Z: no gap inside the spectrum is forced to a label)\n")
	}
	if len(g.Labels) > 0 {
		tw := tabwriter.NewWriter(&b, 0, 0, 2, ' ', tabwriter.AlignRight)
		fmt.Fprintf(tw, "            \tIDS\tcoefficients\t\n")
		for i, l := range g.Labels {
			if !all && i == 12 {
				fmt.Fprintf(tw, "            \t…\t(%d more; --all-labels or --json)\t\n", len(g.Labels)-12)
				break
			}
			fmt.Fprintf(tw, "            \t%.6f\t%s\t\n", l.IDS, ints(l.Coeffs))
		}
		tw.Flush()
	}
	e := r.Embedding
	fmt.Fprintf(&b, "embedding   window %d, %d component(s), %d vectors", e.Window, e.Components, e.Vectors)
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
			if bar.Dim == 0 || shown >= 6 {
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

func ints(v []int) string {
	s := make([]string, len(v))
	for i, x := range v {
		s[i] = fmt.Sprint(x)
	}
	return "(" + strings.Join(s, ", ") + ")"
}

// floats writes numbers with 10 significant digits, comma-separated.
func floats(v []float64) string {
	s := make([]string, len(v))
	for i, x := range v {
		s[i] = strconv.FormatFloat(x, 'g', 10, 64)
	}
	return strings.Join(s, ", ")
}
