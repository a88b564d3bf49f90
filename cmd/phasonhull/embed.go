package main

import (
	"encoding/json"
	"fmt"
	"io"

	"github.com/spf13/cobra"

	"phasonhull/cmd/phasonhull/internal/flagval"
	"phasonhull/cmd/phasonhull/internal/outfile"
	"phasonhull/embed"
)

// embedFlags holds the flags of "phasonhull embed".
type embedFlags struct {
	in        inputFlags
	out       string
	raw       bool
	window    int
	maxWindow int
	landmarks int
	seed      uint64
	noise     *flagval.Noise
	json      bool
}

func (f *embedFlags) register(cmd *cobra.Command) {
	fs := cmd.Flags()
	f.in.register(fs)
	fs.StringVarP(&f.out, "out", "o", "", "write the delay vectors as CSV to `FILE` (nothing is written on error)")
	fs.BoolVar(&f.raw, "raw", false, "with --out, write the dimensionless delay vectors d_n/d̄ instead of the whitened ones")
	fs.IntVar(&f.window, "window", 0, "delay window (0: choose it from the data)")
	fs.IntVar(&f.maxWindow, "max-window", embed.DefaultMaxWindow, "largest window the choice examines")
	fs.IntVar(&f.landmarks, "landmarks", embed.DefaultLandmarks, "number of max–min landmarks")
	fs.Uint64Var(&f.seed, "seed", embed.DefaultSeed, "seed of every random choice (0 means the default)")
	f.noise = noiseFlag(fs)
	fs.BoolVar(&f.json, "json", false, "print the summary as one JSON object")
}

// newEmbedCmd builds "phasonhull embed".
func newEmbedCmd() *cobra.Command {
	var f embedFlags
	cmd := &cobra.Command{
		Use:   "embed FILE",
		Short: "Turn a pattern's spacings into whitened delay vectors and landmarks",
		Long: `embed reads a pattern (FILE, or - for standard input) and builds the cloud
the hull analysis works on: delay vectors of consecutive spacings divided by
the mean spacing, with the window chosen from the data, centred and whitened
on the components that stand above the noise, and max–min landmarks on it.

The window is the larger of two rules' answers. False nearest neighbours:
the first window at which at most 1% of nearest neighbours fly apart when one
more spacing is added. Component rank: the number of directions the cloud
spans at the longest window examined. A cloud that fills every direction and
keeps false neighbours at every window (independent random spacings) gets the
largest window, and the summary says that the choice did not settle.

Noise: the noise variance of a spacing is estimated from the spectrum and
never taken above what position noise of --noise (default 3% of the mean
spacing; 0 for exact data) gives;
components below three times it are dropped before whitening.

The summary lists the sites and mean spacing, the window with each rule's
figures, the component spectrum (eigenvalue and share of the variance, the
kept ones marked), the landmarks and their cover radius in whitened units.
--out writes one CSV row per delay vector: the index of its first spacing,
then its whitened components (or, with --raw, its dimensionless spacings).`,
		Example: `  phasonhull generate modulated --sites 400 --theta 0.2763 --amp 0.12 > design.csv
  phasonhull embed design.csv
  phasonhull embed design.csv --json
  phasonhull embed design.csv --window 3 --landmarks 200 --out vectors.csv
  phasonhull embed sample.csv --raw --out raw.csv --noise 5%`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			return runEmbed(cmd, args[0], &f)
		},
	}
	f.register(cmd)
	outfile.FileArgs(cmd)
	outfile.Mark(cmd.Flags(), outfile.OutputFile, "out")
	return cmd
}

func runEmbed(cmd *cobra.Command, path string, f *embedFlags) error {
	if f.window < 0 || f.maxWindow < 1 || f.landmarks < 1 {
		return fmt.Errorf("--window %d, --max-window %d, --landmarks %d: the window must not be negative, the others must be positive", f.window, f.maxWindow, f.landmarks)
	}
	if f.raw && f.out == "" {
		return fmt.Errorf("--raw says what --out writes; give --out FILE too")
	}
	p, err := f.in.load(path, cmd.InOrStdin())
	if err != nil {
		return err
	}
	tol, err := noiseFraction(f.noise, p)
	if err != nil {
		return err
	}
	res, err := embed.Embed(p, embed.Options{
		Window: f.window, MaxWindow: f.maxWindow, Landmarks: f.landmarks,
		Seed: f.seed, Noise: tol,
	})
	if err != nil {
		return err
	}
	sum := res.Summary(p.Source)
	if f.out != "" {
		kind := "whitened"
		if f.raw {
			kind = "raw"
		}
		if err := writeFileAtomic(f.out, func(file io.Writer) error {
			return res.WriteVectors(file, p, f.raw)
		}); err != nil {
			return err
		}
		sum.Out, sum.OutKind = f.out, kind
	}
	w := cmd.OutOrStdout()
	if f.json {
		enc := json.NewEncoder(w)
		return enc.Encode(sum)
	}
	return sum.WriteText(w)
}
