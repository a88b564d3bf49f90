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
			named, ok := namedByBetti([3]int(c.betti(1)))
			if !ok || named.Class != c.Class {
				t.Errorf("%s: Betti numbers %v name %q", c.Class, c.betti(1), named.Class)
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
	got := regexp.MustCompile("`([a-z]+)`").FindAllStringSubmatch(row[1], -1)
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
