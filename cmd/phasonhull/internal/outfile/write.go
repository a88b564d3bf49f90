package outfile

import (
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sync"
	"time"
)

// commitLock is held while staged content is made visible, and taken for
// good by Hold before the process exits, so that no exit — a return from
// main, a signal, a timeout — falls inside a commit.
var commitLock sync.Mutex

// Hold waits for a commit in progress to finish and keeps any later one
// from starting. Call it right before the process exits.
func Hold() { commitLock.Lock() }

// A File is one output file of a group written into a folder.
type File struct {
	Name  string                  // base name inside the folder
	Write func(w io.Writer) error // writes the whole content
}

// WriteFile writes the file at path: write fills a staged copy that no one
// sees, and only when it returns nil does the copy replace path in one
// rename. On error, or when the run is stopped, path is left as it was.
func WriteFile(path string, write func(w io.Writer) error) error {
	dir, base := filepath.Split(filepath.Clean(path))
	if dir == "" {
		dir = "."
	}
	if !isDir(dir) {
		return fmt.Errorf("writing %s: the folder %s does not exist", path, dir)
	}
	if err := WriteFiles(dir, []File{{Name: base, Write: write}}); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	return nil
}

// WriteFiles writes a group of files into the folder dir, all or none: every
// file is staged first, and the files are then put in place in one short
// commit. A missing dir is created by that commit, whole: it appears with
// all its files at once. The names in remove (base names, not among the
// files) are removed from dir in the same commit, where they exist; other
// files already in dir are left alone.
func WriteFiles(dir string, files []File, remove ...string) error {
	for _, f := range files {
		if f.Name == "" || f.Name != filepath.Base(f.Name) || f.Name[0] == '.' {
			return fmt.Errorf("bad output file name %q", f.Name)
		}
	}
	for _, n := range remove {
		if n == "" || n != filepath.Base(n) || n[0] == '.' {
			return fmt.Errorf("bad name to remove %q", n)
		}
	}
	st, err := os.Stat(dir)
	exists := err == nil
	switch {
	case exists && !st.IsDir():
		return fmt.Errorf("%s exists and is not a folder", dir)
	case err != nil && !errors.Is(err, os.ErrNotExist):
		return err
	}
	// Stage in dir, or in its nearest existing ancestor (the same file
	// system, so the commit can link there).
	stageDir := dir
	if !exists {
		if stageDir, err = existingAncestor(dir); err != nil {
			return err
		}
	}
	staged := make([]*stagedFile, 0, len(files))
	defer func() {
		for _, s := range staged {
			s.discard()
		}
	}()
	for _, f := range files {
		s, err := stage(stageDir)
		if err != nil {
			return err
		}
		staged = append(staged, s)
		pause("writing")
		if err := f.Write(s.w()); err != nil {
			return err
		}
	}
	pause("staged")

	commitLock.Lock()
	defer commitLock.Unlock()
	if exists {
		for i, s := range staged {
			if err := s.commit(filepath.Join(dir, files[i].Name)); err != nil {
				return err
			}
			pause("committing")
		}
		for _, n := range remove {
			if err := os.Remove(filepath.Join(dir, n)); err != nil && !errors.Is(err, os.ErrNotExist) {
				return err
			}
		}
		return nil
	}
	// A new folder is built under a hidden name beside its place and
	// renamed into place whole.
	parent := filepath.Dir(filepath.Clean(dir))
	if err := os.MkdirAll(parent, 0o755); err != nil {
		return err
	}
	tmp, err := os.MkdirTemp(parent, "."+filepath.Base(dir)+tmpMark)
	if err != nil {
		return err
	}
	defer os.RemoveAll(tmp) // gone after the rename
	for i, s := range staged {
		if err := s.commit(filepath.Join(tmp, files[i].Name)); err != nil {
			return err
		}
	}
	pause("committing")
	if err := os.Chmod(tmp, 0o755&^umask()); err != nil {
		return err
	}
	return os.Rename(tmp, dir)
}

// tmpMark is in the name of every hidden entry a commit makes beside its
// target.
const tmpMark = ".phasonhull-"

// existingAncestor returns the nearest folder above path that exists.
func existingAncestor(path string) (string, error) {
	p, err := filepath.Abs(path)
	if err != nil {
		return "", err
	}
	for {
		parent := filepath.Dir(p)
		if st, err := os.Stat(parent); err == nil {
			if !st.IsDir() {
				return "", fmt.Errorf("%s is not a folder", parent)
			}
			return parent, nil
		}
		if parent == p {
			return "", fmt.Errorf("no folder above %s exists", path)
		}
		p = parent
	}
}

// pauseEnv names a point at which a run pauses (PHASONHULL_PAUSE_AT=staged,
// writing or committing) for PHASONHULL_PAUSE_FOR (default 2s), after
// saying so on standard error. It exists for the tests that stop runs at
// those points; unset, it costs one lookup per file.
const pauseEnv = "PHASONHULL_PAUSE_AT"

func pause(point string) {
	if os.Getenv(pauseEnv) != point {
		return
	}
	d := 2 * time.Second
	if v, err := time.ParseDuration(os.Getenv("PHASONHULL_PAUSE_FOR")); err == nil {
		d = v
	}
	fmt.Fprintf(os.Stderr, "phasonhull: paused at %s\n", point)
	time.Sleep(d)
}
