package outfile

import (
	"fmt"

	"github.com/spf13/pflag"
)

// Role is what a command-line flag's value names for the run.
type Role string

// The roles a flag can carry. A flag without a role names no file.
const (
	Input      Role = "input"       // a file the run reads
	OutputFile Role = "output-file" // a file the run writes ("-" is standard output)
	OutputDir  Role = "output-dir"  // a folder the run writes files into
)

// roleKey is the pflag annotation that records a flag's role.
const roleKey = "phasonhull/role"

// Mark records role on the named flags of fs. Naming a flag that does not
// exist is a programming error and panics.
func Mark(fs *pflag.FlagSet, role Role, names ...string) {
	for _, n := range names {
		if err := fs.SetAnnotation(n, roleKey, []string{string(role)}); err != nil {
			panic(fmt.Sprintf("outfile.Mark: %v", err))
		}
	}
}

// RoleOf returns the role recorded on f, or "" when it names no file.
func RoleOf(f *pflag.Flag) Role {
	if v := f.Annotations[roleKey]; len(v) == 1 {
		return Role(v[0])
	}
	return ""
}
