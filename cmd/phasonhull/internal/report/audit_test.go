package report

import (
	"testing"

	"phasonhull/topology/audit"
	"phasonhull/topology/hull"
)

// AuditOf shows the verdict and its reasons, and a table row for each part
// of the audit the report holds: calibration and tolerance only when
// there, the hull comparison's verdict when the hulls were compared.
func TestAuditOf(t *testing.T) {
	off, offErr, scale, scaleErr, tol := 13.41, 0.002, 1.0000004, 1.4e-6, 0.05
	rep := &audit.Report{Verdict: audit.Fail, Reasons: []string{"1 design site(s) missing, 0 allowed"}, Design: "d.json", Unit: "mm",
		DesignSites: 361, MeasuredSites: 360, Matched: 360, Missing: []int{239},
		Offset: &off, OffsetErr: &offErr, Scale: &scale, ScaleErr: &scaleErr, Tolerance: &tol,
		RMS: 0.0079, Max: 0.0246, Sigma: 0.0087,
		Hull: audit.Hulls{Comparison: &hull.Comparison{Verdict: "both hulls are circles"}}}
	a := AuditOf(rep)
	if a.Verdict != "fail" || a.Design != "d.json" || len(a.Reasons) != 1 {
		t.Errorf("heading %+v", a)
	}
	want := [][2]string{
		{"sites", "design 361, measured 360: 360 matched, 1 missing, 0 extra"},
		{"calibration", "offset 13.4100 ± 0.0020 mm, scale 1.0000004 ± 0.0000014"},
		{"residuals", "rms 0.0079 mm, max 0.0246 mm, robust sigma 0.0087 mm"},
		{"tolerance", "0.05 mm"},
		{"outliers", "0"},
		{"hull comparison", "both hulls are circles"},
	}
	if len(a.Rows) != len(want) {
		t.Fatalf("rows %q, want %q", a.Rows, want)
	}
	for i := range want {
		if a.Rows[i] != want[i] {
			t.Errorf("row %d: %q, want %q", i, a.Rows[i], want[i])
		}
	}
	// Screening against the sample's own hull: no calibration, no
	// tolerance, no comparison, no unit.
	a = AuditOf(&audit.Report{Verdict: audit.Pass, MeasuredSites: 10, Matched: 10})
	for _, r := range a.Rows {
		if r[0] == "calibration" || r[0] == "tolerance" || r[0] == "hull comparison" {
			t.Errorf("screening shows %q", r)
		}
	}
	if len(a.Rows) != 3 {
		t.Errorf("screening rows %q", a.Rows)
	}
}
