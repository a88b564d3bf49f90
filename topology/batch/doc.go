// Package batch runs the hull analysis — or the audit against one design
// — over many patterns and sums each up in one row of a summary table:
// class, period, angles with their uncertainty, disorder and, for an
// audit, the verdict with its counts and calibration. A pattern that
// cannot be read or analysed gets a row holding its error; it does not
// stop the others.
//
// Run processes the files on a pool of workers and returns the Summary in
// the order the files were given, the same whatever the number of
// workers; Files expands folders into the files they hold. The summary is
// written as CSV (Summary.WriteCSV) or as JSON in the phasonhull.batch/1
// form.
package batch
