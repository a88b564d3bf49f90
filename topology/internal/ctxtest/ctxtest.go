// Package ctxtest holds what the cancellation tests of the topology
// packages share: a context that is cancelled at a known check.
package ctxtest

import (
	"context"
	"sync/atomic"
)

// Countdown is a context that reports itself cancelled from its (n+1)-th
// call of Err on, so that a test can stop a computation at a known check.
type Countdown struct {
	context.Context
	left atomic.Int64
}

// NewCountdown returns a context whose first n calls of Err pass.
func NewCountdown(n int64) *Countdown {
	c := &Countdown{Context: context.Background()}
	c.left.Store(n)
	return c
}

// Err is context.Canceled once n checks have passed, nil before.
func (c *Countdown) Err() error {
	if c.left.Add(-1) < 0 {
		return context.Canceled
	}
	return nil
}
