package main

import (
	"bytes"
	"strings"
	"testing"
)

// TestGuardPanic: a panic inside a command becomes exit status 1 with the
// bug-report hint, and no stack trace unless PHASONHULL_TRACE is set.
func TestGuardPanic(t *testing.T) {
	for _, trace := range []string{"", "1"} {
		t.Run("trace="+trace, func(t *testing.T) {
			t.Setenv("PHASONHULL_TRACE", trace)
			var stderr bytes.Buffer
			code := guard(&stderr, func() int {
				var m map[string]int
				m["x"] = 1 // a nil-map write: a runtime panic, as a bug would raise
				return exitOK
			})
			if code != exitInternal {
				t.Errorf("status %d, want %d", code, exitInternal)
			}
			msg := stderr.String()
			for _, want := range []string{
				"phasonhull: internal error: assignment to entry in nil map",
				"This is a bug in phasonhull",
				"PHASONHULL_TRACE=1",
			} {
				if !strings.Contains(msg, want) {
					t.Errorf("stderr lacks %q:\n%s", want, msg)
				}
			}
			hasStack := strings.Contains(msg, "goroutine ") && strings.Contains(msg, "guard_test.go")
			if hasStack != (trace != "") {
				t.Errorf("stack trace printed = %v with PHASONHULL_TRACE=%q:\n%s", hasStack, trace, msg)
			}
		})
	}
}

// TestGuardPassesStatus: without a panic, guard returns f's status and
// writes nothing.
func TestGuardPassesStatus(t *testing.T) {
	for _, want := range []int{exitOK, exitInternal, exitInput, exitFail} {
		var stderr bytes.Buffer
		if got := guard(&stderr, func() int { return want }); got != want {
			t.Errorf("guard returned %d, want %d", got, want)
		}
		if stderr.Len() != 0 {
			t.Errorf("guard wrote %q without a panic", stderr.String())
		}
	}
}

// TestRunGuarded: run applies the guard to a real command line. A stdout
// that panics makes the first write of "generate" panic inside the
// command, which must come back as status 1, not a crash.
func TestRunGuarded(t *testing.T) {
	t.Setenv("PHASONHULL_TRACE", "")
	var stderr bytes.Buffer
	code := run([]string{"generate", "periodic", "--cell", "1,1.5", "--sites", "20"}, nil, nilWriter{}, &stderr)
	if code != exitInternal {
		t.Fatalf("status %d, want %d; stderr:\n%s", code, exitInternal, stderr.String())
	}
	if !strings.Contains(stderr.String(), "This is a bug in phasonhull") {
		t.Errorf("stderr lacks the bug-report hint:\n%s", stderr.String())
	}
}

// nilWriter panics on every write, standing in for a bug in an output path.
type nilWriter struct{}

func (nilWriter) Write([]byte) (int, error) { panic("write to a broken writer") }
