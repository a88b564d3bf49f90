package pattern

import (
	"errors"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"path/filepath"
	"slices"
	"sort"
	"strings"
	"testing"
)

func goodFile(name string) string { return filepath.Join("..", "testdata", "read", "good", name) }
func badFile(name string) string  { return filepath.Join("..", "testdata", "read", "bad", name) }

// chain10 are the positions written in most good/positions_* files.
var chain10 = []float64{0, 1, 1.618, 2.618, 3.236, 4.236, 5.236, 5.854, 6.854, 7.472}

func TestReadGoodExact(t *testing.T) {
	tests := []struct {
		file  string
		opt   ReadOptions
		want  []float64
		unit  string
		notes []string // substrings, one per expected note, in order
	}{
		{file: "positions_plain.txt", want: chain10},
		{file: "positions_header_unit_underscore.csv", want: chain10, unit: "mm"},
		{file: "positions_header_unit_brackets.csv", want: chain10, unit: "um"},
		{file: "positions_header_unit_parens.csv", want: chain10, unit: "nm"},
		{file: "positions_comments.csv", want: chain10, unit: "um"},
		{file: "positions_blank_lines.csv", want: chain10},
		{file: "positions_crlf.csv", want: chain10, unit: "nm"},
		{file: "positions_bom.csv", want: chain10, unit: "um"},
		{file: "positions_exponent.csv", unit: "m",
			want: []float64{0, 0.0012, 0.0025, 0.00375, 0.005, 0.0062, 0.0075, 0.0088, 0.01, 100, 150}},
		{file: "positions_unsorted.csv", want: chain10, notes: []string{"not in ascending order and have been sorted"}},
		{file: "positions_plain.txt", opt: ReadOptions{Format: FormatColumn}, want: chain10},
		{file: "positions_header_unit_underscore.csv", opt: ReadOptions{Unit: "in"}, want: chain10, unit: "in",
			notes: []string{`unit "in" given by the caller overrides "mm"`}},
		{file: "positions_plain.txt", opt: ReadOptions{Unit: "um"}, want: chain10, unit: "um"},
		{file: "spacings.txt", opt: ReadOptions{Format: FormatSpacings}, unit: "nm",
			want:  []float64{0, 1, 2.5, 3.5, 5, 6, 7, 8.5, 9.5, 11},
			notes: []string{"cumulative sums of 9 spacings"}},
		{file: "json_positions.json", want: chain10, unit: "um"},
		{file: "json_positions.json", opt: ReadOptions{Format: FormatJSON}, want: chain10, unit: "um"},
		{file: "json_sites_1d.json", want: chain10},
		{file: "json_spacings.json", unit: "nm",
			want:  []float64{0, 1, 2.5, 3.5, 5, 6, 7, 8.5, 9.5, 11},
			notes: []string{"cumulative sums of 9 spacings"}},
	}
	for _, tt := range tests {
		t.Run(tt.file, func(t *testing.T) {
			p, err := ReadFile(goodFile(tt.file), tt.opt)
			if err != nil {
				t.Fatal(err)
			}
			if !slices.Equal(p.Positions, tt.want) {
				t.Errorf("positions = %v, want %v", p.Positions, tt.want)
			}
			if p.Unit != tt.unit {
				t.Errorf("unit = %q, want %q", p.Unit, tt.unit)
			}
			checkNotes(t, p.Notes, tt.notes)
			if p.Source != goodFile(tt.file) {
				t.Errorf("source = %q", p.Source)
			}
			if p.Scan != nil {
				t.Errorf("scan = %+v, want nil for 1-D input", p.Scan)
			}
		})
	}
}

func checkNotes(t *testing.T, got, want []string) {
	t.Helper()
	if len(got) != len(want) {
		t.Errorf("notes = %q, want %d notes like %q", got, len(want), want)
		return
	}
	for i := range want {
		if !strings.Contains(got[i], want[i]) {
			t.Errorf("note %d = %q, want it to contain %q", i, got[i], want[i])
		}
	}
}

// TestReadCentroidSeparators reads one row of centroids along x (y
// constant) written with each separator.
func TestReadCentroidSeparators(t *testing.T) {
	want := []float64{0, 1.25, 2.5, 3.75, 5, 6.25, 7.5, 8.75, 10}
	for _, file := range []string{"centroids_comma.csv", "centroids_semicolon.csv", "centroids_tab.tsv", "centroids_whitespace.txt", "centroids_whitespace_units.txt", "json_sites.json"} {
		t.Run(file, func(t *testing.T) {
			p, err := ReadFile(goodFile(file), ReadOptions{})
			if err != nil {
				t.Fatal(err)
			}
			checkClose(t, "positions", p.Positions, want, 1e-12)
			if p.Unit != "um" {
				t.Errorf("unit = %q, want um", p.Unit)
			}
			s := p.Scan
			if s == nil || s.Dim != 2 {
				t.Fatalf("scan = %+v, want a 2-D scan", s)
			}
			if s.TiltDeg > 1e-6 || s.TransverseRMS > 1e-12 || s.TransverseMax > 1e-12 {
				t.Errorf("scan = %+v, want no tilt and no transverse scatter", s)
			}
			checkNotes(t, p.Notes, []string{"9 centroids in 2 dimensions were projected onto their principal axis"})
		})
	}
}

func checkClose(t *testing.T, what string, got, want []float64, tol float64) {
	t.Helper()
	if len(got) != len(want) {
		t.Fatalf("%s: %d values, want %d", what, len(got), len(want))
	}
	for i := range want {
		if math.Abs(got[i]-want[i]) > tol {
			t.Errorf("%s[%d] = %.17g, want %.17g (tolerance %g)", what, i, got[i], want[i], tol)
		}
	}
}

// TestReadCentroidFiles checks the two committed tilted scans against the
// geometry they were written from (see the comment in each file): positions
// spaced evenly along a rotated axis, with transverse offsets chosen to be
// uncorrelated with the position, so that the principal axis is exactly the
// chain's axis and the RMS offset is exact (common practice: principal
// component analysis of a line plus orthogonal noise).
func TestReadCentroidFiles(t *testing.T) {
	rad := math.Pi / 180
	t.Run("2d", func(t *testing.T) {
		p, err := ReadFile(goodFile("centroids_2d_tilted_shuffled.csv"), ReadOptions{})
		if err != nil {
			t.Fatal(err)
		}
		// 16 sites 1.5 apart, shifted by the translation (100, 50) projected on the axis.
		origin := 100*math.Cos(12*rad) + 50*math.Sin(12*rad)
		want := make([]float64, 16)
		for i := range want {
			want[i] = origin + 1.5*float64(i)
		}
		checkClose(t, "positions", p.Positions, want, 1e-9)
		checkScan(t, p.Scan, 2, 12, 0.02, 0.02)
		if p.Unit != "um" {
			t.Errorf("unit = %q, want um", p.Unit)
		}
		checkNotes(t, p.Notes, []string{"a tilt of 12° from the first scan axis was removed; transverse scatter 0.02 um RMS, 0.02 um at most"})
	})
	t.Run("3d", func(t *testing.T) {
		p, err := ReadFile(goodFile("centroids_3d.csv"), ReadOptions{})
		if err != nil {
			t.Fatal(err)
		}
		want := make([]float64, 16)
		for i := range want {
			want[i] = 2 * float64(i)
		}
		checkClose(t, "positions", p.Positions, want, 1e-9)
		// Axis at azimuth 20°, elevation 10°: its angle from x is acos(cos 20° cos 10°);
		// the offsets 0.03 and 0.04 along two orthogonal transverse directions
		// put every site 0.05 from the axis.
		checkScan(t, p.Scan, 3, math.Acos(math.Cos(20*rad)*math.Cos(10*rad))/rad, 0.05, 0.05)
		if p.Unit != "um" {
			t.Errorf("unit = %q, want um", p.Unit)
		}
	})
}

func checkScan(t *testing.T, s *Scan, dim int, tilt, rms, maxDist float64) {
	t.Helper()
	if s == nil {
		t.Fatal("scan = nil")
	}
	if s.Dim != dim || len(s.Axis) != dim {
		t.Errorf("scan dim = %d, axis %v, want %d", s.Dim, s.Axis, dim)
	}
	norm := 0.0
	for _, a := range s.Axis {
		norm += a * a
	}
	if math.Abs(norm-1) > 1e-12 {
		t.Errorf("axis %v is not a unit vector", s.Axis)
	}
	if math.Abs(s.TiltDeg-tilt) > 1e-9 {
		t.Errorf("tilt = %.12g°, want %.12g°", s.TiltDeg, tilt)
	}
	if math.Abs(s.TransverseRMS-rms) > 1e-9 {
		t.Errorf("transverse RMS = %.12g, want %.12g", s.TransverseRMS, rms)
	}
	if math.Abs(s.TransverseMax-maxDist) > 1e-9 {
		t.Errorf("transverse max = %.12g, want %.12g", s.TransverseMax, maxDist)
	}
}

// fibonacciChain returns the n+1 positions of a Fibonacci chain with
// tiles of length φ and 1, and its word, from the substitution A→AB, B→A
// (the Fibonacci word, OEIS A003849 with 0→A, 1→B).
func fibonacciChain(n int) ([]float64, string) {
	w := "A"
	for len(w) < n {
		var b strings.Builder
		for _, c := range w {
			if c == 'A' {
				b.WriteString("AB")
			} else {
				b.WriteString("A")
			}
		}
		w = b.String()
	}
	w = w[:n]
	phi := (1 + math.Sqrt(5)) / 2
	pos := make([]float64, n+1)
	for i := 0; i < n; i++ {
		l := 1.0
		if w[i] == 'A' {
			l = phi
		}
		pos[i+1] = pos[i] + l
	}
	return pos, w
}

// transverseOffsets returns seeded random offsets of size up to amp, made
// orthogonal to the constant vector and to s − mean(s), so that they move
// neither the centroid nor the principal axis of the chain s.
func transverseOffsets(rng *rand.Rand, s []float64, amp float64) []float64 {
	n := len(s)
	var ms float64
	for _, x := range s {
		ms += x / float64(n)
	}
	c := make([]float64, n)
	o := make([]float64, n)
	var mo, cc float64
	for i := range s {
		c[i] = s[i] - ms
		o[i] = amp * (2*rng.Float64() - 1)
		mo += o[i] / float64(n)
		cc += c[i] * c[i]
	}
	var oc float64
	for i := range o {
		o[i] -= mo
		oc += o[i] * c[i]
	}
	for i := range o {
		o[i] -= oc / cc * c[i]
	}
	return o
}

// TestReadCentroidsGenerated lays a Fibonacci chain along a known axis,
// adds known transverse offsets, shuffles the rows and checks that the
// reader recovers the positions (up to the common offset and the
// documented orientation), the tilt and the closed-form RMS offset.
func TestReadCentroidsGenerated(t *testing.T) {
	rad := math.Pi / 180
	tests := []struct {
		name     string
		axis     []float64 // unit direction of the chain
		tr       []float64 // translation
		seed     uint64
		nTrans   int // transverse directions used
		transvec [][]float64
	}{
		{name: "2d 7deg", axis: []float64{math.Cos(7 * rad), math.Sin(7 * rad)}, tr: []float64{12.5, -3}, seed: 1,
			transvec: [][]float64{{-math.Sin(7 * rad), math.Cos(7 * rad)}}},
		{name: "2d -33deg", axis: []float64{math.Cos(-33 * rad), math.Sin(-33 * rad)}, tr: []float64{-400, 250}, seed: 2,
			transvec: [][]float64{{math.Sin(33 * rad), math.Cos(33 * rad)}}},
		{name: "2d 100deg", axis: []float64{math.Cos(100 * rad), math.Sin(100 * rad)}, tr: []float64{0, 0}, seed: 3,
			transvec: [][]float64{{-math.Sin(100 * rad), math.Cos(100 * rad)}}},
		{name: "2d 160deg reversed", axis: []float64{math.Cos(160 * rad), math.Sin(160 * rad)}, tr: []float64{5, 5}, seed: 4,
			transvec: [][]float64{{-math.Sin(160 * rad), math.Cos(160 * rad)}}},
		{name: "3d", axis: unit([]float64{0.8, -0.5, 0.3}), tr: []float64{1, 2, 3}, seed: 5,
			transvec: orthonormalComplement(unit([]float64{0.8, -0.5, 0.3}))},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			rng := rand.New(rand.NewPCG(tt.seed, 0))
			s, _ := fibonacciChain(60)
			n, dim := len(s), len(tt.axis)
			rows := make([][]float64, n)
			var sumSq, maxD float64
			offs := make([][]float64, len(tt.transvec))
			for k := range tt.transvec {
				offs[k] = transverseOffsets(rng, s, 0.05)
			}
			for i := range rows {
				rows[i] = make([]float64, dim)
				var d2 float64
				for a := 0; a < dim; a++ {
					rows[i][a] = tt.tr[a] + s[i]*tt.axis[a]
					for k, v := range tt.transvec {
						rows[i][a] += offs[k][i] * v[a]
					}
				}
				for k := range tt.transvec {
					d2 += offs[k][i] * offs[k][i]
				}
				sumSq += d2
				maxD = math.Max(maxD, math.Sqrt(d2))
			}
			rng.Shuffle(n, func(i, j int) { rows[i], rows[j] = rows[j], rows[i] })
			var b strings.Builder
			b.WriteString("x_nm,y_nm")
			if dim == 3 {
				b.WriteString(",z_nm")
			}
			b.WriteByte('\n')
			for _, r := range rows {
				for a, v := range r {
					if a > 0 {
						b.WriteByte(',')
					}
					fmt.Fprintf(&b, "%.17g", v)
				}
				b.WriteByte('\n')
			}
			p, err := Read(strings.NewReader(b.String()), "generated.csv", ReadOptions{})
			if err != nil {
				t.Fatal(err)
			}
			// Documented orientation: the axis's largest-magnitude component is positive.
			lead := 0
			for a := range tt.axis {
				if math.Abs(tt.axis[a]) > math.Abs(tt.axis[lead]) {
					lead = a
				}
			}
			sign := math.Copysign(1, tt.axis[lead])
			var shift float64
			for a := range tt.axis {
				shift += tt.tr[a] * sign * tt.axis[a]
			}
			want := make([]float64, n)
			for i := range s {
				want[i] = sign*s[i] + shift
			}
			sort.Float64s(want)
			checkClose(t, "positions", p.Positions, want, 1e-9)
			checkScan(t, p.Scan, dim, math.Acos(sign*tt.axis[0])/rad, math.Sqrt(sumSq/float64(n)), maxD)
			for a := range tt.axis {
				if math.Abs(p.Scan.Axis[a]-sign*tt.axis[a]) > 1e-12 {
					t.Errorf("axis = %v, want %v times %v", p.Scan.Axis, sign, tt.axis)
					break
				}
			}
			if p.Unit != "nm" {
				t.Errorf("unit = %q", p.Unit)
			}

			// The same rows in another order give the same pattern.
			lines := strings.Split(strings.TrimSpace(b.String()), "\n")
			body := lines[1:]
			slices.Reverse(body)
			q, err := Read(strings.NewReader(lines[0]+"\n"+strings.Join(body, "\n")), "reversed.csv", ReadOptions{})
			if err != nil {
				t.Fatal(err)
			}
			checkClose(t, "positions of reversed rows", q.Positions, p.Positions, 1e-12)
		})
	}
}

func unit(v []float64) []float64 {
	var n float64
	for _, x := range v {
		n += x * x
	}
	n = math.Sqrt(n)
	out := make([]float64, len(v))
	for i, x := range v {
		out[i] = x / n
	}
	return out
}

// orthonormalComplement returns two unit vectors orthogonal to the unit
// 3-vector u and to each other.
func orthonormalComplement(u []float64) [][]float64 {
	cross := func(a, b []float64) []float64 {
		return []float64{a[1]*b[2] - a[2]*b[1], a[2]*b[0] - a[0]*b[2], a[0]*b[1] - a[1]*b[0]}
	}
	v := unit(cross(u, []float64{0, 0, 1}))
	return [][]float64{v, cross(u, v)}
}

func TestReadTiles(t *testing.T) {
	phi := (1 + math.Sqrt(5)) / 2
	t.Run("word", func(t *testing.T) {
		p, err := ReadFile(goodFile("tiles_word.txt"), ReadOptions{Tiles: map[string]float64{"A": phi, "B": 1}})
		if err != nil {
			t.Fatal(err)
		}
		want, word := fibonacciChain(13)
		if p.Word != word {
			t.Errorf("word = %q, want the Fibonacci word %q", p.Word, word)
		}
		if !slices.Equal(p.Positions, want) {
			t.Errorf("positions = %v, want %v", p.Positions, want)
		}
		checkNotes(t, p.Notes, nil)
	})
	t.Run("spaced", func(t *testing.T) {
		p, err := ReadFile(goodFile("tiles_spaced.txt"), ReadOptions{Tiles: map[string]float64{"L": 2, "S": 1}})
		if err != nil {
			t.Fatal(err)
		}
		if p.Word != "LSLLSLSLLSLLS" {
			t.Errorf("word = %q", p.Word)
		}
		want := []float64{0, 2, 3, 5, 7, 8, 10, 11, 13, 15, 16, 18, 20, 21}
		if !slices.Equal(p.Positions, want) {
			t.Errorf("positions = %v, want %v", p.Positions, want)
		}
	})
	t.Run("forced", func(t *testing.T) {
		p, err := Read(strings.NewReader("a b a a b a b a\n"), "w", ReadOptions{Format: FormatTiles, Tiles: map[string]float64{"a": 3, "b": 1}})
		if err != nil {
			t.Fatal(err)
		}
		if p.Word != "abaababa" || p.Positions[8] != 18 {
			t.Errorf("word %q positions %v", p.Word, p.Positions)
		}
	})
}

func TestReadBad(t *testing.T) {
	tiles := map[string]float64{"A": 1.618, "B": 1}
	tests := []struct {
		file string
		opt  ReadOptions
		want string
		is   error
	}{
		{file: "positions_not_a_number.csv", want: `positions_not_a_number.csv:5:1: "3.5x" is not a number`},
		{file: "centroids_not_a_number.csv", want: `centroids_not_a_number.csv:14:2: "12.3x" is not a number`},
		{file: "nan.csv", want: `nan.csv:4:1: "nan" is not a finite number`},
		{file: "inf.csv", want: `inf.csv:6:1: "-Inf" is not a finite number`},
		{file: "overflow.csv", want: `overflow.csv:3:1: "1e400" overflows a float64 to infinity`},
		{file: "unicode_minus.csv", want: `unicode_minus.csv:1:1: "−1" is not a number (it has a Unicode minus sign`},
		{file: "hex_number.csv", want: `hex_number.csv:3:1: "0x1p1" is not a number`},
		{file: "too_few.csv", want: `too_few.csv: too few sites: 5, need at least 8`, is: ErrTooFew},
		{file: "duplicate.csv", want: `duplicate.csv:7: two sites at the same position: 3, as on line 4`, is: ErrDuplicate},
		{file: "json_duplicate_sites.json", want: `json_duplicate_sites.json:7: two sites at the same position: 2, as on line 4`, is: ErrDuplicate},
		{file: "ragged_rows.csv", want: `ragged_rows.csv:6: expected 2 columns like the first data row (line 2), got 3`},
		{file: "empty.csv", want: `empty.csv: is empty`},
		{file: "header_only.csv", want: `header_only.csv:1: has a header row but no data rows`},
		{file: "comments_only.csv", want: `comments_only.csv: has no data rows`},
		{file: "binary_nul.bin", want: `binary_nul.bin: is not a text file: NUL byte on line 1`},
		{file: "invalid_utf8.txt", want: `invalid_utf8.txt: is not a text file: invalid UTF-8 on line 3`},
		{file: "utf16.txt", want: `utf16.txt: is not a text file this reader understands: it is UTF-16`},
		{file: "four_columns.csv", want: `four_columns.csv:2: has 4 columns; expected 1 (positions) or 2 or 3`},
		{file: "empty_field.csv", want: `empty_field.csv:3:2: empty field`},
		{file: "header_units_disagree.csv", want: `header_units_disagree.csv:1:2: column 2 has unit "nm" but column 1 has "um"`},
		{file: "header_columns_mismatch.csv", want: `header_columns_mismatch.csv:2: the header (line 1) names 2 columns but the first data row has 1`},
		{file: "centroids_not_a_line.csv", want: `centroids_not_a_line.csv: the centroids do not lie along a line`},
		{file: "spacings_negative.txt", opt: ReadOptions{Format: FormatSpacings}, want: `spacings_negative.txt:4:1: spacing -0.5 is not positive`},
		{file: "spacings_zero.txt", opt: ReadOptions{Format: FormatSpacings}, want: `spacings_zero.txt:6:1: spacing 0 is not positive`},
		{file: "spacings_two_columns.txt", opt: ReadOptions{Format: FormatSpacings}, want: `spacings_two_columns.txt:1: has 2 columns; format "spacings" expects 1`},
		{file: "tiles_unknown_letter.txt", opt: ReadOptions{Tiles: tiles}, want: `tiles_unknown_letter.txt:2:4: tile letter 'C' has no length (lengths are given for A, B)`},
		{file: "tiles_no_lengths.txt", want: `tiles_no_lengths.txt: is a word of tile letters (A, B) but no tile lengths were given: pass --tiles A=1,B=1.618`},
		{file: "tiles_non_ascii.txt", opt: ReadOptions{Tiles: tiles}, want: `tiles_non_ascii.txt:1:3: tile letter 'Ä' is not ASCII`},
		{file: "tiles_digit.txt", opt: ReadOptions{Format: FormatTiles, Tiles: tiles}, want: `tiles_digit.txt:1:6: '1' is not a tile letter`},
		{file: "json_unknown_key.json", want: `json_unknown_key.json:3:3: unknown key "positons"`},
		{file: "json_syntax.json", want: `json_syntax.json:3:3: invalid JSON: invalid character '"' after object key:value pair`},
		{file: "json_null.json", want: `json_null.json:3:3: positions[3] must be a number, not null`},
		{file: "json_string_number.json", want: `json_string_number.json:1:22: positions[2] must be a number, not the string "2"`},
		{file: "json_overflow.json", want: `json_overflow.json:1:28: positions[4]: 1e400 overflows a float64 to infinity`},
		{file: "json_two_arrays.json", want: `json_two_arrays.json:2:2: "positions" and "spacings" are both given`},
		{file: "json_site_missing_x.json", want: `json_site_missing_x.json:7:1: sites[5] has no "x"`},
		{file: "json_site_unknown_key.json", want: `json_site_unknown_key.json:5:10: sites[3]: unknown key "Y"`},
		{file: "json_site_mixed_dims.json", want: `json_site_mixed_dims.json:5:1: sites[3] has 3 coordinates but sites[0] has 2`},
		{file: "json_trailing.json", want: `json_trailing.json:2:1: unexpected content after the JSON object`},
		{file: "json_array_top.json", want: `json_array_top.json:1:1: the JSON must be an object with "unit", "positions", "spacings" and "sites", not an array`},
		{file: "json_duplicate_key.json", want: `json_duplicate_key.json:1:16: key "unit" is given twice`},
		{file: "json_no_data.json", want: `json_no_data.json: the JSON object has none of "positions", "spacings" and "sites"`},
		{file: "json_truncated.json", want: `json_truncated.json:2:1: invalid JSON: unexpected end of input`},
		// Forced formats that do not fit the content.
		{file: "../good/centroids_comma.csv", opt: ReadOptions{Format: FormatColumn}, want: `centroids_comma.csv:2: has 2 columns; format "column" expects 1`},
		{file: "../good/positions_plain.txt", opt: ReadOptions{Format: FormatCentroids}, want: `positions_plain.txt:1: has 1 column; format "centroids" expects 2 or 3`},
		{file: "../good/positions_plain.txt", opt: ReadOptions{Format: FormatJSON}, want: `positions_plain.txt:1:1: the JSON must be an object with "unit", "positions", "spacings" and "sites", not the number 0`},
	}
	for _, tt := range tests {
		t.Run(tt.file, func(t *testing.T) {
			p, err := ReadFile(badFile(tt.file), tt.opt)
			if err == nil {
				t.Fatalf("read %d sites, want an error containing %q", p.Len(), tt.want)
			}
			var ie *InputError
			if !errors.As(err, &ie) {
				t.Errorf("error %q (%T) is not an *InputError", err, err)
			}
			if !strings.Contains(err.Error(), tt.want) {
				t.Errorf("error = %q\nwant it to contain %q", err, tt.want)
			}
			if tt.is != nil && !errors.Is(err, tt.is) {
				t.Errorf("error %q does not wrap %v", err, tt.is)
			}
		})
	}
}

func TestReadFileMissing(t *testing.T) {
	_, err := ReadFile(badFile("no_such_file.csv"), ReadOptions{})
	var ie *InputError
	if !errors.As(err, &ie) || !strings.Contains(err.Error(), "no_such_file.csv: no such file or directory") {
		t.Errorf("error = %v", err)
	}
}

func TestReadStdinName(t *testing.T) {
	p, err := Read(strings.NewReader("0\n1\n2\n3\n4\n5\n6\n7\n"), "-", ReadOptions{})
	if err != nil || p.Source != "-" {
		t.Fatalf("pattern %+v, error %v", p, err)
	}
	_, err = Read(strings.NewReader("0\n1\nx1\n"), "-", ReadOptions{})
	if err == nil || !strings.HasPrefix(err.Error(), `<stdin>:3:1: "x1" is not a number`) {
		t.Errorf("error = %v", err)
	}
}

func TestReadOptionsRefused(t *testing.T) {
	for _, opt := range []ReadOptions{
		{Format: "xml"},
		{Tiles: map[string]float64{"AB": 1}},
		{Tiles: map[string]float64{"A": 0}},
		{Tiles: map[string]float64{"A": math.Inf(1)}},
		{Tiles: map[string]float64{"A": math.NaN()}},
	} {
		_, err := Read(strings.NewReader("0\n1\n2\n3\n4\n5\n6\n7\n"), "ok.txt", opt)
		var ie *InputError
		if err == nil || errors.As(err, &ie) {
			t.Errorf("options %+v: error %v, want a plain error about the options", opt, err)
		}
	}
}

// TestReadLimits checks every bound with lowered limits, and the line
// bound with the real one.
func TestReadLimits(t *testing.T) {
	small := limits{lineBytes: 64, sites: 20, jsonBytes: 200}
	// column returns the integers from a to b, one a line.
	column := func(a, b int) string {
		var sb strings.Builder
		for i := a; i <= b; i++ {
			fmt.Fprintf(&sb, "%d\n", i)
		}
		return sb.String()
	}
	tests := []struct {
		name, input string
		opt         ReadOptions
		want        string // "" means accepted
	}{
		{"20 sites", column(1, 20), ReadOptions{}, ""},
		{"21 sites", column(1, 21), ReadOptions{}, "in:21: more than 20 sites"},
		{"21 spacings", column(1, 21), ReadOptions{Format: FormatSpacings}, "in:21: more than 20 sites"},
		{"21 centroids", strings.ReplaceAll(column(1, 21), "\n", ",0\n"), ReadOptions{}, "in:21: more than 20 sites"},
		{"20 tiles", strings.Repeat("AB", 10), ReadOptions{Tiles: map[string]float64{"A": 1, "B": 2}}, "in:1:20: more than 20 sites"},
		{"19 tiles", strings.Repeat("A", 19), ReadOptions{Tiles: map[string]float64{"A": 1}}, ""},
		{"21 json positions", `{"positions":[` + strings.TrimSuffix(strings.ReplaceAll(column(1, 21), "\n", ","), ",") + `]}`, ReadOptions{}, "more than 20 sites"},
		{"line of 64 bytes", "0\n" + strings.Repeat(" ", 63) + "1\n" + column(2, 9), ReadOptions{}, ""},
		{"line of 64 bytes with CRLF", "0\r\n" + strings.Repeat(" ", 63) + "1\r\n" + column(2, 9), ReadOptions{}, ""},
		{"line of 65 bytes", "0\n" + strings.Repeat(" ", 64) + "1\n" + column(2, 9), ReadOptions{}, "in:2: line is longer than 64 bytes"},
		{"last line too long", column(1, 10) + strings.Repeat(" ", 64) + "11", ReadOptions{}, "in:11: line is longer than 64 bytes"},
		{"json of 201 bytes", `{"positions":[0,1,2,3,4,5,6,7]}` + strings.Repeat(" ", 201-31), ReadOptions{}, "in: is larger than 200 bytes, the limit for JSON input"},
		{"json of 200 bytes", `{"positions":[0,1,2,3,4,5,6,7]}` + strings.Repeat(" ", 200-31), ReadOptions{}, ""},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := read(strings.NewReader(tt.input), "in", tt.opt, small)
			switch {
			case tt.want == "" && err != nil:
				t.Errorf("error %v, want none", err)
			case tt.want != "" && (err == nil || !strings.Contains(err.Error(), tt.want)):
				t.Errorf("error %v, want one containing %q", err, tt.want)
			}
		})
	}

	t.Run("real line limit", func(t *testing.T) {
		long := "0\n" + strings.Repeat(" ", MaxLineBytes) + "1\n" + column(2, 9)
		_, err := Read(strings.NewReader(long), "long.txt", ReadOptions{})
		if err == nil || !strings.Contains(err.Error(), "long.txt:2: line is longer than 1048576 bytes") {
			t.Errorf("error = %v", err)
		}
	})
	t.Run("real site limit", func(t *testing.T) {
		if testing.Short() {
			t.Skip("reads 10^7 lines")
		}
		r := &repeatReader{line: []byte("1\n"), n: MaxSites + 1}
		_, err := Read(r, "many.txt", ReadOptions{})
		if err == nil || !strings.Contains(err.Error(), "many.txt:10000001: more than 10000000 sites") {
			t.Errorf("error = %v", err)
		}
	})
}

// repeatReader yields line n times without holding the whole input.
type repeatReader struct {
	line []byte
	n    int
	off  int
}

func (r *repeatReader) Read(p []byte) (int, error) {
	k := 0
	for k < len(p) {
		if r.n == 0 {
			if k == 0 {
				return 0, io.EOF
			}
			break
		}
		c := copy(p[k:], r.line[r.off:])
		k += c
		r.off += c
		if r.off == len(r.line) {
			r.off = 0
			r.n--
		}
	}
	return k, nil
}

func TestParseTileLengths(t *testing.T) {
	m, err := ParseTileLengths(" A=1, B = 1.618,c=2e-1")
	if err != nil {
		t.Fatal(err)
	}
	if len(m) != 3 || m["A"] != 1 || m["B"] != 1.618 || m["c"] != 0.2 {
		t.Errorf("lengths = %v", m)
	}
	for _, bad := range []struct{ in, want string }{
		{"", "empty"},
		{"A", `"A" is not LETTER=LENGTH`},
		{"A=", `"A=" is not LETTER=LENGTH`},
		{"AB=1", `tile "AB" is not a single ASCII letter`},
		{"Ä=1", `tile "Ä" is not a single ASCII letter`},
		{"1=1", `tile "1" is not a single ASCII letter`},
		{"A=1,A=2", "tile A is given twice"},
		{"A=x", `tile A: "x" is not a number`},
		{"A=inf", `tile A: "inf" is not a finite number`},
		{"A=0", "tile A: length 0 is not positive"},
		{"A=-1", "tile A: length -1 is not positive"},
	} {
		_, err := ParseTileLengths(bad.in)
		if err == nil || !strings.Contains(err.Error(), bad.want) {
			t.Errorf("ParseTileLengths(%q): error %v, want one containing %q", bad.in, err, bad.want)
		}
	}
}

func TestInputErrorFormat(t *testing.T) {
	base := errors.New("bad")
	for _, tt := range []struct {
		e    InputError
		want string
	}{
		{InputError{File: "f.csv", Line: 3, Col: 2, Err: base}, "f.csv:3:2: bad"},
		{InputError{File: "f.csv", Line: 3, Err: base}, "f.csv:3: bad"},
		{InputError{File: "f.csv", Err: base}, "f.csv: bad"},
		{InputError{File: "f.csv", Col: 4, Err: base}, "f.csv: bad"},
		{InputError{Line: 3, Col: 2, Err: base}, "3:2: bad"},
		{InputError{Err: base}, "bad"},
	} {
		if got := tt.e.Error(); got != tt.want {
			t.Errorf("%+v: Error() = %q, want %q", tt.e, got, tt.want)
		}
		if !errors.Is(&tt.e, base) {
			t.Errorf("%+v does not unwrap to its error", tt.e)
		}
	}
}

func TestUnitOf(t *testing.T) {
	for _, tt := range []struct{ in, want string }{
		{"position_mm", "mm"}, {"x [um]", "um"}, {"pos (nm)", "nm"}, {"x_um", "um"},
		{"x [µm]", "um"}, {"x (μm)", "um"}, {"x [px]", "px"}, {"y_px", "px"},
		{"position", ""}, {"site_index", ""}, {"x", ""},
	} {
		if got := unitOf(tt.in); got != tt.want {
			t.Errorf("unitOf(%q) = %q, want %q", tt.in, got, tt.want)
		}
	}
}

func BenchmarkReadColumn(b *testing.B) {
	var sb strings.Builder
	for i := 0; i < 100000; i++ {
		fmt.Fprintf(&sb, "%.6f\n", float64(i)*1.618+0.1*math.Sin(float64(i)))
	}
	in := sb.String()
	b.SetBytes(int64(len(in)))
	for b.Loop() {
		if _, err := Read(strings.NewReader(in), "bench.csv", ReadOptions{}); err != nil {
			b.Fatal(err)
		}
	}
}
