package main

import (
	"strings"
	"testing"
)

// --version prints one line: the module version and the commit the binary
// was built from (or why the commit is not known).
func TestVersionFlag(t *testing.T) {
	code, out, _ := runCmd("--version")
	if code != exitOK || !strings.HasPrefix(out, "phasonhull ") || !strings.Contains(out, "commit ") || strings.Count(out, "\n") != 1 {
		t.Errorf("exit %d, %q: want one line naming the version and the commit", code, out)
	}
}
