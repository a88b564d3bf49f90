package outfile

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"
)

// A Path is a file or folder named on the command line, with where it was
// named: a flag ("--out") or a positional argument ("FILE").
type Path struct {
	Source string // the flag or argument that named it, for messages
	Name   string // the path as given
	Dir    bool   // for outputs: a folder the run writes into
}

// Check refuses, before any work, a run whose outputs are, or hold, one of
// its inputs, a run that names one output twice, an output file that is a
// folder or sits in a missing folder, and an output folder that is a file. Files are compared by identity (device
// and inode, after following symlinks), so a hard link, a symlink or
// another spelling of an input is caught; an input folder stands for
// itself and for the regular files directly in it. An empty name and "-"
// (a standard stream) name no file. The error is one line naming both
// paths; nothing is written by Check.
func Check(inputs, outputs []Path) error {
	ins := expand(inputs)
	for i, out := range outputs {
		if out.Name == "" || out.Name == "-" {
			continue
		}
		for _, other := range outputs[:i] {
			if other.Name != "" && other.Name != "-" && same(out.Name, other.Name) {
				return fmt.Errorf("%s %s and %s %s name the same file: give two different outputs",
					other.Source, other.Name, out.Source, out.Name)
			}
		}
		for _, in := range ins {
			if same(out.Name, in.Name) {
				what := "the input"
				if in.Source != "" {
					what = "the input " + in.Source
				}
				return fmt.Errorf("%s %s is %s %s: refusing to write over an input", out.Source, out.Name, what, in.Name)
			}
		}
		st, err := os.Stat(out.Name)
		switch {
		case err == nil && out.Dir && !st.IsDir():
			return fmt.Errorf("%s %s exists and is not a folder", out.Source, out.Name)
		case err == nil && !out.Dir && st.IsDir():
			return fmt.Errorf("%s %s is a folder: give a file name", out.Source, out.Name)
		case !out.Dir:
			if dir := filepath.Dir(out.Name); !isDir(dir) {
				return fmt.Errorf("%s %s: the folder %s does not exist", out.Source, out.Name, dir)
			}
		}
		if out.Dir {
			for _, in := range ins {
				if holds(out.Name, in.Name) {
					return fmt.Errorf("%s %s holds the input %s: write into a folder that holds no input", out.Source, out.Name, in.Name)
				}
			}
		}
	}
	return nil
}

// expand adds the regular, non-hidden files of each input folder to the
// inputs (the files such a folder stands for), and drops "" and "-".
func expand(inputs []Path) []Path {
	var ins []Path
	for _, in := range inputs {
		if in.Name == "" || in.Name == "-" {
			continue
		}
		ins = append(ins, in)
		st, err := os.Stat(in.Name)
		if err != nil || !st.IsDir() {
			continue
		}
		entries, err := os.ReadDir(in.Name)
		if err != nil {
			continue
		}
		for _, e := range entries {
			if strings.HasPrefix(e.Name(), ".") {
				continue
			}
			p := filepath.Join(in.Name, e.Name())
			if st, err := os.Stat(p); err == nil && st.Mode().IsRegular() {
				ins = append(ins, Path{Source: in.Source, Name: p})
			}
		}
	}
	return ins
}

// same reports whether a and b name the same file: the same device and
// inode when both exist, else the same absolute, clean path.
func same(a, b string) bool {
	sa, errA := os.Stat(a)
	sb, errB := os.Stat(b)
	if errA == nil && errB == nil {
		return os.SameFile(sa, sb)
	}
	aa, err1 := filepath.Abs(a)
	ab, err2 := filepath.Abs(b)
	return err1 == nil && err2 == nil && aa == ab
}

// holds reports whether the folder dir contains the file in at any depth,
// after symlinks in in's path are resolved.
func holds(dir, in string) bool {
	sd, err := os.Stat(dir)
	if err != nil || !sd.IsDir() {
		return false
	}
	p, err := filepath.Abs(in)
	if err != nil {
		return false
	}
	if r, err := filepath.EvalSymlinks(p); err == nil {
		p = r
	}
	for {
		parent := filepath.Dir(p)
		if parent == p {
			return false
		}
		p = parent
		if sp, err := os.Stat(p); err == nil && os.SameFile(sd, sp) {
			return true
		}
	}
}

// isDir reports whether path is an existing folder.
func isDir(path string) bool {
	st, err := os.Stat(path)
	return err == nil && st.IsDir()
}
