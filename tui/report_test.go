package tui

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	tea "github.com/charmbracelet/bubbletea"

	"headroom/internal/scenario"
)

// The r key writes the report of the design on the screen (not the file's)
// through the writer the command line gives, off the key loop; a second
// press never replaces the first report but takes the next numbered name;
// the status line says where it went.
func TestReportKey(t *testing.T) {
	dir := t.TempDir()
	var got []*scenario.Scenario
	writer := func(s *scenario.Scenario, path string) error {
		got = append(got, s)
		return scenario.WriteFile(path, []byte("report of "+s.Design.Cell.ID), false)
	}
	m := New(nil)
	WithReport(writer)(&m)
	m.saveDir = dir
	var tm tea.Model = m
	tm, _ = tm.Update(tea.WindowSizeMsg{Width: 120, Height: 40})
	// Move the series knob up: the report must carry the screen's pack.
	series := tm.(Model).vals.series
	tm = press(tm, tea.KeyMsg{Type: tea.KeyDown}, runes("]")) // the series knob, then a big step
	for i := 0; i < 2; i++ {
		var cmd tea.Cmd
		tm, cmd = tm.Update(runes("r"))
		if cmd == nil {
			t.Fatal("r gave no command: the report must be written off the key loop")
		}
		tm, _ = tm.Update(cmd())
	}
	// Three calls: the first report, then the second press finding that
	// name taken (ErrExists) and writing the next one.
	if len(got) != 3 {
		t.Fatalf("the writer ran %d times, want 3", len(got))
	}
	if now := tm.(Model).vals.series; now == series || got[0].Design.Series != now {
		t.Errorf("the report has %d cells in series, the screen %d (from %d)", got[0].Design.Series, now, series)
	}
	for _, name := range []string{"headroom-report.html", "headroom-report-2.html"} {
		if _, err := os.Stat(filepath.Join(dir, name)); err != nil {
			t.Errorf("%s: %v", name, err)
		}
	}
	if st := tm.(Model).save.status; !strings.Contains(st, "headroom-report-2.html") || tm.(Model).save.failed {
		t.Errorf("status %q, want the second report's path", st)
	}
	// Without a writer the key says so instead of failing silently.
	n, _ := New(nil).Update(runes("r"))
	if st := n.(Model).save.status; !strings.Contains(st, "headroom report") {
		t.Errorf("no writer: status %q", st)
	}
}
