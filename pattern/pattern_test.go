package pattern

import (
	"slices"
	"strings"
	"testing"
)

// Rows maps every site back to its input row, for unsorted columns and for
// centroids in any order (common practice: a permutation and its inverse).
func TestRowsMapBackToInput(t *testing.T) {
	in := []float64{3, 1, 7, 5, 2, 8, 4, 6, 9}
	p, err := New(in, "", "test")
	if err != nil {
		t.Fatal(err)
	}
	for i, r := range p.Rows {
		if in[r] != p.Positions[i] {
			t.Errorf("site %d at %v came from row %d holding %v", i, p.Positions[i], r, in[r])
		}
	}
	csv := "x,y\n3,0\n1,0.01\n7,0\n5,-0.01\n2,0\n8,0.01\n4,0\n6,-0.01\n9,0\n"
	q, err := Read(strings.NewReader(csv), "scan.csv", ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if q.Scan == nil || len(q.Rows) != 9 {
		t.Fatalf("scan %v rows %v", q.Scan, q.Rows)
	}
	sorted := slices.Clone(q.Rows)
	slices.Sort(sorted)
	for i, r := range sorted {
		if r != i {
			t.Fatalf("rows %v are not a permutation", q.Rows)
		}
	}
	for i := 1; i < 9; i++ {
		if in[q.Rows[i]] <= in[q.Rows[i-1]] {
			t.Errorf("rows %v do not list the input rows in chain order", q.Rows)
		}
	}
}
