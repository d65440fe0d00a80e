package main

import (
	"fmt"
	"io"
	"strings"
	"time"

	"github.com/charmbracelet/bubbles/progress"
)

// progressAfter is how long work runs before a progress bar appears: work
// shorter than this finishes before anyone wonders.
const progressAfter = 500 * time.Millisecond

// progressEvery is the shortest time between two redraws.
const progressEvery = 100 * time.Millisecond

// meter draws a progress bar (bubbles' progress) on a terminal's standard
// error for long work: nothing for the first half second, then one line
// redrawn in place, and wiped when the work is done. A nil *meter does
// nothing, so callers need not check for a terminal.
type meter struct {
	w     io.Writer
	what  string
	total int
	bar   progress.Model
	start time.Time
	last  time.Time
	shown bool
	now   func() time.Time // the clock; tests replace it
}

// newMeter returns a meter for total steps on w, or nil when w is not a
// terminal or there is nothing to count.
func newMeter(w io.Writer, terminal bool, what string, total int) *meter {
	if !terminal || total <= 0 {
		return nil
	}
	m := &meter{w: w, what: what, total: total, now: time.Now,
		bar: progress.New(progress.WithDefaultGradient(), progress.WithWidth(30))}
	m.start = m.now()
	return m
}

// step reports that done of the total steps are finished.
func (m *meter) step(done int) {
	if m == nil {
		return
	}
	t := m.now()
	if t.Sub(m.start) < progressAfter || t.Sub(m.last) < progressEvery {
		return
	}
	m.last, m.shown = t, true
	fmt.Fprintf(m.w, "\r%s %d/%d %s", m.bar.ViewAs(float64(done)/float64(m.total)), done, m.total, m.what)
}

// end wipes the bar's line if it was drawn.
func (m *meter) end() {
	if m == nil || !m.shown {
		return
	}
	fmt.Fprintf(m.w, "\r%s\r", strings.Repeat(" ", 30+2*len(fmt.Sprint(m.total))+len(m.what)+8))
}
