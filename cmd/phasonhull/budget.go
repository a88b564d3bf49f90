package main

import (
	"errors"
	"fmt"
	"phasonhull/cmd/phasonhull/internal/flagval"
	"phasonhull/cmd/phasonhull/internal/outfile"
	"phasonhull/cmd/phasonhull/internal/picture"

	"github.com/spf13/cobra"

	"phasonhull/pattern/design"
	"phasonhull/topology/budget"
	"phasonhull/topology/spectrum"
)

// budgetFlags holds the flags of "phasonhull budget".
type budgetFlags struct {
	op                     spectrumFlags // the operator and label flags
	plot                   plotFlags
	sigma                  []float64
	sigmaGrid              *flagval.LengthGrid
	opt                    budget.Options
	gap                    []int
	minWidth               float64
	hullTrials, edgeTrials int
	json                   bool
}

func (f *budgetFlags) register(cmd *cobra.Command) {
	fs := cmd.Flags()
	fs.StringVar(&f.op.design, "design", "", "the JSON design `SPEC` (as phasonhull generate --spec takes) whose fabrication is simulated")
	f.op.registerOperator(fs)
	f.sigmaGrid = flagval.NewLengthGrid(&f.sigma)
	fs.Var(f.sigmaGrid, "sigma", "Gaussian position errors tried: a list of lengths (0.01,20um) or START:STOP:COUNT (default: 0 and 0.5%, 1%, 2%, 5% of the mean spacing)")
	fs.Float64Var(&f.opt.Missing, "missing", 0, "perturbation: fraction of sites removed, in [0,1)")
	fs.Float64Var(&f.opt.Drift, "drift", 0, "perturbation: linear scale drift, > -0.5 (local scale 1 → 1+2·drift)")
	fs.IntVar(&f.opt.Trials, "trials", budget.DefaultTrials, "samples drawn per error level")
	fs.IntVar(&f.hullTrials, "hull-trials", budget.DefaultHullTrials, "of them, how many also get the hull analysis (0: none)")
	fs.IntVar(&f.edgeTrials, "edge-trials", budget.DefaultEdgeTrials, "of them, how many also get the phase sweep of the edge modes (0: none)")
	fs.Uint64Var(&f.opt.Seed, "seed", budget.DefaultSeed, "seed of every random choice")
	fs.IntSliceVar(&f.gap, "gap", nil, "find the budget of the gap with this label n,m (e.g. 0,1): the largest σ keeping it open with probability --confidence")
	fs.Float64Var(&f.opt.Confidence, "confidence", budget.DefaultConfidence, "with --gap: the survival probability asked for")
	fs.Float64Var(&f.minWidth, "min-width", 0, "a gap is open when wider than this, in the levels' unit (0: the spectrum's resolution, its smallest reported gap)")
	fs.BoolVar(&f.json, "json", false, "print the result as one JSON object")
	f.plot.register(fs)
}

// newBudgetCmd builds "phasonhull budget".
func newBudgetCmd() *cobra.Command {
	var f budgetFlags
	cmd := &cobra.Command{
		Use:   "budget --design SPEC",
		Short: "The fabrication error budget of a design: which gaps, edge modes and hull survive a position error",
		Long: `budget simulates the fabrication of a design (--design SPEC) with errors:
every site moved by a Gaussian error of standard deviation --sigma, a
fraction --missing of the sites left out, a linear scale --drift. At each
σ it draws --trials samples (trial i seeded from --seed and i alone, the
same draws scaled at every σ) and builds the operator of the spectrum flags
on each (the same flags and meanings as phasonhull spectrum).

For each labelled gap of the design wider than --min-width, matched by its
label in every sample: the share of samples in which it stays open, with its
95% Wilson score interval; the median and 5–95% range of its width (0 where
it closed) and centre; and, on the first --edge-trials samples, the share
whose boundary states still cross it m times per turn of the phase. On the
first --hull-trials samples, the share whose hull analysis gives the
design's class, and the spread of the recovered angle.

--gap n,m finds the budget: the largest σ whose estimated survival of that
gap reaches --confidence, by bisection on σ, with its Monte Carlo error —
the range of σ where the Wilson interval straddles the confidence. A gap
the design itself does not open is refused, naming the gaps it opens.

--plot DIR draws the survival of each gap against σ with its interval, and
the median width with its 5–95% range.`,
		Example: `  # The demo design: how much position error keeps the widest gap open?
  phasonhull budget --design testdata/demo/lw0412_design.json --hopping exp --decay 3 \
      --sigma 0:0.2mm:5 --gap 0,1 --confidence 0.95`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			return runBudget(cmd, &f)
		},
	}
	f.register(cmd)
	outfile.Mark(cmd.Flags(), outfile.Input, "design", "table", "onsite-file")
	return cmd
}

func runBudget(cmd *cobra.Command, f *budgetFlags) error {
	if f.op.design == "" {
		return errors.New("give the design: --design SPEC")
	}
	if err := f.op.checkOperator(cmd); err != nil {
		return err
	}
	if err := f.plot.validate(); err != nil {
		return err
	}
	spec, err := design.ReadSpecFile(f.op.design)
	if err != nil {
		return err
	}
	spec.Noise, spec.Missing, spec.Extra, spec.Drift = 0, 0, 0, 0
	p, err := design.Generate(spec)
	if err != nil {
		return err
	}
	if err := f.sigmaGrid.Resolve(spec.Unit); err != nil {
		return fmt.Errorf("--sigma: %w", err)
	}
	if !cmd.Flags().Changed("sigma") {
		d := p.MeanSpacing()
		f.sigma = []float64{0, 0.005 * d, 0.01 * d, 0.02 * d, 0.05 * d}
	}
	m, err := f.op.buildModel(p.Len(), p.Unit, f.op.theta, cmd.InOrStdin())
	if err != nil {
		return err
	}
	rep := spectrum.NewReport(f.op.maxCoeff)
	opt, err := f.op.labelOptions(cmd.Context(), p, spec, rep)
	if err != nil {
		return err
	}
	progress := progressOf(cmd)
	defer progress.Close()
	f.opt.Sigmas, f.opt.Gap, f.opt.MinWidth = f.sigma, f.gap, f.minWidth
	f.opt.HullTrials, f.opt.EdgeTrials = f.hullTrials, f.edgeTrials
	f.opt.Progress = func(stage string, done, total int) {
		progress.Stage(stage)
		progress.Count(done, total)
	}
	res, err := budget.Run(cmd.Context(), budget.Chain{Spec: spec, Model: m, Options: opt}, f.opt)
	if err != nil {
		return err
	}
	res.Source = f.op.design
	res.Notes = append(res.Notes, rep.Notes...)
	res.Warnings = append(res.Warnings, rep.Warnings...)
	if f.plot.dir != "" {
		f.plot.list = listTo(cmd)
		pic, err := picture.Budget(res)
		if err != nil {
			return fmt.Errorf("--plot: %w", err)
		}
		if err := f.plot.write([]*picture.Picture{pic}); err != nil {
			return err
		}
	}
	if f.json {
		return writeJSON(cmd.OutOrStdout(), res)
	}
	return res.WriteText(cmd.OutOrStdout())
}
