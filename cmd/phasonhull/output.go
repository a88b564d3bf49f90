package main

import (
	"bytes"
	"encoding/json"
	"io"
	"os"
	"phasonhull/cmd/phasonhull/internal/outfile"
	"phasonhull/cmd/phasonhull/internal/progress"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"
)

// argsAreFiles is the annotation of a command whose positional arguments
// name input files (or folders of them).
const argsAreFiles = "phasonhull/args"

// fileArgs marks cmd's positional arguments as input files.
func fileArgs(cmd *cobra.Command) {
	if cmd.Annotations == nil {
		cmd.Annotations = map[string]string{}
	}
	cmd.Annotations[argsAreFiles] = "files"
}

// bindOutputCheck makes every command refuse, before any work starts, an
// output that is or holds one of the run's inputs (outfile.Check). The
// inputs are the positional arguments of commands marked by fileArgs and
// the flags marked outfile.Input; the outputs are the flags marked
// outfile.OutputFile or outfile.OutputDir. A command or flag added later is
// covered by being marked.
func bindOutputCheck(root *cobra.Command) {
	var wrap func(c *cobra.Command)
	wrap = func(c *cobra.Command) {
		if runE := c.RunE; runE != nil {
			c.RunE = func(cmd *cobra.Command, args []string) error {
				ins, outs := runPaths(cmd, args)
				if err := outfile.Check(ins, outs); err != nil {
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
func runPaths(cmd *cobra.Command, args []string) (ins, outs []outfile.Path) {
	if cmd.Annotations[argsAreFiles] != "" {
		for _, a := range args {
			ins = append(ins, outfile.Path{Source: "", Name: a})
		}
	}
	cmd.Flags().Visit(func(f *pflag.Flag) {
		p := outfile.Path{Source: "--" + f.Name, Name: f.Value.String()}
		switch outfile.RoleOf(f) {
		case outfile.Input:
			ins = append(ins, p)
		case outfile.OutputFile:
			outs = append(outs, p)
		case outfile.OutputDir:
			p.Dir = true
			outs = append(outs, p)
		}
	})
	return ins, outs
}

// progressOf returns the progress line of a run: shown on standard error
// when that is a terminal and --quiet is not given.
func progressOf(cmd *cobra.Command) *progress.Line {
	quiet, _ := cmd.Flags().GetBool("quiet")
	return progress.New(cmd.ErrOrStderr(), !quiet && isTerminal(cmd.ErrOrStderr()))
}

// listTo is where a run lists the files it wrote: standard error, or
// nowhere with --quiet.
func listTo(cmd *cobra.Command) io.Writer {
	if quiet, _ := cmd.Flags().GetBool("quiet"); quiet {
		return nil
	}
	return cmd.ErrOrStderr()
}

// writeFileAtomic writes the file at path through outfile.WriteFile: the
// content is staged out of sight and replaces path in one rename, so a
// failed or stopped run leaves path as it was.
func writeFileAtomic(path string, write func(w io.Writer) error) error {
	return outfile.WriteFile(path, write)
}

// writeJSON writes v to w as indented JSON, the form of every JSON report.
func writeJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(v)
}

// indentJSON returns v as indented JSON, as writeJSON writes it.
func indentJSON(v any) ([]byte, error) {
	var b bytes.Buffer
	if err := writeJSON(&b, v); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}

// isTerminal reports whether w is a terminal (a character device).
func isTerminal(w io.Writer) bool {
	file, ok := w.(*os.File)
	if !ok {
		return false
	}
	st, err := file.Stat()
	return err == nil && st.Mode()&os.ModeCharDevice != 0
}
