package main

import (
	"encoding/json"
	"errors"
	"fmt"
	"math"

	"github.com/spf13/cobra"

	"phasonhull/cmd/phasonhull/internal/flagval"
	"phasonhull/cmd/phasonhull/internal/outfile"
	"phasonhull/embed"
	"phasonhull/pattern"
	"phasonhull/topology/hull"
	"phasonhull/topology/rips"
)

// barcodeFlags holds the flags of "phasonhull barcode".
type barcodeFlags struct {
	in             inputFlags
	points         string
	dim            int
	threshold      float64
	prime          int
	memory         string
	minPersistence float64
	json           bool
	window         int
	landmarks      int
	seed           uint64
	noise          *flagval.Noise
}

func (f *barcodeFlags) register(cmd *cobra.Command) {
	fs := cmd.Flags()
	fs.StringVar(&f.points, "points", "", "read a point cloud from `FILE` (one point a row) instead of a pattern")
	fs.IntVar(&f.dim, "homology", 2, "compute the bars of H0 up to H`K`, K from 0 to 3")
	fs.Float64Var(&f.threshold, "max-edge", 0, "admit edges up to this `LENGTH` only (0: as far as any bar can still change)")
	fs.IntVar(&f.prime, "field", hull.Field, "coefficients in the field Z/`P`, P a prime; the default is the hull analysis's own field")
	fs.StringVar(&f.memory, "memory", "", "memory budget, e.g. 2GiB (default 8GiB); larger jobs are refused")
	fs.Float64Var(&f.minPersistence, "min-persistence", 0, "leave out bars shorter than this")
	fs.BoolVar(&f.json, "json", false, "print one JSON object")
	f.in.register(fs)
	fs.IntVar(&f.window, "window", 0, "for a pattern: delay window (0: choose it from the data)")
	fs.IntVar(&f.landmarks, "landmarks", embed.DefaultLandmarks, "for a pattern: number of max–min landmarks")
	fs.Uint64Var(&f.seed, "seed", embed.DefaultSeed, "for a pattern: seed of every random choice")
	f.noise = noiseFlag(fs)
}

// newBarcodeCmd builds "phasonhull barcode".
func newBarcodeCmd() *cobra.Command {
	var f barcodeFlags
	cmd := &cobra.Command{
		Use:   "barcode [FILE]",
		Short: "Persistence barcode of a pattern's landmark cloud or of a point cloud",
		Long: `barcode computes the persistent homology of the Vietoris–Rips filtration of a
point cloud, for H0 up to H(--homology), with coefficients in Z/(--field).
The default field is Z/47, the one the hull analysis reads its loops in
(its circular coordinates need a prime well above the small integers a
cocycle takes); the hulls phasonhull meets have no torsion, so every field
gives their Betti numbers, and --field 2 is the cheapest.

The cloud is either the landmark cloud of a pattern (FILE, or - for standard
input, read and embedded as "phasonhull embed" does) or, with --points, a
file of points: one point a row, coordinates separated by commas,
semicolons or white space, '#' starting a comment, no header row; every row
must have the same number of coordinates.

A bar [birth, death) is a class that appears once edges of length birth
are admitted and disappears once edges of length death are. Bars of zero
persistence are left out. By default edges are admitted up to the length
past which no bar can start or end any more: from there on one point is
joined to every other, every loop and void is filled, and only the single
H0 class that never ends is left, with death "inf". With --max-edge, the
classes still alive at that length get death "inf" too.

The table lists the bars by dimension, longest first. Before a long
computation the size of the complex is estimated, and a job over the memory
budget is refused with a hint of what to lower.`,
		Example: `  phasonhull barcode --points cloud.csv
  phasonhull barcode --points cloud.csv --homology 1 --max-edge 0.8 --json
  phasonhull generate modulated --sites 400 --theta 0.2763 --amp 0.12 > design.csv
  phasonhull barcode design.csv --landmarks 200 --min-persistence 0.05`,
		Args: cobra.MaximumNArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			return runBarcode(cmd, args, &f)
		},
	}
	f.register(cmd)
	outfile.FileArgs(cmd)
	outfile.Mark(cmd.Flags(), outfile.Input, "points")
	return cmd
}

func runBarcode(cmd *cobra.Command, args []string, f *barcodeFlags) error {
	if (f.points == "") == (len(args) == 0) {
		return errors.New("give either a pattern FILE or --points FILE, not both and not neither")
	}
	if f.dim < 0 || f.dim > rips.MaxDim {
		return fmt.Errorf("--homology %d: must be between 0 and %d", f.dim, rips.MaxDim)
	}
	if f.threshold < 0 || math.IsNaN(f.threshold) || math.IsInf(f.threshold, 0) {
		return fmt.Errorf("--max-edge %v: must be a finite length, or 0 for no limit", f.threshold)
	}
	if !rips.IsPrime(f.prime) {
		return fmt.Errorf("--field %d: not a prime", f.prime)
	}
	if f.minPersistence < 0 || math.IsNaN(f.minPersistence) {
		return fmt.Errorf("--min-persistence %v: must not be negative", f.minPersistence)
	}
	var budget int64
	if f.memory != "" {
		b, err := flagval.ParseBytes(f.memory)
		if err != nil {
			return fmt.Errorf("--memory: %w", err)
		}
		budget = b
	}

	var pts [][]float64
	var source string
	if f.points != "" {
		var err error
		if pts, err = readInput(f.points, cmd.InOrStdin(), pattern.ReadPoints); err != nil {
			return err
		}
		source = f.points
	} else {
		if f.window < 0 || f.landmarks < 1 {
			return fmt.Errorf("--window %d, --landmarks %d: the window must not be negative, the landmarks must be positive", f.window, f.landmarks)
		}
		p, err := f.in.load(args[0], cmd.InOrStdin())
		if err != nil {
			return err
		}
		tol, err := noiseFraction(f.noise, p)
		if err != nil {
			return err
		}
		res, err := embed.Embed(p, embed.Options{Window: f.window, Landmarks: f.landmarks, Seed: f.seed, Noise: tol})
		if err != nil {
			return err
		}
		pts, source = res.LandmarkCloud, p.Source
	}

	opt := rips.Options{MaxDim: f.dim, Threshold: f.threshold, Prime: f.prime, MemoryBudget: budget}
	if quiet, _ := cmd.Flags().GetBool("quiet"); !quiet && isTerminal(cmd.ErrOrStderr()) {
		opt.Progress = cmd.ErrOrStderr()
	}
	d, err := rips.VietorisRipsContext(cmd.Context(), pts, opt)
	if errors.Is(err, rips.ErrBudget) {
		return fmt.Errorf("barcode of %s: %w (flags: --threshold, --dim, --landmarks, --memory)", source, err)
	}
	if err != nil {
		return fmt.Errorf("barcode of %s: %w", source, err)
	}
	rep := d.Barcode(source, f.dim, f.minPersistence)
	w := cmd.OutOrStdout()
	if f.json {
		return json.NewEncoder(w).Encode(rep)
	}
	return rep.WriteText(w)
}
