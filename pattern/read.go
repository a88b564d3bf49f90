package pattern

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"sort"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"
)

// Format names an input layout understood by Read.
type Format string

// The input formats. FormatAuto (or "") tells them apart by content, except
// FormatSpacings, which looks like a column of positions and must be asked
// for.
const (
	FormatAuto      Format = "auto"
	FormatColumn    Format = "column"    // one column of positions
	FormatCentroids Format = "centroids" // 2 or 3 columns x,y[,z]
	FormatSpacings  Format = "spacings"  // one column of spacings
	FormatTiles     Format = "tiles"     // a word of tile letters
	FormatJSON      Format = "json"
)

// Formats lists the formats Read accepts, FormatAuto first.
func Formats() []Format {
	return []Format{FormatAuto, FormatColumn, FormatCentroids, FormatSpacings, FormatTiles, FormatJSON}
}

// Limits on what Read accepts, so that a wrong or hostile file is refused
// with a message instead of being read without bound.
const (
	// MaxLineBytes is the longest line of a text input, in bytes.
	MaxLineBytes = 1 << 20
	// MaxSites is the largest number of sites an input may hold.
	MaxSites = 10_000_000
	// MaxJSONBytes is the largest JSON input, in bytes. A JSON document is
	// held in memory while it is decoded.
	MaxJSONBytes = 512 << 20
)

// sniffBytes is how much of the input is examined to decide whether it is
// text and, under FormatAuto, which format it is.
const sniffBytes = 8 << 10

// ReadOptions controls Read.
type ReadOptions struct {
	// Format is the input layout; "" or FormatAuto detects it from the
	// content: JSON when the first non-space character is '{' (or '['),
	// a tile word when the content is letters only (apart from spaces,
	// commas, semicolons and comments), numeric columns otherwise.
	Format Format
	// Tiles maps each tile letter to its length; a tile word needs it.
	Tiles map[string]float64
	// Unit, when set, overrides the unit found in the file.
	Unit string
	// Columns chooses the columns of a table to read, in order, each by
	// its header name or its 1-based number: {"X", "Y"}, {"3"},
	// {"Position [mm]"}. A name matches exactly, else ignoring case, else
	// ignoring case and the unit. Nil reads every column except a site
	// index (see Read).
	Columns []string
	// DecimalComma reads ',' as the decimal mark ("0,25"), so that it
	// never separates fields. Without it a decimal comma is read only when
	// the file shows it unambiguously (see Read).
	DecimalComma bool
}

// InputError is a refusal of input: it names the file and, where they are
// known, the line and the column of the fault.
//
// Line is 1-based. Col is 1-based and means, for numeric columns, the
// field number on the line; for tile words and JSON, the character
// position on the line. Zero means unknown or not meaningful.
type InputError struct {
	File string // the file name; "<stdin>" for standard input
	Line int    // 1-based line, 0 when the fault is not on one line
	Col  int    // 1-based column as described above, 0 when unknown
	Err  error  // what was wrong
}

// Error formats the error as "FILE:LINE:COL: message", leaving out the
// parts that are unknown.
func (e *InputError) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	if e.Line > 0 {
		if b.Len() > 0 {
			b.WriteByte(':')
		}
		b.WriteString(strconv.Itoa(e.Line))
		if e.Col > 0 {
			fmt.Fprintf(&b, ":%d", e.Col)
		}
	}
	if b.Len() > 0 {
		b.WriteString(": ")
	}
	if e.Err != nil {
		b.WriteString(e.Err.Error())
	}
	return b.String()
}

// Unwrap returns the underlying error.
func (e *InputError) Unwrap() error { return e.Err }

// ReadFile reads a Pattern from the file at path; path "-" reads standard
// input. See Read for the formats and limits.
func ReadFile(path string, opt ReadOptions) (*Pattern, error) {
	if path == "-" {
		return Read(os.Stdin, "-", opt)
	}
	f, err := os.Open(path)
	if err != nil {
		var pe *os.PathError
		if errors.As(err, &pe) {
			err = pe.Err
		}
		return nil, &InputError{File: path, Err: err}
	}
	defer f.Close()
	return Read(f, path, opt)
}

// Read reads a Pattern from r. The name is used as the Pattern's Source and
// in error messages ("-" means standard input and shows as "<stdin>").
//
// Accepted text, in every format: UTF-8 with or without a byte-order mark,
// LF or CRLF line ends, '#' comments (whole-line or trailing), blank lines.
//
// Numeric columns are separated by commas, semicolons, tabs or spaces, in
// the dialects spreadsheets write: a "sep=;" first line fixes the
// separator; fields may be quoted; a separator may end every line (the
// first line says whether they all do); a decimal comma is read under
// opt.DecimalComma, or when the numbers of semicolon- or tab-separated
// fields hold a comma. A dialect that is ambiguous or used in part (a
// missing trailing separator, decimal points and commas mixed) is refused
// where it stops being consistent.
// An optional first row of names is a header, and a unit written in it
// ("position_mm", "x [um]", "pos (nm)"), or after the number in every
// cell of a column ("0.25 mm"), becomes the Pattern's Unit. opt.Columns
// chooses the columns to read; without it a column of consecutive whole
// numbers with step 1 (a site number) is an index, left out with a note,
// and a column of text is refused with a hint to choose. One column holds
// positions (or spacings under FormatSpacings, whose cumulative sums from
// 0 are the positions); two or three hold x,y[,z] centroids, which are
// projected onto their best line (see Scan) when they lie close to it and
// refused as a 2D point set otherwise (IsPlanar; ReadSites reads such a set
// as a Plane).
//
// A tile word is a string of single ASCII letters, optionally separated by
// spaces, commas or line breaks; opt.Tiles gives each letter's length and
// the positions are the cumulative sums from 0.
//
// JSON is an object with an optional "unit" and exactly one of
// "positions" (numbers), "spacings" (positive numbers) or "sites" (objects
// with "x" and optionally "y" and "z"). Any other key is refused.
//
// Read refuses, with an *InputError, input that is not text, that holds
// non-numbers, NaN or infinities, rows of unequal length, more than three
// columns, fewer than MinSites sites (ErrTooFew) or two sites at the same
// position (ErrDuplicate); it also refuses lines longer than MaxLineBytes,
// more than MaxSites sites and JSON larger than MaxJSONBytes.
func Read(r io.Reader, name string, opt ReadOptions) (*Pattern, error) {
	return read(r, name, opt, defaultLimits())
}

// read reads a chain: a planar set is refused (see IsPlanar).
func read(r io.Reader, name string, opt ReadOptions, lim limits) (*Pattern, error) {
	s, err := readSites(r, name, opt, lim, false)
	if err != nil {
		return nil, err
	}
	return s.Chain, nil
}

// limits bundles the bounds of one read; tests lower them.
type limits struct {
	lineBytes int
	sites     int
	jsonBytes int64
}

func defaultLimits() limits {
	return limits{lineBytes: MaxLineBytes, sites: MaxSites, jsonBytes: MaxJSONBytes}
}

// reader holds the state of one call to Read.
type reader struct {
	name string // the Pattern's Source
	file string // the name shown in errors
	opt  ReadOptions
	lim  limits
	dia  dialect
	// planes is set when a planar set is read as a Plane (ReadSites)
	// rather than refused (Read).
	planes bool
}

// errorf returns an *InputError at line and col of the file.
func (rd *reader) errorf(line, col int, format string, args ...any) error {
	return &InputError{File: rd.file, Line: line, Col: col, Err: fmt.Errorf(format, args...)}
}

// wrap returns err as an *InputError at line and col of the file.
func (rd *reader) wrap(line, col int, err error) error {
	return &InputError{File: rd.file, Line: line, Col: col, Err: err}
}

var utf8BOM = []byte{0xEF, 0xBB, 0xBF}

// readSites reads a chain or, when planes is set, a planar set (see
// ReadSites).
func readSites(r io.Reader, name string, opt ReadOptions, lim limits, planes bool) (Sites, error) {
	if err := checkOptions(opt); err != nil {
		return Sites{}, err
	}
	rd, br, head, err := openText(r, name, lim)
	if err != nil {
		return Sites{}, err
	}
	rd.opt, rd.planes = opt, planes
	rd.dia.comma = opt.DecimalComma
	format := opt.Format
	if format == "" || format == FormatAuto {
		format = detect(head)
	}
	if opt.Columns != nil && (format == FormatJSON || format == FormatTiles) {
		return Sites{}, rd.errorf(0, 0, "--columns chooses columns of a table, but this input is %s", map[Format]string{FormatJSON: "JSON", FormatTiles: "a tile word"}[format])
	}
	switch format {
	case FormatJSON:
		return rd.readJSON(br)
	case FormatTiles:
		return chain(rd.readTiles(br))
	default:
		return rd.readColumns(br, format)
	}
}

// openText starts one read of a text input named name ("-" for standard
// input): it skips a UTF-8 byte-order mark and refuses, with an
// *InputError, input that is empty or whose first bytes are not UTF-8
// text. head is the start of the input, left unread in br.
func openText(r io.Reader, name string, lim limits) (rd *reader, br *bufio.Reader, head []byte, err error) {
	rd = &reader{name: name, file: name, lim: lim}
	if name == "-" {
		rd.file = "<stdin>"
	}
	br = bufio.NewReaderSize(r, 64<<10)
	if b, err := br.Peek(len(utf8BOM)); err == nil && bytes.Equal(b, utf8BOM) {
		br.Discard(len(utf8BOM))
	}
	head, err = br.Peek(sniffBytes)
	complete := err != nil // the whole input fits in head
	if err != nil && err != io.EOF && err != bufio.ErrBufferFull {
		return nil, nil, nil, rd.errorf(0, 0, "reading: %w", err)
	}
	if len(head) == 0 {
		return nil, nil, nil, rd.errorf(0, 0, "is empty")
	}
	if err := rd.checkText(head, complete); err != nil {
		return nil, nil, nil, err
	}
	return rd, br, head, nil
}

// checkOptions refuses options that no input could satisfy. These are
// the caller's errors, not the file's, so they are plain errors.
func checkOptions(opt ReadOptions) error {
	known := false
	for _, f := range Formats() {
		if opt.Format == f {
			known = true
		}
	}
	if !known && opt.Format != "" {
		return fmt.Errorf("unknown input format %q (want auto, column, centroids, spacings, tiles or json)", opt.Format)
	}
	if opt.Columns != nil && len(opt.Columns) == 0 {
		return fmt.Errorf("columns: the list is empty")
	}
	for _, c := range opt.Columns {
		if strings.TrimSpace(c) == "" || c != strings.TrimSpace(c) {
			return fmt.Errorf("columns %q: a column is a header name or a number from 1, without spaces around it", opt.Columns)
		}
	}
	for k, v := range opt.Tiles {
		if len(k) != 1 || !isASCIILetter(k[0]) {
			return fmt.Errorf("tile %q: a tile is named by a single ASCII letter", k)
		}
		if !(v > 0) || math.IsInf(v, 0) {
			return fmt.Errorf("tile %s: length %v is not a positive finite number", k, v)
		}
	}
	return nil
}

// checkText refuses input whose first bytes are not UTF-8 text. When the
// head is not the whole input, a rune cut by its end is not an error.
func (rd *reader) checkText(head []byte, complete bool) error {
	if bytes.HasPrefix(head, []byte{0xFF, 0xFE}) || bytes.HasPrefix(head, []byte{0xFE, 0xFF}) {
		return rd.errorf(0, 0, "is not a text file this reader understands: it is UTF-16; save it as UTF-8")
	}
	line := 1
	for i := 0; i < len(head); {
		c := head[i]
		if c == 0 {
			return rd.errorf(0, 0, "is not a text file: NUL byte on line %d", line)
		}
		if c == '\n' {
			line++
		}
		if c < utf8.RuneSelf {
			i++
			continue
		}
		r, size := utf8.DecodeRune(head[i:])
		if r == utf8.RuneError && size == 1 {
			if !complete && !utf8.FullRune(head[i:]) {
				break // cut by the end of head
			}
			return rd.errorf(0, 0, "is not a text file: invalid UTF-8 on line %d", line)
		}
		i += size
	}
	return nil
}

// detect tells the format of a text input from its first bytes.
func detect(head []byte) Format {
	trimmed := bytes.TrimLeftFunc(head, unicode.IsSpace)
	if len(trimmed) > 0 && (trimmed[0] == '{' || trimmed[0] == '[') {
		return FormatJSON
	}
	letters := 0
	inComment := false
	for _, r := range string(head) {
		switch {
		case r == '\n':
			inComment = false
		case inComment:
		case r == '#':
			inComment = true
		case unicode.IsSpace(r) || r == ',' || r == ';':
		case unicode.IsLetter(r):
			letters++
		case r == utf8.RuneError:
			// A rune cut by the end of head; checkText vouched for the rest.
		default:
			return FormatAuto // numeric columns
		}
	}
	if letters > 0 {
		return FormatTiles
	}
	return FormatAuto
}

// lineReader yields the lines of a text input, bounded in length, without
// their line ends. Its errors are *InputErrors naming the line.
type lineReader struct {
	rd   *reader
	br   *bufio.Reader
	line int // number of the line last returned
	buf  []byte
}

// next returns the next line; ok is false at the end of the input.
func (lr *lineReader) next() (text string, ok bool, err error) {
	max := lr.rd.lim.lineBytes
	lr.buf = lr.buf[:0]
	for {
		chunk, err := lr.br.ReadSlice('\n')
		lr.buf = append(lr.buf, chunk...)
		if len(lr.buf) > max+2 { // +2 leaves room for "\r\n"
			break
		}
		if err == bufio.ErrBufferFull {
			continue
		}
		if err == io.EOF {
			if len(lr.buf) == 0 {
				return "", false, nil
			}
			break
		}
		if err != nil {
			return "", false, lr.rd.errorf(lr.line+1, 0, "reading: %w", err)
		}
		break
	}
	lr.line++
	b := bytes.TrimSuffix(lr.buf, []byte("\n"))
	b = bytes.TrimSuffix(b, []byte("\r"))
	if len(b) > max {
		return "", false, lr.rd.errorf(lr.line, 0, "line is longer than %d bytes, the limit for a line of text", max)
	}
	return string(b), true, nil
}

// stripComment removes a '#' comment from a line.
func stripComment(s string) string {
	if i := strings.IndexByte(s, '#'); i >= 0 {
		return s[:i]
	}
	return s
}

// finish turns positions read from the input into a Pattern. lines[i], when
// lines is not nil, is the input line of positions[i], so that two sites at
// the same position can be reported where they are.
func (rd *reader) finish(positions []float64, lines []int, unit string, notes []string) (*Pattern, error) {
	if lines != nil && len(positions) >= MinSites {
		if err := rd.checkDuplicates(positions, lines); err != nil {
			return nil, err
		}
	}
	p, err := New(positions, unit, rd.name)
	if err != nil {
		return nil, rd.wrap(0, 0, err)
	}
	p.Notes = append(notes, p.Notes...)
	if rd.opt.Unit != "" {
		if unit != "" && unit != rd.opt.Unit {
			p.Notes = append(p.Notes, fmt.Sprintf("unit %q given by the caller overrides %q found in the input", rd.opt.Unit, unit))
		}
		p.Unit = rd.opt.Unit
	}
	return p, nil
}

// checkDuplicates applies the separation part of the Pattern invariant
// (same tolerance as New) and names the two lines of a pair that breaks it.
func (rd *reader) checkDuplicates(positions []float64, lines []int) error {
	n := len(positions)
	order := make([]int, n)
	for i := range order {
		order[i] = i
	}
	sort.SliceStable(order, func(a, b int) bool { return positions[order[a]] < positions[order[b]] })
	span := positions[order[n-1]] - positions[order[0]]
	if math.IsInf(span, 0) || math.IsNaN(span) {
		return nil // New reports it
	}
	tol := DuplicateTolerance * span / float64(n-1)
	for k := 1; k < n; k++ {
		i, j := order[k-1], order[k]
		if positions[j]-positions[i] <= tol {
			first, second := lines[i], lines[j]
			if first > second {
				first, second = second, first
			}
			return rd.errorf(second, 0, "%w: %v, as on line %d", ErrDuplicate, positions[j], first)
		}
	}
	return nil
}

func isASCIILetter(c byte) bool { return 'a' <= c && c <= 'z' || 'A' <= c && c <= 'Z' }
