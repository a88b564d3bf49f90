package pattern

import (
	"errors"
	"reflect"
	"slices"
	"strings"
	"testing"
)

func TestReadPoints(t *testing.T) {
	text := "# header\n1 2 3\n\n4,5,6 # trailing\n  7 ,\t8 , 9\n1e-3\t-2\t+3.5\n"
	pts, err := ReadPoints(strings.NewReader(text), "t")
	if err != nil {
		t.Fatal(err)
	}
	want := [][]float64{{1, 2, 3}, {4, 5, 6}, {7, 8, 9}, {1e-3, -2, 3.5}}
	if !reflect.DeepEqual(pts, want) {
		t.Errorf("got %v, want %v", pts, want)
	}
	// Appending to one point must not overwrite the next.
	_ = append(pts[0], 99)
	if pts[1][0] != 4 {
		t.Errorf("points share capacity: %v", pts)
	}
}

// checkRefused asserts that err is an *InputError whose message is want.
func checkRefused(t *testing.T, what string, err error, want string) {
	t.Helper()
	var ie *InputError
	if !errors.As(err, &ie) {
		t.Errorf("%s: %v, want an *InputError", what, err)
		return
	}
	if err.Error() != want {
		t.Errorf("%s: %q, want %q", what, err, want)
	}
}

func TestReadPointsBad(t *testing.T) {
	for _, c := range []struct{ in, want string }{
		{"0 0\n1 0\n0 1 2\n", "c.txt:3: expected 2 columns like the first data row (line 1), got 3"},
		{"# two columns\n0, 0\n1, x\n", `c.txt:3:2: "x" is not a number`},
		{"0,0\n1,,0\n", "c.txt:2:2: empty field (two separators in a row?)"},
		{"0,0\n1,NaN\n", `c.txt:2:2: "NaN" is not a finite number`},
		{"x,y\n0,0\n", `c.txt:1:1: "x" is not a number`}, // no header in a cloud
		{"# nothing\n", "c.txt: has no data rows"},
		{"", "c.txt: is empty"},
		{"0\x000\n", "c.txt: is not a text file: NUL byte on line 1"},
	} {
		_, err := ReadPoints(strings.NewReader(c.in), "c.txt")
		checkRefused(t, "ReadPoints("+c.in+")", err, c.want)
	}
	_, err := ReadPoints(strings.NewReader("1 2\n3\n"), "-")
	checkRefused(t, "standard input", err, "<stdin>:2: expected 2 columns like the first data row (line 1), got 1")
}

func TestReadCouplings(t *testing.T) {
	d, c, err := ReadCouplings(strings.NewReader("# measured couplings\ndistance,coupling\n1.0, 2.0\n1.5;1.0\n2.0\t0.5\n"), "t.csv")
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(d, []float64{1, 1.5, 2}) || !slices.Equal(c, []float64{2, 1, 0.5}) {
		t.Errorf("read %v, %v", d, c)
	}
	for _, c := range []struct{ in, want string }{
		{"1,2\n", "t.csv:1: a coupling table needs at least two rows, this one has 1"},
		{"1,2\n1,3\n", "t.csv:2:1: distance 1 does not exceed 1 on line 1; distances must ascend"},
		{"1,2\n0.5,3\n", "t.csv:2:1: distance 0.5 does not exceed 1 on line 1; distances must ascend"},
		{"1,2\n2,x\n", `t.csv:2:2: "x" is not a number`},
		{"1,2\n2,3,4\n", "t.csv:2: expected 2 columns like the first data row (line 1), got 3"},
		{"1,2,3\n2,3,4\n", "t.csv:1: has 3 columns; a coupling table has 2 (distance, coupling)"},
		{"-1,2\n2,3\n", "t.csv:1:1: distance -1 is not positive"},
		{"1,2\n2,NaN\n", `t.csv:2:2: "NaN" is not a finite number`},
		{"distance,coupling\n", "t.csv:1: has a header row but no data rows"},
		{"", "t.csv: is empty"},
	} {
		_, _, err := ReadCouplings(strings.NewReader(c.in), "t.csv")
		checkRefused(t, "ReadCouplings("+c.in+")", err, c.want)
	}
}

func TestReadValues(t *testing.T) {
	v, err := ReadValues(strings.NewReader("# resonances\nfrequency_GHz,q\n1.5,200\n\n2.5 100\n0.5\n"), "f.csv")
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(v, []float64{1.5, 2.5, 0.5}) {
		t.Errorf("read %v", v)
	}
	for _, c := range []struct{ in, want string }{
		{"1\n", "f.csv: has 1 value(s); at least two are needed"},
		{"1\nx\n", `f.csv:2:1: "x" is not a number`},
		{"1\n2\nInf\n", `f.csv:3:1: "Inf" is not a finite number`},
		{"1\n2,,3\n", "f.csv:2:2: empty field (two separators in a row?)"},
		{"energy\n", "f.csv: has 0 value(s); at least two are needed"},
		{"", "f.csv: is empty"},
	} {
		_, err := ReadValues(strings.NewReader(c.in), "f.csv")
		checkRefused(t, "ReadValues("+c.in+")", err, c.want)
	}
}
