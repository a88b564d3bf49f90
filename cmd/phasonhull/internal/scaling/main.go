// Command scaling measures how "phasonhull analyze" scales with the length
// of the chain. It builds the command, writes modulated chains of 10³ to
// 10⁶ sites with 1% position noise, analyzes each in a child process and
// prints the wall time (the median of several runs for the small sizes)
// and the child's peak resident memory as a markdown table.
//
//	go run ./cmd/phasonhull/internal/scaling [-sizes 1000,10000] [-limit 3m] [-bin PATH]
package main

import (
	"context"
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"syscall"
	"time"
)

func main() {
	sizes := flag.String("sizes", "1000,10000,100000,1000000", "comma-separated chain lengths")
	limit := flag.Duration("limit", 3*time.Minute, "stop a run that takes longer than this")
	bin := flag.String("bin", "", "a built phasonhull binary (default: build one into a temp dir)")
	flag.Parse()
	if err := run(*sizes, *limit, *bin, os.Stdout); err != nil {
		fmt.Fprintln(os.Stderr, "scaling:", err)
		os.Exit(1)
	}
}

// measurement is one child run.
type measurement struct {
	wall   time.Duration
	maxRSS int64 // bytes
}

func run(sizeList string, limit time.Duration, bin string, out io.Writer) error {
	dir, err := os.MkdirTemp("", "phasonhull-scaling")
	if err != nil {
		return err
	}
	defer os.RemoveAll(dir)
	if bin == "" {
		bin = filepath.Join(dir, "phasonhull")
		build := exec.Command("go", "build", "-o", bin, "phasonhull/cmd/phasonhull")
		build.Stdout, build.Stderr = os.Stderr, os.Stderr
		if err := build.Run(); err != nil {
			return fmt.Errorf("building phasonhull: %w", err)
		}
	}
	fmt.Fprintln(out, "| sites | runs | wall time (median) | peak RSS | result |")
	fmt.Fprintln(out, "|---:|---:|---:|---:|:---|")
	for _, s := range strings.Split(sizeList, ",") {
		n, err := strconv.Atoi(strings.TrimSpace(s))
		if err != nil || n < 8 {
			return fmt.Errorf("size %q: want an integer of at least 8", s)
		}
		file := filepath.Join(dir, fmt.Sprintf("chain_%d.csv", n))
		gen := exec.Command(bin, "generate", "modulated", "--sites", strconv.Itoa(n),
			"--theta", "0.2763", "--amp", "0.12", "--noise", "0.01", "--seed", "1", "--out", file)
		gen.Stderr = os.Stderr
		if err := gen.Run(); err != nil {
			return fmt.Errorf("generating %d sites: %w", n, err)
		}
		runs := 3
		if n >= 1_000_000 {
			runs = 1
		}
		var ms []measurement
		class := ""
		for range runs {
			m, c, err := analyze(bin, file, limit)
			if err != nil {
				fmt.Fprintf(out, "| %d | %d | %s | | |\n", n, len(ms)+1, err)
				break
			}
			ms, class = append(ms, m), c
		}
		if len(ms) < runs {
			continue
		}
		slices.SortFunc(ms, func(a, b measurement) int { return int(a.wall - b.wall) })
		med := ms[len(ms)/2]
		peak := slices.MaxFunc(ms, func(a, b measurement) int { return int(a.maxRSS - b.maxRSS) })
		fmt.Fprintf(out, "| %d | %d | %.2f s | %.0f MiB | %s |\n", n, runs, med.wall.Seconds(), float64(peak.maxRSS)/(1<<20), class)
	}
	return nil
}

// analyze runs "phasonhull analyze --json FILE" and measures it; it
// returns the hull class read from the JSON.
func analyze(bin, file string, limit time.Duration) (measurement, string, error) {
	ctx, cancel := context.WithTimeout(context.Background(), limit)
	defer cancel()
	cmd := exec.CommandContext(ctx, bin, "analyze", "--json", file)
	var stdout, stderr strings.Builder
	cmd.Stdout, cmd.Stderr = &stdout, &stderr
	start := time.Now()
	err := cmd.Run()
	wall := time.Since(start)
	if errors.Is(ctx.Err(), context.DeadlineExceeded) {
		return measurement{}, "", fmt.Errorf("stopped after %v", limit)
	}
	if err != nil {
		return measurement{}, "", fmt.Errorf("analyze: %v: %s", err, strings.TrimSpace(stderr.String()))
	}
	var rss int64
	if ru, ok := cmd.ProcessState.SysUsage().(*syscall.Rusage); ok {
		rss = ru.Maxrss * 1024 // kilobytes on Linux
	}
	return measurement{wall: wall, maxRSS: rss}, classOf(stdout.String()), nil
}

// classOf reads the hull class and the angles out of the result's JSON.
func classOf(js string) string {
	var r struct {
		Hull struct {
			Class string `json:"class"`
		} `json:"hull"`
		Angles []float64 `json:"angles"`
	}
	if err := json.Unmarshal([]byte(js), &r); err != nil {
		return "? (" + err.Error() + ")"
	}
	if len(r.Angles) == 0 {
		return r.Hull.Class
	}
	return fmt.Sprintf("%s, angle %.5f", r.Hull.Class, r.Angles[0])
}
