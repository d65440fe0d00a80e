package tui

import (
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	tea "github.com/charmbracelet/bubbletea"

	"headroom/curves"
	"headroom/discharge"
	"headroom/internal/scenario"
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

// hostileScenario is the heaviest design the readers accept: a cell file
// of 1 MB (52,000 points; thinned on load), a profile of the most phases
// a load may have, and the most cells a scenario may define, each with a
// long curve.
func hostileScenario(tb testing.TB) *scenario.Scenario {
	dir := tb.TempDir()
	var csv strings.Builder
	csv.WriteString("mAh,V\n")
	for i := 0; i < 52000; i++ {
		x := float64(i) / 52000
		fmt.Fprintf(&csv, "%.3f,%.5f\n", 2600*x, 1.58-0.45*x-0.35*math.Pow(x, 9))
	}
	if err := os.WriteFile(filepath.Join(dir, "long.csv"), []byte(csv.String()), 0o644); err != nil {
		tb.Fatal(err)
	}
	var load []string
	for i := range discharge.MaxPhases {
		load = append(load, fmt.Sprintf("%dmA/%ds", 20+7*(i%13), 1+i%5))
	}
	var s strings.Builder
	fmt.Fprintf(&s, "name = \"heavy\"\ncell = \"long.csv\"\nseries = 2\nload = %q\n", strings.Join(load, ","))
	for i := range scenario.MaxCells - 1 {
		fmt.Fprintf(&s, "[[define_cell]]\nid = \"c%d\"\ncurve = [", i)
		for j := 0; j < curves.MaxCurvePoints; j++ {
			x := float64(j) / float64(curves.MaxCurvePoints-1)
			fmt.Fprintf(&s, "[%.2f, %.5f],", 2000*x, 1.55-0.5*x-0.3*math.Pow(x, 8))
		}
		s.WriteString("]\n")
	}
	path := filepath.Join(dir, "heavy.toml")
	if err := os.WriteFile(path, []byte(s.String()), 0o644); err != nil {
		tb.Fatal(err)
	}
	sc, err := scenario.Load(path)
	if err != nil {
		tb.Fatal(err)
	}
	return sc
}

// BenchmarkKnobStepHostile is BenchmarkKnobStep on hostileScenario. The
// budget is a median of at most 50 ms a key on the project's 2-core
// machine for any input the readers accept.
func BenchmarkKnobStepHostile(b *testing.B) {
	var m tea.Model = New(hostileScenario(b))
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

// BenchmarkLineupHostile is the key that opens the line-up after a knob
// moved on hostileScenario, and the frame drawn after it: past
// lineupSyncWork the line-up is evaluated off the key path. Same 50 ms
// budget.
func BenchmarkLineupHostile(b *testing.B) {
	var m tea.Model = New(hostileScenario(b))
	m, _ = m.Update(tea.WindowSizeMsg{Width: 120, Height: 40})
	for range int(knobLoad) {
		m, _ = m.Update(tea.KeyMsg{Type: tea.KeyDown})
	}
	b.ResetTimer()
	for b.Loop() {
		b.StopTimer()
		m, _ = m.Update(tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune("1")})
		m, _ = m.Update(tea.KeyMsg{Type: tea.KeyRight})
		b.StartTimer()
		m, _ = m.Update(tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune("2")})
		_ = m.View()
	}
}

// BenchmarkLineupBackgroundHostile is the line-up's evaluation itself on
// hostileScenario, which runs beside the keys: how long until it shows.
func BenchmarkLineupBackgroundHostile(b *testing.B) {
	m := New(hostileScenario(b))
	for b.Loop() {
		lineupFor(m.design(), m.cells)
	}
}
