package pattern

import (
	"bufio"
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"
	"unicode/utf8"
)

// jsonKeys are the top-level keys a JSON input may hold.
const jsonKeys = `"unit", "positions", "spacings" and "sites"`

// jsonReader walks a JSON document token by token, so that every refusal
// (an unknown key, a null, a string where a number belongs) can name the
// line and column where it sits.
type jsonReader struct {
	rd       *reader
	data     []byte
	dec      *json.Decoder
	newlines []int // byte offsets of the '\n's in data
}

// readJSON reads a JSON input of at most rd.lim.jsonBytes bytes.
func (rd *reader) readJSON(br *bufio.Reader) (Sites, error) {
	data, err := io.ReadAll(io.LimitReader(br, rd.lim.jsonBytes+1))
	if err != nil {
		return Sites{}, rd.errorf(0, 0, "reading: %w", err)
	}
	if int64(len(data)) > rd.lim.jsonBytes {
		return Sites{}, rd.errorf(0, 0, "is larger than %d bytes, the limit for JSON input", rd.lim.jsonBytes)
	}
	j := &jsonReader{rd: rd, data: data, dec: json.NewDecoder(bytes.NewReader(data))}
	j.dec.UseNumber()
	for i, c := range data {
		if c == '\n' {
			j.newlines = append(j.newlines, i)
		}
	}
	return j.document()
}

// at converts a byte offset into a 1-based line and character column.
func (j *jsonReader) at(off int) (line, col int) {
	off = min(max(off, 0), len(j.data))
	k := sort.SearchInts(j.newlines, off) // newlines before off
	start := 0
	if k > 0 {
		start = j.newlines[k-1] + 1
	}
	return k + 1, utf8.RuneCount(j.data[start:off]) + 1
}

func (j *jsonReader) errorf(off int, format string, args ...any) error {
	line, col := j.at(off)
	return j.rd.errorf(line, col, format, args...)
}

// next returns the next token and the byte offset where it starts.
func (j *jsonReader) next() (json.Token, int, error) {
	start := int(j.dec.InputOffset())
	// The decoder's offset sits after the previous token; skip the white
	// space and separators that lead to this one.
	for start < len(j.data) && strings.IndexByte(" \t\r\n,:", j.data[start]) >= 0 {
		start++
	}
	tok, err := j.dec.Token()
	if err != nil {
		var se *json.SyntaxError
		switch {
		case errors.As(err, &se):
			return nil, 0, j.errorf(int(se.Offset), "invalid JSON: %s", strings.TrimPrefix(se.Error(), "json: "))
		case err == io.EOF || errors.Is(err, io.ErrUnexpectedEOF):
			return nil, 0, j.errorf(len(j.data), "invalid JSON: unexpected end of input")
		default:
			return nil, 0, j.errorf(start, "invalid JSON: %v", err)
		}
	}
	return tok, start, nil
}

// expectDelim reads a token that must be the delimiter d.
func (j *jsonReader) expectDelim(d json.Delim, what string) (int, error) {
	tok, start, err := j.next()
	if err != nil {
		return 0, err
	}
	if tok != d {
		return 0, j.errorf(start, "%s must be %s, not %s", what, delimName(d), tokenName(tok))
	}
	return start, nil
}

func delimName(d json.Delim) string {
	if d == '[' {
		return "an array"
	}
	return "an object"
}

// tokenName describes a token for an error message.
func tokenName(tok json.Token) string {
	switch t := tok.(type) {
	case json.Delim:
		switch t {
		case '[':
			return "an array"
		case '{':
			return "an object"
		}
		return fmt.Sprintf("%q", string(t))
	case string:
		return fmt.Sprintf("the string %q", t)
	case json.Number:
		return "the number " + t.String()
	case bool:
		return strconv.FormatBool(t)
	case nil:
		return "null"
	}
	return fmt.Sprint(tok)
}

// number reads a token that must be a finite number.
func (j *jsonReader) number(what string) (float64, int, error) {
	tok, start, err := j.next()
	if err != nil {
		return 0, 0, err
	}
	n, ok := tok.(json.Number)
	if !ok {
		return 0, 0, j.errorf(start, "%s must be a number, not %s", what, tokenName(tok))
	}
	v, err := strconv.ParseFloat(n.String(), 64)
	if err != nil || math.IsInf(v, 0) {
		return 0, 0, j.errorf(start, "%s: %s overflows a float64 to infinity; positions must be finite", what, n)
	}
	return v, start, nil
}

// numbers reads an array of numbers and the line of each.
func (j *jsonReader) numbers(key string) (vals []float64, offs []int, err error) {
	if _, err := j.expectDelim('[', fmt.Sprintf("%q", key)); err != nil {
		return nil, nil, err
	}
	for j.dec.More() {
		if len(vals) >= j.rd.lim.sites {
			return nil, nil, j.errorf(int(j.dec.InputOffset()), "more than %d sites; inputs are limited to %d", j.rd.lim.sites, j.rd.lim.sites)
		}
		v, off, err := j.number(fmt.Sprintf("%s[%d]", key, len(vals)))
		if err != nil {
			return nil, nil, err
		}
		vals, offs = append(vals, v), append(offs, off)
	}
	_, _, err = j.next() // ']'
	return vals, offs, err
}

// sites reads an array of {"x":…, "y":…, "z":…} objects. Every site must
// have the same coordinates: x alone, x and y, or x, y and z.
func (j *jsonReader) sites() (vals []float64, offs []int, dim int, err error) {
	if _, err := j.expectDelim('[', `"sites"`); err != nil {
		return nil, nil, 0, err
	}
	for j.dec.More() {
		i := len(offs)
		if i >= j.rd.lim.sites {
			return nil, nil, 0, j.errorf(int(j.dec.InputOffset()), "more than %d sites; inputs are limited to %d", j.rd.lim.sites, j.rd.lim.sites)
		}
		start, err := j.expectDelim('{', fmt.Sprintf("sites[%d]", i))
		if err != nil {
			return nil, nil, 0, err
		}
		var xyz [3]float64
		var have [3]bool
		for j.dec.More() {
			tok, off, err := j.next()
			if err != nil {
				return nil, nil, 0, err
			}
			key, _ := tok.(string)
			k := strings.Index("xyz", key)
			if len(key) != 1 || k < 0 {
				return nil, nil, 0, j.errorf(off, "sites[%d]: unknown key %q (a site has \"x\" and optionally \"y\" and \"z\")", i, key)
			}
			if have[k] {
				return nil, nil, 0, j.errorf(off, "sites[%d]: key %q is given twice", i, key)
			}
			v, _, err := j.number(fmt.Sprintf("sites[%d].%s", i, key))
			if err != nil {
				return nil, nil, 0, err
			}
			xyz[k], have[k] = v, true
		}
		if _, _, err := j.next(); err != nil { // '}'
			return nil, nil, 0, err
		}
		d := 0
		for d < 3 && have[d] {
			d++
		}
		switch {
		case d == 0:
			return nil, nil, 0, j.errorf(start, "sites[%d] has no \"x\"", i)
		case d < 3 && have[2]:
			return nil, nil, 0, j.errorf(start, "sites[%d] has \"z\" but no \"y\"", i)
		case i == 0:
			dim = d
		case d != dim:
			return nil, nil, 0, j.errorf(start, "sites[%d] has %d coordinates but sites[0] has %d", i, d, dim)
		}
		vals = append(vals, xyz[:d]...)
		offs = append(offs, start)
	}
	_, _, err = j.next() // ']'
	return vals, offs, dim, err
}

// document reads the top-level object and builds the Pattern.
func (j *jsonReader) document() (Sites, error) {
	tok, start, err := j.next()
	if err != nil {
		return Sites{}, err
	}
	if tok != json.Delim('{') {
		return Sites{}, j.errorf(start, "the JSON must be an object with %s, not %s", jsonKeys, tokenName(tok))
	}
	var (
		unit string
		vals []float64
		offs []int
		dim  int
		kind string // the data key met
		keys = make(map[string]bool)
	)
	for j.dec.More() {
		tok, off, err := j.next()
		if err != nil {
			return Sites{}, err
		}
		key, _ := tok.(string)
		if keys[key] {
			return Sites{}, j.errorf(off, "key %q is given twice", key)
		}
		keys[key] = true
		switch key {
		case "unit":
			t, voff, err := j.next()
			if err != nil {
				return Sites{}, err
			}
			s, ok := t.(string)
			if !ok {
				return Sites{}, j.errorf(voff, `"unit" must be a string, not %s`, tokenName(t))
			}
			unit = normalizeUnit(strings.TrimSpace(s))
			continue
		case "positions", "spacings", "sites":
		default:
			return Sites{}, j.errorf(off, "unknown key %q (the keys are %s)", key, jsonKeys)
		}
		if kind != "" {
			return Sites{}, j.errorf(off, "%q and %q are both given; give only one of \"positions\", \"spacings\" and \"sites\"", kind, key)
		}
		switch key {
		case "positions", "spacings":
			vals, offs, err = j.numbers(key)
			dim = 1
		case "sites":
			vals, offs, dim, err = j.sites()
		}
		if err != nil {
			return Sites{}, err
		}
		kind = key
	}
	if _, _, err := j.next(); err != nil { // '}'
		return Sites{}, err
	}
	// Nothing but white space may follow the object.
	rest := bytes.TrimLeft(j.data[j.dec.InputOffset():], " \t\r\n")
	if len(rest) > 0 {
		return Sites{}, j.errorf(len(j.data)-len(rest), "unexpected content after the JSON object")
	}
	if kind == "" {
		return Sites{}, j.rd.errorf(0, 0, "the JSON object has none of \"positions\", \"spacings\" and \"sites\"")
	}
	lines := make([]int, len(offs))
	for i, off := range offs {
		lines[i], _ = j.at(off)
	}
	switch {
	case kind == "spacings":
		return chain(j.rd.fromSpacings(vals, func(i int) (int, int) { return j.at(offs[i]) }, unit, nil))
	case dim <= 1: // dim 0: an empty "sites" array, refused by finish as too few
		return chain(j.rd.finish(vals, lines, unit, nil))
	default:
		return j.rd.fromPoints(vals, dim, lines, unit, nil)
	}
}
