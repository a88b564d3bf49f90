package pattern

import (
	"bytes"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// fuzzSeeds adds every file of testdata/read/good, testdata/read/bad and
// testdata/dialects to the seed corpus of f, so the fuzzer starts from real
// layouts, from every spreadsheet dialect and from the faults already known.
func fuzzSeeds(f *testing.F, add func(data []byte)) {
	for _, dir := range []string{filepath.Join("read", "good"), filepath.Join("read", "bad"), "dialects"} {
		paths, err := filepath.Glob(filepath.Join("..", "testdata", dir, "*"))
		if err != nil {
			f.Fatal(err)
		}
		for _, p := range paths {
			data, err := os.ReadFile(p)
			if err != nil {
				f.Fatal(err)
			}
			add(data)
		}
	}
}

// checkRead asserts the contract of Read on arbitrary bytes: it returns
// either an *InputError naming the source, or a Pattern that keeps the
// documented invariant (at least MinSites finite positions, strictly
// ascending, one Rows entry per site).
func checkRead(t *testing.T, data []byte, opt ReadOptions) {
	t.Helper()
	p, err := Read(bytes.NewReader(data), "fuzz.in", opt)
	if err != nil {
		var ie *InputError
		if !errors.As(err, &ie) {
			t.Fatalf("error %q (%T) is not an *InputError", err, err)
		}
		if ie.File != "fuzz.in" {
			t.Fatalf("error names file %q, want fuzz.in", ie.File)
		}
		if p != nil {
			t.Fatalf("a pattern came back with the error %v", err)
		}
		return
	}
	if p == nil {
		t.Fatal("nil pattern and nil error")
	}
	checkInvariant(t, p)
}

// checkInvariant asserts the Pattern invariant stated on the type.
func checkInvariant(t *testing.T, p *Pattern) {
	t.Helper()
	if len(p.Positions) < MinSites {
		t.Fatalf("%d sites, want at least %d", len(p.Positions), MinSites)
	}
	for i, x := range p.Positions {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			t.Fatalf("position %d is %v", i, x)
		}
		if i > 0 && !(x > p.Positions[i-1]) {
			t.Fatalf("positions %d,%d = %v,%v not strictly ascending", i-1, i, p.Positions[i-1], x)
		}
	}
	if p.Rows != nil && len(p.Rows) != len(p.Positions) {
		t.Fatalf("%d rows for %d sites", len(p.Rows), len(p.Positions))
	}
	if m := p.MeanSpacing(); math.IsNaN(m) || math.IsInf(m, 0) || m <= 0 {
		t.Fatalf("mean spacing %v", m)
	}
}

// FuzzReadAuto feeds arbitrary bytes to Read with format detection, which
// reaches the column, centroid, tile (refused without lengths) and JSON
// readers.
func FuzzReadAuto(f *testing.F) {
	fuzzSeeds(f, func(data []byte) { f.Add(data) })
	for _, s := range dialectSeeds {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		checkRead(t, data, ReadOptions{})
	})
}

// dialectSeeds are small inputs in each spreadsheet dialect and on the
// edges between them.
var dialectSeeds = []string{
	"sep=;\n\"Site\";\"Position [mm]\"\n1;0,5\n2;1,5\n3;2,5\n4;3,5\n5;4,5\n6;5,5\n7;6,5\n8;7,5\n",
	"\xef\xbb\xbf\"x [um]\",\"y [um]\"\n\"0\",\"1\"\n\"1\",\"1\"\n\"2\",\"1\"\n\"3\",\"1\"\n\"4\",\"1\"\n\"5\",\"1\"\n\"6\",\"1\"\n\"7\",\"1\"\n",
	"1.5;\n2.5;\n3;\n4;\n5.5;\n6;\n7;\n8.5;\n",
	"1;0,25\t\n2\t1,5\n3\t2,5\n4\t3,5\n5\t4,5\n6\t5,5\n7\t6,5\n8\t7,5\n",
	"0 mm\n1 mm\n2.5 mm\n3mm\n4 mm\n5 mm\n6 mm\n7 mm\n",
	"Name,X,Y,Z\nA,0,0,0\nB,1,0,0\nC,2,0,0\nD,3,0,0\nE,4,0,0\nF,5,0,0\nG,6,0,0\nH,7,0,0\n",
	"\"a\"\"b\",\"1\"\n\"2\"x;3\n\"",
	"0,5\n1,5\n2,5\n3,5\n4,5\n5,5\n6,5\n7,5\n",
}

// FuzzReadColumns feeds arbitrary bytes to the column reader, as positions
// or spacings, with or without --decimal-comma and with any --columns
// (comma separated, as the flag is).
func FuzzReadColumns(f *testing.F) {
	fuzzSeeds(f, func(data []byte) { f.Add(data, false, false, "") })
	f.Add([]byte("1\n2\n3\n4\n5\n6\n7\n8\n9\n"), true, false, "")
	for _, s := range dialectSeeds {
		f.Add([]byte(s), false, true, "")
		f.Add([]byte(s), false, false, "2")
		f.Add([]byte(s), true, false, "Position")
		f.Add([]byte(s), false, true, "X,Y")
	}
	f.Fuzz(func(t *testing.T, data []byte, spacings, decimalComma bool, columns string) {
		opt := ReadOptions{Format: FormatColumn, DecimalComma: decimalComma}
		if spacings {
			opt.Format = FormatSpacings
		}
		if columns != "" {
			opt.Columns = strings.Split(columns, ",")
			if !spacings {
				opt.Format = FormatAuto // one column or centroids, as chosen
			}
		}
		if checkOptions(opt) != nil {
			return // the options, not the input, are refused: a plain error
		}
		checkRead(t, data, opt)
	})
}

// FuzzReadCentroids feeds arbitrary bytes to the centroid reader.
func FuzzReadCentroids(f *testing.F) {
	fuzzSeeds(f, func(data []byte) { f.Add(data) })
	for _, s := range dialectSeeds {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		checkRead(t, data, ReadOptions{Format: FormatCentroids})
	})
}

// FuzzReadTiles feeds arbitrary bytes and tile-length strings to the tile
// reader, the way "--tiles A=1,B=1.618" reaches it.
func FuzzReadTiles(f *testing.F) {
	fuzzSeeds(f, func(data []byte) { f.Add(data, "A=1,B=1.618") })
	f.Add([]byte("ABAABABAABAAB"), "A=1,B=0")
	f.Add([]byte("ABAABABAABAAB"), "A=1e308,B=1e308")
	f.Fuzz(func(t *testing.T, data []byte, lengths string) {
		tiles, err := ParseTileLengths(lengths)
		if err != nil {
			return
		}
		for k, v := range tiles {
			if math.IsNaN(v) || math.IsInf(v, 0) || v <= 0 {
				t.Fatalf("ParseTileLengths(%q) accepted %s=%v", lengths, k, v)
			}
		}
		checkRead(t, data, ReadOptions{Format: FormatTiles, Tiles: tiles})
	})
}

// FuzzReadJSON feeds arbitrary bytes to the JSON reader.
func FuzzReadJSON(f *testing.F) {
	fuzzSeeds(f, func(data []byte) { f.Add(data) })
	f.Add([]byte(`{"positions":[0,1,2,3,4,5,6,7,8,9e999999999]}`))
	f.Add([]byte(`{"sites":[[[[[[[[[[[[[[[[[[[[]]]]]]]]]]]]]]]]]]]}`))
	f.Fuzz(func(t *testing.T, data []byte) {
		checkRead(t, data, ReadOptions{Format: FormatJSON})
	})
}

// FuzzNew builds patterns from arbitrary float64s, as the generators and
// the callers of the library do.
func FuzzNew(f *testing.F) {
	f.Add(0.0, 1.0, 1.618, 1e-9, 12)
	f.Add(math.MaxFloat64, -math.MaxFloat64, 1.0, 0.0, 9)
	f.Add(0.0, 1.0, -1.0, 5e-324, 64)
	f.Fuzz(func(t *testing.T, start, a, b, c float64, n int) {
		n = min(max(n, 0), 64)
		pos := make([]float64, n)
		x := start
		steps := [3]float64{a, b, c}
		for i := range pos {
			pos[i] = x
			x += steps[i%3]
		}
		p, err := New(pos, "", "fuzz")
		if err != nil {
			return
		}
		checkInvariant(t, p)
	})
}

// FuzzReadSites feeds arbitrary bytes to ReadSites, with format detection
// or as centroids: it returns an *InputError naming the source and no
// sites, or exactly one of a chain that keeps the Pattern invariant and a
// plane that keeps the Plane invariant and that IsPlanar calls planar.
func FuzzReadSites(f *testing.F) {
	fuzzSeeds(f, func(data []byte) { f.Add(data, false) })
	for _, s := range dialectSeeds {
		f.Add([]byte(s), true)
	}
	f.Add([]byte("x,y\n0,0\n1,0\n2,0\n0,1\n1,1\n2,1\n0,2\n1,2\n2,2\n"), false)
	f.Add([]byte(`{"sites":[{"x":0,"y":0},{"x":1,"y":0},{"x":0,"y":1},{"x":1,"y":1},{"x":2,"y":0},{"x":2,"y":1},{"x":0,"y":2},{"x":1,"y":2},{"x":2,"y":2}]}`), false)
	f.Fuzz(func(t *testing.T, data []byte, centroids bool) {
		opt := ReadOptions{}
		if centroids {
			opt.Format = FormatCentroids
		}
		s, err := ReadSites(bytes.NewReader(data), "fuzz.in", opt)
		if err != nil {
			var ie *InputError
			if !errors.As(err, &ie) || ie.File != "fuzz.in" {
				t.Fatalf("error %q (%T) is not an *InputError naming fuzz.in", err, err)
			}
			if s.Chain != nil || s.Plane != nil {
				t.Fatalf("sites came back with the error %v", err)
			}
			return
		}
		if (s.Chain == nil) == (s.Plane == nil) {
			t.Fatalf("chain %v, plane %v: want exactly one", s.Chain != nil, s.Plane != nil)
		}
		if s.Chain != nil {
			checkInvariant(t, s.Chain)
			return
		}
		p := s.Plane
		if len(p.Points) < MinSites || len(p.Rows) != len(p.Points) {
			t.Fatalf("%d points, %d rows", len(p.Points), len(p.Rows))
		}
		for i, q := range p.Points {
			if math.IsNaN(q[0]) || math.IsInf(q[0], 0) || math.IsNaN(q[1]) || math.IsInf(q[1], 0) {
				t.Fatalf("point %d is %v", i, q)
			}
		}
		if _, _, dup := closePair(p.Points); dup || !IsPlanar(p.Points) {
			t.Fatalf("plane with a close pair (%v) or not planar (%v)", dup, IsPlanar(p.Points))
		}
	})
}
