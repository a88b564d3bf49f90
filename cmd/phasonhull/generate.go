package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"strings"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"phasonhull/cmd/phasonhull/internal/flagval"
	"phasonhull/cmd/phasonhull/internal/outfile"
	"phasonhull/pattern"
	"phasonhull/pattern/design"
)

// generateFlags holds the flags of "phasonhull generate": the output
// options and one flag per field of design.Spec, of the same name, bound
// to the field of over (--tiles is parsed into it).
type generateFlags struct {
	out, specFile string
	printSpec     bool
	tiles         string
	over          design.Spec
	lengths       map[string]interface{ Resolve(string) error }
	noise         *flagval.Noise
}

func (f *generateFlags) register(fs *pflag.FlagSet) {
	o := &f.over
	fs.StringVarP(&f.out, "out", "o", "", "write to `FILE` instead of standard output (nothing is written on error)")
	fs.StringVar(&f.specFile, "spec", "", "read the design from a JSON spec `FILE`; flags given as well override it")
	fs.BoolVar(&f.printSpec, "print-spec", false, "write the design's JSON spec, defaults filled in, instead of positions")

	fs.IntVar(&o.Sites, "sites", design.DefaultSites, fmt.Sprintf("number of sites before perturbation; for plate and twisted, sites per side of the patch (rows × columns, default %d)", design.DefaultSitesPerSide))
	o.Spacing = 1
	f.lengths = map[string]interface{ Resolve(string) error }{
		"spacing": flagval.NewLength(&o.Spacing), "amp": flagval.NewLength(&o.Amp), "amp2": flagval.NewLength(&o.Amp2),
		"sin": flagval.NewLengthList(&o.Sin), "cos": flagval.NewLengthList(&o.Cos),
		"amps": flagval.NewLengthList(&o.Amps),
	}
	fs.Var(f.lengths["spacing"].(pflag.Value), "spacing", "mean spacing L, a `LENGTH` (modulated, loop, circle-map, two-angle, multi-angle, random), the lattice step (plate, twisted); lengths are in --unit, or carry their own unit: 450nm")
	fs.StringVar(&o.Unit, "unit", "", "length unit of the positions, e.g. um (written into the CSV header)")
	fs.Float64SliceVar(&o.Cell, "cell", nil, "periodic, decorated: the repeated cell of spacings, a `LIST` like 1,1.5")
	fs.Float64Var(&o.Theta, "theta", 0, "angle θ in turns, in (0,1) (modulated, decorated, two-angle, sturmian)")
	fs.Float64Var(&o.Phase, "phase", 0, "starting phase in turns (φ; ψ_0 of circle-map; starting arc fraction of loop)")
	fs.Var(f.lengths["sin"].(pflag.Value), "sin", "modulated, decorated: sine amplitudes a_1,a_2,... (a `LIST` of lengths)")
	fs.Var(f.lengths["cos"].(pflag.Value), "cos", "modulated, decorated: cosine amplitudes b_1,b_2,... (a `LIST` of lengths)")
	fs.Var(f.lengths["amp"].(pflag.Value), "amp", "amplitude, a `LENGTH`: a_1 of modulated, a of two-angle, amp of loop, circle-map and twisted")
	fs.Float64Var(&o.Theta2, "theta2", 0, "two-angle: second angle θ2 in turns")
	fs.Float64Var(&o.Phase2, "phase2", 0, "two-angle: second phase φ2 in turns")
	fs.Var(f.lengths["amp2"].(pflag.Value), "amp2", "two-angle: second amplitude a2, a `LENGTH`")
	fs.Float64SliceVar(&o.Thetas, "thetas", nil, "multi-angle, decorated: one to three angles θ_1,θ_2,θ_3 in turns (a `LIST`)")
	fs.Var(f.lengths["amps"].(pflag.Value), "amps", "multi-angle, decorated, plate: amplitudes a_1,a_2,a_3, one per angle or row of --rotation (a `LIST` of lengths)")
	fs.Float64SliceVar(&o.Phases, "phases", nil, "multi-angle, decorated: phases φ_1,φ_2,φ_3; plate, twisted: ψ0 per torus coordinate; in turns (a `LIST`; missing ones are 0)")
	fs.Float64SliceVar(&o.RadiusCos, "radius-cos", nil, "loop: radius coefficients c_1,c_2,... (a `LIST`) relative to R")
	fs.Float64SliceVar(&o.RadiusSin, "radius-sin", nil, "loop: radius coefficients s_1,s_2,... (a `LIST`) relative to R")
	fs.Float64Var(&o.Step, "step", 0, "loop: arc step as a fraction of the perimeter, in (0,1)")
	fs.Float64Var(&o.Omega, "omega", 0, "circle-map: Ω in [0,1)")
	fs.Float64Var(&o.K, "k", 0, "circle-map: K in [0,1]")
	fs.StringVar(&f.tiles, "tiles", "", "sturmian, substitution: tile `LENGTHS` like A=1,B=1.618 (default A=1,B=golden ratio)")
	fs.Float64Var(&o.Intercept, "intercept", 0, "sturmian: intercept ρ in [0,1)")
	fs.StringVar(&o.Rule, "rule", "", "substitution: fibonacci, thue-morse, period-doubling, or a rule like A=AB,B=A")
	fs.StringVar(&o.Dist, "dist", "", "random: uniform, exponential or gaussian (default uniform)")
	fs.Float64Var(&o.Spread, "spread", 0, "random: relative spread in (0,1) (default 0.5)")
	fs.StringVar(&o.Lattice, "lattice", "", "plate, twisted: the lattice, square or hex (default square)")
	fs.Var(flagval.NewRows(&o.Matrix, 2), "rotation", "plate: the matrix A, turns per lattice step, one row of 2 numbers per wave (`ROWS` like 0.381966,0.1; repeat the flag or separate rows by ';')")
	fs.Float64SliceVar(&o.Polar, "polar", nil, "plate: polarisation of each wave in degrees from the x axis (a `LIST`; default along the wave)")
	fs.Float64Var(&o.Twist, "twist", 0, "twisted: angle of the periodic potential against the lattice, in degrees")
	fs.Float64Var(&o.Scale, "scale", 0, "twisted: scale s of A = s·R(twist), turns per lattice step (default 1)")
	f.noise = flagval.NewNoise(0)
	fs.Var(f.noise, "noise", "perturbation: standard deviation of Gaussian position noise, a `LEVEL`: a length or a percentage of --spacing (2%)")
	fs.Float64Var(&o.Missing, "missing", 0, "perturbation: fraction of sites removed, in [0,1)")
	fs.Float64Var(&o.Extra, "extra", 0, "perturbation: spurious sites inserted, as a fraction of the sites")
	fs.Float64Var(&o.Drift, "drift", 0, "perturbation: linear scale drift, > -0.5 (local scale 1 → 1+2·drift)")
	fs.Uint64Var(&o.Seed, "seed", design.DefaultSeed, "seed of every random choice")
}

// apply copies the flags given on the command line into s.
func (f *generateFlags) apply(fs *pflag.FlagSet, s *design.Spec) error {
	if fs.Changed("tiles") {
		t, err := pattern.ParseTileLengths(f.tiles)
		if err != nil {
			return fmt.Errorf("--tiles: %w", err)
		}
		f.over.Tiles = t
	}
	unit := s.Unit
	if fs.Changed("unit") {
		unit = f.over.Unit
	}
	for name, v := range f.lengths {
		if err := v.Resolve(unit); fs.Changed(name) && err != nil {
			return fmt.Errorf("--%s: %w (give --unit for the positions)", name, err)
		}
	}
	if fs.Changed("noise") {
		spacing := s.WithDefaults().Spacing
		if fs.Changed("spacing") {
			spacing = f.over.Spacing
		}
		x, err := f.noise.Length(unit, spacing)
		if err != nil {
			return err
		}
		f.over.Noise = x
	}
	if s.Family == design.Modulated && fs.Changed("amp") && fs.Changed("sin") {
		return fmt.Errorf("--amp is shorthand for the first value of --sin; give one of them")
	}
	s.Override(f.over, fs.Changed)
	return nil
}

// familyHelp lists the design families with their help from the family
// table, one entry a line or two.
func familyHelp() string {
	var b strings.Builder
	for _, f := range append(design.Families(), design.PlaneFamilies()...) {
		fmt.Fprintf(&b, "  %-13s %s\n", f, strings.ReplaceAll(f.Help(), "\n", "\n"+strings.Repeat(" ", 16)))
	}
	return b.String()
}

// newGenerateCmd builds "phasonhull generate".
func newGenerateCmd() *cobra.Command {
	var f generateFlags
	cmd := &cobra.Command{
		Use:   "generate FAMILY",
		Short: "Write the site positions of a generated design as CSV",
		Long: `generate writes the site positions of a design family as a one-column CSV
file, or, for the plate families (plate, twisted), the sites of a plate as a
two-column CSV x,y. Comment lines at its top record every parameter, and a "# spec:" line
holds the whole design as JSON, so a file documents its own design.

Families (L = --spacing, angles and phases in turns):
` + familyHelp() + `
Perturbations, applied in this order from --seed: --missing, --extra, --noise,
--drift (not for plates; their noise is isotropic, on each coordinate). A flag that the family does not use is refused, as are parameters
that would make a spacing zero or negative. With --spec FILE the file must be
a complete design; a FAMILY argument or flags given as well override it.`,
		Example: `  phasonhull generate periodic --cell 1,1.5 --sites 100
  phasonhull generate modulated --sites 400 --theta 0.2763 --amp 0.12 > design.csv
  phasonhull generate modulated --theta 0.381966 --sin 0.1,0.03 --cos 0,0.02 --unit um --spacing 2.5
  phasonhull generate decorated --cell 0.88,1.12 --theta 0.4142136 --sin 0.1
  phasonhull generate decorated --cell 0.9,1.2,0.9 --thetas 0.4142136,0.2679492 --amps 0.08,0.06 --sites 3000
  phasonhull generate loop --step 0.381966 --amp 0.15 --radius-cos 0,0.3
  phasonhull generate circle-map --omega 0.3 --k 0.9 --amp 0.1
  phasonhull generate two-angle --theta 0.4142136 --amp 0.1 --theta2 0.7320508 --amp2 0.06
  phasonhull generate multi-angle --thetas 0.4142136,0.2679492,0.618034 --amps 0.05,0.04,0.03 --sites 5000
  phasonhull generate sturmian --theta 0.381966 --tiles L=1.618,S=1
  phasonhull generate substitution --rule thue-morse --tiles A=1,B=1.4 --sites 257
  phasonhull generate substitution --rule A=AB,B=C,C=A --tiles A=1,B=0.8,C=0.6
  phasonhull generate random --dist exponential --spread 0.8 --seed 7
  phasonhull generate modulated --theta 0.2763 --amp 0.1 --noise 0.01 --missing 0.02 --drift 0.001 --out sample.csv
  phasonhull generate --spec testdata/design/loop.json --sites 1000 --print-spec
  phasonhull generate plate --rotation 0.381966,0.1 --amps 0.05 --sites 60
  phasonhull generate plate --lattice hex --rotation 0.381966,0 --rotation 0,0.2763932 --amps 0.04,0.04
  phasonhull generate plate --rotation 0.25,0.5 --amps 0.06 --sites 24
  phasonhull generate twisted --twist 13.2 --scale 0.6180340 --amp 0.05 --spacing 1.2um --unit um
  phasonhull generate twisted --twist 21.8 --amp 0.04 --noise 1% --missing 0.01 --extra 0.005 --out plate.csv`,
		Args: cobra.MaximumNArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			return runGenerate(cmd, args, &f)
		},
	}
	f.register(cmd.Flags())
	outfile.Mark(cmd.Flags(), outfile.Input, "spec")
	outfile.Mark(cmd.Flags(), outfile.OutputFile, "out")
	return cmd
}

func runGenerate(cmd *cobra.Command, args []string, f *generateFlags) error {
	var s design.Spec
	switch {
	case f.specFile != "":
		var err error
		if s, err = design.ReadSpecFile(f.specFile); err != nil {
			return err
		}
		if len(args) == 1 {
			s.Family = design.Family(args[0])
		}
	case len(args) == 1:
		s = design.NewSpec(design.Family(args[0]))
	default:
		return fmt.Errorf("generate needs a FAMILY (%s) or --spec FILE", design.FamilyNames())
	}
	if err := f.apply(cmd.Flags(), &s); err != nil {
		return err
	}
	var buf bytes.Buffer
	if f.printSpec {
		if err := s.Validate(); err != nil {
			return err
		}
		js, err := json.MarshalIndent(s.WithDefaults(), "", "  ")
		if err != nil {
			return internalErr(err)
		}
		buf.Write(append(js, '\n'))
	} else if s.Family.Dimension() == 2 {
		p, err := design.GeneratePlane(s)
		if err != nil {
			return err
		}
		if err := pattern.WritePlane(&buf, p, s.Comments()); err != nil {
			return internalErr(err)
		}
	} else {
		p, err := design.Generate(s)
		if err != nil {
			return err
		}
		if err := pattern.WriteCSV(&buf, p, s.Comments()); err != nil {
			return internalErr(err)
		}
	}
	if f.out == "" {
		_, err := cmd.OutOrStdout().Write(buf.Bytes())
		return err
	}
	return writeFileAtomic(f.out, func(file io.Writer) error {
		_, err := file.Write(buf.Bytes())
		return err
	})
}
