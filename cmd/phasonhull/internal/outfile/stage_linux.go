//go:build linux

package outfile

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strconv"

	"golang.org/x/sys/unix"
)

// A stagedFile is content written where no one sees it: an unnamed file
// (O_TMPFILE) in the target's file system, or, where that file system has
// none, a buffer in memory.
type stagedFile struct {
	f   *os.File      // the unnamed file, or nil
	buf *bytes.Buffer // the fallback
}

func stage(dir string) (*stagedFile, error) {
	fd, err := unix.Open(dir, unix.O_TMPFILE|unix.O_WRONLY|unix.O_CLOEXEC, 0o644)
	if err != nil {
		if errors.Is(err, unix.EOPNOTSUPP) || errors.Is(err, unix.EISDIR) || errors.Is(err, unix.EINVAL) {
			return &stagedFile{buf: new(bytes.Buffer)}, nil
		}
		return nil, fmt.Errorf("staging in %s: %w", dir, err)
	}
	return &stagedFile{f: os.NewFile(uintptr(fd), filepath.Join(dir, "(staged)"))}, nil
}

func (s *stagedFile) w() io.Writer {
	if s.f != nil {
		return s.f
	}
	return s.buf
}

// commit makes the content visible at path: linked under a hidden name
// beside path, then renamed over it. The caller holds commitLock.
func (s *stagedFile) commit(path string) error {
	if s.f == nil {
		return commitBuffer(s.buf, path)
	}
	if err := s.f.Sync(); err != nil {
		return err
	}
	tmp := hiddenName(path)
	proc := "/proc/self/fd/" + strconv.Itoa(int(s.f.Fd()))
	if err := unix.Linkat(unix.AT_FDCWD, proc, unix.AT_FDCWD, tmp, unix.AT_SYMLINK_FOLLOW); err != nil {
		return fmt.Errorf("linking the staged file to %s: %w", tmp, err)
	}
	if err := os.Rename(tmp, path); err != nil {
		os.Remove(tmp)
		return err
	}
	return nil
}

func (s *stagedFile) discard() {
	if s.f != nil {
		s.f.Close() // an unnamed file vanishes with its last descriptor
	}
}

// umask returns the process's file mode creation mask.
func umask() os.FileMode {
	m := unix.Umask(0)
	unix.Umask(m)
	return os.FileMode(m)
}
