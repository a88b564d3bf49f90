//go:build unix

package main

import (
	"os"
	"runtime"
	"syscall"
)

// peakRSS is the largest resident set of a finished child process, in
// bytes.
func peakRSS(ps *os.ProcessState) int64 {
	ru, ok := ps.SysUsage().(*syscall.Rusage)
	if !ok {
		return 0
	}
	if runtime.GOOS == "darwin" || runtime.GOOS == "ios" {
		return int64(ru.Maxrss) // bytes there
	}
	return int64(ru.Maxrss) * 1024 // kibibytes elsewhere
}
