package tui

import (
	"fmt"
	"path/filepath"
	"strings"
	"testing"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/ansi"

	"headroom/internal/goldentest"
	"headroom/protect"
)

// drive sends each message and then runs the commands it returns, the
// way bubbletea would, feeding their messages back in; pickedMsg and
// pickDoneMsg are the ones that matter here. It returns the model and
// whether some key returned a search command (work off the key path).
func drive(t *testing.T, m tea.Model, msgs ...tea.Msg) (tea.Model, bool) {
	t.Helper()
	searched := false
	var run func(c tea.Cmd)
	run = func(c tea.Cmd) {
		if c == nil {
			return
		}
		switch msg := c().(type) {
		case tea.BatchMsg:
			for _, cc := range msg {
				run(cc)
			}
		case pickDoneMsg:
			searched = true
			var next tea.Cmd
			m, next = m.Update(msg)
			run(next)
		case pickedMsg:
			var next tea.Cmd
			m, next = m.Update(msg)
			run(next)
		}
	}
	for _, msg := range msgs {
		var c tea.Cmd
		m, c = m.Update(msg)
		run(c)
	}
	return m, searched
}

// TestPickView: 5 opens the pick view; the search runs in a command; the
// view lists ranked designs for the target and fits 100×30 and 80×24
// (golden file, colour stripped; -update rewrites it).
func TestPickView(t *testing.T) {
	for _, size := range [][2]int{{100, 30}, {80, 24}} {
		m, searched := drive(t, sized(size[0], size[1]), runes("5"))
		if !searched {
			t.Fatal("opening the pick view started no search")
		}
		got := ansi.Strip(m.View())
		checkSize(t, got, size[0], size[1])
		if !strings.Contains(got, "Pick: the cheapest designs") || !strings.Contains(got, " 1 ") {
			t.Fatalf("no ranked designs:\n%s", got)
		}
		goldentest.Check(t, filepath.Join("testdata", "TestPickView", fmt.Sprintf("%dx%d.golden", size[0], size[1])), got)
	}
}

// TestPickEnterUsesDesign: enter on the second design makes it the
// design view's: cell, counts and protection part.
func TestPickEnterUsesDesign(t *testing.T) {
	m, _ := drive(t, sized(100, 30), runes("5"), keyDown)
	pm := m.(Model)
	if pm.pick.out == nil || len(pm.pick.out.Designs) < 2 {
		t.Fatal("fewer than two designs to choose from")
	}
	want := pm.pick.out.Designs[1]
	m, _ = drive(t, m, keyEnter)
	got := m.(Model)
	if got.view != screenDesign {
		t.Errorf("view %v after enter, want the design view", got.view)
	}
	v := got.vals
	if got.cell() != want.Cell || v.series != want.Series || v.parallel != want.Parallel || protect.Short(v.elem) != want.Spec {
		t.Errorf("design %s %d×%d %s, want %s %d×%d %s", got.cell().ID, v.series, v.parallel, protect.Short(v.elem),
			want.Cell.ID, want.Series, want.Parallel, want.Spec)
	}
	// The verdict is the chosen design's, to the engine's figure.
	if got.res == nil || got.res.RuntimeH != want.Result.RuntimeH {
		t.Errorf("verdict runtime %v, pick said %v", got.res, want.Result.RuntimeH)
	}
}

// TestPickTargetKnob: → raises the target by a tenth and starts a new
// search in a command; the key itself returns at once with the old list
// still shown, and a result for an older target is dropped.
func TestPickTargetKnob(t *testing.T) {
	m, _ := drive(t, sized(100, 30), runes("5"))
	before := m.(Model).pick
	next, cmd := m.Update(keyRight)
	after := next.(Model).pick
	if cmd == nil || !after.running || after.out != before.out {
		t.Fatalf("the key did not hand the search to a command: cmd %v running %v", cmd != nil, after.running)
	}
	if after.need <= before.need {
		t.Errorf("target %v → %v, want higher", before.need, after.need)
	}
	stale := pickDoneMsg{gen: after.gen - 1, out: nil}
	next, _ = next.Update(stale)
	if next.(Model).pick.out != before.out {
		t.Errorf("a stale result replaced the list")
	}
	m, _ = drive(t, next, keyRight)
	if p := m.(Model).pick; p.running || p.out == nil || p.out.Limits.Need != p.need {
		t.Errorf("after the search: running %v, need %v, searched for %v", p.running, p.need, p.out.Limits.Need)
	}
}
