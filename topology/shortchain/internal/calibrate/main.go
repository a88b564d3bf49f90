// Command calibrate measures the short-chain decision on simulated chains
// and computes its thresholds: for each calibrated size, the margin each
// class needs so that, at every calibrated noise, simulated chains of every
// other class (package null) are called falsely at most -target of the time
// in total. It prints the thresholds and the rule's rates on the same draws
// and, with -o, writes them as the package's table.go:
//
//	go generate ./topology/shortchain
//
// runs it with the defaults (about five minutes on two idle cores).
package main

import (
	"bytes"
	"context"
	"flag"
	"fmt"
	"go/format"
	"io"
	"log"
	"math"
	"os"
	"os/signal"
	"sync"

	"phasonhull/topology/shortchain"
	"phasonhull/topology/shortchain/internal/null"
)

// Seed is the calibration's seed; the tests re-measure with others.
const Seed = 0x5c0a1e

func main() {
	draws := flag.Int("draws", 1000, "simulated chains per size, noise and class")
	target := flag.Float64("target", 0.003, "largest total false-call fraction per cell in the calibration draws")
	workers := flag.Int("workers", 2, "parallel workers")
	out := flag.String("o", "", "write the table as Go source to this `FILE`")
	flag.Parse()
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	if err := run(ctx, os.Stdout, *draws, *target, *workers, *out); err != nil {
		log.Fatal(err)
	}
}

func run(ctx context.Context, w io.Writer, draws int, target float64, workers int, out string) error {
	sizes, noises := shortchain.Grid()
	kinds := shortchain.Kinds()
	thresholds := make([][4]float64, len(sizes))
	confusion := make([][][4][5]int, len(sizes))
	for si, N := range sizes {
		cmps, err := simulate(ctx, N, si, noises, draws, workers)
		if err != nil {
			return err
		}
		thresholds[si] = fitThresholds(cmps, int(target*float64(draws)))
		confusion[si] = make([][4][5]int, len(noises))
		for ni := range noises {
			for t := range kinds {
				for _, c := range cmps[ni][t] {
					confusion[si][ni][t][index(c.Call(thresholds[si][index(c.Best)]))]++
				}
			}
		}
		fmt.Fprintf(os.Stderr, "calibrate: %d sites done\n", N)
	}
	print(w, sizes, noises, draws, thresholds, confusion)
	if out == "" {
		return nil
	}
	src, err := source(draws, thresholds, confusion)
	if err != nil {
		return err
	}
	return os.WriteFile(out, src, 0o644)
}

// simulate compares the models on draws chains of every noise and class.
func simulate(ctx context.Context, N, si int, noises []float64, draws, workers int) ([][4][]shortchain.Comparison, error) {
	out := make([][4][]shortchain.Comparison, len(noises))
	type job struct{ ni, f int }
	jobs := make(chan job)
	errs := make(chan error, workers)
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for j := range jobs {
				res := make([]shortchain.Comparison, draws)
				for i := range res {
					if err := ctx.Err(); err != nil {
						errs <- err
						return
					}
					r := null.Rand(Seed, N, j.ni, null.Family(j.f), i)
					x := null.Draw(null.Family(j.f), N, noises[j.ni], r)
					c, err := shortchain.Compare(ctx, x, shortchain.Options{})
					if err != nil {
						errs <- fmt.Errorf("%d sites, noise %g, family %d, draw %d: %w", N, noises[j.ni], j.f, i, err)
						return
					}
					res[i] = c
				}
				out[j.ni][j.f] = res
			}
		}()
	}
feed:
	for ni := range noises {
		for f := range 4 {
			select {
			case jobs <- job{ni, f}:
			case err := <-errs:
				close(jobs)
				wg.Wait()
				return nil, err
			case <-ctx.Done():
				break feed
			}
		}
	}
	close(jobs)
	wg.Wait()
	select {
	case err := <-errs:
		return nil, err
	default:
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	return out, nil
}

// fitThresholds raises the margin of one class at a time, each time that
// of the class making most false calls in the worst cell, until no cell
// (noise, true class) holds more than limit false calls.
func fitThresholds(cmps [][4][]shortchain.Comparison, limit int) [4]float64 {
	var t [4]float64
	for {
		worstN, worstNi, worstT := limit, -1, -1
		for ni := range cmps {
			for tc := range 4 {
				n := 0
				for _, c := range cmps[ni][tc] {
					if k := index(c.Call(t[index(c.Best)])); k != tc && k < 4 {
						n++
					}
				}
				if n > worstN {
					worstN, worstNi, worstT = n, ni, tc
				}
			}
		}
		if worstNi < 0 {
			return t
		}
		var count [4]int
		lowest := [4]float64{math.Inf(1), math.Inf(1), math.Inf(1), math.Inf(1)}
		for _, c := range cmps[worstNi][worstT] {
			if k := index(c.Call(t[index(c.Best)])); k != worstT && k < 4 {
				count[k]++
				lowest[k] = math.Min(lowest[k], c.Margin)
			}
		}
		k := 0
		for i := range count {
			if count[i] > count[k] {
				k = i
			}
		}
		t[k] = lowest[k]
	}
}

func index(k shortchain.Kind) int {
	for i, v := range shortchain.Kinds() {
		if v == k {
			return i
		}
	}
	return 4
}

func print(w io.Writer, sizes []int, noises []float64, draws int, th [][4]float64, conf [][][4][5]int) {
	kinds := shortchain.Kinds()
	fmt.Fprintf(w, "Short-chain decision on %d simulated chains per size, noise and class (seed %#x)\n\n", draws, Seed)
	fmt.Fprintf(w, "margin needed (log-likelihood)\n%6s", "sites")
	for _, k := range kinds {
		fmt.Fprintf(w, " %12s", k)
	}
	fmt.Fprintln(w)
	for si, N := range sizes {
		fmt.Fprintf(w, "%6d", N)
		for _, v := range th[si] {
			fmt.Fprintf(w, " %12.2f", v)
		}
		fmt.Fprintln(w)
	}
	fmt.Fprintf(w, "\nper class: correct / false / undecided, %%\n%6s %6s", "sites", "noise")
	for _, k := range kinds {
		fmt.Fprintf(w, " %20s", k)
	}
	fmt.Fprintf(w, " %10s\n", "worst false")
	for si, N := range sizes {
		for ni, s := range noises {
			fmt.Fprintf(w, "%6d %5.1f%%", N, 100*s)
			worst := 0
			for t := range kinds {
				c := conf[si][ni][t]
				f := 0
				for k := range 4 {
					if k != t {
						f += c[k]
					}
				}
				worst = max(worst, f)
				fmt.Fprintf(w, " %6.1f %6.1f %6.1f", pct(c[t], draws), pct(f, draws), pct(c[4], draws))
			}
			fmt.Fprintf(w, " %9.2f%%\n", pct(worst, draws))
		}
	}
}

func pct(n, d int) float64 { return 100 * float64(n) / float64(d) }

func source(draws int, th [][4]float64, conf [][][4][5]int) ([]byte, error) {
	var b bytes.Buffer
	fmt.Fprintf(&b, "// Code generated by go run ./internal/calibrate -o table.go; DO NOT EDIT.\n\npackage shortchain\n\n")
	fmt.Fprintf(&b, "// tableDraws is the number of simulated chains per size, noise and class\n// (seed %#x).\nconst tableDraws = %d\n\n", Seed, draws)
	fmt.Fprintf(&b, "// thresholds[size][class] is the margin a call of the class needs.\nvar thresholds = [len(sizes)][4]float64{\n")
	for _, t := range th {
		fmt.Fprintf(&b, "{%v, %v, %v, %v},\n", t[0], t[1], t[2], t[3])
	}
	fmt.Fprintf(&b, "}\n\n// confusion[size][noise][true class][call] counts the calls of the\n// simulated chains, the calls in the order of Kinds and then Undecided.\nvar confusion = [len(sizes)][len(noises)][4][5]int{\n")
	for _, bySize := range conf {
		b.WriteString("{\n")
		for _, byNoise := range bySize {
			b.WriteString("{")
			for _, row := range byNoise {
				fmt.Fprintf(&b, "{%d, %d, %d, %d, %d}, ", row[0], row[1], row[2], row[3], row[4])
			}
			b.WriteString("},\n")
		}
		b.WriteString("},\n")
	}
	b.WriteString("}\n")
	return format.Source(b.Bytes())
}
