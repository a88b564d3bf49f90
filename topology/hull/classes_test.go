package hull

import (
	"os"
	"regexp"
	"strings"
	"testing"
)

// Every class Analyze can name has exactly one entry in the class table,
// with a summary, Betti numbers and generators; the barcodes name each
// class with angles by its own Betti numbers.
func TestClassTable(t *testing.T) {
	seen := map[Class]int{}
	for _, c := range Classes() {
		seen[c.Class]++
		if c.Summary == "" || c.Betti == "" || c.Generators == "" || c.betti == nil {
			t.Errorf("%s: incomplete entry %+v", c.Class, c)
		}
		if len(c.Summary) > 66 {
			t.Errorf("%s: summary of %d bytes does not fit a help line", c.Class, len(c.Summary))
		}
		if c.angles > 0 {
			for p := 1; p <= maxComponents; p++ {
				named, q, ok := namedByBetti([3]int(c.betti(p)))
				if !ok || named.Class != c.Class || q != p {
					t.Errorf("%s: Betti numbers %v name %q with %d components, want %d", c.Class, c.betti(p), named.Class, q, p)
				}
			}
			if c.reason == "" || c.labels == nil {
				t.Errorf("%s: a class with angles needs a reason and labels", c.Class)
			}
		}
	}
	for c := range classes { // the documented values (fuzz_test.go)
		if seen[c] != 1 {
			t.Errorf("class %s has %d entries in the table, want 1", c, seen[c])
		}
	}
	if len(seen) != len(classes) {
		t.Errorf("the table has %d classes, the documented values %d", len(seen), len(classes))
	}
}

// The Betti numbers of p disjoint d-tori are p·C(d, k) (Künneth formula
// for the torus T^d = (S^1)^d, additivity over disjoint unions; common
// practice): checked against the ranks computed independently by
// multiplying Poincaré polynomials (1 + t)^d.
func TestTorusBetti(t *testing.T) {
	for d := 0; d <= 3; d++ {
		poly := []int{1} // (1 + t)^d, built by repeated multiplication
		for range d {
			next := make([]int, len(poly)+1)
			for i, c := range poly {
				next[i] += c
				next[i+1] += c
			}
			poly = next
		}
		for p := 1; p <= 4; p++ {
			got := torusBetti(d)(p)
			for k := range 3 {
				want := 0
				if k < len(poly) {
					want = p * poly[k]
				}
				if got[k] != want {
					t.Errorf("%d × T^%d: b%d = %d, want %d", p, d, k, got[k], want)
				}
			}
		}
		if ci := info(classOf(1, d)); ci.TorusDimension != d {
			t.Errorf("classOf(1, %d) = %s of torus dimension %d", d, ci.Class, ci.TorusDimension)
		}
	}
	if got := torusBetti(1)(2); got[0] != 2 || got[1] != 2 || got[2] != 0 {
		t.Errorf("two circles: Betti %v, want (2, 2, 0)", got)
	}
}

// The README lists the classes where it documents hull.class and in the
// accuracy section's confusion matrix, in the table's order.
func TestReadmeListsClasses(t *testing.T) {
	b, err := os.ReadFile("../../README.md")
	if err != nil {
		t.Fatal(err)
	}
	var want []string
	for _, c := range Classes() {
		want = append(want, string(c.Class))
	}
	readme := string(b)
	row := regexp.MustCompile("(?m)^\\| `hull.class` \\| (.*) \\|$").FindStringSubmatch(readme)
	if row == nil {
		t.Fatal("README: no row documenting hull.class")
	}
	got := regexp.MustCompile("`([a-z][a-z0-9]*)`").FindAllStringSubmatch(row[1], -1)
	var names []string
	for _, g := range got {
		names = append(names, g[1])
	}
	if strings.Join(names, ",") != strings.Join(want, ",") {
		t.Errorf("README hull.class lists %v, the class table %v", names, want)
	}
	header := regexp.MustCompile(`(?m)^\| true \\ reported \| (.*) \| correct \|$`).FindStringSubmatch(readme)
	if header == nil {
		t.Fatal("README: no confusion matrix")
	}
	if cols := strings.Split(header[1], " | "); strings.Join(cols, ",") != strings.Join(want, ",") {
		t.Errorf("README confusion matrix columns %v, the class table %v", cols, want)
	}
}
