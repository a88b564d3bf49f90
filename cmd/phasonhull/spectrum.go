package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"phasonhull/cmd/phasonhull/internal/flagval"
	"phasonhull/cmd/phasonhull/internal/outfile"
	"phasonhull/cmd/phasonhull/internal/picture"
	"strings"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"phasonhull/pattern"
	"phasonhull/pattern/design"
	"phasonhull/topology/spectrum"
)

// spectrumFlags holds the flags of "phasonhull spectrum".
type spectrumFlags struct {
	in    inputFlags
	plot  plotFlags
	plate plateFlags

	design, eigenvalues, patternFile string

	model, law, table, ends string
	t0, decay, power, nnn   float64
	closing                 float64
	closingLen              *flagval.Length
	onsite                  float64
	onsiteFile              string
	harper, harperPhase     float64

	theta    []float64
	period   int
	maxCoeff int
	minGap   float64
	method   string

	edgeModes bool
	samples   int
	edgeGaps  int
	thetaGrid string

	json bool
	out  string
}

// modelFlags are the flags that describe the operator, refused with
// measured levels.
var modelFlags = []string{"model", "hopping", "table", "t0", "decay", "power", "nnn", "ends", "closing", "onsite", "onsite-file", "harper", "harper-phase", "method"}

func (f *spectrumFlags) register(cmd *cobra.Command) {
	fs := cmd.Flags()
	f.in.register(fs)
	f.plot.register(fs)
	fs.StringVar(&f.design, "design", "", "build the chain from a JSON design `SPEC` (as phasonhull generate --spec takes) instead of FILE")
	fs.StringVar(&f.eigenvalues, "eigenvalues", "", "analyse measured levels from `FILE` (one per line: frequencies, ω² or energies) instead of an operator")
	fs.StringVar(&f.patternFile, "pattern", "", "with --eigenvalues: recover the angle(s) for the labels from this pattern `FILE`")

	f.registerOperator(fs)
	f.plate.register(fs)

	fs.BoolVar(&f.edgeModes, "edge-modes", false, "with --design: sweep the design's phase through one turn and count boundary states crossing the widest gaps")
	fs.IntVar(&f.samples, "samples", spectrum.DefaultSamples, "with --edge-modes: phases of the first pass over the turn")
	fs.IntVar(&f.edgeGaps, "edge-gaps", spectrum.DefaultEdgeGaps, "with --edge-modes: number of widest gaps followed")
	fs.StringVar(&f.thetaGrid, "theta-grid", "", "with --design: the spectrum over `START:STOP:COUNT` values of θ, as CSV rows theta,eigenvalue,ids")

	fs.BoolVar(&f.json, "json", false, "print the report as one JSON object")
	fs.StringVarP(&f.out, "out", "o", "", "write the levels (or the staircase, or the θ scan) as CSV to `FILE` (nothing is written on error)")
}

// registerOperator registers the flags that describe the operator and its
// labels, which budget shares.
func (f *spectrumFlags) registerOperator(fs *pflag.FlagSet) {
	fs.StringVar(&f.model, "model", string(spectrum.Hopping), "operator: hopping (tight binding, eigenvalues are energies) or springs (unit masses, eigenvalues are ω²)")
	fs.StringVar(&f.law, "hopping", "exp", "coupling law of hoppings or springs: exp, power or table")
	fs.Float64Var(&f.t0, "t0", 1, "coupling at the mean spacing d̄ (exp and power laws)")
	fs.Float64Var(&f.decay, "decay", 0, "exp law: t = t0·exp(−decay·(d/d̄ − 1))")
	fs.Float64Var(&f.power, "power", 0, "power law: t = t0·(d/d̄)^(−power)")
	fs.StringVar(&f.table, "table", "", "table law: `FILE` of rows distance,coupling (distance in the pattern's unit), linear between rows")
	fs.Float64Var(&f.nnn, "nnn", 0, "next-nearest coupling ratio: bond n–n+2 carries nnn·t((d_n + d_{n+1})/2)")
	fs.StringVar(&f.ends, "ends", string(spectrum.Open), "ends of the chain: open or periodic")
	f.closingLen = flagval.NewLength(&f.closing)
	fs.Var(f.closingLen, "closing", "periodic: the spacing that closes the ring, a `LENGTH` (0: the mean spacing)")
	fs.Float64Var(&f.onsite, "onsite", 0, "constant on-site term (a ground spring for springs)")
	fs.StringVar(&f.onsiteFile, "onsite-file", "", "per-site on-site terms from `FILE`, one per line, added to --onsite")
	fs.Float64Var(&f.harper, "harper", 0, "add the almost-Mathieu on-site term 2λ·cos 2π(nθ + φ) with this λ (θ from --theta)")
	fs.Float64Var(&f.harperPhase, "harper-phase", 0, "φ of the almost-Mathieu term, in turns")
	fs.StringVar(&f.method, "method", "auto", "auto, values (every level) or counting (Sturm counts, nearest neighbours only)")

	fs.Float64SliceVar(&f.theta, "theta", nil, "angle(s) θ[,θ2] in turns for the labels (default: the design's, or recovered from the pattern)")
	fs.IntVar(&f.period, "period", 0, "label the gaps k/p of a periodic chain with p sites per cell")
	fs.IntVar(&f.maxCoeff, "max-coeff", spectrum.DefaultMaxCoeff, "largest |m| of the labels tried")
	fs.Float64Var(&f.minGap, "min-gap", 0, "smallest gap reported, relative to the width of the spectrum (0: the larger of 0.001 and 4 mean level spacings)")
}

// newSpectrumCmd builds "phasonhull spectrum".
func newSpectrumCmd() *cobra.Command {
	var f spectrumFlags
	cmd := &cobra.Command{
		Use:   "spectrum [FILE]",
		Short: "Gaps, integrated density of states, gap labels and edge modes of an operator on a chain or a plate",
		Long: `spectrum builds an operator on a chain — the pattern in FILE (or - for
standard input), or a design (--design SPEC) — and reports the gaps of its
spectrum: for each, the integrated density of states (IDS, the share of
levels below it), its label n + m·θ (+ m2·θ2) in the gap-label group, its
width and edges. With --eigenvalues it does the same for measured levels.

Operators. --model hopping is the tight-binding matrix
  H = Σ ε_n |n⟩⟨n| − Σ t (|n⟩⟨n+1| + h.c.)   (note the minus sign),
--model springs the dynamical matrix of unit masses and springs k (its
eigenvalues are ω²). Couplings follow from the spacing d by --hopping exp
(t = t0·exp(−decay·(d/d̄ − 1))), power (t = t0·(d/d̄)^(−power)) or table (a
file of distance,coupling rows, interpolated linearly, refused outside its
range); --nnn adds next-nearest bonds. On-site terms: --onsite, --onsite-file,
and the almost-Mathieu term --harper λ (2λ·cos 2π(nθ + φ), θ from --theta).
--ends periodic closes the ring across --closing (default the mean spacing).

Labels use the angle(s) of --theta, the period of --period, the design's own
θ, or the angle(s) and class the hull analysis recovers from the pattern. An
IDS matches a label within 3/N; a gap that matches none is reported
unlabelled, never forced. On an open chain, levels inside a gap whose
eigenvectors sit on the ends (boundary states) are listed with the gap and
not counted: IDS = levels at or below the gap's lower edge / N.

--edge-modes (with --design) sweeps the design's phase through one turn on
an open chain and counts, for the widest gaps, the signed crossings of the
gap's middle by the states on each end (+1 upward). For a gap of label
n + mθ, θ the angle the phase advances by per site, the first end's states
cross m times and the last end's −m times. A tiling (sturmian) is swept
through its intercept and changes by jumps; steps read across a jump are
counted as such, and a step that cannot be read is counted unresolved and
keeps the gap from agreeing.

--theta-grid START:STOP:COUNT (with --design) writes the whole spectrum at
each θ as CSV rows theta,eigenvalue,ids (to --out, or standard output).

Plates (a 2D file, a 2D design, or --eigenvalues with a 2D --pattern): the
operator sits on the recovered lattice (nearest neighbours, or --cutoff),
with --flux α; --harper λ adds Σ_k 2λ·cos 2π(ψ_k + φ) of a design's phase.
Gaps are labelled in Z + Σ Z·A_ij + Z·det A (+ Zα), A the design's or the
recovered rotation matrix; past 2000 sites the IDS is estimated by the
kernel polynomial method (--method kpm, --moments, --vectors). --sweep
follows each gap and confirms its label by an integer line; --edge-modes
counts the edge states of a strip as its seam phase turns once.

Chains with nearest-neighbour bonds only are counted in O(N) per energy
(Sturm sequences), so 10^5–10^6 sites are cheap; every level is computed up
to 4000 sites, and next-nearest bonds are limited to that.`,
		Example: `  # The almost-Mathieu operator at the golden angle on a uniform chain
  phasonhull generate periodic --cell 1 --sites 1000 > chain.csv
  phasonhull spectrum chain.csv --harper 1 --theta 0.6180339887 --min-gap 0.01

  # A Fibonacci chain with spacing-dependent hopping, labels recovered from the pattern
  phasonhull generate substitution --rule fibonacci --sites 20000 > fib.csv
  phasonhull spectrum fib.csv --hopping exp --decay 2 --json > fib.spectrum.json

  # Edge modes of a modulated design: do the boundary states cross each gap m times?
  phasonhull spectrum --design testdata/spectrum/modulated.json --hopping exp --decay 4 --edge-modes

  # Measured resonance frequencies, labelled with the angle of the sample's pattern
  phasonhull spectrum --eigenvalues testdata/spectrum/harper_levels.csv --pattern sample.csv

  # A plate on a rotated potential: labels confirmed by a sweep of the twist
  phasonhull spectrum --design testdata/demo/twisted_plate.json --harper 1.5 --ends periodic \
      --min-gap 0.02 --sweep twist=0:40:5 --plot figures

  # The spectrum against θ (a Hofstadter butterfly) for plotting
  phasonhull spectrum --design testdata/spectrum/lattice.json --harper 1 --ends periodic \
      --theta-grid 0.01:0.99:99 --out butterfly.csv`,
		Args: cobra.MaximumNArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			return runSpectrum(cmd, args, &f)
		},
	}
	f.register(cmd)
	outfile.FileArgs(cmd)
	outfile.Mark(cmd.Flags(), outfile.Input, "design", "eigenvalues", "pattern", "table", "onsite-file")
	outfile.Mark(cmd.Flags(), outfile.OutputFile, "out")
	return cmd
}

func runSpectrum(cmd *cobra.Command, args []string, f *spectrumFlags) error {
	if err := f.plot.validate(); err != nil {
		return err
	}
	if isPlate, err := runPlate(cmd, args, f); isPlate {
		return err
	}
	if err := f.check(cmd, args); err != nil {
		return err
	}
	rep := spectrum.NewReport(f.maxCoeff)
	if f.eigenvalues != "" {
		return runMeasured(cmd, f, rep)
	}
	var spec design.Spec
	var p *pattern.Pattern
	var err error
	if f.design != "" {
		if spec, err = design.ReadSpecFile(f.design); err != nil {
			return err
		}
		if f.thetaGrid != "" {
			return runThetaGrid(cmd, f, spec)
		}
		if p, err = design.Generate(spec); err != nil {
			return err
		}
		p.Source = f.design
	} else if p, err = f.in.load(args[0], cmd.InOrStdin()); err != nil {
		return err
	}
	rep.Source, rep.Sites, rep.Unit = p.Source, p.Len(), p.Unit
	m, err := f.buildModel(p.Len(), p.Unit, f.theta, cmd.InOrStdin())
	if err != nil {
		return err
	}
	rep.Operator = m.Info(f.onsiteFile)
	opt, err := f.labelOptions(cmd.Context(), p, spec, rep)
	if err != nil {
		return err
	}
	progress := progressOf(cmd)
	defer progress.Close()
	f.plot.list = listTo(cmd)
	if f.edgeModes {
		progress.Stage("following the boundary states over one turn of the phase")
		sweep, err := spectrum.PhaseSweep(spec)
		if err != nil {
			return err
		}
		er, err := spectrum.EdgeModesContext(cmd.Context(), sweep, m, spectrum.EdgeOptions{Options: opt, Samples: f.samples, Gaps: f.edgeGaps})
		if err != nil {
			return err
		}
		rep.EdgeModes, rep.Spectrum = er, er.Start
		if f.plot.dir != "" {
			pic, err := picture.EdgeFlow(er, f.design, spectrum.Kind(f.model).Axis())
			if err != nil {
				return fmt.Errorf("--plot: %w", err)
			}
			if err := f.plot.write([]*picture.Picture{pic}); err != nil {
				return err
			}
		}
	} else {
		op, err := spectrum.New(p, m)
		if err != nil {
			return err
		}
		progress.Stage(fmt.Sprintf("the spectrum of %d sites", p.Len()))
		if rep.Spectrum, err = spectrum.AnalyzeContext(cmd.Context(), op, opt); err != nil {
			return err
		}
		if f.out != "" {
			if err := writeFileAtomic(f.out, func(file io.Writer) error {
				return rep.WriteLevels(file, op)
			}); err != nil {
				return err
			}
			rep.Out = f.out
		}
	}
	rep.Warnings = append(rep.Warnings, rep.Spectrum.Warnings...)
	if err := f.plot.writeSpectrum(cmd.ErrOrStderr(), rep.Spectrum, rep.Source, spectrum.Kind(f.model).Axis()); err != nil {
		return err
	}
	return writeSpectrumReport(cmd.OutOrStdout(), rep, f.json)
}

// check refuses contradictory flags before anything is read.
func (f *spectrumFlags) check(cmd *cobra.Command, args []string) error {
	sources := 0
	for _, on := range []bool{len(args) == 1, f.design != "", f.eigenvalues != ""} {
		if on {
			sources++
		}
	}
	if sources != 1 {
		return errors.New("give exactly one of FILE (a pattern), --design SPEC or --eigenvalues FILE")
	}
	changed := cmd.Flags().Changed
	for _, name := range plateOnly {
		if changed(name) {
			return fmt.Errorf("--%s is for plates (a 2D file or design); this input is a chain", name)
		}
	}
	if f.eigenvalues != "" {
		for _, name := range modelFlags {
			if changed(name) {
				return fmt.Errorf("--%s describes an operator; --eigenvalues analyses measured levels, which need none", name)
			}
		}
		if f.edgeModes || f.thetaGrid != "" {
			return errors.New("--edge-modes and --theta-grid need an operator on a design (--design), not measured levels")
		}
	} else if f.patternFile != "" {
		return errors.New("--pattern gives the angles for --eigenvalues; for an operator, give the pattern as FILE")
	}
	if (f.edgeModes || f.thetaGrid != "") && f.design == "" {
		return errors.New("--edge-modes and --theta-grid move a design's phase or angle: give --design SPEC")
	}
	if f.edgeModes && f.thetaGrid != "" {
		return errors.New("--edge-modes and --theta-grid are separate runs; give one")
	}
	if f.edgeModes && f.out != "" {
		return errors.New("--out writes levels or a θ scan; --edge-modes reports its counts in the text or JSON report")
	}
	if f.edgeModes && f.ends == string(spectrum.Periodic) {
		return errors.New("--edge-modes counts states on the ends of an open chain; drop --ends periodic")
	}
	if f.period < 0 || f.maxCoeff < 1 || f.samples < 1 || f.edgeGaps < 1 {
		return fmt.Errorf("--period %d, --max-coeff %d, --samples %d, --edge-gaps %d: the period must not be negative, the others must be positive",
			f.period, f.maxCoeff, f.samples, f.edgeGaps)
	}
	return f.checkOperator(cmd)
}

// checkOperator refuses contradictory operator and label flags.
func (f *spectrumFlags) checkOperator(cmd *cobra.Command) error {
	changed := cmd.Flags().Changed
	if len(f.theta) > 0 && f.period > 0 {
		return errors.New("--theta and --period are two ways to label; give one")
	}
	if (f.law == "table") != (f.table != "") {
		return errors.New("--hopping table and --table FILE go together")
	}
	if changed("closing") && f.ends != string(spectrum.Periodic) {
		return errors.New("--closing closes a ring: give --ends periodic")
	}
	if changed("harper-phase") && f.harper == 0 {
		return errors.New("--harper-phase is the phase of the almost-Mathieu term: give --harper λ")
	}
	if f.harper != 0 && len(f.theta) != 1 && f.thetaGrid == "" {
		return errors.New("--harper needs its angle: give one --theta")
	}
	return nil
}

// buildModel turns the flags into a spectrum.Model for n sites; theta is
// the almost-Mathieu angle (ignored without --harper). The files of
// --table and --onsite-file may be "-", read from stdin.
func (f *spectrumFlags) buildModel(n int, unit string, theta []float64, stdin io.Reader) (spectrum.Model, error) {
	if err := f.closingLen.Resolve(unit); err != nil {
		return spectrum.Model{}, fmt.Errorf("--closing: %w", err)
	}
	m := spectrum.Model{Kind: spectrum.Kind(f.model), Ends: spectrum.Ends(f.ends), NNN: f.nnn, Closing: f.closing}
	if m.Kind != spectrum.Hopping && m.Kind != spectrum.Springs {
		return m, fmt.Errorf("--model %q: want hopping or springs", f.model)
	}
	if m.Ends != spectrum.Open && m.Ends != spectrum.Periodic {
		return m, fmt.Errorf("--ends %q: want open or periodic", f.ends)
	}
	for name, v := range map[string]float64{"t0": f.t0, "decay": f.decay, "power": f.power, "nnn": f.nnn, "closing": f.closing, "onsite": f.onsite, "harper": f.harper, "harper-phase": f.harperPhase} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return m, fmt.Errorf("--%s %v: not a finite number", name, v)
		}
	}
	switch f.law {
	case "exp":
		m.Law = spectrum.Exp{T0: f.t0, Decay: f.decay}
	case "power":
		m.Law = spectrum.Power{T0: f.t0, Power: f.power}
	case "table":
		t, err := readInput(f.table, stdin, func(r io.Reader, name string) (spectrum.Table, error) {
			d, c, err := pattern.ReadCouplings(r, name)
			return spectrum.Table{D: d, T: c}, err
		})
		if err != nil {
			return m, err
		}
		m.Law = t
	default:
		return m, fmt.Errorf("--hopping %q: want exp, power or table", f.law)
	}
	if f.t0 == 0 && f.law != "table" {
		return m, errors.New("--t0 0 couples nothing: every level would be an on-site term")
	}
	m.OnSite.Constant = f.onsite
	if f.onsiteFile != "" {
		v, err := readInput(f.onsiteFile, stdin, pattern.ReadValues)
		if err != nil {
			return m, err
		}
		if len(v) != n {
			return m, fmt.Errorf("--onsite-file %s: %d values for %d sites", f.onsiteFile, len(v), n)
		}
		m.OnSite.Values = v
	}
	if f.harper != 0 {
		m.OnSite.Lambda, m.OnSite.Phase = f.harper, f.harperPhase
		if len(theta) > 0 {
			m.OnSite.Theta = theta[0]
		}
	}
	return m, nil
}

// labelOptions builds the options of the gap analysis: the flags, and the
// labels spectrum.ChooseLabels picks from --theta, --period, the design
// (spec, when f.design is set) and the pattern p, recorded in rep.
func (f *spectrumFlags) labelOptions(ctx context.Context, p *pattern.Pattern, spec design.Spec, rep *spectrum.Report) (spectrum.Options, error) {
	opt := spectrum.Options{MinGap: f.minGap, MaxCoeff: f.maxCoeff}
	if opt.MinGap == 0 && p != nil {
		opt.MinGap = spectrum.MinGapFor(p.Len())
	}
	switch f.method {
	case "auto":
	case "values", "counting":
		opt.Method = spectrum.Method(f.method)
	default:
		return opt, fmt.Errorf("--method %q: want auto, values or counting", f.method)
	}
	src := spectrum.LabelSources{Angles: f.theta, Period: f.period, Pattern: p, MaxCoeff: f.maxCoeff}
	if f.design != "" {
		src.Design = &spec
	}
	l, err := spectrum.ChooseLabels(ctx, src)
	if err != nil {
		return opt, err
	}
	return rep.Label(l, opt), nil
}

// runMeasured analyses measured levels.
func runMeasured(cmd *cobra.Command, f *spectrumFlags, rep *spectrum.Report) error {
	v, err := readInput(f.eigenvalues, cmd.InOrStdin(), pattern.ReadValues)
	if err != nil {
		return err
	}
	rep.Source, rep.Sites = f.eigenvalues, len(v)
	var p *pattern.Pattern
	if f.patternFile != "" {
		if p, err = f.in.load(f.patternFile, cmd.InOrStdin()); err != nil {
			return err
		}
	} else if len(f.theta) == 0 && f.period == 0 {
		return errors.New("--eigenvalues needs the angle(s) to label with: give --theta, --period or --pattern FILE")
	}
	opt, err := f.labelOptions(cmd.Context(), p, design.Spec{}, rep)
	if err != nil {
		return err
	}
	n := 0
	if p != nil {
		n = p.Len()
	}
	return runMeasuredWith(cmd, f, rep, v, opt, n)
}

// runMeasuredWith analyses measured levels v with the label options opt;
// sites is the number of sites of the pattern they were measured on (0:
// none given).
func runMeasuredWith(cmd *cobra.Command, f *spectrumFlags, rep *spectrum.Report, v []float64, opt spectrum.Options, sites int) error {
	var err error
	if rep.Spectrum, err = spectrum.AnalyzeMeasured(v, opt); err != nil {
		return err
	}
	if sites > 0 && sites != len(v) {
		rep.Warnings = append(rep.Warnings, fmt.Sprintf("%d levels for a pattern of %d sites: a level missing from the list lowers every IDS above it by 1/N", len(v), sites))
	}
	if f.out != "" {
		if err := writeFileAtomic(f.out, func(file io.Writer) error {
			return rep.WriteLevels(file, nil)
		}); err != nil {
			return err
		}
		rep.Out = f.out
	}
	rep.Warnings = append(rep.Warnings, rep.Spectrum.Warnings...)
	if err := f.plot.writeSpectrum(cmd.ErrOrStderr(), rep.Spectrum, f.eigenvalues, "measured level"); err != nil {
		return err
	}
	return writeSpectrumReport(cmd.OutOrStdout(), rep, f.json)
}

// runThetaGrid writes the spectrum over a grid of θ as CSV.
func runThetaGrid(cmd *cobra.Command, f *spectrumFlags, spec design.Spec) error {
	thetas, err := spectrum.ParseGrid(f.thetaGrid)
	if err != nil {
		return fmt.Errorf("--theta-grid %w", err)
	}
	m, err := f.buildModel(spec.Sites, spec.Unit, nil, cmd.InOrStdin())
	if err != nil {
		return err
	}
	// The spectra are kept for --plot only.
	var plotThetas []float64
	var plotValues [][]float64
	progress := progressOf(cmd)
	defer progress.Close()
	progress.Stage("values of θ done")
	f.plot.list = listTo(cmd)
	scanned := 0
	keep := func(theta float64, v []float64) {
		scanned++
		progress.Count(scanned, len(thetas))
		if f.plot.dir != "" {
			plotThetas, plotValues = append(plotThetas, theta), append(plotValues, v)
		}
	}
	scan := func(w io.Writer) error {
		plotThetas, plotValues = nil, nil
		return spectrum.WriteScan(cmd.Context(), w, spec, m, thetas, f.design, keep)
	}
	plot := func() error {
		if f.plot.dir == "" {
			return nil
		}
		p, err := picture.ThetaScan(plotThetas, plotValues, f.design, spectrum.Kind(f.model).Axis())
		if err != nil {
			return fmt.Errorf("--plot: %w", err)
		}
		return f.plot.write([]*picture.Picture{p})
	}
	if f.out == "" {
		// Standard output: compute first, so that an error writes nothing.
		var sb strings.Builder
		if err := scan(&sb); err != nil {
			return err
		}
		if err := plot(); err != nil {
			return err
		}
		_, err := io.WriteString(cmd.OutOrStdout(), sb.String())
		return err
	}
	if err := writeFileAtomic(f.out, scan); err != nil {
		return err
	}
	if err := plot(); err != nil {
		return err
	}
	fmt.Fprintf(cmd.OutOrStdout(), "written     %s: the spectrum at %d values of θ\n", f.out, len(thetas))
	return nil
}

// writeSpectrumReport prints the report as text or JSON.
func writeSpectrumReport(w io.Writer, rep *spectrum.Report, asJSON bool) error {
	if asJSON {
		return writeJSON(w, rep)
	}
	return rep.WriteText(w)
}
