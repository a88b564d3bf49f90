// Package buildinfo describes the binary from what the Go toolchain
// recorded when it was built.
package buildinfo

import (
	"fmt"
	"runtime/debug"
)

// Version describes the binary: the module version and the commit it was
// built from, as the Go toolchain recorded them.
func Version() string {
	bi, ok := debug.ReadBuildInfo()
	if !ok {
		return "unknown (built without module information)"
	}
	v := bi.Main.Version
	if v == "" {
		v = "(devel)"
	}
	var rev, at, dirty string
	for _, s := range bi.Settings {
		switch s.Key {
		case "vcs.revision":
			rev = s.Value
		case "vcs.time":
			at = s.Value
		case "vcs.modified":
			if s.Value == "true" {
				dirty = ", with uncommitted changes"
			}
		}
	}
	if rev == "" {
		return v + ", commit unknown (built without version control information, e.g. by go run)"
	}
	return fmt.Sprintf("%s, commit %s (%s%s)", v, rev, at, dirty)
}
