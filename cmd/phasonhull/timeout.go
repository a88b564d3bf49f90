package main

import (
	"fmt"
	"phasonhull/cmd/phasonhull/internal/runlimit"
	"time"

	"github.com/spf13/cobra"
)

// bindTimeout gives root the persistent flag --timeout and makes every
// command honour it: with a positive limit, the command runs under a
// context with that deadline, which the long computations check (the hull
// analysis, the persistence engine). When the limit passes, the command's
// output is closed, so no partial report follows, and the run ends with a
// refusal (exit status 2) as soon as the command returns.
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
				return runlimit.Bounded(cmd, limit, func() error { return runE(cmd, args) })
			}
		}
		for _, sub := range c.Commands() {
			wrap(sub)
		}
	}
	wrap(root)
}
