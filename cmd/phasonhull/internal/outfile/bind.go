package outfile

import (
	"github.com/spf13/cobra"
	"github.com/spf13/pflag"
)

// ArgsAreFiles is the annotation of a command whose positional arguments
// name input files (or folders of them).
const ArgsAreFiles = "phasonhull/args"

// FileArgs marks cmd's positional arguments as input files.
func FileArgs(cmd *cobra.Command) {
	if cmd.Annotations == nil {
		cmd.Annotations = map[string]string{}
	}
	cmd.Annotations[ArgsAreFiles] = "files"
}

// Bind makes every command refuse, before any work starts, an
// output that is or holds one of the run's inputs (Check). The
// inputs are the positional arguments of commands marked by FileArgs and
// the flags marked Input; the outputs are the flags marked
// OutputFile or OutputDir. A command or flag added later is
// covered by being marked.
func Bind(root *cobra.Command) {
	var wrap func(c *cobra.Command)
	wrap = func(c *cobra.Command) {
		if runE := c.RunE; runE != nil {
			c.RunE = func(cmd *cobra.Command, args []string) error {
				ins, outs := runPaths(cmd, args)
				if err := Check(ins, outs); err != nil {
					return err
				}
				return runE(cmd, args)
			}
		}
		for _, sub := range c.Commands() {
			wrap(sub)
		}
	}
	wrap(root)
}

// runPaths lists the inputs and outputs of one command line.
func runPaths(cmd *cobra.Command, args []string) (ins, outs []Path) {
	if cmd.Annotations[ArgsAreFiles] != "" {
		for _, a := range args {
			ins = append(ins, Path{Source: "", Name: a})
		}
	}
	cmd.Flags().Visit(func(f *pflag.Flag) {
		p := Path{Source: "--" + f.Name, Name: f.Value.String()}
		switch RoleOf(f) {
		case Input:
			ins = append(ins, p)
		case OutputFile:
			outs = append(outs, p)
		case OutputDir:
			p.Dir = true
			outs = append(outs, p)
		}
	})
	return ins, outs
}
