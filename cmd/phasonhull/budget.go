package main

import (
	"errors"
	"fmt"
	"phasonhull/cmd/phasonhull/internal/flagval"
	"phasonhull/cmd/phasonhull/internal/outfile"
	"phasonhull/cmd/phasonhull/internal/picture"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"phasonhull/pattern/design"
	"phasonhull/topology/budget"
	"phasonhull/topology/spectrum"
)

// budgetFlags holds the flags of "phasonhull budget".
type budgetFlags struct {
	op    spectrumFlags // the operator and label flags, as spectrum has them
	plot  plotFlags
	sigma *flagval.LengthGrid
	opt   budget.Options
	json  bool
}

func (f *budgetFlags) register(fs *pflag.FlagSet) {
	fs.StringVar(&f.op.design, "design", "", "the JSON design `SPEC` (as phasonhull generate --spec takes) whose fabrication is simulated")
	f.op.registerOperator(fs)
	f.sigma = flagval.NewLengthGrid(&f.opt.Sigmas)
	fs.Var(f.sigma, "sigma", "Gaussian position errors tried: a list of lengths (0.01,20um) or START:STOP:COUNT (default: 0, 0.5%, 1%, 2% and 5% of the mean spacing)")
	fs.Float64Var(&f.opt.Missing, "missing", 0, "perturbation: fraction of sites removed, in [0,1)")
	fs.Float64Var(&f.opt.Drift, "drift", 0, "perturbation: linear scale drift, > -0.5 (local scale 1 → 1+2·drift)")
	fs.IntVar(&f.opt.Trials, "trials", budget.DefaultTrials, "samples drawn per error level")
	fs.IntVar(&f.opt.HullTrials, "hull-trials", budget.DefaultHullTrials, "of them, how many also get the hull analysis (0: none)")
	fs.IntVar(&f.opt.EdgeTrials, "edge-trials", budget.DefaultEdgeTrials, "of them, how many also get the phase sweep of the edge modes (0: none)")
	fs.Uint64Var(&f.opt.Seed, "seed", budget.DefaultSeed, "seed of every random choice")
	fs.IntSliceVar(&f.opt.Gap, "gap", nil, "find the budget of the gap labelled n,m (e.g. 0,1): the largest σ keeping it open with probability --confidence")
	fs.Float64Var(&f.opt.Confidence, "confidence", budget.DefaultConfidence, "with --gap: the survival probability asked for")
	fs.Float64Var(&f.opt.MinWidth, "min-width", 0, "a gap is open when wider than this, in the levels' unit (0: the spectrum's resolution, its smallest reported gap)")
	fs.BoolVar(&f.json, "json", false, "print the result as one JSON object")
	f.plot.register(fs)
}

// newBudgetCmd builds "phasonhull budget".
func newBudgetCmd() *cobra.Command {
	var f budgetFlags
	cmd := &cobra.Command{
		Use:   "budget --design SPEC",
		Short: "The fabrication error budget of a design: which gaps, edge modes and hull survive a position error",
		Long: `budget simulates the fabrication of a design (--design SPEC): sites moved
by Gaussian errors --sigma, a fraction --missing left out, a scale --drift.
At each σ it draws --trials samples (trial i seeded by --seed and i alone)
and builds on each the operator of the spectrum flags (as spectrum has
them). Per labelled gap of the design: the share of samples where it stays
open (95% Wilson interval), its width and centre, and whether its edge
modes still count m (first --edge-trials samples); per level, whether the
hull keeps its class (first --hull-trials). --gap n,m finds by bisection
the largest σ keeping that gap open with probability --confidence, with
its Monte Carlo error; a gap the design does not open is refused.`,
		Example: `  phasonhull budget --design testdata/demo/lw0412_design.json --hopping exp --decay 3 \
      --sigma 0:0.2mm:5 --gap 0,1 --confidence 0.95`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error { return runBudget(cmd, &f) },
	}
	f.register(cmd.Flags())
	outfile.Mark(cmd.Flags(), outfile.Input, "design", "table", "onsite-file")
	return cmd
}

func runBudget(cmd *cobra.Command, f *budgetFlags) error {
	if f.op.design == "" {
		return errors.New("give the design: --design SPEC")
	}
	if err := errors.Join(f.op.checkOperator(cmd), f.plot.validate()); err != nil {
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
	if err := f.sigma.Resolve(spec.Unit); err != nil {
		return fmt.Errorf("--sigma: %w", err)
	}
	if !cmd.Flags().Changed("sigma") {
		f.opt.Sigmas = budget.DefaultSigmas(p.MeanSpacing())
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
	f.opt.Progress = func(stage string, done, total int) { progress.Stage(stage); progress.Count(done, total) }
	res, err := budget.Run(cmd.Context(), budget.Chain{Spec: spec, Model: m, Options: opt}, f.opt)
	if err != nil {
		return err
	}
	res.Source = f.op.design
	res.Notes, res.Warnings = append(res.Notes, rep.Notes...), append(res.Warnings, rep.Warnings...)
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
