package report_test

import (
	"fmt"

	"phasonhull/cmd/phasonhull/internal/report"
)

// CheckDir refuses a report folder that holds an input file.
func ExampleCheckDir() {
	fmt.Println(report.CheckDir("data", []string{"data/sample.csv"}))
	fmt.Println(report.CheckDir("data/report", []string{"data/sample.csv"}))
	// Output:
	// report folder data holds the input data/sample.csv: choose another folder
	// <nil>
}
