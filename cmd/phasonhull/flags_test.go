package main

import (
	"phasonhull/cmd/phasonhull/internal/outfile"
	"strings"
	"testing"

	"github.com/spf13/pflag"
)

// One meaning per flag name: a flag name used by several commands takes
// the same kind of value everywhere (a length stays a length, a noise
// level a noise level), and its role for the output check is the same.
// Two kinds count as one: --out names the output, a file or a folder
// (report); a list of angles (spectrum --theta, for the angles of a
// torus) is the same kind as one angle.
func TestOneMeaningPerFlagName(t *testing.T) {
	type seen struct{ cmd, typ, role string }
	first := map[string]seen{}
	kind := func(f *pflag.Flag) seen {
		typ, role := strings.TrimSuffix(f.Value.Type(), "Slice"), outfile.RoleOf(f)
		if role == outfile.OutputDir {
			role = outfile.OutputFile
		}
		return seen{typ: typ, role: string(role)}
	}
	for path, cmd := range commands() {
		cmd.Flags().VisitAll(func(f *pflag.Flag) {
			s := kind(f)
			s.cmd = path
			if p, ok := first[f.Name]; ok && (p.typ != s.typ || p.role != s.role) {
				t.Errorf("--%s is a %s (%s) in %s but a %s (%s) in %s", f.Name, p.typ, p.role, p.cmd, s.typ, s.role, s.cmd)
			}
			if _, ok := first[f.Name]; !ok {
				first[f.Name] = s
			}
		})
	}
}
