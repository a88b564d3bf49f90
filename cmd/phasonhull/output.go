package main

import (
	"bytes"
	"encoding/json"
	"io"
	"os"
	"phasonhull/cmd/phasonhull/internal/outfile"
	"phasonhull/cmd/phasonhull/internal/progress"

	"github.com/spf13/cobra"
)

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
