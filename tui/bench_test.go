package tui

import (
	"testing"

	tea "github.com/charmbracelet/bubbletea"
)

// BenchmarkKnobStep is one adjust key on the load knob (which re-evaluates
// the design; the line-up and the reverse view follow in a command, see
// BenchmarkTables) plus one full redraw at 120×40. The target is a median of at most 5 ms on the project's
// 2-core machine, so that a held-down arrow never lags.
func BenchmarkKnobStep(b *testing.B) {
	var m tea.Model = New(nil)
	m, _ = m.Update(tea.WindowSizeMsg{Width: 120, Height: 40})
	for range int(knobLoad) {
		m, _ = m.Update(tea.KeyMsg{Type: tea.KeyDown})
	}
	keys := []tea.KeyMsg{{Type: tea.KeyRight}, {Type: tea.KeyLeft}}
	b.ResetTimer()
	for i := 0; b.Loop(); i++ {
		m, _ = m.Update(keys[i%2])
		_ = m.View()
	}
}

// BenchmarkTables is the work a design change starts off the key path:
// the whole line-up and the reverse view (tables.go).
func BenchmarkTables(b *testing.B) {
	m := New(nil)
	work := m.tablesNow()
	for b.Loop() {
		work()
	}
}
