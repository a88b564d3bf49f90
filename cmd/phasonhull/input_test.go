package main

import (
	"bytes"
	"errors"
	"fmt"
	"path/filepath"
	"strings"
	"testing"

	"github.com/spf13/cobra"

	"phasonhull/pattern"
)

// newLoadCmd is a minimal command that reads a pattern through the shared
// input flags and prints what it read.
func newLoadCmd() *cobra.Command {
	var in inputFlags
	cmd := &cobra.Command{
		Use:           "load FILE",
		Args:          cobra.ExactArgs(1),
		SilenceUsage:  true,
		SilenceErrors: true,
		RunE: func(cmd *cobra.Command, args []string) error {
			p, err := in.load(args[0], cmd.InOrStdin())
			if err != nil {
				return err
			}
			fmt.Fprintf(cmd.OutOrStdout(), "%d sites, unit %q, word %q, last %g\n", p.Len(), p.Unit, p.Word, p.Positions[p.Len()-1])
			return nil
		},
	}
	in.register(cmd.Flags())
	return cmd
}

func runLoad(t *testing.T, stdin string, args ...string) (string, error) {
	t.Helper()
	cmd := newLoadCmd()
	var out bytes.Buffer
	cmd.SetIn(strings.NewReader(stdin))
	cmd.SetOut(&out)
	cmd.SetErr(&out)
	cmd.SetArgs(args)
	err := cmd.Execute()
	return out.String(), err
}

func testFile(dir, name string) string {
	return filepath.Join("..", "..", "testdata", "read", dir, name)
}

func TestInputFlagsLoad(t *testing.T) {
	column := "0\n1\n2.5\n3.5\n5\n6\n7.5\n8.5\n"
	tests := []struct {
		name  string
		stdin string
		args  []string
		want  string
	}{
		{"file", "", []string{testFile("good", "positions_header_unit_underscore.csv")}, `10 sites, unit "mm", word "", last 7.472`},
		{"stdin", column, []string{"-"}, `8 sites, unit "", word "", last 8.5`},
		{"unit", column, []string{"--unit", "um", "-"}, `8 sites, unit "um", word "", last 8.5`},
		{"spacings", column[2:], []string{"--spacings", "-"}, `8 sites, unit "", word "", last 34`},
		{"format spacings", column[2:], []string{"--format", "spacings", "-"}, `8 sites, unit "", word "", last 34`},
		{"spacings twice", column[2:], []string{"--format=spacings", "--spacings", "-"}, `8 sites, unit "", word "", last 34`},
		{"tiles", "LSLLSLSL", []string{"--tiles", "L=2,S=1", "-"}, `9 sites, unit "", word "LSLLSLSL", last 13`},
		{"forced tiles", "LSLLSLSL", []string{"--format", "tiles", "--tiles", "L=2,S=1", "-"}, `9 sites, unit "", word "LSLLSLSL", last 13`},
		{"json", `{"unit": "nm", "positions": [0, 1, 2, 3, 4, 5, 6, 7]}`, []string{"--format", "json", "-"}, `8 sites, unit "nm", word "", last 7`},
		{"tiles ignored for a column", column, []string{"--tiles", "A=1", "-"}, `8 sites, unit "", word "", last 8.5`},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			out, err := runLoad(t, tt.stdin, tt.args...)
			if err != nil {
				t.Fatal(err)
			}
			if strings.TrimSpace(out) != tt.want {
				t.Errorf("output %q, want %q", out, tt.want)
			}
		})
	}
}

// TestInputFlagsRefuse checks that bad flags and bad input give plain
// errors — exit status 2 under run's rule — and print nothing.
func TestInputFlagsRefuse(t *testing.T) {
	tests := []struct {
		name  string
		stdin string
		args  []string
		want  string
		input bool // an *pattern.InputError is expected
	}{
		{"unknown format", "", []string{"--format", "xml", "-"}, `--format "xml": want one of auto, column, centroids, spacings, tiles, json`, false},
		{"spacings contradicts", "", []string{"--spacings", "--format", "centroids", "-"}, "--spacings contradicts --format centroids", false},
		{"tiles contradict", "", []string{"--tiles", "A=1", "--format", "column", "-"}, "--tiles gives tile lengths for a tile word, but --format is column", false},
		{"bad tiles", "", []string{"--tiles", "A=1,B", "-"}, `--tiles: tile lengths "A=1,B": "B" is not LETTER=LENGTH`, false},
		{"missing tiles", "ABAAB\n", []string{"-"}, "<stdin>: is a word of tile letters (A, B) but no tile lengths were given: pass --tiles A=1,B=1.618", true},
		{"missing file", "", []string{testFile("bad", "no_such_file.csv")}, "no_such_file.csv: no such file or directory", true},
		{"bad number", "", []string{testFile("bad", "centroids_not_a_number.csv")}, `centroids_not_a_number.csv:14:2: "12.3x" is not a number`, true},
		{"too few", "0\n1\n2\n", []string{"-"}, "<stdin>: too few sites: 3, need at least 8", true},
		{"negative spacing", "1\n1\n-1\n1\n1\n1\n1\n1\n", []string{"--spacings", "-"}, "<stdin>:3:1: spacing -1 is not positive", true},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			out, err := runLoad(t, tt.stdin, tt.args...)
			if err == nil {
				t.Fatalf("no error; output %q", out)
			}
			if !strings.Contains(err.Error(), tt.want) {
				t.Errorf("error %q, want it to contain %q", err, tt.want)
			}
			var ee *exitError
			if errors.As(err, &ee) {
				t.Errorf("error %q carries exit status %d, want a plain error (exit status 2)", err, ee.code)
			}
			var ie *pattern.InputError
			if got := errors.As(err, &ie); got != tt.input {
				t.Errorf("error %q: InputError %v, want %v", err, got, tt.input)
			}
			if out != "" {
				t.Errorf("printed %q on error", out)
			}
		})
	}
}

func TestInputFlagsHelp(t *testing.T) {
	out, err := runLoad(t, "", "--help")
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"--format string", "auto, column, centroids, spacings, tiles, json", "--spacings", "--tiles string", "A=1,B=1.618", "--unit string"} {
		if !strings.Contains(out, want) {
			t.Errorf("help lacks %q:\n%s", want, out)
		}
	}
}
