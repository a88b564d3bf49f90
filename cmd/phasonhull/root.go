package main

import (
	"io"
	"phasonhull/cmd/phasonhull/internal/buildinfo"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"
)

// newRootCmd builds the command tree. Each command is built by a function
// of its own file and holds no analysis logic: it wires packages together.
func newRootCmd(stdin io.Reader, stdout, stderr io.Writer) *cobra.Command {
	root := &cobra.Command{
		Use:   "phasonhull",
		Short: "Recover the hull, step angle(s) and gap labels of a chain or a plate of sites",
		Long: `phasonhull reads the site positions of a chain or a plate (a fabricated sample's
metrology export, a column from a paper's table, a generated design),
turns its spacings (a plate: its displacements from the average lattice)
into delay-coordinate vectors, and reads the hull of the pattern — the
space of its local configurations — off their persistent homology and the
frequency module of the pattern.`,
		Example: `  # The main job: the hull, step angle and gap labels of a measured sample
  phasonhull analyze testdata/demo/lw0412_cmm.csv

  # Check the sample against its design: calibration, defects, hull and angle
  phasonhull audit --design testdata/demo/lw0412_design.json testdata/demo/lw0412_cmm.csv

  # Write a modulated design and look at its delay-coordinate trace
  phasonhull generate modulated --sites 400 --theta 0.2763 --amp 0.12 > design.csv
  phasonhull embed design.csv`,
		Version:       buildinfo.Version(),
		SilenceUsage:  true,
		SilenceErrors: true,
	}
	root.PersistentFlags().Bool("quiet", false, "no progress line and no list of the files written on standard error (results and errors still print)")
	root.SetVersionTemplate("phasonhull {{.Version}}\n")
	root.SetIn(stdin)
	root.SetOut(stdout)
	root.SetErr(stderr)
	root.AddCommand(
		newGenerateCmd(),
		newEmbedCmd(),
		newBarcodeCmd(),
		newAnalyzeCmd(),
		newAuditCmd(),
		newBatchCmd(),
		newSpectrumCmd(),
		newReportCmd(),
		newBudgetCmd(),
	// commands are added here as they land
	)
	emptyListsShowNoDefault(root)
	return root
}

// emptyListsShowNoDefault clears the default text of list flags whose
// default is the empty list, so that help does not end their line with
// "(default [])".
func emptyListsShowNoDefault(c *cobra.Command) {
	c.Flags().VisitAll(func(f *pflag.Flag) {
		if f.DefValue == "[]" {
			f.DefValue = ""
		}
	})
	for _, sub := range c.Commands() {
		emptyListsShowNoDefault(sub)
	}
}
