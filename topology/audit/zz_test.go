package audit_test

import (
	"fmt"
	"testing"

	"phasonhull/topology/audit"
)

func TestZZ(t *testing.T) {
	d := readDesign(t, "design.json")
	p, _ := defects{offset: 700, scale: 1 + 1e-4, missing: []int{40, 130}, displaced: map[int]float64{90: 30}}.build(t, d)
	rep := run(t, d, p, audit.Options{})
	fmt.Println(rep.Hull.Measured.Hull.Reason, rep.Hull.Measured.Warnings)
}
