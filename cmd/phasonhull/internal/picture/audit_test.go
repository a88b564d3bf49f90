package picture

import (
	"math"
	"testing"

	"phasonhull/topology/audit"
)

// AuditSitesOf takes each matched site's position, residual and flag, the
// defects and the tolerance from the report; a report with no matched site
// has nothing to draw.
func TestAuditSitesOf(t *testing.T) {
	if _, ok := AuditSitesOf(&audit.Report{Measured: "s.csv"}); ok {
		t.Error("no matched site: something to draw")
	}
	tol := 0.05
	rep := &audit.Report{Measured: "s.csv", Unit: "mm", Verdict: audit.Fail, OutlierThreshold: 0.03, Tolerance: &tol,
		Sites: []audit.Site{{Position: 1, Residual: 0.01}, {Position: 2, Residual: 0.08, Outlier: true}}}
	a, ok := AuditSitesOf(rep)
	if !ok {
		t.Fatal("matched sites: nothing to draw")
	}
	if a.Source != "s.csv" || a.Unit != "mm" || a.Verdict != "fail" || a.Tolerance != tol || a.OutlierThreshold != 0.03 {
		t.Errorf("heading %+v", a)
	}
	if len(a.Position) != 2 || a.Position[1] != 2 || a.Residual[1] != 0.08 || a.Flagged[0] || !a.Flagged[1] {
		t.Errorf("sites %v %v %v", a.Position, a.Residual, a.Flagged)
	}
	rep.Tolerance = nil
	if a, _ := AuditSitesOf(rep); a.Tolerance != 0 || math.IsNaN(a.Tolerance) {
		t.Errorf("no tolerance given: %g", a.Tolerance)
	}
}
