package spectrum

import (
	"context"
	"errors"
	"strings"
	"sync/atomic"
	"testing"
	"time"

	"phasonhull/pattern"
	"phasonhull/pattern/design"
	"phasonhull/topology/internal/ctxtest"
)

// A context that is done stops the phason sweep: before the first chain is
// built when it is done from the start, and after no more chains than the
// checks it let through when it is cancelled on the way — far fewer than
// the sweep's DefaultSamples + 1. The error wraps the context's.
func TestEdgeModesStopsWhenCancelled(t *testing.T) {
	sw, err := PhaseSweep(modulatedSpec(0.2763))
	if err != nil {
		t.Fatal(err)
	}
	var built atomic.Int64
	counted := func(s float64) (*pattern.Pattern, error) {
		built.Add(1)
		return sw(s)
	}
	opt := EdgeOptions{Options: Options{Angles: []float64{0.2763}}}
	m := Model{Law: Exp{T0: 1, Decay: 4}}

	past, cancel := context.WithDeadline(context.Background(), time.Now().Add(-time.Second))
	defer cancel()
	if _, err := EdgeModesContext(past, counted, m, opt); !errors.Is(err, context.DeadlineExceeded) {
		t.Fatalf("past deadline: error %v, want context.DeadlineExceeded", err)
	}
	if n := built.Load(); n != 0 {
		t.Errorf("past deadline: %d phases built, want 0", n)
	}

	const through = 5
	cd := ctxtest.NewCountdown(through)
	built.Store(0)
	if _, err := EdgeModesContext(cd, counted, m, opt); !errors.Is(err, context.Canceled) {
		t.Fatalf("cancelled on the way: error %v, want context.Canceled", err)
	}
	// Every chain built passed a check first.
	if n := built.Load(); n == 0 || n > through {
		t.Errorf("cancelled after %d checks: %d chains built, want 1 to %d", through, n, through)
	}

	// Not cancelled, the sweep runs to the end: the chain at the start is
	// built once for its gaps, then once per phase evaluated.
	built.Store(0)
	r, err := EdgeModesContext(context.Background(), counted, m, opt)
	if err != nil {
		t.Fatal(err)
	}
	if n := built.Load(); n != int64(r.Phases)+1 || r.Phases < DefaultSamples {
		t.Errorf("full sweep: %d phases built, %d evaluated, want at least %d", n, r.Phases, DefaultSamples)
	}
}

// A cancelled context stops the θ scan before the next angle; the spectra
// already handed over stay handed over.
func TestScanThetaStopsWhenCancelled(t *testing.T) {
	s := design.NewSpec("periodic")
	s.Sites, s.Cell = 60, []float64{1}
	m := Model{OnSite: OnSite{Lambda: 1}}
	thetas := []float64{0.1, 0.2, 0.3, 0.4, 0.5}
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	seen := 0
	err := ScanThetaContext(ctx, s, m, thetas, func(float64, []float64) error {
		seen++
		if seen == 2 {
			cancel()
		}
		return nil
	})
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("error %v, want context.Canceled", err)
	}
	if seen != 2 {
		t.Errorf("%d spectra handed over after cancelling at the second, want 2", seen)
	}
}

// A cancelled context stops the gap analysis of a long chain counted by
// Sturm sequences between its stages: done from the start, before the
// levels; cancelled after two checks, before the edges are bracketed.
func TestAnalyzeStopsWhenCancelled(t *testing.T) {
	s := design.NewSpec("modulated")
	s.Sites, s.Theta, s.Amp = 5000, 0.2763, 0.15
	p, err := design.Generate(s)
	if err != nil {
		t.Fatal(err)
	}
	op, err := New(p, Model{Law: Exp{T0: 1, Decay: 4}})
	if err != nil {
		t.Fatal(err)
	}
	opt := Options{Angles: []float64{0.2763}, Method: Counting}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := AnalyzeContext(ctx, op, opt); !errors.Is(err, context.Canceled) || !strings.Contains(err.Error(), "before the levels") {
		t.Fatalf("cancelled from the start: error %v, want context.Canceled before the levels", err)
	}
	cd := ctxtest.NewCountdown(2)
	if _, err := AnalyzeContext(cd, op, opt); !errors.Is(err, context.Canceled) || !strings.Contains(err.Error(), "bracketing") {
		t.Fatalf("cancelled after two checks: error %v, want context.Canceled before bracketing", err)
	}
	// Not cancelled, it gives what Analyze gives.
	got, err := AnalyzeContext(context.Background(), op, opt)
	if err != nil {
		t.Fatal(err)
	}
	want, err := Analyze(op, opt)
	if err != nil {
		t.Fatal(err)
	}
	if len(got.Gaps) == 0 || len(got.Gaps) != len(want.Gaps) {
		t.Errorf("%d gaps under a context, %d without", len(got.Gaps), len(want.Gaps))
	}
}
