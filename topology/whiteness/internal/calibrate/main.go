// Command calibrate measures the independent-spacings rule on simulated
// chains: for each calibrated size, how often the four readings agree on
// chains that have a hull (package hulls: every family at every noise),
// and how often on chains of independent spacings (by spread, noise-free,
// with the noise tolerance at the analysis's default). It prints both and,
// with -o, writes them as the package's table.go:
//
//	go generate ./topology/whiteness
//
// runs it with the defaults (a few minutes on two idle cores). For the
// sizes up to 200 it also prints how often the short-chain decision
// (package shortchain), which the hull analysis asks as the second reading
// there, calls the same independent chains so.
package main

import (
	"bytes"
	"context"
	"flag"
	"fmt"
	"go/format"
	"io"
	"log"
	"os"
	"os/signal"
	"sync"

	"phasonhull/embed"
	"phasonhull/topology/shortchain"
	"phasonhull/topology/whiteness"
	"phasonhull/topology/whiteness/internal/hulls"
)

// Seed is the calibration's seed; the tests re-measure with others.
const Seed = 0x3b17e

func main() {
	draws := flag.Int("draws", 1000, "simulated chains with a hull per size, noise and family")
	powerDraws := flag.Int("power-draws", 1000, "simulated independent chains per size and spread (a fifth of it above 3000 sites)")
	workers := flag.Int("workers", 2, "parallel workers")
	largest := flag.Int("largest", 0, "calibrate only the sizes up to this many sites (0: all; not with -o)")
	out := flag.String("o", "", "write the table as Go source to this `FILE`")
	flag.Parse()
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	if *largest > 0 && *out != "" {
		log.Fatal("-largest and -o: the table needs every size")
	}
	if err := run(ctx, os.Stdout, *draws, *powerDraws, *workers, *largest, *out); err != nil {
		log.Fatal(err)
	}
}

// tolerance is the noise variance of one spacing the analysis tolerates
// by default: position noise of embed.DefaultNoise on both ends.
var tolerance = 2 * embed.DefaultNoise * embed.DefaultNoise

type table struct {
	draws, powerDraws []int
	falseCalls        [][][len(hulls.Families)]int // [size][noise][family]
	alone             [][][len(hulls.Families)]int // the same, the four readings without the short-chain decision
	power             [][]int                      // [size][spread], as whiteness.Decide calls
	powerAlone        [][]int                      // [size][spread], the four readings alone
}

func run(ctx context.Context, w io.Writer, draws, powerDraws, workers, largest int, out string) error {
	sizes, noises, spreads := whiteness.Grid()
	for largest > 0 && sizes[len(sizes)-1] > largest {
		sizes = sizes[:len(sizes)-1]
	}
	t := table{}
	for _, N := range sizes {
		pd := powerDraws
		if N > 3000 {
			pd = max(powerDraws/5, 1)
		}
		fc := make([][len(hulls.Families)]int, len(noises))
		fa := make([][len(hulls.Families)]int, len(noises))
		var jobs []func() error
		var mu sync.Mutex
		for ni, sigma := range noises {
			for fi, f := range hulls.Families {
				jobs = append(jobs, func() error {
					n, a := 0, 0
					for i := range draws {
						x := hulls.Draw(f, N, sigma, hulls.Rand(Seed, N, ni, fi, i))
						ok, short, err := calls(ctx, x, N, 0)
						if err != nil {
							return fmt.Errorf("%d sites, noise %g, %s, draw %d: %w", N, sigma, f, i, err)
						}
						if ok {
							a++
						}
						if ok && short {
							n++
						}
					}
					mu.Lock()
					fc[ni][fi], fa[ni][fi] = n, a
					mu.Unlock()
					return nil
				})
			}
		}
		pw, sh := make([]int, len(spreads)), make([]int, len(spreads))
		for k, sp := range spreads {
			law := lawOf(sp.Law)
			jobs = append(jobs, func() error {
				n, m := 0, 0
				for i := range pd {
					x := hulls.Independent(law, sp.Spread, N, 0, hulls.Rand(Seed, N, 100+k, 0, i))
					ok, short, err := calls(ctx, x, N, tolerance)
					if err != nil {
						return fmt.Errorf("%d sites, %s %g, draw %d: %w", N, sp.Law, sp.Spread, i, err)
					}
					if ok {
						n++
					}
					if ok && short {
						m++
					}
				}
				mu.Lock()
				pw[k], sh[k] = n, m
				mu.Unlock()
				return nil
			})
		}
		if err := parallel(ctx, workers, jobs); err != nil {
			return err
		}
		t.draws = append(t.draws, draws)
		t.powerDraws = append(t.powerDraws, pd)
		t.falseCalls = append(t.falseCalls, fc)
		t.alone = append(t.alone, fa)
		t.power = append(t.power, sh)
		t.powerAlone = append(t.powerAlone, pw)
		fmt.Fprintf(os.Stderr, "calibrate: %d sites done\n", N)
	}
	report(w, sizes, noises, spreads, t)
	if out == "" {
		return nil
	}
	src, err := source(t)
	if err != nil {
		return err
	}
	return os.WriteFile(out, src, 0o644)
}

// calls tells whether the four readings of the spacings agree on
// independent spacings, and whether the short-chain decision does too (up
// to whiteness.ShortSites sites; true beyond), as whiteness.Decide asks.
func calls(ctx context.Context, x []float64, N int, nu float64) (ok, short bool, err error) {
	s, err := whiteness.Measure(ctx, diff(x), whiteness.Options{NoiseVariance: nu})
	if err != nil || !s.Passes() {
		return false, false, err
	}
	if N > whiteness.ShortSites {
		return true, true, nil
	}
	d, err := shortchain.Decide(ctx, x, shortchain.Options{})
	if err != nil {
		return false, false, err
	}
	return true, d.Kind == shortchain.Independent, nil
}

// parallel runs the jobs on a pool of workers and returns the first error.
func parallel(ctx context.Context, workers int, jobs []func() error) error {
	ch := make(chan func() error)
	errs := make(chan error, len(jobs))
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for j := range ch {
				if err := ctx.Err(); err != nil {
					errs <- err
					continue
				}
				if err := j(); err != nil {
					errs <- err
				}
			}
		}()
	}
	for _, j := range jobs {
		ch <- j
	}
	close(ch)
	wg.Wait()
	select {
	case err := <-errs:
		return err
	default:
		return nil
	}
}

func lawOf(name string) hulls.Law {
	for _, l := range []hulls.Law{hulls.Uniform, hulls.Gaussian, hulls.Exponential} {
		if l.String() == name {
			return l
		}
	}
	panic("calibrate: unknown law " + name)
}

func diff(x []float64) []float64 {
	d := make([]float64, len(x)-1)
	for i := range d {
		d[i] = x[i+1] - x[i]
	}
	return d
}

func report(w io.Writer, sizes []int, noises []float64, spreads []whiteness.Spread, t table) {
	fmt.Fprintf(w, "Independent-spacings rule (seed %#x)\n\n", Seed)
	fmt.Fprintf(w, "chains with a hull called independent, %% (worst noise of %v for each family; %d draws per size, noise and family; up to %d sites the short-chain decision must agree, in brackets the four readings alone)\n", noises, t.draws[0], whiteness.ShortSites)
	fmt.Fprintf(w, "%6s", "sites")
	for _, f := range hulls.Families {
		fmt.Fprintf(w, " %9s", f)
	}
	fmt.Fprintf(w, " %9s\n", "worst")
	for si, N := range sizes {
		fmt.Fprintf(w, "%6d", N)
		worst, worstAlone := 0, 0
		for fi := range hulls.Families {
			m, a := 0, 0
			for ni := range noises {
				m = max(m, t.falseCalls[si][ni][fi])
				a = max(a, t.alone[si][ni][fi])
			}
			worst, worstAlone = max(worst, m), max(worstAlone, a)
			fmt.Fprintf(w, " %9s", cell(m, a, t.draws[si], N))
		}
		fmt.Fprintf(w, " %9s\n", cell(worst, worstAlone, t.draws[si], N))
	}
	fmt.Fprintf(w, "\nindependent chains called independent, %% (noise-free, noise tolerance %.3g per spacing; in brackets the four readings alone)\n%6s %6s", tolerance, "sites", "draws")
	for _, s := range spreads {
		fmt.Fprintf(w, " %14s", fmt.Sprintf("%s %g", s.Law, s.Spread))
	}
	fmt.Fprintln(w)
	for si, N := range sizes {
		fmt.Fprintf(w, "%6d %6d", N, t.powerDraws[si])
		for k := range spreads {
			fmt.Fprintf(w, " %14s", cell(t.power[si][k], t.powerAlone[si][k], t.powerDraws[si], N))
		}
		fmt.Fprintln(w)
	}
}

// cell writes a percentage, and up to whiteness.ShortSites sites that of
// the four readings alone in brackets.
func cell(n, alone, draws, N int) string {
	if N > whiteness.ShortSites {
		return fmt.Sprintf("%.1f", pct(n, draws))
	}
	return fmt.Sprintf("%.1f (%.1f)", pct(n, draws), pct(alone, draws))
}

func pct(n, d int) float64 { return 100 * float64(n) / float64(d) }

func source(t table) ([]byte, error) {
	var b bytes.Buffer
	fmt.Fprintf(&b, "// Code generated by go run ./internal/calibrate -o table.go; DO NOT EDIT.\n\npackage whiteness\n\n")
	fmt.Fprintf(&b, "// tableDraws[size] is the number of simulated chains with a hull per\n// noise and family, powerDraws[size] that of independent chains per\n// spread (seed %#x).\n", Seed)
	fmt.Fprintf(&b, "var tableDraws = [len(sizes)]int{%s}\n\nvar powerDraws = [len(sizes)]int{%s}\n\n", ints(t.draws), ints(t.powerDraws))
	fmt.Fprintf(&b, "// falseCalls[size][noise][family] counts the chains with a hull that\n// the four readings called independent, the families in the order of\n// internal/hulls.\nvar falseCalls = [len(sizes)][len(noises)][%d]int{\n", len(hulls.Families))
	for _, bySize := range t.falseCalls {
		b.WriteString("{")
		for _, row := range bySize {
			fmt.Fprintf(&b, "{%s}, ", ints(row[:]))
		}
		b.WriteString("},\n")
	}
	b.WriteString("}\n\n// power[size][spread] counts the noise-free independent chains the\n// four readings called independent, at the default noise tolerance.\nvar power = [len(sizes)][len(spreads)]int{\n")
	for _, row := range t.power {
		fmt.Fprintf(&b, "{%s},\n", ints(row))
	}
	b.WriteString("}\n")
	return format.Source(b.Bytes())
}

func ints(v []int) string {
	var b bytes.Buffer
	for i, x := range v {
		if i > 0 {
			b.WriteString(", ")
		}
		fmt.Fprint(&b, x)
	}
	return b.String()
}
