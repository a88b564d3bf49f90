package main

import (
	"bytes"
	"strings"
	"testing"

	"phasonhull/topology/hull"
)

// analyze --help lists every class of the class table with its summary.
func TestAnalyzeHelpListsClasses(t *testing.T) {
	var stdout, stderr bytes.Buffer
	if code := run([]string{"analyze", "--help"}, nil, &stdout, &stderr); code != exitOK {
		t.Fatalf("status %d: %s", code, stderr.String())
	}
	for _, c := range hull.Classes() {
		if !strings.Contains(stdout.String(), string(c.Class)+" ") || !strings.Contains(stdout.String(), c.Summary) {
			t.Errorf("analyze --help does not list %s (%s)", c.Class, c.Summary)
		}
	}
}
