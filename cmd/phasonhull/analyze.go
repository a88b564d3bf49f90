package main

import (
	"fmt"
	"strings"

	"github.com/spf13/cobra"

	"phasonhull/cmd/phasonhull/internal/flagval"
	"phasonhull/cmd/phasonhull/internal/outfile"
	"phasonhull/pattern"
	"phasonhull/pattern/lattice"
	"phasonhull/topology/hull"
)

// analyzeFlags holds the flags of "phasonhull analyze".
type analyzeFlags struct {
	in        inputFlags
	opt       hull.Options
	memory    string
	noise     *flagval.Noise
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
A hull with a continuous modulation is p components × a d-torus (point 1 × 0,
finite p × 0, circle p × 1, torus p × 2, torus3 p × 3); the JSON form gives p
as hull.components and d as hull.torus_dimension (a circle decorated by a
cell of two sites: class circle, components 2).

The angle is the rotation number of the shift on the recovered hull, in turns,
folded into [0, 1/2]; it is measured from circular coordinates and refined by
a least-squares fit of the positions, with a one-sigma uncertainty. Angles
(and their class) are reported only when the positions refitted on them
leave residuals consistent with the measured noise. Gap labels are the values
n + k/p + m·θ (+ m2·θ2 …) in (0, 1) with |k|, |m| ≤ --max-coeff (k only when
p > 1), or k/p for a finite hull: by the gap-labelling theorem, the
integrated density of states in any spectral gap of a pattern-equivariant
operator on this chain takes one of these values. They say where gaps may
open, not that they do.

A plate — x,y centroids that do not lie along a line — is read on its
average lattice (basis with uncertainties, missing and stray sites): the
hull of the displacement field, read from patches of --window × --window
lattice steps, and the rotation matrix A (turns per lattice step) with its
uncertainties; its gap labels form Z + Σ Z·A_ij + Z·det A, the coefficient
of det A a second Chern number. A plate with no average lattice is
disordered. --plot draws its sites with their displacements and its
structure factor.

--json prints one object (schema phasonhull.analysis/1, documented in the
README).`,
		Example: `  phasonhull analyze testdata/demo/lw0412_cmm.csv
  phasonhull analyze sample.csv --json > sample.analysis.json
  phasonhull generate modulated --sites 600 --theta 0.4142136 --amp 0.1 | phasonhull analyze -
  phasonhull analyze word.txt --tiles A=1,B=1.618
  phasonhull analyze testdata/demo/lw0519_plate.csv --plot figures/`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			return runAnalyze(cmd, args[0], &f)
		},
	}
	fs := cmd.Flags()
	f.in.register(fs)
	fs.IntVar(&f.opt.Window, "window", 0, "delay window of a chain, side of the patches of a plate in lattice steps (0: choose it)")
	fs.IntVar(&f.opt.Landmarks, "landmarks", hull.DefaultLandmarks, "landmarks for the barcodes")
	fs.IntVar(&f.opt.Subsamples, "subsamples", hull.DefaultSubsamples, "landmark subsamples whose Betti numbers must agree")
	fs.IntVar(&f.opt.MaxCoeff, "max-coeff", hull.DefaultMaxCoeff, "largest |m| of the listed gap labels")
	fs.Uint64Var(&f.opt.Seed, "seed", hull.DefaultSeed, "seed of every random choice")
	f.noise = noiseFlag(fs)
	fs.StringVar(&f.memory, "memory", "", "memory budget of the persistence computation, e.g. 4GiB (default: the engine's)")
	fs.BoolVar(&f.json, "json", false, "print the result as one JSON object")
	fs.BoolVar(&f.allLabels, "all-labels", false, "list every gap label in the text output (default: the first 12)")
	f.plot.register(fs)
	outfile.FileArgs(cmd)
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
	sites, err := f.in.loadSites(path, cmd.InOrStdin())
	if err != nil {
		return err
	}
	if err := f.plot.validate(); err != nil {
		return err
	}
	opt := f.opt
	if p := sites.Chain; p != nil {
		if opt.Noise, err = noiseFraction(f.noise, p); err != nil {
			return err
		}
	} else if cmd.Flags().Changed("noise") {
		return fmt.Errorf("--noise: %s is a plate, whose noise is measured from its displacement field; --noise applies to chains", sites.Plane.Source)
	}
	if f.memory != "" {
		if opt.MemoryBudget, err = flagval.ParseBytes(f.memory); err != nil {
			return fmt.Errorf("--memory: %w", err)
		}
	}
	progress := progressOf(cmd)
	defer progress.Close()
	progress.Stage(fmt.Sprintf("analysing %s", sitesName(sites)))
	res, l, err := hull.AnalyzeSites(cmd.Context(), sites, lattice.Options{}, opt)
	if err != nil {
		return err
	}
	progress.Stage("drawing the figures")
	f.plot.list = listTo(cmd)
	if err := f.plot.writeAnalysis(cmd.ErrOrStderr(), res, sites.Plane, l); err != nil {
		return err
	}
	progress.Close()
	out := cmd.OutOrStdout()
	if f.json {
		return writeJSON(out, res)
	}
	return res.WriteText(out, f.allLabels)
}

// sitesName names what was read, for the progress line.
func sitesName(s pattern.Sites) string {
	if s.Plane != nil {
		return fmt.Sprintf("%s (%d sites on a plane)", s.Plane.Source, s.Plane.Len())
	}
	return fmt.Sprintf("%s (%d sites)", s.Chain.Source, s.Chain.Len())
}
