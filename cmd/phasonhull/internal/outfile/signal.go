package outfile

import (
	"fmt"
	"io"
	"os"
	"os/signal"
	"syscall"
)

// ExitOnSignal makes SIGINT, SIGTERM and SIGHUP end the process only
// between commits: the handler waits for a commit in progress, says on
// stderr that the run was stopped, and exits with 128 + the signal's
// number. Staged content that was not committed vanishes with the process.
func ExitOnSignal(stderr io.Writer) {
	c := make(chan os.Signal, 1)
	signal.Notify(c, syscall.SIGINT, syscall.SIGTERM, syscall.SIGHUP)
	go func() {
		s := <-c
		Hold()
		fmt.Fprintf(stderr, "phasonhull: stopped by %v; files not yet written were left as they were\n", s)
		code := 1
		if n, ok := s.(syscall.Signal); ok {
			code = 128 + int(n)
		}
		os.Exit(code)
	}()
}
