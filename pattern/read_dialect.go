package pattern

import (
	"fmt"
	"strings"
	"unicode"
	"unicode/utf8"
)

// This file reads the spreadsheet dialects of a numeric text input: how a
// line splits into fields and how a field's number is written. Each
// dialect is accepted when the file says it unambiguously, and refused at
// the line and field where it stops being unambiguous:
//
//   - a first line "sep=;" (or "sep=,", "sep=|", "sep=" and a tab) fixes
//     the separator of every line;
//   - without it, a line is split at semicolons when it has one (outside
//     quotes), else at commas, else at runs of white space;
//   - fields may be enclosed in double quotes, a doubled quote standing
//     for one inside them; separators inside quotes do not split;
//   - a separator at the end of every line (as spreadsheets write "1.23;")
//     is dropped; the first line says whether the file does this, and a
//     line that differs is refused (a missing value?);
//   - a decimal comma ("0,25") is read when ReadOptions.DecimalComma asks
//     for it, or when the fields of a semicolon- or tab-separated line
//     hold numbers with a comma inside; a file that mixes "0.25" and
//     "0,25" is refused.

// dialect is what a read has learnt of its input's layout so far.
type dialect struct {
	sep          byte // the separator fixed by a "sep=" line; 0 when none
	lineSep      byte // the separator the last line was split at; 0 for white space
	comma        bool // ',' is the decimal mark
	commaLine    int  // the line that showed it; 0 when the caller said so
	commaSplit   int  // first line split at commas; 0 when none
	dotLine      int  // first line with a number written with '.'; 0 when none
	trailing     int  // +1: every line ends with a separator; -1: none does; 0: unknown yet
	trailingLine int  // the line that set trailing
}

// sepLine reads an Excel "sep=X" first line.
func sepLine(s string) (sep byte, ok bool, err error) {
	s = unquote(strings.TrimSpace(s))
	if len(s) < 4 || !strings.EqualFold(s[:4], "sep=") {
		return 0, false, nil
	}
	switch v := s[4:]; v {
	case ";", ",", "|", "\t":
		return v[0], true, nil
	case "":
		if strings.Contains(s, "\t") {
			return '\t', true, nil
		}
	}
	return 0, false, fmt.Errorf("a \"sep=\" line names %q; the separators read are ';', ',', '|' and tab", s[4:])
}

// split splits one data line (comments stripped, trimmed, not empty) into
// fields appended to buf[:0], following and updating the dialect.
func (rd *reader) split(s string, line int, buf []string) ([]string, error) {
	d := &rd.dia
	sep := d.sep
	if sep == 0 {
		switch {
		case indexUnquoted(s, ';') >= 0:
			sep = ';'
		case !d.comma && indexUnquoted(s, ',') >= 0 && !tabDecimal(s):
			sep = ','
		case strings.IndexByte(s, '\t') >= 0 && (d.comma || tabDecimal(s)):
			sep = '\t'
		}
	}
	fields, col, err := splitQuoted(s, sep, buf)
	if err != nil {
		return nil, rd.wrap(line, col, err)
	}
	d.lineSep = sep
	if sep == ',' && d.commaSplit == 0 {
		d.commaSplit = line
	}

	// A separator at the end of the line: the first line decides whether
	// the file ends every line with one.
	ends := sep != 0 && sep != ' ' && len(fields) > 1 && fields[len(fields)-1] == "" && !strings.HasSuffix(s, `""`)
	if d.trailing == 0 {
		d.trailing, d.trailingLine = -1, line
		if ends {
			d.trailing = 1
		}
	}
	switch {
	case ends && d.trailing > 0:
		fields = fields[:len(fields)-1]
	case ends:
		return nil, rd.errorf(line, len(fields), "empty last field: the line ends with %s but line %d does not (a missing value?)", sepName(sep), d.trailingLine)
	case d.trailing > 0:
		return nil, rd.errorf(line, 0, "the line does not end with a separator as line %d does (a missing value?)", d.trailingLine)
	}
	for i, f := range fields {
		if f == "" {
			return nil, rd.errorf(line, i+1, "empty field (two separators in a row?)")
		}
	}

	// Numbers with a comma inside, in fields split at something else: a
	// decimal comma.
	if !d.comma && sep != ',' && d.commaSplit == 0 && (sep == ';' || sep == '\t') {
		for i, f := range fields {
			if isDecimalComma(f) {
				if d.dotLine > 0 {
					return nil, rd.errorf(line, i+1, "%q has a decimal comma but line %d writes numbers with a decimal point; use one decimal mark throughout", f, d.dotLine)
				}
				d.comma, d.commaLine = true, line
				break
			}
		}
	}
	return fields, nil
}

// sepName names a separator for a message.
func sepName(sep byte) string {
	if sep == '\t' {
		return "a tab"
	}
	return fmt.Sprintf("%q", string(sep))
}

// number reads one field as a number in the dialect of the file: with a
// decimal comma or a decimal point, never both.
func (rd *reader) number(f string, line int) (float64, error) {
	d := &rd.dia
	if d.comma {
		if strings.IndexByte(f, '.') >= 0 {
			return 0, fmt.Errorf("%q has a decimal point but %s ',' is the decimal mark; use one decimal mark throughout (digit grouping is not read)", f, d.commaSource())
		}
		if strings.Count(f, ",") > 1 {
			return 0, fmt.Errorf("%q has more than one decimal comma", f)
		}
		v, err := parseNumber(strings.Replace(f, ",", ".", 1))
		if err != nil {
			return 0, fmt.Errorf("%q is not a number", f)
		}
		return v, nil
	}
	v, err := parseNumber(f)
	if err != nil {
		if strings.IndexByte(f, ',') >= 0 && isDecimalComma(f) {
			return 0, fmt.Errorf("%w; if ',' is the decimal mark, pass --decimal-comma", err)
		}
		return 0, err
	}
	if d.dotLine == 0 && strings.IndexByte(f, '.') >= 0 {
		d.dotLine = line
	}
	return v, nil
}

// commaSource says why the decimal mark is a comma, for a message.
func (d *dialect) commaSource() string {
	if d.commaLine == 0 {
		return "with --decimal-comma"
	}
	return fmt.Sprintf("from line %d on", d.commaLine)
}

// isDecimalComma reports whether f is a number written with a decimal
// comma: digits, one comma, digits, and an optional exponent.
func isDecimalComma(f string) bool {
	i := 0
	if i < len(f) && (f[i] == '+' || f[i] == '-') {
		i++
	}
	a := i
	for i < len(f) && '0' <= f[i] && f[i] <= '9' {
		i++
	}
	if i == a || i == len(f) || f[i] != ',' {
		return false
	}
	i++
	b := i
	for i < len(f) && '0' <= f[i] && f[i] <= '9' {
		i++
	}
	if i == b {
		return false
	}
	if i < len(f) && (f[i] == 'e' || f[i] == 'E') {
		i++
		if i < len(f) && (f[i] == '+' || f[i] == '-') {
			i++
		}
		c := i
		for i < len(f) && '0' <= f[i] && f[i] <= '9' {
			i++
		}
		if i == c {
			return false
		}
	}
	return i == len(f)
}

// tabDecimal reports whether s is a tab-separated line of at least two
// fields one of which is a number with a decimal comma.
func tabDecimal(s string) bool {
	if strings.IndexByte(s, '\t') < 0 {
		return false
	}
	parts := strings.Split(s, "\t")
	found := false
	for _, p := range parts {
		p = unquote(strings.TrimSpace(p))
		if strings.IndexByte(p, ',') >= 0 {
			if !isDecimalComma(p) {
				return false
			}
			found = true
		}
	}
	return found && len(parts) > 1
}

// indexUnquoted returns the index of the first c in s outside double
// quotes, or -1.
func indexUnquoted(s string, c byte) int {
	if strings.IndexByte(s, '"') < 0 {
		return strings.IndexByte(s, c)
	}
	in := false
	for i := 0; i < len(s); i++ {
		switch s[i] {
		case '"':
			in = !in
		case c:
			if !in {
				return i
			}
		}
	}
	return -1
}

// splitQuoted splits s at sep (0: at runs of white space) outside double
// quotes. Fields are trimmed of white space; a field enclosed in quotes
// loses them and the white space inside them, and a doubled quote inside
// stands for one. An empty field stays in the result as "". An error
// names the 1-based field number col where it arose.
func splitQuoted(s string, sep byte, buf []string) (fields []string, col int, err error) {
	fields = buf[:0]
	if strings.IndexByte(s, '"') < 0 {
		switch {
		case sep != 0:
			for {
				i := strings.IndexByte(s, sep)
				if i < 0 {
					return append(fields, strings.TrimSpace(s)), 0, nil
				}
				fields = append(fields, strings.TrimSpace(s[:i]))
				s = s[i+1:]
			}
		case !mayHoldSpace(s):
			return append(fields, s), 0, nil // the common one-number line
		default:
			return append(fields, strings.Fields(s)...), 0, nil
		}
	}
	var b strings.Builder
	for s != "" || col == 0 {
		col++
		s = strings.TrimLeftFunc(s, unicode.IsSpace)
		var f string
		if strings.HasPrefix(s, `"`) {
			b.Reset()
			i, closed := 1, false
			for i < len(s) {
				if s[i] == '"' {
					if i+1 < len(s) && s[i+1] == '"' {
						b.WriteByte('"')
						i += 2
						continue
					}
					closed = true
					i++
					break
				}
				b.WriteByte(s[i])
				i++
			}
			if !closed {
				return nil, col, fmt.Errorf("the quote that opens field %d is not closed", col)
			}
			f = strings.TrimSpace(b.String())
			s = strings.TrimLeftFunc(s[i:], unicode.IsSpace)
			switch {
			case s == "":
			case sep != 0 && s[0] == sep:
				s = s[1:]
				if s == "" {
					fields = append(fields, f)
					f = ""
				}
			case sep == 0:
			default:
				r, _ := utf8.DecodeRuneInString(s)
				return nil, col, fmt.Errorf("%q follows the closing quote of field %d; a quoted field ends at its quote", r, col)
			}
		} else {
			var i int
			if sep != 0 {
				i = indexUnquoted(s, sep)
			} else {
				i = strings.IndexFunc(s, unicode.IsSpace)
			}
			if i < 0 {
				f, s = strings.TrimSpace(s), ""
			} else {
				f, s = strings.TrimSpace(s[:i]), s[i:]
				if sep != 0 {
					s = s[1:]
					if s == "" {
						fields = append(fields, f)
						f = ""
					}
				}
			}
			if strings.IndexByte(f, '"') >= 0 {
				return nil, col, fmt.Errorf("%q has a quote inside it; quote the whole field", f)
			}
		}
		fields = append(fields, f)
	}
	return fields, 0, nil
}
