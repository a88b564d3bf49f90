package main

import (
	"bytes"
	"runtime"
	"testing"
)

// TestDeterminism: the same input, flags and seed give byte-identical
// JSON, run after run and whether the persistence engine has one core or
// two. The analysis fans out over goroutines (Options.Workers defaults to
// all cores), so this catches any result that depends on their schedule.
func TestDeterminism(t *testing.T) {
	demo := func(name string) string { return "../../testdata/demo/" + name }
	commands := [][]string{
		{"analyze", demo("lw0412_cmm.csv"), "--json"},
		{"analyze", demo("lw0412_cmm.csv"), "--json", "--seed", "7"},
		{"audit", "--design", demo("lw0412_design.json"), demo("lw0412_cmm.csv"), "--json"},
	}
	if testing.Short() {
		commands = commands[:1]
	}
	for _, args := range commands {
		t.Run(args[0], func(t *testing.T) {
			var first []byte
			for _, procs := range []int{1, 2, 1, 2} {
				got := runProcs(t, procs, args)
				if first == nil {
					first = got
					continue
				}
				if !bytes.Equal(got, first) {
					t.Fatalf("%v under GOMAXPROCS=%d differs from the first run:\n%s\nvs\n%s", args, procs, got, first)
				}
			}
			if len(first) == 0 || first[0] != '{' {
				t.Fatalf("%v printed no JSON object: %.200q", args, first)
			}
		})
	}
}

// runProcs runs args under runtime.GOMAXPROCS(procs) and returns stdout.
// An audit may end in status 3 (a failing verdict), which is an answer too.
func runProcs(t *testing.T, procs int, args []string) []byte {
	t.Helper()
	defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(procs))
	var stdout, stderr bytes.Buffer
	if code := run(args, nil, &stdout, &stderr); code != exitOK && code != exitFail {
		t.Fatalf("%v: status %d: %s", args, code, stderr.String())
	}
	return stdout.Bytes()
}
