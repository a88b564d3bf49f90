package main

import (
	"os"
	"strings"
	"testing"
)

// TestReadmeQuotesOutput: every line the README quotes from a command's
// output in its worked example is a line the command prints today (a line
// cut short with "…" begins one), in the same order, so the README cannot
// drift from the binary.
func TestReadmeQuotesOutput(t *testing.T) {
	readme, err := os.ReadFile("../../README.md")
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(string(readme), "\n")
	quotes := 0
	for i := 0; i < len(lines); i++ {
		cmd, ok := strings.CutPrefix(lines[i], "    $ phasonhull ")
		if !ok {
			continue
		}
		var quoted []string
		for i++; i < len(lines) && strings.HasPrefix(lines[i], "    "); i++ {
			quoted = append(quoted, lines[i][4:])
		}
		args := strings.Fields(cmd)
		for k, a := range args {
			if strings.HasPrefix(a, "testdata/") {
				args[k] = "../../" + a
			}
		}
		code, out, stderr := runCmd(args...)
		if code != exitOK && code != exitFail {
			t.Fatalf("%s: exit %d: %s", cmd, code, stderr)
		}
		out = strings.ReplaceAll(out, "../../testdata/", "testdata/")
		got := strings.Split(out, "\n")
		at := 0
		for _, q := range quoted {
			if strings.TrimSpace(q) == "…" {
				continue
			}
			prefix, cut := strings.CutSuffix(q, "…")
			found := false
			for ; at < len(got) && !found; at++ {
				found = got[at] == q || cut && strings.HasPrefix(got[at], prefix)
			}
			if !found {
				t.Errorf("README quotes a line %q prints no more (or not in this order):\n%s\nit prints:\n%s", cmd, q, out)
				break
			}
		}
		quotes++
	}
	if quotes < 3 {
		t.Errorf("%d quoted commands found in the README; the worked example has 3", quotes)
	}
}
