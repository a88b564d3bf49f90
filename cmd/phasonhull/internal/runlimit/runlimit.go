// Package runlimit bounds the time of one command: the command computes
// under a context with a deadline, and its output is closed at the
// deadline, so no partial report follows the refusal.
package runlimit

import (
	"context"
	"errors"
	"fmt"
	"io"
	"sync"
	"time"

	"github.com/spf13/cobra"
)

// Bounded runs f, which writes through cmd and computes under
// cmd.Context(), with a deadline limit from now. At the deadline the
// outputs are closed; once f returns, a run whose outputs were closed is
// refused whatever f returned. A panic in f goes up to the guard of run.
func Bounded(cmd *cobra.Command, limit time.Duration, f func() error) error {
	parent := cmd.Context()
	if parent == nil {
		parent = context.Background()
	}
	ctx, cancel := context.WithTimeout(parent, limit)
	defer cancel()
	cmd.SetContext(ctx)
	out, errw := &gate{w: cmd.OutOrStdout()}, &gate{w: cmd.ErrOrStderr()}
	cmd.SetOut(out)
	cmd.SetErr(errw)
	// Close the gates at the deadline: nothing the command writes from
	// then on reaches the user.
	stop := context.AfterFunc(ctx, func() {
		out.close()
		errw.close()
	})
	err := f()
	if !stop() {
		// The deadline passed and the gates closed.
		return fmt.Errorf("stopped after --timeout %v: the run took longer; give a larger --timeout or a shorter input", limit)
	}
	return err
}

// errTimedOut is returned to a command that writes after its time is up.
var errTimedOut = errors.New("the run was stopped by --timeout")

// gate is a writer that can be closed from another goroutine (the
// deadline's): after close, writes are dropped with errTimedOut.
type gate struct {
	mu     sync.Mutex
	w      io.Writer
	closed bool
}

func (g *gate) Write(p []byte) (int, error) {
	g.mu.Lock()
	defer g.mu.Unlock()
	if g.closed {
		return 0, errTimedOut
	}
	return g.w.Write(p)
}

func (g *gate) close() {
	g.mu.Lock()
	g.closed = true
	g.mu.Unlock()
}
