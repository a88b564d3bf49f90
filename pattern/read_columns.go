package pattern

import (
	"bufio"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"
)

// table is the numeric content of a column file.
type table struct {
	cols       int
	vals       []float64 // row-major, cols values per row
	lines      []int     // input line of each row
	unit       string    // unit found in the header, "" if none
	headerLine int       // 0 when there is no header
}

func (t *table) rows() int { return len(t.lines) }

// readColumns reads numeric columns and builds the Pattern that format
// asks for (FormatAuto chooses by the number of columns).
func (rd *reader) readColumns(br *bufio.Reader, format Format) (*Pattern, error) {
	t, err := rd.readTable(br, tableRules{
		columns: func(n, line int) error { return rd.checkColumns(n, format, line) },
		header:  true,
		noun:    "sites",
	})
	if err != nil {
		return nil, err
	}
	switch {
	case format == FormatSpacings:
		return rd.fromSpacings(t.vals, func(i int) (int, int) { return t.lines[i], 1 }, t.unit)
	case t.cols == 1:
		return rd.finish(t.vals, t.lines, t.unit, nil)
	default:
		return rd.fromCentroids(t.vals, t.cols, t.lines, t.unit)
	}
}

// tableRules says what a numeric table may hold.
type tableRules struct {
	columns func(n, line int) error // refuses a column count; nil takes any
	header  bool                    // a first row of column names is allowed
	noun    string                  // what the rows are, for the limit's message
}

// dataLines calls row with the fields of every line of the input that
// holds data: comments are stripped, blank lines skipped, and an empty
// field is refused. The fields are reused between calls.
func (rd *reader) dataLines(br *bufio.Reader, row func(line int, fields []string) error) error {
	lr := &lineReader{rd: rd, br: br}
	var buf []string
	for {
		text, ok, err := lr.next()
		if err != nil {
			return err
		}
		if !ok {
			return nil
		}
		text = strings.TrimSpace(stripComment(text))
		if text == "" {
			continue
		}
		fields, col := splitFields(text, buf)
		buf = fields
		if col > 0 {
			return rd.errorf(lr.line, col, "empty field (two separators in a row?)")
		}
		if err := row(lr.line, fields); err != nil {
			return err
		}
	}
}

// readTable reads the rows of a column file, checking the header, the
// column count and every number.
func (rd *reader) readTable(br *bufio.Reader, rules tableRules) (*table, error) {
	t := &table{}
	var header []string
	err := rd.dataLines(br, func(line int, fields []string) error {
		if rules.header && t.headerLine == 0 && t.rows() == 0 && isHeader(joinUnits(fields)) {
			fields = joinUnits(fields)
			unit, err := rd.headerUnit(fields, line)
			if err != nil {
				return err
			}
			t.headerLine, t.unit, header = line, unit, slices.Clone(fields)
			return nil
		}
		if t.cols == 0 {
			if rules.columns != nil {
				if err := rules.columns(len(fields), line); err != nil {
					return err
				}
			}
			if header != nil && len(header) != len(fields) {
				return rd.errorf(line, 0, "the header (line %d) names %d columns but the first data row has %d", t.headerLine, len(header), len(fields))
			}
			t.cols = len(fields)
		} else if len(fields) != t.cols {
			return rd.errorf(line, 0, "expected %d columns like the first data row (line %d), got %d", t.cols, t.lines[0], len(fields))
		}
		if t.rows() >= rd.lim.sites {
			return rd.errorf(line, 0, "more than %d %s; inputs are limited to %d", rd.lim.sites, rules.noun, rd.lim.sites)
		}
		for j, f := range fields {
			v, err := parseNumber(f)
			if err != nil {
				return rd.wrap(line, j+1, err)
			}
			t.vals = append(t.vals, v)
		}
		t.lines = append(t.lines, line)
		return nil
	})
	if err != nil {
		return nil, err
	}
	if t.rows() == 0 {
		if t.headerLine > 0 {
			return nil, rd.errorf(t.headerLine, 0, "has a header row but no data rows")
		}
		return nil, rd.errorf(0, 0, "has no data rows")
	}
	return t, nil
}

// checkColumns refuses a column count that the format cannot take.
func (rd *reader) checkColumns(n int, format Format, line int) error {
	switch {
	case n > 3:
		return rd.errorf(line, 0, "has %d columns; expected 1 (positions) or 2 or 3 (x,y[,z] centroids)", n)
	case (format == FormatColumn || format == FormatSpacings) && n != 1:
		return rd.errorf(line, 0, "has %d columns; format %q expects 1", n, format)
	case format == FormatCentroids && n == 1:
		return rd.errorf(line, 0, "has 1 column; format %q expects 2 or 3 (x,y[,z])", format)
	}
	return nil
}

// splitFields splits a data line. A line with a semicolon is split at
// semicolons, else one with a comma at commas, else at runs of white space
// (tabs included). Fields are trimmed of spaces and of enclosing double
// quotes. col > 0 reports an empty field at that field number. The fields
// are appended to buf[:0].
func splitFields(s string, buf []string) (fields []string, col int) {
	fields = buf[:0]
	switch {
	case strings.IndexByte(s, ';') >= 0:
		fields = append(fields, strings.Split(s, ";")...)
	case strings.IndexByte(s, ',') >= 0:
		fields = append(fields, strings.Split(s, ",")...)
	case !mayHoldSpace(s):
		fields = append(fields, s) // the common one-number line; checked below like the rest
	default:
		fields = append(fields, strings.Fields(s)...)
	}
	for i, f := range fields {
		f = unquote(strings.TrimSpace(f))
		if f == "" {
			return nil, i + 1
		}
		fields[i] = f
	}
	return fields, 0
}

// mayHoldSpace reports whether s may contain white space: an ASCII space
// character or any non-ASCII byte (Unicode spaces are left to
// strings.Fields).
func mayHoldSpace(s string) bool {
	for i := 0; i < len(s); i++ {
		if c := s[i]; c == ' ' || c == '\t' || c == '\v' || c == '\f' || c >= utf8.RuneSelf {
			return true
		}
	}
	return false
}

// unquote removes enclosing double quotes and the spaces inside them.
func unquote(f string) string {
	if len(f) >= 2 && f[0] == '"' && f[len(f)-1] == '"' {
		return strings.TrimSpace(f[1 : len(f)-1])
	}
	return f
}

// joinUnits rejoins a unit in brackets or parentheses to the column name
// before it, for headers split at white space: "x [um]" is one name.
func joinUnits(fields []string) []string {
	var out []string
	for _, f := range fields {
		if len(out) > 0 && (f[0] == '[' || f[0] == '(') {
			out[len(out)-1] += " " + f
			continue
		}
		out = append(out, f)
	}
	return out
}

// isHeader reports whether a first row is a row of column names: every
// field starts with a letter and none reads as a number ("nan" and "inf"
// read as numbers, to be refused as such).
func isHeader(fields []string) bool {
	for _, f := range fields {
		r := []rune(f)[0]
		if !unicode.IsLetter(r) && r != '_' {
			return false
		}
		if _, err := strconv.ParseFloat(f, 64); err == nil {
			return false
		}
	}
	return true
}

// parseNumber reads one field as a finite decimal number, with an error
// that names the token. Only plain decimal notation is accepted: no hex
// floats, no digit separators.
func parseNumber(f string) (float64, error) {
	for i := 0; i < len(f); i++ {
		switch c := f[i]; {
		case '0' <= c && c <= '9', c == '.', c == '-', c == '+', c == 'e', c == 'E':
			continue
		}
		switch strings.ToLower(strings.TrimLeft(f, "+-")) {
		case "nan", "inf", "infinity":
			return 0, fmt.Errorf("%q is not a finite number", f)
		}
		if strings.ContainsRune(f, '\u2212') {
			return 0, fmt.Errorf("%q is not a number (it has a Unicode minus sign; write \"-\")", f)
		}
		return 0, fmt.Errorf("%q is not a number", f)
	}
	v, err := strconv.ParseFloat(f, 64)
	if err != nil {
		if math.IsInf(v, 0) {
			return 0, fmt.Errorf("%q overflows a float64 to infinity; positions must be finite", f)
		}
		return 0, fmt.Errorf("%q is not a number", f)
	}
	return v, nil
}

// headerUnit returns the unit named in a header row. All columns that name
// a unit must name the same one.
func (rd *reader) headerUnit(fields []string, line int) (string, error) {
	unit, from := "", 0
	for j, f := range fields {
		u := unitOf(f)
		if u == "" {
			continue
		}
		if unit != "" && u != unit {
			return "", rd.errorf(line, j+1, "column %d has unit %q but column %d has %q", j+1, u, from, unit)
		}
		unit, from = u, j+1
	}
	return unit, nil
}

// unitOf extracts a unit from a column name: the text in square brackets
// or parentheses ("x [um]", "pos (nm)"), or a known length unit after the
// last underscore ("position_mm"). The micro sign is spelled "u".
func unitOf(name string) string {
	for _, br := range [][2]string{{"[", "]"}, {"(", ")"}} {
		i := strings.LastIndex(name, br[0])
		j := strings.LastIndex(name, br[1])
		if i >= 0 && j > i {
			return normalizeUnit(strings.TrimSpace(name[i+1 : j]))
		}
	}
	if i := strings.LastIndexByte(name, '_'); i >= 0 {
		u := normalizeUnit(name[i+1:])
		switch u {
		case "pm", "nm", "um", "mm", "cm", "m", "km", "px", "in", "mil":
			return u
		}
	}
	return ""
}

// normalizeUnit spells micrometres "um" whichever micro sign was used.
func normalizeUnit(u string) string {
	switch u {
	case "µm", "μm", "micron", "microns", "micrometer", "micrometre":
		return "um"
	}
	return u
}

// fromSpacings builds positions as the cumulative sums, from 0, of
// spacings; at(i) is where spacing i was read.
func (rd *reader) fromSpacings(spacings []float64, at func(i int) (line, col int), unit string) (*Pattern, error) {
	positions := make([]float64, len(spacings)+1)
	for i, d := range spacings {
		if !(d > 0) {
			line, col := at(i)
			return nil, rd.errorf(line, col, "spacing %v is not positive", d)
		}
		positions[i+1] = positions[i] + d
	}
	note := fmt.Sprintf("positions are the cumulative sums of %d spacings, starting at 0", len(spacings))
	return rd.finish(positions, nil, unit, []string{note})
}
