package audit_test

import (
	"context"
	"fmt"
	"log"

	"phasonhull/pattern"
	"phasonhull/pattern/design"
	"phasonhull/topology/audit"
	"phasonhull/topology/hull"
)

// Audit the shipped demo sample, a chain measured on a coordinate-measuring
// machine, against its design spec: the calibration is near the identity,
// the hulls agree, and one design site is missing, which fails the sample
// unless it is allowed.
func ExampleRun() {
	f, err := design.ReadFile("../../testdata/demo/lw0412_design.json", "")
	if err != nil {
		log.Fatal(err)
	}
	d := audit.NewDesign(context.Background(), f, hull.Options{})
	sample, err := pattern.ReadFile("../../testdata/demo/lw0412_cmm.csv", pattern.ReadOptions{})
	if err != nil {
		log.Fatal(err)
	}
	rep, err := audit.Run(context.Background(), d, sample, audit.Options{})
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("%s: %v\n", rep.Verdict, rep.Reasons)
	fmt.Printf("missing design sites %v\n", rep.Missing)
	fmt.Printf("offset %.2f %s, scale %+.1f ppm\n", *rep.Offset, rep.Unit, (*rep.Scale-1)*1e6)
	fmt.Println("hulls agree:", rep.Hull.Comparison.Agree)

	rep, err = audit.Run(context.Background(), d, sample, audit.Options{AllowMissing: 1})
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println(rep.Verdict)
	// Output:
	// fail: [1 design site(s) missing, 0 allowed]
	// missing design sites [239]
	// offset 13.41 mm, scale +0.4 ppm
	// hulls agree: true
	// pass
}
