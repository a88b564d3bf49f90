package batch

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"sort"
	"strings"
)

// Files expands the arguments of a batch: a folder stands for its
// regular, non-hidden files in name order, except those that are the same
// file as one in skip; a file stands for itself, and so does a path that
// does not exist (it gets a row of its own, like any bad file). Standard
// input ("-") is refused, and so are folders that hold no file.
func Files(args, skip []string) ([]string, error) {
	var files []string
	for _, a := range args {
		if a == "-" {
			return nil, errors.New("batch reads files, not standard input")
		}
		st, err := os.Stat(a)
		if err != nil || !st.IsDir() {
			files = append(files, a)
			continue
		}
		entries, err := os.ReadDir(a)
		if err != nil {
			return nil, fmt.Errorf("reading folder %s: %w", a, err)
		}
		var names []string
		for _, e := range entries {
			if strings.HasPrefix(e.Name(), ".") || !e.Type().IsRegular() {
				continue
			}
			names = append(names, e.Name())
		}
		sort.Strings(names)
		for _, n := range names {
			path := filepath.Join(a, n)
			if !slices.ContainsFunc(skip, func(s string) bool { return s != "" && samePath(s, path) }) {
				files = append(files, path)
			}
		}
	}
	if len(files) == 0 {
		return nil, errors.New("no input files: the folders given hold none")
	}
	return files, nil
}

// samePath reports whether two paths name the same file: the same clean
// absolute path, or the same existing file.
func samePath(a, b string) bool {
	aa, errA := filepath.Abs(a)
	bb, errB := filepath.Abs(b)
	if errA == nil && errB == nil && aa == bb {
		return true
	}
	sa, errA := os.Stat(a)
	sb, errB := os.Stat(b)
	return errA == nil && errB == nil && os.SameFile(sa, sb)
}
