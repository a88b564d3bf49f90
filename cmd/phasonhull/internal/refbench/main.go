// Command refbench times the persistence engine against the reference
// program (Debian's ripser 1.2.1) on the engine's four benchmark clouds and
// checks that both print the same barcode.
//
// Both programs run as child processes on the same file, alternately, a
// few times each: this engine as "phasonhull barcode --points FILE --homology D --field 2
// --json" (built from this module into a temporary folder), the reference
// as "ripser --format point-cloud --dim D FILE". The table gives the median
// wall time of each, their ratio, and the peak resident memory of each
// child (the largest over the repetitions, from the kernel's accounting of
// the child process). Barcodes are compared at the reference's six
// significant digits after rounding this engine's lengths to single
// precision; the clouds lie on a dyadic grid where that comparison is
// exact.
//
// Usage:
//
//	go run ./cmd/phasonhull/internal/refbench [-reps 3] [-only name,name] [-ref ripser]
package main

import (
	"encoding/json"
	"flag"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"text/tabwriter"
	"time"

	"phasonhull/topology/rips"
	"phasonhull/topology/rips/ripstest"
)

func main() {
	reps := flag.Int("reps", 3, "repetitions of each program on each cloud")
	only := flag.String("only", "", "comma-separated cloud names to run (default all)")
	ref := flag.String("ref", "ripser", "the reference program")
	flag.Parse()
	if err := run(*reps, *only, *ref); err != nil {
		fmt.Fprintln(os.Stderr, "refbench:", err)
		os.Exit(1)
	}
}

// result is the measurement of one program on one cloud.
type result struct {
	walls []time.Duration
	peak  int64 // bytes
	bars  []string
}

func (r *result) median() time.Duration {
	w := slices.Clone(r.walls)
	slices.Sort(w)
	if len(w)%2 == 1 {
		return w[len(w)/2]
	}
	return (w[len(w)/2-1] + w[len(w)/2]) / 2
}

func run(reps int, only, ref string) error {
	refPath, err := exec.LookPath(ref)
	if err != nil {
		return fmt.Errorf("the reference program %q: %w", ref, err)
	}
	dir, err := os.MkdirTemp("", "refbench")
	if err != nil {
		return err
	}
	defer os.RemoveAll(dir)
	bin := filepath.Join(dir, "phasonhull")
	build := exec.Command("go", "build", "-o", bin, "phasonhull/cmd/phasonhull")
	build.Stderr = os.Stderr
	if err := build.Run(); err != nil {
		return fmt.Errorf("building phasonhull: %w", err)
	}
	want := map[string]bool{}
	for _, name := range strings.Split(only, ",") {
		if name != "" {
			want[name] = true
		}
	}

	fmt.Printf("refbench: %d repetitions, alternating; engine: %s barcode --points FILE --homology D --field 2 --json; reference: %s --format point-cloud --dim D FILE\n\n", reps, bin, refPath)
	tw := tabwriter.NewWriter(os.Stdout, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "cloud\tpoints\tdim\tengine s\treference s\tratio\tengine MiB\treference MiB\tbarcodes\t")
	for _, c := range ripstest.BenchmarkSet() {
		if len(want) > 0 && !want[c.Name] {
			continue
		}
		path := filepath.Join(dir, c.Name+".txt")
		if err := ripstest.WriteCloud(path, c.Points); err != nil {
			return err
		}
		dim := strconv.Itoa(c.MaxDim)
		refArgs := ripstest.ReferenceArgs(path, c.MaxDim, 2, 0)
		ours := &result{}
		theirs := &result{}
		for i := 0; i < reps; i++ {
			steps := []func() error{
				func() error {
					return measure(ours, bin, []string{"barcode", "--points", path, "--homology", dim, "--field", "2", "--json"}, parseOurs)
				},
				func() error {
					return measure(theirs, refPath, refArgs, ripstest.ParseReference)
				},
			}
			if i%2 == 1 {
				steps[0], steps[1] = steps[1], steps[0]
			}
			for _, step := range steps {
				if err := step(); err != nil {
					return fmt.Errorf("%s: %w", c.Name, err)
				}
			}
			fmt.Fprintf(os.Stderr, "refbench: %s repetition %d: engine %.2fs, reference %.2fs\n",
				c.Name, i+1, ours.walls[i].Seconds(), theirs.walls[i].Seconds())
		}
		verdict := "identical"
		if a, b := ripstest.Diff(ours.bars, theirs.bars); len(a)+len(b) > 0 {
			verdict = fmt.Sprintf("DIFFER (%d only here, %d only in the reference)", len(a), len(b))
		}
		om, rm := ours.median().Seconds(), theirs.median().Seconds()
		fmt.Fprintf(tw, "%s\t%d\t%s\t%.3f\t%.3f\t%.3f\t%.1f\t%.1f\t%s\t\n", c.Name, len(c.Points), dim, om, rm, om/rm,
			float64(ours.peak)/(1<<20), float64(theirs.peak)/(1<<20), verdict)
	}
	return tw.Flush()
}

// measure runs one program to completion, adding its wall time, peak
// memory and barcode (the same on every repetition) to r.
func measure(r *result, bin string, args []string, parse func([]byte) ([]string, error)) error {
	cmd := exec.Command(bin, args...)
	cmd.Stderr = os.Stderr
	start := time.Now()
	out, err := cmd.Output()
	wall := time.Since(start)
	if err != nil {
		return fmt.Errorf("%s %s: %w", bin, strings.Join(args, " "), err)
	}
	bars, err := parse(out)
	if err != nil {
		return err
	}
	if r.bars != nil && !slices.Equal(r.bars, bars) {
		return fmt.Errorf("%s printed different barcodes on two runs", bin)
	}
	r.bars = bars
	r.walls = append(r.walls, wall)
	r.peak = max(r.peak, peakRSS(cmd.ProcessState))
	return nil
}

// parseOurs reads the JSON report of "phasonhull barcode".
func parseOurs(out []byte) ([]string, error) {
	var rep struct {
		Bars []rips.Bar `json:"bars"`
	}
	if err := json.Unmarshal(out, &rep); err != nil {
		return nil, fmt.Errorf("reading the engine's report: %w", err)
	}
	return ripstest.FormatBars(rep.Bars), nil
}
