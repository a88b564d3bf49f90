package main

import (
	"bufio"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"phasonhull/cmd/phasonhull/internal/outfile"
	"phasonhull/embed"
	"phasonhull/pattern"
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
	tolerance float64
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
	fs.Float64Var(&f.tolerance, "tolerance", embed.DefaultNoise, "position noise tolerated, as a fraction of the mean spacing (0 or negative: exact data)")
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
never taken above what position noise of --tolerance mean spacings gives;
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
  phasonhull embed sample.csv --raw --out raw.csv --tolerance 0.05`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			return runEmbed(cmd, args[0], &f)
		},
	}
	f.register(cmd)
	fileArgs(cmd)
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
	tol := f.tolerance
	if tol == 0 {
		tol = -1 // the flag's 0 means none, not the library's default
	}
	res, err := embed.Embed(p, embed.Options{
		Window: f.window, MaxWindow: f.maxWindow, Landmarks: f.landmarks,
		Seed: f.seed, Noise: tol,
	})
	if err != nil {
		return err
	}
	sum := newEmbedSummary(p, res)
	if f.out != "" {
		kind := "whitened"
		if f.raw {
			kind = "raw"
		}
		if err := writeFileAtomic(f.out, func(file io.Writer) error {
			return writeVectors(file, p, res, f.raw)
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
	return sum.print(w)
}

// embedSummary is what "phasonhull embed" reports, in text or JSON.
type embedSummary struct {
	Source      string  `json:"source"`
	Sites       int     `json:"sites"`
	Unit        string  `json:"unit"`
	MeanSpacing float64 `json:"mean_spacing"`

	Window int `json:"window"`
	// WindowRule is "chosen" or "given".
	WindowRule      string    `json:"window_rule"`
	Settled         bool      `json:"settled"`
	Cap             int       `json:"cap,omitempty"`
	Examined        int       `json:"examined_vectors,omitempty"`
	FalseNeighbours []float64 `json:"false_neighbours,omitempty"`
	NeighbourWindow int       `json:"neighbour_window,omitempty"`
	Rank            []int     `json:"rank,omitempty"`
	RankWindow      int       `json:"rank_window,omitempty"`
	NoiseVariance   float64   `json:"noise_variance,omitempty"`
	NoiseCapped     bool      `json:"noise_capped,omitempty"`

	NoiseFloor float64   `json:"noise_floor"`
	Spectrum   []float64 `json:"spectrum"`
	Variance   []float64 `json:"variance_fraction"`
	Kept       int       `json:"kept"`
	Threshold  float64   `json:"threshold"`

	Vectors     int     `json:"vectors"`
	Landmarks   int     `json:"landmarks"`
	CoverRadius float64 `json:"cover_radius"`

	Out     string `json:"out,omitempty"`
	OutKind string `json:"out_kind,omitempty"`
}

func newEmbedSummary(p *pattern.Pattern, res *embed.Result) *embedSummary {
	w := res.Whitened
	s := &embedSummary{
		Source: p.Source, Sites: res.Sites, Unit: res.Unit, MeanSpacing: res.MeanSpacing,
		Window: res.Window, WindowRule: "given", Settled: true,
		NoiseFloor: res.NoiseFloor, Spectrum: w.Spectrum, Kept: w.Kept, Threshold: w.Threshold,
		Vectors: len(w.Cloud), Landmarks: len(res.Landmarks), CoverRadius: res.CoverRadius,
	}
	var total float64
	for _, v := range w.Spectrum {
		total += v
	}
	s.Variance = make([]float64, len(w.Spectrum))
	for i, v := range w.Spectrum {
		if total > 0 {
			s.Variance[i] = v / total
		}
	}
	if c := res.Choice; c != nil {
		s.WindowRule, s.Settled, s.Cap, s.Examined = "chosen", c.Settled, c.Cap, c.Vectors
		s.FalseNeighbours, s.NeighbourWindow = c.FalseNeighbours, c.NeighbourWindow
		s.Rank, s.RankWindow = c.Rank, c.RankWindow
		s.NoiseVariance, s.NoiseCapped = c.NoiseVariance, c.NoiseCapped
	}
	return s
}

// why says in words how the window was found.
func (s *embedSummary) why() string {
	switch {
	case s.WindowRule == "given":
		return "given (--window)"
	case s.Settled:
		return fmt.Sprintf("chosen: false neighbours settle at %d, the cloud spans %d direction%s",
			s.NeighbourWindow, s.Rank[s.Cap], plural(s.Rank[s.Cap]))
	case s.RankWindow == 0:
		return "the cap: the choice did not settle — the cloud fills every direction and keeps false neighbours, as independent random spacings do"
	default:
		return fmt.Sprintf("the cap: the choice did not settle — the cloud spans %d directions but its points keep splitting as the window grows, as a Sturmian chain's do", s.Rank[s.Cap])
	}
}

func plural(n int) string {
	if n == 1 {
		return ""
	}
	return "s"
}

func (s *embedSummary) print(out io.Writer) error {
	w := bufio.NewWriter(out)
	unit := s.Unit
	if unit == "" {
		unit = "(no unit)"
	}
	fmt.Fprintf(w, "pattern     %s: %d sites, mean spacing %.6g %s\n", s.Source, s.Sites, s.MeanSpacing, unit)
	fmt.Fprintf(w, "window      %d, %s\n", s.Window, s.why())
	if s.WindowRule == "chosen" {
		var k, fnn, rank strings.Builder
		for i := range s.Rank {
			fmt.Fprintf(&k, " %5d", i+1)
			if i < len(s.FalseNeighbours) {
				fmt.Fprintf(&fnn, " %5.3f", s.FalseNeighbours[i])
			} else {
				fnn.WriteString("     -")
			}
			fmt.Fprintf(&rank, " %5d", s.Rank[i])
		}
		fmt.Fprintf(w, "  window          %s\n", k.String())
		fmt.Fprintf(w, "  false neighbours%s\n", fnn.String())
		fmt.Fprintf(w, "  components      %s\n", rank.String())
		how := "estimated"
		if s.NoiseCapped {
			how = "capped at the tolerance"
		}
		fmt.Fprintf(w, "  (%d vectors examined; noise %.3g mean spacings per spacing, %s)\n", s.Examined, sqrt(s.NoiseVariance), how)
	}
	fmt.Fprintf(w, "components  %d of %d kept: eigenvalue above %.3g\n", s.Kept, len(s.Spectrum), s.Threshold)
	fmt.Fprintf(w, "  %3s  %11s  %8s\n", "#", "eigenvalue", "variance")
	for i, v := range s.Spectrum {
		mark := ""
		if i < s.Kept {
			mark = "  kept"
		}
		fmt.Fprintf(w, "  %3d  %11.4g  %7.2f%%%s\n", i+1, v, 100*s.Variance[i], mark)
	}
	fmt.Fprintf(w, "landmarks   %d of %d vectors, cover radius %.4g (whitened units)\n", s.Landmarks, s.Vectors, s.CoverRadius)
	if s.Out != "" {
		fmt.Fprintf(w, "written     %s: %d %s vectors\n", s.Out, s.Vectors, s.OutKind)
	}
	return w.Flush()
}

func sqrt(v float64) float64 {
	if v <= 0 {
		return 0
	}
	return math.Sqrt(v)
}

// writeVectors writes one CSV row per delay vector: the index of its first
// spacing, then the whitened components c1… or, raw, the dimensionless
// spacings d1…
func writeVectors(out io.Writer, p *pattern.Pattern, res *embed.Result, raw bool) error {
	w := bufio.NewWriter(out)
	var cols int
	name := "c"
	if raw {
		cols, name = res.Window, "d"
	} else {
		cols = res.Whitened.Kept
	}
	what := fmt.Sprintf("whitened delay vectors (%d of %d components)", res.Whitened.Kept, res.Window)
	if raw {
		what = "delay vectors d_n/d̄ (dimensionless)"
	}
	fmt.Fprintf(w, "# phasonhull embed: %s of %s, window %d\n", what, p.Source, res.Window)
	w.WriteString("start")
	for j := range cols {
		fmt.Fprintf(w, ",%s%d", name, j+1)
	}
	w.WriteByte('\n')
	var rows [][]float64
	if raw {
		x, err := embed.Delay(p.Spacings(), res.Window)
		if err != nil {
			return err
		}
		rows = make([][]float64, len(res.Rows))
		for i, n := range res.Rows {
			rows[i] = x.RawRowView(n)
		}
	} else {
		rows = res.Whitened.Cloud
	}
	buf := make([]byte, 0, 32)
	for i, row := range rows {
		w.WriteString(strconv.Itoa(res.Rows[i]))
		for _, v := range row {
			buf = strconv.AppendFloat(append(buf[:0], ','), v, 'g', -1, 64)
			w.Write(buf)
		}
		w.WriteByte('\n')
	}
	return w.Flush()
}
