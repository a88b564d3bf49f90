package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"strings"

	"github.com/spf13/pflag"

	"phasonhull/cmd/phasonhull/internal/flagval"
	"phasonhull/embed"
	"phasonhull/pattern"
)

// inputFlags are the flags shared by every command that reads a pattern.
type inputFlags struct {
	format   string
	spacings bool
	tiles    string
	unit     string
	columns  string
	decimal  bool
}

// register adds the input flags to fs.
func (f *inputFlags) register(fs *pflag.FlagSet) {
	fs.StringVar(&f.format, "format", string(pattern.FormatAuto),
		"input format: "+formatList()+"; auto tells them apart by content, except spacings")
	fs.BoolVar(&f.spacings, "spacings", false,
		"the input is one column of spacings, not positions (same as --format spacings)")
	fs.StringVar(&f.tiles, "tiles", "",
		"tile lengths for a word of tile letters, e.g. A=1,B=1.618")
	fs.StringVar(&f.unit, "unit", "",
		"length unit of the input (nm, um, mm, ...), overriding any unit named in the file")
	fs.StringVar(&f.columns, "columns", "",
		"columns of a table to read, by header name or number from 1, comma separated, e.g. --columns X,Y or --columns 3 or --columns \"Position [mm]\" (default: every column but a site index of consecutive whole numbers)")
	fs.BoolVar(&f.decimal, "decimal-comma", false,
		"read ',' as the decimal mark, e.g. 0,25 (default false: a decimal comma is read only where the file shows it, in semicolon- or tab-separated fields)")
}

// noiseFlag adds --noise to fs: the position noise an analysis tolerates.
func noiseFlag(fs *pflag.FlagSet) *flagval.Noise {
	v := flagval.NewNoise(100 * embed.DefaultNoise)
	fs.Var(v, "noise", "position noise tolerated, a `LEVEL`: a percentage of the mean spacing (3%) or a length (20nm; a bare number is in the input's unit); 0 for exact data")
	return v
}

// noiseFraction is --noise as the library takes it: a fraction of p's
// mean spacing, embed.ExactData for none.
func noiseFraction(v *flagval.Noise, p *pattern.Pattern) (float64, error) {
	f, err := v.Fraction(p.Unit, p.MeanSpacing())
	if f == 0 {
		f = embed.ExactData
	}
	return f, err
}

// formatList names the accepted formats: "auto, column, ...".
func formatList() string {
	names := make([]string, 0, len(pattern.Formats()))
	for _, f := range pattern.Formats() {
		names = append(names, string(f))
	}
	return strings.Join(names, ", ")
}

// options turns the flags into read options, refusing contradictions.
func (f *inputFlags) options() (pattern.ReadOptions, error) {
	var opt pattern.ReadOptions
	format := pattern.Format(f.format)
	known := false
	for _, k := range pattern.Formats() {
		known = known || format == k
	}
	if !known {
		return opt, fmt.Errorf("--format %q: want one of %s", f.format, formatList())
	}
	if f.spacings {
		if format != pattern.FormatAuto && format != pattern.FormatSpacings {
			return opt, fmt.Errorf("--spacings contradicts --format %s", f.format)
		}
		format = pattern.FormatSpacings
	}
	opt.Format = format
	if f.tiles != "" {
		if format != pattern.FormatAuto && format != pattern.FormatTiles {
			return opt, fmt.Errorf("--tiles gives tile lengths for a tile word, but --format is %s", format)
		}
		tiles, err := pattern.ParseTileLengths(f.tiles)
		if err != nil {
			return opt, fmt.Errorf("--tiles: %w", err)
		}
		opt.Tiles = tiles
	}
	opt.Unit = strings.TrimSpace(f.unit)
	if f.columns != "" {
		if format == pattern.FormatJSON || format == pattern.FormatTiles {
			return opt, fmt.Errorf("--columns chooses columns of a table, but --format is %s", format)
		}
		for _, c := range strings.Split(f.columns, ",") {
			c = strings.TrimSpace(c)
			if c == "" {
				return opt, fmt.Errorf("--columns %q: an empty column name; write names or numbers from 1 between commas", f.columns)
			}
			opt.Columns = append(opt.Columns, c)
		}
	}
	opt.DecimalComma = f.decimal
	return opt, nil
}

// load reads the pattern at path as the flags say; path "-" reads stdin.
// Its errors are the user's to fix (exit status 2).
func (f *inputFlags) load(path string, stdin io.Reader) (*pattern.Pattern, error) {
	opt, err := f.options()
	if err != nil {
		return nil, err
	}
	if path == "-" {
		return pattern.Read(stdin, "-", opt)
	}
	return pattern.ReadFile(path, opt)
}

// loadSites reads the chain or plate at path as the flags say (the one
// 1D/2D rule of pattern.ReadSites); path "-" reads stdin.
func (f *inputFlags) loadSites(path string, stdin io.Reader) (pattern.Sites, error) {
	opt, err := f.options()
	if err != nil {
		return pattern.Sites{}, err
	}
	if path == "-" {
		return pattern.ReadSites(stdin, "-", opt)
	}
	return pattern.ReadSitesFile(path, opt)
}

// readInput reads the file at path with read, one of pattern's readers;
// path "-" reads stdin. A file that cannot be opened is refused like bad
// input, with an *pattern.InputError naming it (exit status 2).
func readInput[T any](path string, stdin io.Reader, read func(r io.Reader, name string) (T, error)) (T, error) {
	if path == "-" {
		return read(stdin, "-")
	}
	file, err := os.Open(path)
	if err != nil {
		var zero T
		var pe *os.PathError
		if errors.As(err, &pe) {
			err = pe.Err
		}
		return zero, &pattern.InputError{File: path, Err: err}
	}
	defer file.Close()
	return read(file, path)
}
