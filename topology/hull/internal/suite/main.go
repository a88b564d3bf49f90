// Command suite measures the accuracy and precision of the hull analysis on
// a seeded grid of generated chains whose hulls are known in closed form.
//
// It prints a confusion matrix (true hull × reported hull; a hull of p > 1
// components is labelled with its class and ×p, "circle×2" for two
// circles), the number of confident wrong answers (a named class, period
// or number of components that is wrong, or angles more than 5 stated
// uncertainties from the truth) with the false-call rate at each size,
// one row per case (class, the size that decides it, confidence, angle
// error, reported uncertainty, their ratio, wall time), the barcode
// figures of every misclassified case, the
// breakdown points of each class (the smallest size and the largest
// position noise at which it is still recognised), and three precision
// checks with PASS or FAIL against their goals: noise-free circle angles to
// 1e-9, the angle RMSE under position noise against the Cramér–Rao bound,
// and the wall time of one analysis of 2000 sites.
//
// Usage:
//
//	go run ./topology/hull/internal/suite [-quick] [-plane] [-seed N] [-json]
//
// With -plane it runs the two-dimensional families instead (plane.go):
// generated plates through lattice recovery and the plane analysis, scored
// by the same rules plus the rotation matrix as a module and the lattice
// basis; it prints the same confusion matrix, confident wrong answers and
// case rows, without the chains' sweeps and precision checks.
//
// The grid of cases and their known hulls is in cases.go: the class of
// each follows from its parameters, p components and d angles (hullOf). A
// case smaller than the size that decides its class at its noise
// (decidingSites in theory.go) counts as correct when unresolved. The
// Cramér–Rao bounds the angle precision is held to and the deciding sizes
// are in theory.go, the runs and the
// checks in runner.go, the text and JSON reports in writer.go.
//
// The suite is a measurement, not a test: it exits 0 whatever the verdicts
// (1 when it cannot run). The same seed gives the same cases and the same
// results; only the wall times vary.
package main

import (
	"flag"
	"fmt"
	"os"

	"phasonhull/topology/hull"
)

func main() {
	quick := flag.Bool("quick", false, "run a small subset (smoke test)")
	plane := flag.Bool("plane", false, "run the two-dimensional families (plates) instead of the chains")
	seed := flag.Uint64("seed", 1, "seed of every random choice")
	asJSON := flag.Bool("json", false, "write the report as JSON")
	flag.Parse()
	rep, err := Run(Config{Quick: *quick, Plane: *plane, Seed: *seed})
	if err != nil {
		fmt.Fprintln(os.Stderr, "suite:", err)
		os.Exit(1)
	}
	if *asJSON {
		err = writeJSON(os.Stdout, rep)
	} else {
		err = writeText(os.Stdout, rep)
	}
	if err != nil {
		fmt.Fprintln(os.Stderr, "suite:", err)
		os.Exit(1)
	}
}

// Config selects what Run measures.
type Config struct {
	Quick bool   // the small subset
	Plane bool   // the two-dimensional families (plane.go) instead of the chains
	Seed  uint64 // suite seed; every case seed derives from it and the case name
}

// The classes of the suite. Cantor and disordered are the true classes of
// the negative cases; the analysis may not name them yet.
const (
	cantor     hull.Class = "cantor"
	disordered hull.Class = "disordered"
	failed     hull.Class = "error" // Analyze returned an error
)

var (
	// sweepClasses have breakdown sweeps (a prototype over sizes and
	// noises); trueClasses are every class a case may have, in the order
	// of the confusion matrix, and reportedClasses its columns.
	sweepClasses    = []hull.Class{hull.Point, hull.Finite, hull.Circle, hull.Torus, cantor, disordered}
	trueClasses     = []hull.Class{hull.Point, hull.Finite, hull.Circle, hull.Torus, torus3, cantor, disordered}
	reportedClasses = []hull.Class{hull.Point, hull.Finite, hull.Circle, hull.Torus, torus3, cantor, disordered, hull.Unresolved, failed}
)

// Goals of the precision checks.
const (
	exactAngleGoal = 1e-9 // noise-free circle angle error, 2000 sites
	crbGoal        = 1.5  // angle RMSE over √CRB
	timeGoal       = 0.5  // seconds, median analysis of 2000 sites
)

// Grid axes.
var (
	sizes      = []int{40, 100, 500, 2000, 5000, 20000}
	torusSizes = []int{2000, 5000, 20000}
	noises     = []float64{0, 0.005, 0.01, 0.02, 0.03, 0.05}
	// sweepNoise is the noise of the second size sweep; noiseSweepSites
	// the size of the noise sweep.
	sweepNoise      = 0.01
	noiseSweepSites = 2000
)
