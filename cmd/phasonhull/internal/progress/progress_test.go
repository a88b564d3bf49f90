package progress

import (
	"bytes"
	"strings"
	"sync"
	"testing"
	"time"
)

// syncBuffer is a buffer safe for the line's goroutine and the test.
type syncBuffer struct {
	mu sync.Mutex
	b  bytes.Buffer
}

func (s *syncBuffer) Write(p []byte) (int, error) {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.b.Write(p)
}

func (s *syncBuffer) String() string {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.b.String()
}

// A line that is on shows the stage and the count once the run has gone
// on past a second, and clears itself on Close; a line that is off writes
// nothing; a short run writes nothing either.
func TestLine(t *testing.T) {
	var on syncBuffer
	l := New(&on, true)
	l.Stage("analysing 10 files")
	l.Count(3, 10)
	time.Sleep(delay + 2*refresh)
	l.Close()
	got := on.String()
	if !strings.Contains(got, "analysing 10 files 3/10 · ") || !strings.HasSuffix(got, "\r\033[K") {
		t.Errorf("line %q", got)
	}
	var quick syncBuffer
	q := New(&quick, true)
	q.Stage("quick")
	q.Close()
	if quick.String() != "" {
		t.Errorf("a run shorter than a second wrote %q", quick.String())
	}
	var off syncBuffer
	o := New(&off, false)
	o.Stage("x")
	o.Count(1, 2)
	o.Close()
	if off.String() != "" {
		t.Errorf("a line that is off wrote %q", off.String())
	}
}
