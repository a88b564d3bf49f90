package audit_test

import (
	"math"
	"slices"
	"testing"

	"phasonhull/pattern"
	"phasonhull/topology/audit"
)

// Defects lists each injected defect once, with the indices a person needs
// to find it — the design index of a missing site, the file row of an
// extra one, both for a displaced one — ordered by position, and a missing
// site where the calibration puts its design site.
func TestDefectsListInjectedSites(t *testing.T) {
	d := readDesign(t, "design.json")
	s := defects{offset: 2500, scale: 1 + 3e-4, missing: []int{77}, displaced: map[int]float64{120: 30}, extraAfter: []int{150}}
	p, extra := s.build(t, d)
	rep := run(t, d, p, audit.Options{Tolerance: pattern.Length{Value: 20, Unit: "nm"}})
	got := rep.Defects()
	kinds := map[string]int{}
	for i, df := range got {
		kinds[df.Kind]++
		if i > 0 && got[i-1].Position > df.Position {
			t.Errorf("defects not ordered by position at %d", i)
		}
		switch df.Kind {
		case audit.DefectMissing:
			if !slices.Equal(df.Design, []int{77}) || len(df.Measured) != 0 {
				t.Errorf("missing: %+v, want design #77 and no row", df)
			}
			// The design site 77 calibrated into the sample's frame.
			want := s.offset + s.scale*d.File.Pattern.Positions[77]
			if math.Abs(df.Position-want) > 10 {
				t.Errorf("missing site at %.1f, want about %.1f", df.Position, want)
			}
		case audit.DefectExtra:
			if !slices.Equal(df.Measured, extra) || len(df.Design) != 0 {
				t.Errorf("extra: %+v, want row %v and no design index", df, extra)
			}
		case audit.DefectOutOfTolerance:
			if !slices.Equal(df.Design, []int{120}) || math.Abs(df.Residual-30) > 10 {
				t.Errorf("out of tolerance: %+v, want design #120 about 30 nm off", df)
			}
			if row := df.Measured[0]; p.Positions[row] != df.Position {
				t.Errorf("row %d holds %g, the defect says %g", row, p.Positions[row], df.Position)
			}
		default:
			t.Errorf("unexpected defect %+v", df)
		}
	}
	if kinds[audit.DefectMissing] != 1 || kinds[audit.DefectExtra] != 1 || kinds[audit.DefectOutOfTolerance] != 1 {
		t.Errorf("defects by kind %v, want one missing, one extra, one out of tolerance", kinds)
	}
}
