package batch_test

import (
	"context"
	"fmt"

	"phasonhull/pattern"
	"phasonhull/pattern/design"
	"phasonhull/topology/audit"
	"phasonhull/topology/batch"
)

// Two generated chains and a file that cannot be read, analysed on two
// workers: one row each, in the order given.
func ExampleRun() {
	specs := map[string]design.Spec{
		"modulated.csv": {Family: design.Modulated, Sites: 400, Theta: 0.2763, Sin: []float64{0.1}},
		"cell.csv":      {Family: design.Periodic, Sites: 120, Cell: []float64{1, 1.5}},
	}
	load := func(path string) (*pattern.Pattern, error) {
		s, ok := specs[path]
		if !ok {
			return nil, fmt.Errorf("%s: no such file", path)
		}
		return design.Generate(s)
	}
	sum := batch.Run(context.Background(), []string{"modulated.csv", "missing.csv", "cell.csv"}, load, nil, audit.Options{}, 2, nil)
	for _, r := range sum.Rows {
		if r.Error != "" {
			fmt.Printf("%-14s error: %s\n", r.File, r.Error)
			continue
		}
		fmt.Printf("%-14s %-7s period %d angles %.4f\n", r.File, r.Class, r.Period, r.Angles)
	}
	fmt.Printf("%d files, %d errors\n", sum.Files, sum.Errors)
	// Output:
	// modulated.csv  circle  period 0 angles [0.2763]
	// missing.csv    error: missing.csv: no such file
	// cell.csv       finite  period 2 angles []
	// 3 files, 1 errors
}
