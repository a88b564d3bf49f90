package main

import (
	"bytes"
	"io"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"

	"phasonhull/pattern"
)

// badCase is one file of testdata/bad: the flags it is read with, the
// fragment its refusal must contain, the "FILE:LINE[:COL]" location the
// message must start with ("" when the fault sits on no single line), and
// why the file is bad.
type badCase struct {
	file  string
	flags []string
	want  string
	at    string // location after the file name, e.g. ":6:1"; "" for none
	why   string
}

var tiles = []string{"--format", "tiles", "--tiles", "A=1,B=1.618"}

// badInputs is the corpus. Every file is refused with exit status 2.
var badInputs = []badCase{
	{"empty.csv", nil, "is empty", "", "zero bytes"},
	{"blank_lines_only.csv", nil, "has no data rows", "", "white space only"},
	{"comments_only.csv", nil, "has no data rows", "", "comments, no rows"},
	{"header_only.csv", nil, "has a header row but no data rows", ":1", "a header and nothing else"},
	{"too_few.csv", nil, "too few sites: 7, need at least 8", "", "fewer than pattern.MinSites"},
	{"nan.csv", nil, `"NaN" is not a finite number`, ":6:1", "NaN among positions"},
	{"inf.csv", nil, `"+Inf" is not a finite number`, ":8:1", "an infinity among positions"},
	{"huge_span.csv", nil, "span of the positions overflows", "", "±1e308: max-min is +Inf"},
	{"spacings_overflow.txt", []string{"--spacings"}, "position +Inf is not a finite number", "", "cumulative sum of 1e308 spacings overflows"},
	{"overflow_literal.csv", nil, `"2e400" overflows a float64`, ":5:1", "a literal beyond float64"},
	{"letters.csv", nil, `"abc" is not a number`, ":4:1", "a word among numbers"},
	{"number_with_unit.csv", nil, `"7.5um" is in um but the cells of column 1 on line 1 have no unit`, ":7:1", "a unit glued to one number only"},
	{"decimal_comma.csv", nil, "expected 1 columns like the first data row (line 1), got 2; if ',' is a decimal mark here, pass --decimal-comma", ":6", "a decimal comma splits a row of a comma-less file in two"},
	{"decimal_comma_whole_numbers.csv", nil, "every row is two whole numbers split at a comma, the first counting up by 1: if ',' is the decimal mark, pass --decimal-comma; if it separates columns, pass --columns 1,2", ":1", "0,5 1,7 2,4 …: decimal commas or an index and a column"},
	{"decimal_mark_mixed.csv", nil, `"5.236" has a decimal point but from line 4 on ',' is the decimal mark`, ":8:2", "decimal commas, then decimal points"},
	{"unit_cells_mixed.csv", nil, `"3.236 um" is in um but the cells of column 1 on line 1 are in mm`, ":5:1", "one cell in another unit"},
	{"trailing_separator_missing.csv", nil, "the line does not end with a separator as line 1 does (a missing value?)", ":7", "every line ends with ';' but one"},
	{"cmm_name_column.csv", nil, `"R001" is not a number: column 1 ("Name") holds text, not coordinates; choose the columns to read with --columns, e.g. --columns X,Y,Z`, ":2:1", "a CMM export with a name column"},
	{"lattice_strip_2d.csv", nil, "half of them sit 2.5 spacings or more off their best line (a chain stays within 0.55): this is a 2D point set", "", "an elongated strip of a hexagonal lattice, 3 rows by 40"},
	{"mixed_columns.csv", nil, "expected 2 columns like the first data row (line 2), got 1", ":6", "a short row among x,y rows"},
	{"five_columns.csv", nil, "has 5 columns", ":1", "more than x,y,z"},
	{"duplicate_sites.csv", nil, "two sites at the same position: 3, as on line 4", ":5", "one site listed twice"},
	{"binary_garbage.bin", nil, "is not a text file", "", "an executable's header and random bytes"},
	{"nul_after_sniff.csv", nil, `is not a number`, ":3001:1", "a NUL byte past the first 8 KiB"},
	{"invalid_utf8_late.csv", nil, `is not a number`, ":3001:1", "invalid UTF-8 past the first 8 KiB"},
	{"utf16le.csv", nil, "it is UTF-16; save it as UTF-8", "", "a UTF-16 export with BOM"},
	{"crlf_bad_row.csv", nil, "expected 1 columns like the first data row (line 2), got 2", ":6", "CRLF lines, one row with two fields"},
	{"unicode_minus.csv", nil, "Unicode minus sign", ":1:1", "U+2212 instead of '-'"},
	{"hex_float.csv", nil, `"0x1p1" is not a number`, ":3:1", "hex floats are not decimal"},
	{"header_units_disagree.csv", nil, `column 2 has unit "nm" but column 1 has "um"`, ":1:2", "two units in one header"},
	{"centroids_scattered.csv", nil, "do not lie along a line: half of them sit 6.7 spacings or more off their best line", "", "a 2-D cloud, not a chain"},
	{"spacings_negative.txt", []string{"--spacings"}, "spacing -0.5 is not positive", ":4:1", "a negative spacing"},
	{"spacings_zero.txt", []string{"--spacings"}, "spacing 0 is not positive", ":4:1", "a zero spacing"},
	{"tiles_unknown_letter.txt", tiles, "tile letter 'C' has no length", ":1:14", "a letter --tiles does not name"},
	{"tiles_digit.txt", tiles, "'1' is not a tile letter", ":1:10", "a digit in a tile word"},
	{"json_empty_object.json", nil, "has none of", "", "no data key"},
	{"json_empty_sites.json", nil, "too few sites: 0", "", "an empty sites array (once a divide by zero)"},
	{"json_unknown_key.json", nil, `unknown key "postions"`, ":3:3", "a misspelt key"},
	{"json_huge_exponent.json", nil, "1e999999999 overflows a float64", ":1:40", "a number with a 9-digit exponent"},
	{"json_deep_nesting.json", nil, "positions[0] must be a number, not an array", ":1:16", "20000 nested arrays"},
	{"json_null.json", nil, "positions[3] must be a number, not null", ":1:25", "a null position"},
	{"json_string_number.json", nil, `not the string "2"`, ":1:22", "a quoted number"},
	{"json_trailing.json", nil, "unexpected content after the JSON object", ":2:1", "two documents"},
	{"json_truncated.json", nil, "unexpected end of input", ":1:33", "cut off mid-array"},
	{"json_negative_spacing.json", nil, "spacing -1 is not positive", ":1:24", "a negative spacing in JSON"},
	{"json_duplicate_key.json", nil, `key "unit" is given twice`, ":1:16", "a key twice"},
}

// badSpecs are the design specs of the corpus, refused by generate --spec.
var badSpecs = []badCase{
	{"spec_impossible.json", nil, "theta = 1.5: must lie strictly between 0 and 1", "", "an angle outside (0, 1)"},
	{"spec_negative_sites.json", nil, "sites = -3: a design needs at least 8 sites", "", "a negative size"},
	{"spec_unknown_key.json", nil, `unknown field "ampl"`, "", "a misspelt field"},
	{"spec_unknown_family.json", nil, `family "quasicrystal": unknown`, "", "no such family"},
	{"spec_syntax.json", nil, "invalid character ','", ":2:18", "a doubled comma"},
}

// badNumbers are the files of the corpus that go with a pattern rather
// than being one: point clouds (barcode --points), coupling tables
// (spectrum --table), measured levels (spectrum --eigenvalues) and
// per-site terms (spectrum --onsite-file). Their flags come before the
// file; a spectrum run also asks for --out, which must not be written.
var badNumbers = []badCase{
	{"points_ragged.csv", []string{"barcode", "--points"}, "expected 2 columns like the first data row (line 2), got 3", ":4", "a 3-D point among 2-D ones"},
	{"points_word.txt", []string{"barcode", "--points"}, `"1mm" is not a number`, ":4:2", "a unit glued to a coordinate"},
	{"points_header.csv", []string{"barcode", "--points"}, `"start" is not a number`, ":1:1", "a header with an index column: a cloud has no header"},
	{"couplings_descending.csv", []string{"spectrum", "--design", specPath("lattice.json"), "--hopping", "table", "--table"}, "distance 1.2 does not exceed 1.618 on line 4; distances must ascend", ":5:1", "distances out of order"},
	{"couplings_short_row.csv", []string{"spectrum", "--design", specPath("lattice.json"), "--hopping", "table", "--table"}, "expected 2 columns like the first data row (line 2), got 1", ":3", "a distance without its coupling"},
	{"couplings_zero_distance.csv", []string{"spectrum", "--design", specPath("lattice.json"), "--hopping", "table", "--table"}, "distance 0 is not positive", ":2:1", "a zero distance"},
	{"levels_infinite.csv", []string{"spectrum", "--theta", "0.3", "--eigenvalues"}, `"+Inf" is not a finite number`, ":5:1", "an infinite level"},
	{"levels_unit_field.csv", []string{"spectrum", "--theta", "0.3", "--eigenvalues"}, `"3.75GHz" is not a number`, ":5:1", "a unit glued to a level"},
	{"onsite_nan.txt", []string{"spectrum", "--design", specPath("lattice.json"), "--onsite-file"}, `"NaN" is not a finite number`, ":4:1", "NaN among on-site terms"},
}

func specPath(name string) string { return filepath.Join("..", "..", "testdata", "spectrum", name) }

func badPath(name string) string { return filepath.Join("..", "..", "testdata", "bad", name) }

// checkRefusal runs args and asserts a refusal: status 2, nothing on
// stdout, exactly one line on stderr that names the file (with its
// location when there is one) and holds the expected fragment; and, when
// out is not "", that no file was left there.
func checkRefusal(t *testing.T, args []string, stdin io.Reader, file string, c badCase, out string) {
	t.Helper()
	var stdout, stderr bytes.Buffer
	code := run(args, stdin, &stdout, &stderr)
	if code != exitInput {
		t.Errorf("%v: status %d, want %d; stderr: %s", args, code, exitInput, stderr.String())
	}
	if stdout.Len() != 0 {
		t.Errorf("%v: stdout not empty: %.200q", args, stdout.String())
	}
	msg := stderr.String()
	if strings.Count(msg, "\n") != 1 || !strings.HasSuffix(msg, "\n") {
		t.Errorf("%v: want exactly one line on stderr, got %q", args, msg)
	}
	if !strings.Contains(msg, file+c.at+": ") {
		t.Errorf("%v: stderr %q does not name %q", args, msg, file+c.at)
	}
	if !strings.Contains(msg, c.want) {
		t.Errorf("%v: stderr %q lacks %q", args, msg, c.want)
	}
	if out != "" {
		if _, err := os.Stat(out); !os.IsNotExist(err) {
			t.Errorf("%v: output file %s left behind (stat: %v)", args, out, err)
		}
	}
}

// plates are the 2D sets of the corpus: a chain's reader refuses them
// (embed), but analyze reads them as plates. The value is the refusal
// analyze gives, or "" when it reads the set as a plate with no average
// lattice, a disordered hull.
var plates = map[string]string{
	"lattice_strip_2d.csv":    "the sites span 40×3 lattice steps, need at least 4 along each",
	"centroids_scattered.csv": "",
}

// checkPlate runs analyze on a 2D set of the corpus: a refusal holding
// want, or, for want "", a disordered plate with no lattice.
func checkPlate(t *testing.T, file, want string) {
	t.Helper()
	if want != "" {
		checkRefusal(t, []string{"analyze", file}, nil, file, badCase{want: want}, "")
		return
	}
	code, out, stderr := runCmd("analyze", file)
	if code != exitOK || !strings.Contains(out, "sites on a plane") || !strings.Contains(out, "hull        disordered") || !strings.Contains(out, "no average lattice") {
		t.Errorf("analyze %s: exit %d, stderr %q, stdout:\n%s", file, code, stderr, out)
	}
}

// TestBadInputs runs every pattern file of the corpus through analyze,
// and through embed --out, which must leave no output file; every design
// spec through generate --spec --out; every other file through the
// command and flag that read it.
func TestBadInputs(t *testing.T) {
	if n := len(badInputs) + len(badSpecs); n < 30 {
		t.Fatalf("corpus has %d cases, want at least 30", n)
	}
	listed := map[string]bool{}
	for _, c := range badInputs {
		listed[c.file] = true
		t.Run(c.file, func(t *testing.T) {
			file := badPath(c.file)
			if want, ok := plates[c.file]; ok {
				checkPlate(t, file, want)
			} else {
				checkRefusal(t, append(append([]string{"analyze"}, c.flags...), file), nil, file, c, "")
			}
			out := filepath.Join(t.TempDir(), "vectors.csv")
			checkRefusal(t, append(append([]string{"embed"}, c.flags...), file, "--out", out), nil, file, c, out)
		})
	}
	for _, c := range badSpecs {
		listed[c.file] = true
		t.Run(c.file, func(t *testing.T) {
			file := badPath(c.file)
			out := filepath.Join(t.TempDir(), "design.csv")
			checkRefusal(t, []string{"generate", "--spec", file, "--out", out}, nil, file, c, out)
		})
	}
	for _, c := range badNumbers {
		listed[c.file] = true
		t.Run(c.file, func(t *testing.T) {
			file := badPath(c.file)
			args, out := append(slices.Clone(c.flags), file), ""
			if args[0] == "spectrum" {
				out = filepath.Join(t.TempDir(), "levels.csv")
				args = append(args, "--out", out)
			}
			checkRefusal(t, args, nil, file, c, out)
		})
	}
	// Every file in the folder is in a table, so none is left unchecked.
	files, err := os.ReadDir(filepath.Join("..", "..", "testdata", "bad"))
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range files {
		if !listed[f.Name()] {
			t.Errorf("testdata/bad/%s is not in the table", f.Name())
		}
	}
}

// TestBadLongLine: a single 10 MB line, generated here rather than
// committed, is refused at line 1 without being read whole.
func TestBadLongLine(t *testing.T) {
	file := filepath.Join(t.TempDir(), "long.csv")
	if err := os.WriteFile(file, append(bytes.Repeat([]byte("1"), 10<<20), '\n'), 0o644); err != nil {
		t.Fatal(err)
	}
	c := badCase{want: "line is longer than 1048576 bytes", at: ":1"}
	checkRefusal(t, []string{"analyze", file}, nil, file, c, "")
}

// TestBadStdinBeyondLimits streams inputs past the reader's limits on
// standard input: JSON beyond pattern.MaxJSONBytes and a column beyond
// pattern.MaxSites. They hold hundreds of MB in memory, so they run only
// when PHASONHULL_BIG_TESTS is set.
func TestBadStdinBeyondLimits(t *testing.T) {
	if os.Getenv("PHASONHULL_BIG_TESTS") == "" {
		t.Skip("set PHASONHULL_BIG_TESTS=1 to stream inputs past MaxJSONBytes and MaxSites")
	}
	t.Run("json", func(t *testing.T) {
		// '{"positions":[0,0,0,...' with no end, just past the limit.
		body := io.LimitReader(repeatReader("0,"), pattern.MaxJSONBytes)
		in := io.MultiReader(strings.NewReader(`{"positions":[`), body)
		c := badCase{want: "is larger than 536870912 bytes, the limit for JSON input"}
		checkRefusal(t, []string{"analyze", "-"}, in, "<stdin>", c, "")
	})
	t.Run("sites", func(t *testing.T) {
		in := io.LimitReader(&countingReader{}, 1<<40)
		c := badCase{want: "more than 10000000 sites", at: ":10000001"}
		checkRefusal(t, []string{"analyze", "-"}, in, "<stdin>", c, "")
	})
}

// repeatReader returns s over and over.
func repeatReader(s string) io.Reader {
	return &cycle{s: s}
}

type cycle struct {
	s   string
	off int
}

func (c *cycle) Read(p []byte) (int, error) {
	n := 0
	for n < len(p) {
		k := copy(p[n:], c.s[c.off:])
		n += k
		c.off = (c.off + k) % len(c.s)
	}
	return n, nil
}

// countingReader writes the lines 0, 1, 2, ... without end.
type countingReader struct {
	i   int
	buf []byte
}

func (c *countingReader) Read(p []byte) (int, error) {
	for len(c.buf) < len(p) {
		c.buf = strconv.AppendInt(c.buf, int64(c.i), 10)
		c.buf = append(c.buf, '\n')
		c.i++
	}
	n := copy(p, c.buf)
	c.buf = c.buf[:copy(c.buf, c.buf[n:])]
	return n, nil
}
