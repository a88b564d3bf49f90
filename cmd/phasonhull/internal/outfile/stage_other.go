//go:build !linux

package outfile

import (
	"bytes"
	"io"
	"os"
)

// A stagedFile is content held in memory until its commit.
type stagedFile struct{ buf *bytes.Buffer }

func stage(string) (*stagedFile, error) { return &stagedFile{buf: new(bytes.Buffer)}, nil }

func (s *stagedFile) w() io.Writer { return s.buf }

func (s *stagedFile) commit(path string) error { return commitBuffer(s.buf, path) }

func (s *stagedFile) discard() {}

func umask() os.FileMode { return 0o022 }
