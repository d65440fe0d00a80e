package tui

import (
	"path/filepath"
	"strings"
	"testing"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/ansi"

	"headroom/internal/goldentest"
)

// sized returns the demo's screen at w × h after the given keys.
func sized(w, h int, keys ...tea.Msg) tea.Model {
	var m tea.Model = New(nil)
	m, _ = m.Update(tea.WindowSizeMsg{Width: w, Height: h})
	for _, k := range keys {
		m, _ = m.Update(k)
	}
	return m
}

// TestGolden compares views at 100×30 (and the smallest, 80×24), colour stripped, with
// testdata/TestGolden/<case>.golden. Run with -update after a deliberate
// change to the screen or the engine and read the diff.
func TestGolden(t *testing.T) {
	cases := []struct {
		name string
		keys []tea.Msg
		w, h int // 0: 100×30
	}{
		{"design-80x24", nil, 80, 24},
		{"notes-80x24", []tea.Msg{runes("w")}, 80, 24},
		{"typing-protection-80x24", []tea.Msg{keyDown, keyDown, keyDown, keyEnter}, 80, 24},
		{"design", nil, 0, 0},
		{"design-floor-selected", []tea.Msg{keyUp, keyUp, keyUp}, 0, 0},
		{"design-pmos", []tea.Msg{keyDown, keyDown, keyDown, keyRight, keyRight}, 0, 0},
		{"typing-bad-floor", []tea.Msg{keyUp, keyUp, keyUp, keyEnter, tea.KeyMsg{Type: tea.KeyCtrlU}, runes("2 volts"), keyEnter}, 0, 0},
		{"lineup", []tea.Msg{runes("2")}, 0, 0},
		{"lineup-by-runtime", []tea.Msg{runes("2"), runes("o")}, 0, 0},
		{"reverse", []tea.Msg{runes("3")}, 0, 0},
		{"help", []tea.Msg{runes("?")}, 0, 0},
		{"save-prompt", []tea.Msg{runes("s")}, 0, 0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			w, h := c.w, c.h
			if w == 0 {
				w, h = 100, 30
			}
			got := ansi.Strip(sized(w, h, c.keys...).View())
			checkSize(t, got, w, h)
			goldentest.Check(t, filepath.Join("testdata", t.Name()+".golden"), got)
		})
	}
}

// checkSize fails when a view has more lines or wider lines than w × h.
func checkSize(t *testing.T, view string, w, h int) {
	t.Helper()
	lines := strings.Split(view, "\n")
	if len(lines) > h {
		t.Errorf("%d lines at height %d", len(lines), h)
	}
	for i, l := range lines {
		if n := ansi.StringWidth(l); n > w {
			t.Errorf("line %d is %d wide at width %d: %q", i+1, n, w, ansi.Strip(l))
		}
	}
}
