package main

import (
	"errors"
	"fmt"
	"io"
	"sync"
	"time"

	"github.com/spf13/cobra"
)

// bindTimeout gives root the persistent flag --timeout and makes every
// command honour it: with a positive limit, the command runs in a
// goroutine of its own, and when the limit passes first the run ends with
// a refusal (exit status 2) while the command's later output is dropped.
// The binary exits right after, which ends the abandoned goroutine.
func bindTimeout(root *cobra.Command) {
	var limit time.Duration
	root.PersistentFlags().DurationVar(&limit, "timeout", 0,
		"stop with exit status 2 when the run takes longer than `DURATION` (30s, 5m, ...); 0 means no limit")
	var wrap func(c *cobra.Command)
	wrap = func(c *cobra.Command) {
		if runE := c.RunE; runE != nil {
			c.RunE = func(cmd *cobra.Command, args []string) error {
				switch {
				case limit < 0:
					return fmt.Errorf("--timeout %v: must not be negative", limit)
				case limit == 0:
					return runE(cmd, args)
				}
				return bounded(cmd, limit, func() error { return runE(cmd, args) })
			}
		}
		for _, sub := range c.Commands() {
			wrap(sub)
		}
	}
	wrap(root)
}

// bounded runs f, which writes through cmd, for at most limit. A panic in
// f is raised again on the caller's goroutine, so that the guard of run
// reports it.
func bounded(cmd *cobra.Command, limit time.Duration, f func() error) error {
	out, errw := &gate{w: cmd.OutOrStdout()}, &gate{w: cmd.ErrOrStderr()}
	cmd.SetOut(out)
	cmd.SetErr(errw)
	done := make(chan error, 1)
	panics := make(chan any, 1)
	go func() {
		defer func() {
			if r := recover(); r != nil {
				panics <- r
			}
		}()
		done <- f()
	}()
	timer := time.NewTimer(limit)
	defer timer.Stop()
	select {
	case err := <-done:
		return err
	case r := <-panics:
		panic(r)
	case <-timer.C:
		// Close the gates first: nothing the command writes from now on
		// reaches the user, so no partial report follows the refusal.
		out.close()
		errw.close()
		return fmt.Errorf("stopped after --timeout %v: the run took longer; give a larger --timeout or a shorter input", limit)
	}
}

// errTimedOut is returned to a command that writes after its time is up.
var errTimedOut = errors.New("the run was stopped by --timeout")

// gate is a writer that can be closed from another goroutine: after close,
// writes are dropped with errTimedOut.
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
