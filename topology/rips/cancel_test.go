package rips_test

import (
	"context"
	"errors"
	"strings"
	"testing"

	"phasonhull/topology/internal/ctxtest"
	"phasonhull/topology/rips"
	"phasonhull/topology/rips/ripstest"
)

// A cancelled context stops the computation before it starts, and a
// context cancelled while the columns of H1 are reduced stops the
// reduction there: the error wraps context.Canceled and names the
// dimension.
func TestContextStops(t *testing.T) {
	pts := ripstest.Circle(120, 0.05, 3)
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := rips.VietorisRipsContext(ctx, pts, rips.Options{MaxDim: 1}); !errors.Is(err, context.Canceled) {
		t.Fatalf("cancelled before the start: error %v, want context.Canceled", err)
	}
	// Two checks pass (the start and the loop over dimensions); the third,
	// at the first column of dimension 1, stops it.
	cd := ctxtest.NewCountdown(2)
	_, err := rips.VietorisRipsContext(cd, pts, rips.Options{MaxDim: 1})
	if !errors.Is(err, context.Canceled) || !strings.Contains(err.Error(), "dimension 1") {
		t.Fatalf("cancelled in the reduction: error %v, want context.Canceled in dimension 1", err)
	}
	// Without cancellation the same call gives the same bars as VietorisRips.
	got, err := rips.VietorisRipsContext(context.Background(), pts, rips.Options{MaxDim: 1})
	if err != nil {
		t.Fatal(err)
	}
	if want := compute(t, pts, rips.Options{MaxDim: 1}); len(got.Bars) != len(want.Bars) {
		t.Errorf("%d bars under a context, %d without", len(got.Bars), len(want.Bars))
	}
}
