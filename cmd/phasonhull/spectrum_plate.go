package main

import (
	"fmt"
	"io"
	"phasonhull/cmd/phasonhull/internal/flagval"
	"phasonhull/cmd/phasonhull/internal/picture"
	"strings"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"phasonhull/pattern"
	"phasonhull/pattern/design"
	"phasonhull/topology/spectrum"
	"phasonhull/topology/spectrum/plate"
)

// plateFlags are the flags of "phasonhull spectrum" that only plates take.
type plateFlags struct {
	cutoff           float64
	cutoffLen        *flagval.Length
	flux, sweep      string
	moments, vectors int
}

// plateOnly and chainOnly are the flags that one kind of input refuses.
var (
	plateOnly = []string{"cutoff", "flux", "moments", "vectors", "sweep"}
	chainOnly = []string{"nnn", "closing", "theta", "period", "theta-grid", "edge-gaps"}
)

func (p *plateFlags) register(fs *pflag.FlagSet) {
	p.cutoffLen = flagval.NewLength(&p.cutoff)
	fs.Var(p.cutoffLen, "cutoff", "plates: bond every pair of sites closer than this `LENGTH` (default: nearest lattice neighbours)")
	fs.StringVar(&p.flux, "flux", "", "plates: magnetic flux α per lattice cell, a decimal or a fraction p/q (Peierls phases; the labels gain Zα)")
	fs.IntVar(&p.moments, "moments", 0, "plates, kernel polynomial method: Chebyshev moments M (0: 512); resolution ≈ π·half-width/M")
	fs.IntVar(&p.vectors, "vectors", 0, "plates, kernel polynomial method: random vectors of the stochastic trace (0: 16)")
	fs.StringVar(&p.sweep, "sweep", "", "plates: `PARAM=START:STOP:COUNT`: follow each gap as a design parameter (twist, scale, amp…), harper or flux moves, and fit its IDS as an integer line")
}

// runPlate runs spectrum on a plate (a 2D file, a 2D design, or measured
// levels with a 2D --pattern); it reports false when the input is a chain.
func runPlate(cmd *cobra.Command, args []string, f *spectrumFlags) (bool, error) {
	q := plate.Request{Source: f.design}
	var err error
	if opt, oerr := f.in.options(); f.design != "" && len(args) == 0 {
		spec, err := design.ReadSpecFile(f.design)
		if err != nil || spec.Family.Dimension() != 2 {
			return false, nil
		}
		if q.Sample, err = plate.DesignSample(cmd.Context(), spec); err != nil {
			return true, err
		}
	} else if q.Source = f.patternFile + strings.Join(args, ""); oerr != nil || q.Source == "" || q.Source == "-" || f.design != "" {
		return false, nil
	} else if sites, err := pattern.ReadSitesFile(q.Source, opt); err != nil || sites.Plane == nil {
		return false, nil
	} else if q.Sample, err = plate.NewSample(cmd.Context(), sites.Plane); err != nil {
		return true, err
	}
	for _, name := range chainOnly {
		if cmd.Flags().Changed(name) {
			return true, fmt.Errorf("--%s is for chains; %s is a plate", name, q.Source)
		}
	}
	if f.eigenvalues != "" {
		return true, runMeasuredPlate(cmd, f, q.Sample)
	}
	if q.Config, err = f.plateConfig(q.Sample, cmd.InOrStdin()); err != nil {
		return true, err
	}
	progress := progressOf(cmd)
	defer progress.Close()
	q.Stage, q.Count, q.Sweep, q.Edges, q.EdgeOptions = progress.Stage, progress.Count, f.plate.sweep, f.edgeModes, plate.EdgeOptions{Samples: f.samples}
	rep, err := q.Run(cmd.Context())
	if err != nil {
		return true, err
	}
	if f.out != "" && rep.Sweep != nil {
		if err := writeFileAtomic(f.out, rep.Sweep.WriteCSV); err != nil {
			return true, err
		}
	}
	if f.plot.list = listTo(cmd); f.plot.dir != "" {
		pics, err := picture.PlateSpectra(rep, spectrum.Kind(f.model).Axis())
		if err != nil {
			return true, fmt.Errorf("--plot: %w", err)
		}
		if err := f.plot.write(pics); err != nil {
			return true, err
		}
	}
	if f.json {
		return true, writeJSON(cmd.OutOrStdout(), rep)
	}
	return true, rep.WriteText(cmd.OutOrStdout())
}

// plateConfig turns the operator flags into a plate.Config.
func (f *spectrumFlags) plateConfig(s *plate.Sample, stdin io.Reader) (plate.Config, error) {
	h := f.harper
	f.harper = 0 // the chain's model must not take the almost-Mathieu term
	m1, err := f.buildModel(s.Plane.Len(), s.Plane.Unit, nil, stdin)
	f.harper = h
	if err == nil {
		err = f.plate.cutoffLen.Resolve(s.Plane.Unit)
	}
	c := plate.Config{Harper: h, HarperPhase: f.harperPhase, Model: plate.Model{Kind: m1.Kind, Law: m1.Law, Ends: m1.Ends, Cutoff: f.plate.cutoff,
		OnSite: plate.OnSite{Constant: m1.OnSite.Constant, Values: m1.OnSite.Values}}}
	c.Options = plate.Options{MinGap: f.minGap, KPM: plate.KPMOptions{Moments: f.plate.moments, Vectors: f.plate.vectors}}
	if err == nil && f.plate.flux != "" {
		c.Model.Flux, err = plate.ParseFlux(f.plate.flux)
	}
	if err == nil {
		c.Options.Method, err = plate.ParseMethod(f.method)
	}
	return c, err
}

// runMeasuredPlate labels measured levels with a plate's recovered group.
func runMeasuredPlate(cmd *cobra.Command, f *spectrumFlags, s *plate.Sample) error {
	v, err := readInput(f.eigenvalues, cmd.InOrStdin(), pattern.ReadValues)
	if err != nil {
		return err
	}
	rep := spectrum.NewReport(f.maxCoeff)
	rep.Source, rep.Sites = f.eigenvalues, len(v)
	l, err := plate.MeasuredLabelling(s, f.maxCoeff)
	if err != nil {
		return err
	}
	return runMeasuredWith(cmd, f, rep, v, rep.Label(l, spectrum.Options{MinGap: f.minGap, MaxCoeff: f.maxCoeff}), s.Plane.Len())
}
