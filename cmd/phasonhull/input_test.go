package main

import (
	"bytes"
	"encoding/json"
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

func dialectPath(name string) string { return filepath.Join("..", "..", "testdata", "dialects", name) }

// TestColumnsSameHull: the demo's centroids written as a CMM export with a
// name column and a constant z, read with --columns X,Y, give the demo's
// analysis: the JSON differs only in the source and the note on the
// columns read.
func TestColumnsSameHull(t *testing.T) {
	analyze := func(args ...string) map[string]any {
		t.Helper()
		var stdout, stderr bytes.Buffer
		if code := run(append([]string{"analyze", "--json"}, args...), nil, &stdout, &stderr); code != 0 {
			t.Fatalf("%v: status %d: %s", args, code, stderr.String())
		}
		var v map[string]any
		if err := json.Unmarshal(stdout.Bytes(), &v); err != nil {
			t.Fatal(err)
		}
		return v
	}
	demo := analyze(filepath.Join("..", "..", "testdata", "demo", "lw0412_cmm.csv"))
	cmm := analyze("--columns", "X,Y", dialectPath("cmm_name_xyz.csv"))
	notes, _ := cmm["notes"].([]any)
	if len(notes) == 0 || !strings.Contains(fmt.Sprint(notes[0]), `read column 2 ("X [mm]"), column 3 ("Y [mm]"), as asked`) {
		t.Fatalf("notes %q: want the columns read first", notes)
	}
	cmm["notes"] = notes[1:]
	cmm["source"] = demo["source"]
	a, _ := json.Marshal(demo)
	b, _ := json.Marshal(cmm)
	if !bytes.Equal(a, b) {
		t.Errorf("analysis of the CMM export differs from the demo's:\n%s\n%s", a, b)
	}
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
		{"index column", "", []string{dialectPath("index_site.csv")}, `10 sites, unit "mm", word "", last 7.472`},
		{"columns by name", "", []string{"--columns", "Position [mm]", dialectPath("index_site.csv")}, `10 sites, unit "mm", word "", last 7.472`},
		{"columns by number", "", []string{"--columns", "1", dialectPath("index_site.csv")}, `10 sites, unit "", word "", last 10`},
		{"decimal comma", "", []string{"--decimal-comma", dialectPath("decimal_comma_flag.txt")}, `10 sites, unit "", word "", last 7.472`},
		// testdata/bad/decimal_comma.csv is ambiguous without the flag; with it, line 6 is 5.25.
		{"decimal comma in the bad corpus", "", []string{"--decimal-comma", badPath("decimal_comma.csv")}, `10 sites, unit "", word "", last 9`},
		{"unit in every cell", "", []string{dialectPath("unit_cells.csv")}, `10 sites, unit "mm", word "", last 7.472`},
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
		{"columns of JSON", "", []string{"--format", "json", "--columns", "1", "-"}, "--columns chooses columns of a table, but --format is json", false},
		{"columns empty name", "", []string{"--columns", "X,,Y", "-"}, `--columns "X,,Y": an empty column name`, false},
		{"columns unknown", "", []string{"--columns", "Q", dialectPath("index_site.csv")}, `index_site.csv:1: --columns Q: no column is named so; the header names "Site", "Position [mm]"`, true},
		{"name column", "", []string{dialectPath("cmm_name_xyz.csv")}, `cmm_name_xyz.csv:3:1: "R001" is not a number: column 1 ("Name") holds text, not coordinates; choose the columns to read with --columns, e.g. --columns X,Y,Z`, true},
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
	for _, want := range []string{"--format string", "auto, column, centroids, spacings, tiles, json", "--spacings", "--tiles string", "A=1,B=1.618", "--unit string",
		"--columns string", "--columns X,Y", "(default: every column but a site index", "--decimal-comma", "(default false"} {
		if !strings.Contains(out, want) {
			t.Errorf("help lacks %q:\n%s", want, out)
		}
	}
}
