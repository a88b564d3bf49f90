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

// table is the numeric content of a column file: the columns kept, in the
// order they were asked for (all of them unless ReadOptions.Columns picks
// some).
type table struct {
	cols       int
	vals       []float64 // row-major, cols values per row
	lines      []int     // input line of each row
	src        []int     // the 0-based column of the file each kept column came from
	header     []string  // the header's column names, every column; nil when there is no header
	headerLine int       // 0 when there is no header
	cellUnit   []string  // the unit written in every cell of each kept column, "" if none
	bare       bool      // every number read is a bare whole number (digits and a sign)
}

func (t *table) rows() int { return len(t.lines) }

// name names column k of the file for a message: its number and, when
// there is a header, its name.
func (t *table) name(k int) string {
	if t.header != nil {
		return fmt.Sprintf("column %d (%q)", k+1, t.header[k])
	}
	return fmt.Sprintf("column %d", k+1)
}

// readColumns reads numeric columns and builds the chain or plane that
// format asks for (FormatAuto chooses by the number of columns kept).
func (rd *reader) readColumns(br *bufio.Reader, format Format) (Sites, error) {
	t, err := rd.readTable(br, tableRules{
		header:  true,
		noun:    "sites",
		pick:    rd.opt.Columns,
		pattern: true,
	})
	if err != nil {
		return Sites{}, err
	}
	var notes []string
	if rd.opt.Columns == nil {
		if notes, err = rd.dropIndexColumns(t); err != nil {
			return Sites{}, err
		}
	} else {
		names := make([]string, t.cols)
		for j, k := range t.src {
			names[j] = t.name(k)
		}
		notes = append(notes, fmt.Sprintf("read %s, as asked", strings.Join(names, ", ")))
	}
	if err := rd.checkColumns(t.cols, format, t.lines[0]); err != nil {
		return Sites{}, err
	}
	unit, err := rd.tableUnit(t)
	if err != nil {
		return Sites{}, err
	}
	switch {
	case format == FormatSpacings:
		return chain(rd.fromSpacings(t.vals, func(i int) (int, int) { return t.lines[i], t.src[0] + 1 }, unit, notes))
	case t.cols == 1:
		return chain(rd.finish(t.vals, t.lines, unit, notes))
	default:
		return rd.fromPoints(t.vals, t.cols, t.lines, unit, notes)
	}
}

// dropIndexColumns leaves out of t every column that holds consecutive
// whole numbers with step exactly +1 (a site number 1…N or 0…N−1): it is
// an index, not a coordinate. A column is kept all the same when the
// header names it x, y or z, or when no column that varies would be left.
// It returns one note for each column left out.
//
// A table without a header whose rows are two bare whole numbers split
// at a comma is refused when its first column counts 0, 1, 2, …: it may
// as well be one column of numbers with a decimal comma.
func (rd *reader) dropIndexColumns(t *table) ([]string, error) {
	n := t.rows()
	if t.cols < 2 || n < 2 {
		return nil, nil
	}
	index := make([]bool, t.cols)
	some, varied := false, false
	for j := range t.cols {
		first := t.vals[j]
		isIndex := first == math.Trunc(first)
		constant := true
		for i := 1; i < n; i++ {
			v := t.vals[i*t.cols+j]
			isIndex = isIndex && v == first+float64(i)
			constant = constant && v == first
		}
		if isIndex && t.header != nil {
			switch axisName(t.header[t.src[j]]) {
			case "x", "y", "z":
				isIndex = false
			}
		}
		index[j] = isIndex
		some = some || isIndex
		varied = varied || (!isIndex && !constant)
	}
	if index[0] && t.header == nil && t.cols == 2 && t.bare && rd.dia.commaSplit > 0 {
		return nil, rd.errorf(t.lines[0], 0, "every row is two whole numbers split at a comma, the first counting up by 1: "+
			"if ',' is the decimal mark, pass --decimal-comma; if it separates columns, pass --columns 1,2 (or --columns 2 for the second alone)")
	}
	if !some || !varied {
		return nil, nil
	}
	var notes []string
	keep := 0
	for j := range t.cols {
		if index[j] {
			k := t.src[j]
			notes = append(notes, fmt.Sprintf("%s holds the consecutive whole numbers %g…%g: it was read as a site index, not a coordinate, and left out (--columns chooses the columns to read)",
				t.name(k), t.vals[j], t.vals[(n-1)*t.cols+j]))
			continue
		}
		t.src[keep], t.cellUnit[keep] = t.src[j], t.cellUnit[j]
		keep++
	}
	vals := t.vals[:0]
	for i := range n {
		for j := range t.cols {
			if !index[j] {
				vals = append(vals, t.vals[i*t.cols+j])
			}
		}
	}
	t.vals, t.cols, t.src, t.cellUnit = vals, keep, t.src[:keep], t.cellUnit[:keep]
	return notes, nil
}

// axisName is a column name without its unit, in lower case: "X [mm]",
// "x_mm" and "x" all give "x".
func axisName(h string) string {
	name := strings.ToLower(withoutUnit(h))
	if i := strings.LastIndexByte(name, '_'); i > 0 && unitOf(name) != "" {
		name = name[:i]
	}
	return name
}

// tableUnit returns the unit of the kept columns: the one their header
// names, or the one written in their cells. Columns that name a unit must
// name the same one, in the header and in the cells alike.
func (rd *reader) tableUnit(t *table) (string, error) {
	unit, from := "", 0
	if t.header != nil {
		for _, k := range t.src {
			u := unitOf(t.header[k])
			if u == "" {
				continue
			}
			if unit != "" && u != unit {
				return "", rd.errorf(t.headerLine, k+1, "column %d has unit %q but column %d has %q", k+1, u, from, unit)
			}
			unit, from = u, k+1
		}
	}
	for j, u := range t.cellUnit {
		k := t.src[j]
		switch {
		case u == "":
		case unit == "":
			unit, from = u, k+1
		case u != unit && from > 0 && t.header != nil && unitOf(t.header[from-1]) != "":
			return "", rd.errorf(t.lines[0], k+1, "the cells of column %d are in %s but the header names %q for column %d", k+1, u, unit, from)
		case u != unit:
			return "", rd.errorf(t.lines[0], k+1, "the cells of column %d are in %s but those of column %d are in %s", k+1, u, from, unit)
		}
	}
	return unit, nil
}

// tableRules says what a numeric table may hold.
type tableRules struct {
	columns func(n, line int) error // refuses a column count; nil takes any
	header  bool                    // a first row of column names is allowed
	noun    string                  // what the rows are, for the limit's message
	// pick chooses the columns to keep, by header name or 1-based number
	// (see ReadOptions.Columns); nil keeps them all.
	pick []string
	// pattern allows what only a pattern's table may hold: a unit written
	// in every cell of a column, and text columns refused with a hint to
	// choose the columns.
	pattern bool
}

// dataLines calls row with the fields of every line of the input that
// holds data: comments are stripped, blank lines skipped, a "sep=" first
// line read, and the line split in the file's dialect (see split). The
// fields are reused between calls.
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
		if lr.line == 1 {
			sep, ok, err := sepLine(text)
			if err != nil {
				return rd.wrap(1, 1, err)
			}
			if ok {
				if sep == ',' && rd.dia.comma {
					return rd.errorf(1, 1, "\"sep=,\" makes ',' the separator, but --decimal-comma makes it the decimal mark")
				}
				rd.dia.sep = sep
				continue
			}
		}
		text = strings.TrimSpace(stripComment(text))
		if text == "" {
			continue
		}
		fields, err := rd.split(text, lr.line, buf)
		if err != nil {
			return err
		}
		buf = fields
		if err := row(lr.line, fields); err != nil {
			return err
		}
	}
}

// readTable reads the rows of a column file, checking the header, the
// column count and every number of the columns it keeps.
func (rd *reader) readTable(br *bufio.Reader, rules tableRules) (*table, error) {
	t := &table{bare: true}
	nfields := 0 // fields on every row
	err := rd.dataLines(br, func(line int, fields []string) error {
		if rules.pattern && rd.dia.lineSep == 0 {
			fields = joinCellUnits(fields)
		}
		if rules.header && t.headerLine == 0 && t.rows() == 0 && isHeader(joinUnits(fields)) {
			t.headerLine, t.header = line, slices.Clone(joinUnits(fields))
			return nil
		}
		if nfields == 0 {
			if rules.columns != nil {
				if err := rules.columns(len(fields), line); err != nil {
					return err
				}
			}
			if rules.pattern && rules.pick == nil && rd.opt.Format == FormatCentroids && len(fields) == 1 {
				return rd.checkColumns(1, FormatCentroids, line)
			}
			if t.header != nil && len(t.header) != len(fields) {
				return rd.errorf(line, 0, "the header (line %d) names %d columns but the first data row has %d", t.headerLine, len(t.header), len(fields))
			}
			nfields = len(fields)
			src, err := rd.pickColumns(rules.pick, t, nfields, line)
			if err != nil {
				return err
			}
			t.src, t.cols = src, len(src)
			t.cellUnit = make([]string, t.cols)
		} else if len(fields) != nfields {
			msg := fmt.Sprintf("expected %d columns like the first data row (line %d), got %d", nfields, t.lines[0], len(fields))
			if rules.pattern && rd.dia.lineSep == ',' && nfields == 1 {
				msg += "; if ',' is a decimal mark here, pass --decimal-comma"
			}
			return rd.errorf(line, 0, "%s", msg)
		}
		if t.rows() >= rd.lim.sites {
			return rd.errorf(line, 0, "more than %d %s; inputs are limited to %d", rd.lim.sites, rules.noun, rd.lim.sites)
		}
		for j, k := range t.src {
			f := fields[k]
			v, unit, err := rd.cell(f, line, rules.pattern)
			if err != nil {
				if rules.pattern && rules.pick == nil && nfields > 1 && isText(f) {
					err = fmt.Errorf("%w: %s holds text, not coordinates; choose the columns to read with --columns%s", err, t.name(k), columnsExample(t, fields, k))
				}
				return rd.wrap(line, k+1, err)
			}
			switch {
			case t.rows() == 0:
				t.cellUnit[j] = unit
			case unit != t.cellUnit[j] && t.cellUnit[j] == "":
				return rd.errorf(line, k+1, "%q is in %s but the cells of %s on line %d have no unit; write the unit in every cell or in the header", f, unit, t.name(k), t.lines[0])
			case unit != t.cellUnit[j] && unit == "":
				return rd.errorf(line, k+1, "%q has no unit but the cells of %s on line %d are in %s; write the unit in every cell or in the header", f, t.name(k), t.lines[0], t.cellUnit[j])
			case unit != t.cellUnit[j]:
				return rd.errorf(line, k+1, "%q is in %s but the cells of %s on line %d are in %s; use one unit throughout", f, unit, t.name(k), t.lines[0], t.cellUnit[j])
			}
			t.bare = t.bare && isBare(f)
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

// pickColumns resolves the columns to keep (see ReadOptions.Columns) on
// the first data row, of n fields: nil keeps them all.
func (rd *reader) pickColumns(pick []string, t *table, n, line int) ([]int, error) {
	if pick == nil {
		src := make([]int, n)
		for k := range src {
			src[k] = k
		}
		return src, nil
	}
	src := make([]int, 0, len(pick))
	for _, c := range pick {
		k, err := columnIndex(c, t.header, n)
		if err != nil {
			at := line
			if t.header != nil {
				at = t.headerLine
			}
			return nil, rd.errorf(at, 0, "--columns %s: %v", c, err)
		}
		if slices.Contains(src, k) {
			return nil, rd.errorf(line, 0, "--columns %s: column %d is chosen twice", c, k+1)
		}
		src = append(src, k)
	}
	return src, nil
}

// columnIndex finds one column of --columns: a 1-based number, or a name
// of the header, matched exactly, else ignoring case, else ignoring case
// and the unit.
func columnIndex(c string, header []string, n int) (int, error) {
	if k, err := strconv.Atoi(c); err == nil {
		if k < 1 || k > n {
			return 0, fmt.Errorf("there is no column %d; the rows have %d", k, n)
		}
		return k - 1, nil
	}
	if header == nil {
		return 0, fmt.Errorf("the file has no header row to name its columns; give their numbers, from 1")
	}
	for _, same := range []func(a, b string) bool{
		func(a, b string) bool { return a == b },
		strings.EqualFold,
		func(a, b string) bool { return strings.EqualFold(withoutUnit(a), withoutUnit(b)) },
	} {
		found := -1
		for k, h := range header {
			if same(h, c) {
				if found >= 0 {
					return 0, fmt.Errorf("columns %d and %d are both named so; give the number of the one to read", found+1, k+1)
				}
				found = k
			}
		}
		if found >= 0 {
			return found, nil
		}
	}
	return 0, fmt.Errorf("no column is named so; the header names %s", quoteAll(header))
}

// bareName returns the name of column k of header without its unit, when
// it names that column alone and needs no quoting on a command line; ""
// otherwise.
func bareName(header []string, k int) string {
	if header == nil {
		return ""
	}
	name := withoutUnit(header[k])
	if name == "" || strings.ContainsAny(name, ", \t\"'") {
		return ""
	}
	for j, h := range header {
		if j != k && strings.EqualFold(withoutUnit(h), name) {
			return ""
		}
	}
	return name
}

// withoutUnit is a column name without its unit: "Position [mm]" → "Position".
func withoutUnit(s string) string {
	if i := strings.IndexAny(s, "[("); i > 0 {
		s = s[:i]
	}
	return strings.TrimSpace(s)
}

func quoteAll(names []string) string {
	q := make([]string, len(names))
	for i, s := range names {
		q[i] = strconv.Quote(s)
	}
	return strings.Join(q, ", ")
}

// columnsExample suggests a --columns value for a row whose column bad
// holds text: the other columns that hold numbers, by name without unit
// when that names one column, else by number.
func columnsExample(t *table, fields []string, bad int) string {
	var pick []string
	for k, f := range fields {
		if k == bad {
			continue
		}
		if _, err := parseNumber(f); err != nil {
			continue
		}
		if name := bareName(t.header, k); name != "" {
			pick = append(pick, name)
		} else {
			pick = append(pick, strconv.Itoa(k+1))
		}
	}
	if len(pick) == 0 || len(pick) > 3 {
		return ""
	}
	return ", e.g. --columns " + strings.Join(pick, ",")
}

// isText reports whether f is a word rather than a malformed number: it
// starts with a letter and does not read as NaN or an infinity.
func isText(f string) bool {
	r, _ := utf8.DecodeRuneInString(f)
	if !unicode.IsLetter(r) {
		return false
	}
	switch strings.ToLower(f) {
	case "nan", "inf", "infinity":
		return false
	}
	return true
}

// isBare reports whether f is a whole number written with digits and an
// optional sign only.
func isBare(f string) bool {
	f = strings.TrimLeft(f, "+-")
	if f == "" {
		return false
	}
	for i := 0; i < len(f); i++ {
		if f[i] < '0' || f[i] > '9' {
			return false
		}
	}
	return true
}

// cellUnits are the length units a cell may carry after its number.
var cellUnits = []string{"pm", "nm", "um", "µm", "μm", "mm", "cm", "m", "km", "in", "mil", "px"}

// cell reads one field as a number in the file's dialect; withUnit lets it
// carry a length unit after the number ("0.25 mm", "0.25mm"), which is
// returned normalised.
func (rd *reader) cell(f string, line int, withUnit bool) (float64, string, error) {
	v, err := rd.number(f, line)
	if err == nil || !withUnit {
		return v, "", err
	}
	for _, u := range cellUnits {
		num, ok := strings.CutSuffix(f, u)
		if !ok || num == "" {
			continue
		}
		num = strings.TrimSpace(num)
		if c := num[len(num)-1]; !('0' <= c && c <= '9' || c == '.' || c == ',') {
			continue // "2 pm" is not "2 p" in metres
		}
		v, nerr := rd.number(num, line)
		if nerr != nil {
			return 0, "", nerr
		}
		return v, normalizeUnit(u), nil
	}
	return 0, "", err
}

// joinCellUnits rejoins a unit to the number before it, for rows split at
// white space: "0.25 mm" is one cell.
func joinCellUnits(fields []string) []string {
	out := fields[:0]
	for _, f := range fields {
		if len(out) > 0 && slices.Contains(cellUnits, f) {
			prev := out[len(out)-1]
			if c := prev[len(prev)-1]; '0' <= c && c <= '9' || c == '.' {
				out[len(out)-1] = prev + " " + f
				continue
			}
		}
		out = append(out, f)
	}
	return out
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
func (rd *reader) fromSpacings(spacings []float64, at func(i int) (line, col int), unit string, notes []string) (*Pattern, error) {
	positions := make([]float64, len(spacings)+1)
	for i, d := range spacings {
		if !(d > 0) {
			line, col := at(i)
			return nil, rd.errorf(line, col, "spacing %v is not positive", d)
		}
		positions[i+1] = positions[i] + d
	}
	note := fmt.Sprintf("positions are the cumulative sums of %d spacings, starting at 0", len(spacings))
	return rd.finish(positions, nil, unit, append(notes, note))
}
