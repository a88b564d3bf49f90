// Package progress shows what a long run is doing, on one line of the
// terminal that standard error is: the stage, a count where there is one,
// and the time spent. It shows nothing during the first second, so short
// runs stay silent, and nothing at all when it is off (standard error not
// a terminal, or --quiet).
package progress

import (
	"fmt"
	"io"
	"sync"
	"time"
)

// Line is the progress line of one run. Its methods may be called from
// several goroutines; all of them do nothing on a Line that is off.
type Line struct {
	mu          sync.Mutex
	w           io.Writer
	stage       string
	done, total int
	start       time.Time
	shown       bool
	stop        chan struct{}
	wg          sync.WaitGroup
}

// refresh is how often the line is redrawn, and delay how long a run goes
// before the line first shows.
const (
	refresh = 250 * time.Millisecond
	delay   = time.Second
)

// New returns a Line writing to w when on, else one that stays silent.
func New(w io.Writer, on bool) *Line {
	l := &Line{start: time.Now()}
	if !on {
		return l
	}
	l.w, l.stop = w, make(chan struct{})
	l.wg.Add(1)
	go func() {
		defer l.wg.Done()
		t := time.NewTicker(refresh)
		defer t.Stop()
		for {
			select {
			case <-l.stop:
				return
			case <-t.C:
				l.draw()
			}
		}
	}()
	return l
}

// Stage names what the run does now; the count is reset.
func (l *Line) Stage(s string) {
	l.mu.Lock()
	l.stage, l.done, l.total = s, 0, 0
	l.mu.Unlock()
}

// Count sets how far the stage has come: done of total items.
func (l *Line) Count(done, total int) {
	l.mu.Lock()
	l.done, l.total = done, total
	l.mu.Unlock()
}

// Close stops the line and clears it from the terminal.
func (l *Line) Close() {
	if l.w == nil {
		return
	}
	close(l.stop)
	l.wg.Wait()
	l.mu.Lock()
	defer l.mu.Unlock()
	if l.shown {
		fmt.Fprint(l.w, "\r\033[K")
	}
	l.w = nil
}

func (l *Line) draw() {
	l.mu.Lock()
	defer l.mu.Unlock()
	el := time.Since(l.start)
	if el < delay || l.w == nil {
		return
	}
	l.shown = true
	count := ""
	if l.total > 0 {
		count = fmt.Sprintf(" %d/%d", l.done, l.total)
	}
	fmt.Fprintf(l.w, "\r\033[K%s%s · %.0f s", l.stage, count, el.Seconds())
}
