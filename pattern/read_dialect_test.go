package pattern

import (
	"fmt"
	"math"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

func dialectFile(name string) string { return filepath.Join("..", "testdata", "dialects", name) }

// TestReadDialects reads every file of testdata/dialects — the same chain
// written in the dialects spreadsheets and metrology software write — and
// wants the positions of the plain file to the last bit.
func TestReadDialects(t *testing.T) {
	plain, err := ReadFile(dialectFile("plain.csv"), ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(plain.Positions, chain10) {
		t.Fatalf("plain.csv: positions %v, want %v", plain.Positions, chain10)
	}
	index := `column 1 ("Site") holds the consecutive whole numbers 1…10: it was read as a site index`
	tests := []struct {
		file  string
		opt   ReadOptions
		unit  string
		notes []string // substrings, one per expected note, in order
	}{
		{file: "index_site.csv", unit: "mm", notes: []string{index}},
		{file: "index_zero.txt", notes: []string{"column 1 holds the consecutive whole numbers 0…9"}},
		{file: "trailing_separator.csv", unit: "mm"},
		{file: "quoted_bom.csv", unit: "mm"},
		{file: "quoted_fields.csv", unit: "mm", notes: []string{index}},
		{file: "sep_line.csv", unit: "mm", notes: []string{index}},
		{file: "decimal_comma_semicolon.csv", unit: "mm", notes: []string{index}},
		{file: "decimal_comma_tab.tsv", unit: "mm", notes: []string{index}},
		{file: "decimal_comma_flag.txt", opt: ReadOptions{DecimalComma: true}},
		{file: "unit_cells.csv", unit: "mm"},
		{file: "unit_cells_glued.csv", unit: "mm", notes: []string{`column 1 ("Site")`}},
		{file: "index_site.csv", opt: ReadOptions{Columns: []string{"Position [mm]"}}, unit: "mm", notes: []string{`read column 2 ("Position [mm]"), as asked`}},
		{file: "index_site.csv", opt: ReadOptions{Columns: []string{"position"}}, unit: "mm", notes: []string{`read column 2`}},
		{file: "index_site.csv", opt: ReadOptions{Columns: []string{"2"}}, unit: "mm", notes: []string{`read column 2`}},
		{file: "decimal_comma_semicolon.csv", opt: ReadOptions{DecimalComma: true}, unit: "mm", notes: []string{index}},
		{file: "index_site.csv", opt: ReadOptions{Format: FormatColumn}, unit: "mm", notes: []string{index}},
	}
	for _, tt := range tests {
		t.Run(tt.file, func(t *testing.T) {
			p, err := ReadFile(dialectFile(tt.file), tt.opt)
			if err != nil {
				t.Fatal(err)
			}
			if !slices.Equal(p.Positions, plain.Positions) {
				t.Errorf("positions = %v, want %v", p.Positions, plain.Positions)
			}
			if p.Unit != tt.unit {
				t.Errorf("unit = %q, want %q", p.Unit, tt.unit)
			}
			checkNotes(t, p.Notes, tt.notes)
			if p.Scan != nil {
				t.Errorf("scan = %+v, want nil", p.Scan)
			}
		})
	}
}

// TestReadColumnsCMM reads a CMM export with a name column and a constant
// z: with the X and Y columns chosen it gives the demo sample's positions,
// which hold the same x,y centroids, to the last bit.
func TestReadColumnsCMM(t *testing.T) {
	demo, err := ReadFile(filepath.Join("..", "testdata", "demo", "lw0412_cmm.csv"), ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	for _, cols := range [][]string{{"X", "Y"}, {"x [mm]", "y [mm]"}, {"2", "3"}} {
		p, err := ReadFile(dialectFile("cmm_name_xyz.csv"), ReadOptions{Columns: cols})
		if err != nil {
			t.Fatalf("%q: %v", cols, err)
		}
		if !slices.Equal(p.Positions, demo.Positions) || !slices.Equal(p.Rows, demo.Rows) || p.Unit != demo.Unit {
			t.Errorf("%q: positions, rows or unit %q differ from the demo's", cols, p.Unit)
		}
		if !slices.Equal(p.Notes[1:], demo.Notes) {
			t.Errorf("%q: notes %q, want a note on the columns then %q", cols, p.Notes, demo.Notes)
		}
	}
	// Y before X is another scan axis order, the same chain.
	p, err := ReadFile(dialectFile("cmm_name_xyz.csv"), ReadOptions{Columns: []string{"Y", "X"}})
	if err != nil {
		t.Fatal(err)
	}
	checkClose(t, "positions of Y,X", p.Positions, demo.Positions, 1e-9)
}

// TestReadIndexColumn checks when a column of consecutive whole numbers is
// and is not taken for a site index.
func TestReadIndexColumn(t *testing.T) {
	rows := func(format string, n int, f func(i int) []any) string {
		var b strings.Builder
		for i := range n {
			b.WriteString(strings.TrimSpace(fmt.Sprintf(format, f(i)...)) + "\n")
		}
		return b.String()
	}
	t.Run("a lattice along x stays a lattice", func(t *testing.T) {
		// x = 0, 1, 2, … and y constant: the x column is the only one that
		// varies. (Split at commas, "0,3" might be 0.3: refused above.)
		p, err := Read(strings.NewReader(rows("%d;%d", 12, func(i int) []any { return []any{i, 3} })), "in", ReadOptions{})
		if err != nil {
			t.Fatal(err)
		}
		if p.Scan == nil || len(p.Notes) != 1 || !strings.Contains(p.Notes[0], "projected onto their principal axis") {
			t.Errorf("notes %q, scan %+v: want the two columns read as centroids", p.Notes, p.Scan)
		}
	})
	t.Run("a header naming x keeps it", func(t *testing.T) {
		for _, header := range []string{"x,y", "x_mm,y_mm", "X [um],Y [um]"} {
			in := header + "\n" + rows("%d,%g", 12, func(i int) []any { return []any{i, 0.01 * float64(i%3)} })
			p, err := Read(strings.NewReader(in), "in", ReadOptions{})
			if err != nil {
				t.Fatal(err)
			}
			if p.Scan == nil {
				t.Errorf("%s: notes %q: want x,y read as centroids", header, p.Notes)
			}
		}
	})
	t.Run("step 2 is not an index", func(t *testing.T) {
		in := rows("%d;%g", 12, func(i int) []any { return []any{2 * i, 1.5 * float64(i)} })
		p, err := Read(strings.NewReader(in), "in", ReadOptions{})
		if err != nil {
			t.Fatal(err)
		}
		if p.Scan == nil {
			t.Errorf("notes %q: want both columns read", p.Notes)
		}
	})
	t.Run("site, x, y", func(t *testing.T) {
		in := "Site,x_um,y_um\n" + rows("%d,%g,%g", 12, func(i int) []any { return []any{i + 1, 1.5 * float64(i), 7.0} })
		p, err := Read(strings.NewReader(in), "in", ReadOptions{})
		if err != nil {
			t.Fatal(err)
		}
		if p.Scan == nil || p.Scan.Dim != 2 || p.Unit != "um" {
			t.Fatalf("scan %+v, unit %q: want x,y centroids in um", p.Scan, p.Unit)
		}
		checkNotes(t, p.Notes, []string{`column 1 ("Site") holds the consecutive whole numbers 1…12`, "12 centroids in 2 dimensions"})
		checkClose(t, "positions", p.Positions, []float64{0, 1.5, 3, 4.5, 6, 7.5, 9, 10.5, 12, 13.5, 15, 16.5}, 1e-12)
	})
	t.Run("the index chosen by --columns is read", func(t *testing.T) {
		p, err := ReadFile(dialectFile("index_site.csv"), ReadOptions{Columns: []string{"Site"}})
		if err != nil {
			t.Fatal(err)
		}
		if p.Positions[0] != 1 || p.Positions[9] != 10 || p.Unit != "" {
			t.Errorf("positions %v unit %q: want the site numbers 1…10, no unit", p.Positions, p.Unit)
		}
	})
}

// TestReadDialectsRefused: every dialect stays refused, at its line and
// field, where it is ambiguous or inconsistent.
func TestReadDialectsRefused(t *testing.T) {
	ten := func(f func(i int) string) string {
		var b strings.Builder
		for i := range 10 {
			b.WriteString(f(i) + "\n")
		}
		return b.String()
	}
	tests := []struct {
		name, in string
		opt      ReadOptions
		want     string
	}{
		{"trailing separator on one line", "1;2\n2;3;\n", ReadOptions{}, `in:2:3: empty last field: the line ends with ";" but line 1 does not (a missing value?)`},
		{"trailing separator missing", "1;2;\n2;3\n", ReadOptions{}, "in:2: the line does not end with a separator as line 1 does"},
		{"empty field", "1;;2\n", ReadOptions{}, "in:1:2: empty field (two separators in a row?)"},
		{"quote not closed", "\"1.5\n", ReadOptions{}, "in:1:1: the quote that opens field 1 is not closed"},
		{"text after quote", "1,\"2\"x,3\n", ReadOptions{}, "in:1:2: 'x' follows the closing quote of field 2"},
		{"quote inside", "1,2\"3\n", ReadOptions{}, "in:1:2: \"2\\\"3\" has a quote inside it"},
		{"sep line unknown", "sep=:\n1\n", ReadOptions{}, `in:1:1: a "sep=" line names ":"`},
		{"sep comma with decimal comma", "sep=,\n1\n", ReadOptions{DecimalComma: true}, `in:1:1: "sep=," makes ',' the separator, but --decimal-comma`},
		{"comma then point", "1;0,5\n2;1.5\n", ReadOptions{}, `in:2:2: "1.5" has a decimal point but from line 1 on ',' is the decimal mark`},
		{"point then comma", "1;0.5\n2;1,5\n", ReadOptions{}, `in:2:2: "1,5" has a decimal comma but line 1 writes numbers with a decimal point`},
		{"grouping with the flag", "1.234,5\n", ReadOptions{DecimalComma: true}, `in:1:1: "1.234,5" has a decimal point but with --decimal-comma ',' is the decimal mark`},
		{"quoted decimal comma", ten(func(i int) string { return `"` + string(rune('0'+i)) + `,5"` }), ReadOptions{}, `in:1:1: "0,5" is not a number; if ',' is the decimal mark, pass --decimal-comma`},
		{"decimal comma or two columns", ten(func(i int) string { return string(rune('0'+i)) + ",5" }), ReadOptions{}, "in:1: every row is two whole numbers split at a comma"},
		{"unit on some cells", "0 mm\n1\n", ReadOptions{}, `in:2:1: "1" has no unit but the cells of column 1 on line 1 are in mm`},
		{"units disagree across columns", ten(func(i int) string { return string(rune('0'+i)) + " mm;0 um" }), ReadOptions{}, `in:1:2: the cells of column 2 are in um but those of column 1 are in mm`},
		{"cell unit against header", "pos [um]\n" + ten(func(i int) string { return string(rune('0'+i)) + " mm" }), ReadOptions{}, `in:2:1: the cells of column 1 are in mm but the header names "um" for column 1`},
		{"text column", "Name,X,Y\nA,1,2\n", ReadOptions{}, `in:2:1: "A" is not a number: column 1 ("Name") holds text, not coordinates; choose the columns to read with --columns, e.g. --columns X,Y`},
		{"columns: no such name", "a,b\n1,2\n", ReadOptions{Columns: []string{"c"}}, `in:1: --columns c: no column is named so; the header names "a", "b"`},
		{"columns: no header", "1,2\n", ReadOptions{Columns: []string{"b"}}, "in:1: --columns b: the file has no header row to name its columns"},
		{"columns: out of range", "1,2\n", ReadOptions{Columns: []string{"3"}}, "in:1: --columns 3: there is no column 3; the rows have 2"},
		{"columns: twice", "a,b\n1,2\n", ReadOptions{Columns: []string{"a", "1"}}, "in:2: --columns 1: column 1 is chosen twice"},
		{"columns: two names alike", "a [mm],A [um]\n1,2\n", ReadOptions{Columns: []string{"A"}}, "--columns A: columns 1 and 2 are both named so"},
		{"columns of JSON", `{"positions":[1,2]}`, ReadOptions{Columns: []string{"1"}}, "in: --columns chooses columns of a table, but this input is JSON"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := Read(strings.NewReader(tt.in), "in", tt.opt)
			if err == nil || !strings.Contains(err.Error(), tt.want) {
				t.Errorf("error %v, want it to contain %q", err, tt.want)
			}
		})
	}
}

// TestRead2DRefused: a 2D point set is refused however elongated, and a
// chain with scatter across its line is read, by the one rule IsPlanar.
func TestRead2DRefused(t *testing.T) {
	// A 64×64 rhombus of a hexagonal lattice (unit step): its spreads
	// across and along its long diagonal differ by √3, so a bound on the
	// ratio of spreads alone would take it for a chain.
	var b strings.Builder
	b.WriteString("x,y\n")
	for i := range 64 {
		for j := range 64 {
			b.WriteString(fmt.Sprintf("%.9f,%.9f\n", float64(i)+0.5*float64(j), math.Sqrt(3)/2*float64(j)))
		}
	}
	_, err := Read(strings.NewReader(b.String()), "rhombus.csv", ReadOptions{})
	if err == nil || !strings.Contains(err.Error(), "rhombus.csv: the centroids do not lie along a line: half of them sit") ||
		!strings.Contains(err.Error(), "this is a 2D point set") {
		t.Errorf("rhombus: error %v, want a 2D point set refused", err)
	}

	// Two rows one step apart, the narrowest 2D set: a figure near 1.
	b.Reset()
	for i := range 30 {
		b.WriteString(fmt.Sprintf("%d.5,0\n%d.5,1\n", i, i))
	}
	_, err = Read(strings.NewReader(b.String()), "ladder.csv", ReadOptions{})
	// Every site is a/2 off the line; the central 54 of the 60
	// projections (3 trimmed at each end) span 27a over 53 gaps.
	want := fmt.Sprintf("half of them sit %.2g spacings or more off their best line", 0.5/(27.0/53))
	if err == nil || !strings.Contains(err.Error(), want) {
		t.Errorf("ladder: error %v, want %q", err, want)
	}

	// A zigzag chain 0.3 spacings either side of its line is a chain.
	b.Reset()
	for i := range 30 {
		b.WriteString(fmt.Sprintf("%d.25,%g\n", i, 0.3*float64(1-2*(i%2))))
	}
	p, err := Read(strings.NewReader(b.String()), "zigzag.csv", ReadOptions{})
	if err != nil {
		t.Fatalf("zigzag: %v", err)
	}
	if math.Abs(p.Scan.TransverseRMS-0.3) > 0.01 {
		t.Errorf("zigzag: transverse RMS %g, want about 0.3", p.Scan.TransverseRMS)
	}

	// A 360-site chain with one stray centroid 10 spacings off its line (a
	// speck on the stage) is still a chain: the rule reads the median.
	b.Reset()
	for i := range 360 {
		y := 0.01 * float64(i%3)
		if i == 200 {
			y = 10
		}
		b.WriteString(fmt.Sprintf("%d,%g\n", i, y))
	}
	if _, err := Read(strings.NewReader("x,y\n"+b.String()), "speck.csv", ReadOptions{}); err != nil {
		t.Errorf("speck: a chain with one stray site was refused: %v", err)
	}
}

// TestReadDecimalCommaFlag: testdata/bad/decimal_comma.csv, a column of
// whole numbers with one "5,25", is ambiguous as it stands (refused in
// the bad corpus) and reads with DecimalComma.
func TestReadDecimalCommaFlag(t *testing.T) {
	p, err := ReadFile(filepath.Join("..", "testdata", "bad", "decimal_comma.csv"), ReadOptions{DecimalComma: true})
	if err != nil {
		t.Fatal(err)
	}
	if want := []float64{0, 1, 2, 3, 4, 5.25, 6, 7, 8, 9}; !slices.Equal(p.Positions, want) {
		t.Errorf("positions = %v, want %v", p.Positions, want)
	}
}
