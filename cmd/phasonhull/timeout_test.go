package main

import (
	"bytes"
	"path/filepath"
	"phasonhull/cmd/phasonhull/internal/runlimit"
	"strings"
	"testing"
	"time"

	"github.com/spf13/cobra"
)

// TestTimeoutStops: a tiny --timeout on a large generated chain ends the
// run with status 2 and one line on stderr, and nothing on stdout.
func TestTimeoutStops(t *testing.T) {
	file := filepath.Join(t.TempDir(), "chain.csv")
	var stderr bytes.Buffer
	if code := run([]string{"generate", "modulated", "--sites", "30000", "--theta", "0.2763",
		"--amp", "0.12", "--noise", "0.01", "--out", file}, nil, &bytes.Buffer{}, &stderr); code != exitOK {
		t.Fatalf("generate: status %d: %s", code, stderr.String())
	}
	var stdout bytes.Buffer
	stderr.Reset()
	code := run([]string{"analyze", "--timeout", "1ms", file}, nil, &stdout, &stderr)
	if code != exitInput {
		t.Errorf("status %d, want %d", code, exitInput)
	}
	if stdout.Len() != 0 {
		t.Errorf("stdout not empty: %.200q", stdout.String())
	}
	if msg := stderr.String(); strings.Count(msg, "\n") != 1 || !strings.Contains(msg, "stopped after --timeout 1ms") {
		t.Errorf("stderr = %q, want one line saying the run was stopped", msg)
	}
}

// TestTimeoutGenerous: a limit that is not reached changes nothing: the
// JSON is byte-identical to a run without --timeout.
func TestTimeoutGenerous(t *testing.T) {
	file := "../../testdata/demo/lw0412_cmm.csv"
	var plain, limited, stderr bytes.Buffer
	if code := run([]string{"analyze", "--json", file}, nil, &plain, &stderr); code != exitOK {
		t.Fatalf("status %d: %s", code, stderr.String())
	}
	if code := run([]string{"analyze", "--json", "--timeout", "10m", file}, nil, &limited, &stderr); code != exitOK {
		t.Fatalf("with --timeout: status %d: %s", code, stderr.String())
	}
	if !bytes.Equal(plain.Bytes(), limited.Bytes()) || plain.Len() == 0 {
		t.Errorf("--timeout 10m changed the output:\n%s\nvs\n%s", limited.String(), plain.String())
	}
}

// TestTimeoutNegative: a negative limit is refused as a flag error.
func TestTimeoutNegative(t *testing.T) {
	var stdout, stderr bytes.Buffer
	code := run([]string{"analyze", "--timeout", "-1s", "../../testdata/demo/lw0412_cmm.csv"}, nil, &stdout, &stderr)
	if code != exitInput || !strings.Contains(stderr.String(), "must not be negative") || stdout.Len() != 0 {
		t.Errorf("status %d, stderr %q, stdout %q", code, stderr.String(), stdout.String())
	}
}

// TestTimeoutPanic: a panic inside a bounded command still reaches the
// guard, which turns it into status 1.
func TestTimeoutPanic(t *testing.T) {
	t.Setenv("PHASONHULL_TRACE", "")
	var stderr bytes.Buffer
	cmd := &cobra.Command{}
	cmd.SetOut(&bytes.Buffer{})
	cmd.SetErr(&stderr)
	code := guard(&stderr, func() int {
		runlimit.Bounded(cmd, time.Minute, func() error { panic("boom") })
		return exitOK
	})
	if code != exitInternal || !strings.Contains(stderr.String(), "internal error: boom") {
		t.Errorf("status %d, stderr %q", code, stderr.String())
	}
}
