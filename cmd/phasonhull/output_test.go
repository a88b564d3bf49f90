package main

import (
	"bufio"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"phasonhull/cmd/phasonhull/internal/outfile"
)

// TestMain lets the test binary stand in for phasonhull itself, so that the
// kill test can stop a real process: with PHASONHULL_TEST_AS_BINARY=1 it runs
// main on its arguments.
func TestMain(m *testing.M) {
	if os.Getenv("PHASONHULL_TEST_AS_BINARY") == "1" {
		main()
	}
	os.Exit(m.Run())
}

// commands lists every runnable command of the tree with its path ("audit").
func commands() map[string]*cobra.Command {
	cmds := map[string]*cobra.Command{}
	var walk func(c *cobra.Command, path []string)
	walk = func(c *cobra.Command, path []string) {
		if c.RunE != nil {
			cmds[strings.Join(path, " ")] = c
		}
		for _, sub := range c.Commands() {
			walk(sub, append(slices.Clone(path), sub.Name()))
		}
	}
	walk(newRootCmd(nil, nil, nil), nil)
	return cmds
}

// flagsWith lists cmd's flags that carry one of the roles.
func flagsWith(cmd *cobra.Command, roles ...outfile.Role) []string {
	var names []string
	cmd.Flags().VisitAll(func(f *pflag.Flag) {
		if slices.Contains(roles, outfile.RoleOf(f)) {
			names = append(names, f.Name)
		}
	})
	return names
}

// Every flag whose value is a path (its help names FILE, DIR or SPEC)
// says whether the run reads or writes it, so the output check sees it.
func TestEveryPathFlagHasARole(t *testing.T) {
	for path, cmd := range commands() {
		cmd.Flags().VisitAll(func(f *pflag.Flag) {
			name, _ := pflag.UnquoteUsage(f)
			if (name == "FILE" || name == "DIR" || name == "SPEC") && outfile.RoleOf(f) == "" {
				t.Errorf("%s --%s names a %s but is marked neither input nor output", path, f.Name, name)
			}
		})
	}
}

// No command writes over one of its inputs: every writing flag of every
// command (read off the command tree, so a new one is covered unasked) is
// pointed at each of the command's inputs — under the same name, through
// "./", a symlink and a hard link — and must be refused with exit status 2
// and one line naming both paths, leaving the input byte for byte as it was
// and its folder without a new entry.
func TestNoOutputOverwritesAnInput(t *testing.T) {
	sample, err := os.ReadFile("../../testdata/demo/lw0412_cmm.csv")
	if err != nil {
		t.Fatal(err)
	}
	tried := 0
	for path, cmd := range commands() {
		writers := flagsWith(cmd, outfile.OutputFile, outfile.OutputDir)
		if len(writers) == 0 {
			continue
		}
		slots := flagsWith(cmd, outfile.Input)
		if cmd.Annotations[outfile.ArgsAreFiles] != "" {
			slots = append(slots, "")
		}
		if len(slots) == 0 {
			t.Errorf("%s writes files but reads none: nothing to check it against", path)
		}
		needsArg := cmd.Args != nil && cmd.Args(cmd, nil) != nil
		for _, w := range writers {
			for _, slot := range slots {
				for _, alias := range []string{"same", "dot", "symlink", "hardlink"} {
					name := path + " --" + w + " on " + map[bool]string{true: "FILE", false: "--" + slot}[slot == ""] + " " + alias
					t.Run(name, func(t *testing.T) {
						dir := t.TempDir()
						t.Chdir(dir)
						os.WriteFile("in.csv", sample, 0o644)
						os.WriteFile("other.csv", sample, 0o644)
						target := map[string]string{"same": "in.csv", "dot": "./in.csv", "symlink": "link.csv", "hardlink": "hard.csv"}[alias]
						switch alias {
						case "symlink":
							os.Symlink("in.csv", "link.csv")
						case "hardlink":
							os.Link("in.csv", "hard.csv")
						}
						before := entries(t, dir)
						args := strings.Fields(path)
						if slot == "" {
							args = append(args, "in.csv")
						} else {
							args = append(args, "--"+slot, "in.csv")
							if needsArg {
								args = append(args, "other.csv")
							}
						}
						args = append(args, "--"+w, target)
						code, _, stderr := runCmd(args...)
						if code != exitInput {
							t.Errorf("%v: exit %d, want %d (%s)", args, code, exitInput, stderr)
						}
						if strings.Count(stderr, "\n") != 1 || !strings.Contains(stderr, target) || !strings.Contains(stderr, "in.csv") {
							t.Errorf("%v: stderr %q, want one line naming %s and in.csv", args, stderr, target)
						}
						if after, _ := os.ReadFile("in.csv"); string(after) != string(sample) {
							t.Errorf("%v: the input was changed", args)
						}
						if after := entries(t, dir); !slices.Equal(after, before) {
							t.Errorf("%v: the folder went from %v to %v", args, before, after)
						}
					})
					tried++
				}
			}
			if outfile.RoleOf(cmd.Flags().Lookup(w)) == outfile.OutputDir {
				t.Run(path+" --"+w+" on the input's folder", func(t *testing.T) {
					t.Chdir(t.TempDir())
					os.WriteFile("in.csv", sample, 0o644)
					args := append(strings.Fields(path), "--"+w, ".")
					if slices.Contains(slots, "") {
						args = append(args, "in.csv")
					} else {
						args = append(args, "--"+slots[0], "in.csv")
					}
					code, _, stderr := runCmd(args...)
					if code != exitInput || !strings.Contains(stderr, "holds the input in.csv") {
						t.Errorf("%v: exit %d, %q", args, code, stderr)
					}
				})
			}
		}
	}
	if tried < 4*9 {
		t.Errorf("only %d refusals tried: the command tree lost its marks?", tried)
	}
}

// entries lists the names in dir.
func entries(t *testing.T, dir string) []string {
	t.Helper()
	es, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, e := range es {
		names = append(names, e.Name())
	}
	return names
}

// killCase is a run that writes one output, with the path it writes.
type killCase struct {
	args   []string // run in a folder holding in.csv and design.json
	target string   // the file or folder written
	later  bool     // another output is committed before target
}

// killCases covers every writing flag of every command: the kill test
// fails when a flag is added without a case here.
var killCases = map[string]killCase{
	"embed --out":      {args: []string{"embed", "in.csv", "--out", "out.csv"}, target: "out.csv"},
	"generate --out":   {args: []string{"generate", "modulated", "--sites", "400", "--theta", "0.2763", "--amp", "0.12", "--out", "out.csv"}, target: "out.csv"},
	"spectrum --out":   {args: []string{"spectrum", "in.csv", "--hopping", "exp", "--decay", "3", "--out", "out.csv"}, target: "out.csv"},
	"spectrum --plot":  {args: []string{"spectrum", "in.csv", "--hopping", "exp", "--decay", "3", "--plot", "figs"}, target: "figs"},
	"analyze --plot":   {args: []string{"analyze", "in.csv", "--plot", "figs"}, target: "figs"},
	"audit --out":      {args: []string{"audit", "--design", "design.json", "in.csv", "--out", "out.txt"}, target: "out.txt"},
	"audit --plot":     {args: []string{"audit", "--design", "design.json", "in.csv", "--plot", "figs"}, target: "figs"},
	"batch --out":      {args: []string{"batch", "in.csv", "--out", "out.csv"}, target: "out.csv"},
	"batch --out-json": {args: []string{"batch", "in.csv", "--out", "out.csv", "--out-json", "out.json"}, target: "out.json", later: true},
	"budget --plot":    {args: []string{"budget", "--design", "design.json", "--hopping", "exp", "--decay", "3", "--trials", "4", "--hull-trials", "0", "--edge-trials", "0", "--sigma", "0,0.05", "--plot", "figs"}, target: "figs"},
	"report --out":     {args: []string{"report", "in.csv", "--design", "design.json", "--out", "rep"}, target: "rep"},
}

// A run stopped at any point leaves its output as it was and no temporary
// entry behind: killed (SIGKILL) while it computes, while it stages its
// files and once they are staged; stopped (SIGTERM) in the middle of its
// commit, it finishes the commit first, so the output is whole and new.
// Each writing command is run as a real process, over an output that
// already exists (a folder output also when it is missing).
func TestStoppedRunsLeaveOutputsWhole(t *testing.T) {
	if testing.Short() {
		t.Skip("runs each writing command about ten times as a process")
	}
	for path, cmd := range commands() {
		for _, w := range flagsWith(cmd, outfile.OutputFile, outfile.OutputDir) {
			if _, ok := killCases[path+" --"+w]; !ok {
				t.Errorf("%s --%s writes output but has no case in killCases", path, w)
			}
		}
	}
	sample, _ := os.ReadFile("../../testdata/demo/lw0412_cmm.csv")
	spec, _ := os.ReadFile("../../testdata/demo/lw0412_design.json")
	self, err := os.Executable()
	if err != nil {
		t.Fatal(err)
	}
	type stop struct {
		at     string // a pause point, or "" for a time after the start
		sig    syscall.Signal
		whole  bool // the output must be the new one (else the old one)
		exists bool // the output exists before the run
	}
	stops := []stop{
		{"", syscall.SIGKILL, false, true},
		{"writing", syscall.SIGKILL, false, true},
		{"staged", syscall.SIGKILL, false, true},
		{"staged", syscall.SIGTERM, false, true},
		{"committing", syscall.SIGTERM, true, true},
		{"staged", syscall.SIGKILL, false, false},
		{"committing", syscall.SIGTERM, true, false},
	}
	for name, kc := range killCases {
		t.Run(name, func(t *testing.T) {
			t.Parallel()
			// The output of an uninterrupted run, to compare with.
			ref := t.TempDir()
			os.WriteFile(filepath.Join(ref, "in.csv"), sample, 0o644)
			os.WriteFile(filepath.Join(ref, "design.json"), spec, 0o644)
			c := exec.Command(self, kc.args...)
			c.Dir, c.Env = ref, append(os.Environ(), "PHASONHULL_TEST_AS_BINARY=1")
			if out, err := c.CombinedOutput(); err != nil && c.ProcessState.ExitCode() != exitFail {
				t.Fatalf("%v: %v\n%s", kc.args, err, out)
			}
			want := snapshot(t, filepath.Join(ref, kc.target))
			isDir := strings.Contains(name, "--plot") || name == "report --out"
			for _, s := range stops {
				if !s.exists && !isDir {
					continue
				}
				dir := t.TempDir()
				os.WriteFile(filepath.Join(dir, "in.csv"), sample, 0o644)
				os.WriteFile(filepath.Join(dir, "design.json"), spec, 0o644)
				target := filepath.Join(dir, kc.target)
				if s.exists {
					if isDir {
						os.Mkdir(target, 0o755)
						for f := range want {
							os.WriteFile(filepath.Join(target, f), []byte("previous\n"), 0o644)
						}
					} else {
						os.WriteFile(target, []byte("previous\n"), 0o644)
					}
				}
				old := snapshot(t, target)
				names := entries(t, dir)
				c := exec.Command(self, kc.args...)
				c.Dir = dir
				c.Env = append(os.Environ(), "PHASONHULL_TEST_AS_BINARY=1", "PHASONHULL_PAUSE_AT="+s.at, "PHASONHULL_PAUSE_FOR=1s")
				stderr, err := c.StderrPipe()
				if err != nil {
					t.Fatal(err)
				}
				if err := c.Start(); err != nil {
					t.Fatal(err)
				}
				if s.at == "" {
					time.Sleep(20 * time.Millisecond)
				} else {
					sc := bufio.NewScanner(stderr)
					for sc.Scan() && !strings.Contains(sc.Text(), "paused at "+s.at) {
					}
				}
				c.Process.Signal(s.sig)
				go func() { bufio.NewScanner(stderr).Scan() }()
				c.Wait()
				got := snapshot(t, target)
				label := s.sig.String() + " at " + map[bool]string{true: "20 ms", false: s.at}[s.at == ""]
				switch {
				case !equalSnap(got, old) && !equalSnap(got, want):
					t.Errorf("%s: the output is neither the old one nor the whole new one: %v", label, keys(got))
				case s.at == "" || (s.whole && kc.later):
					// Stopped by time, or while an earlier output of the run
					// was committed: the old or the whole new output.
				case s.whole && !equalSnap(got, want):
					t.Errorf("%s: the output is not the whole new one: %v", label, keys(got))
				case !s.whole && !equalSnap(got, old):
					t.Errorf("%s: the output changed: %v", label, keys(got))
				}
				after := entries(t, dir)
				after = slices.DeleteFunc(after, func(n string) bool {
					// outputs the run may have committed whole
					return (n == kc.target || slices.Contains(kc.args, n)) && !slices.Contains(names, n)
				})
				if !slices.Equal(after, names) {
					t.Errorf("%s: the folder went from %v to %v", label, names, after)
				}
				if isDir && s.exists {
					if left := slices.DeleteFunc(entries(t, target), func(n string) bool { _, ok := want[n]; return ok }); len(left) > 0 {
						t.Errorf("%s: left in the output folder: %v", label, left)
					}
				}
			}
		})
	}
}

// snapshot maps each file of a folder (or the one file) to its content;
// nil when path does not exist.
func snapshot(t *testing.T, path string) map[string]string {
	t.Helper()
	st, err := os.Stat(path)
	if err != nil {
		return nil
	}
	if !st.IsDir() {
		b, _ := os.ReadFile(path)
		return map[string]string{"": string(b)}
	}
	m := map[string]string{}
	for _, n := range entries(t, path) {
		b, _ := os.ReadFile(filepath.Join(path, n))
		m[n] = string(b)
	}
	return m
}

func equalSnap(a, b map[string]string) bool {
	if len(a) != len(b) || (a == nil) != (b == nil) {
		return false
	}
	for k, v := range a {
		if w, ok := b[k]; !ok || w != v {
			return false
		}
	}
	return true
}

func keys(m map[string]string) []string {
	var ks []string
	for k := range m {
		ks = append(ks, k)
	}
	slices.Sort(ks)
	return ks
}
