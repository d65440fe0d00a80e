package tui

import (
	"path/filepath"
	"strings"
	"testing"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/ansi"

	"headroom/internal/goldentest"
	"headroom/internal/scenario"
	"headroom/tolerance"
)

// settle runs the commands a model returns (the spread's, off the key
// path) until none is left, as the bubbletea runtime would.
func settle(t *testing.T, m tea.Model, cmd tea.Cmd) tea.Model {
	t.Helper()
	for i := 0; cmd != nil && i < 10; i++ {
		msg := cmd()
		if b, ok := msg.(tea.BatchMsg); ok {
			var next []tea.Cmd
			for _, c := range b {
				if c != nil {
					next = append(next, c)
				}
			}
			if len(next) == 0 {
				return m
			}
			for _, c := range next[1:] {
				m = settle(t, m, c)
			}
			cmd = next[0]
			continue
		}
		m, cmd = m.Update(msg)
	}
	return m
}

// The verdict fills in the p10 and the worst corner once the spread's
// command has run, and they are the tolerance package's own figures for
// the demo (same design, tolerances, samples and seed).
func TestSpreadFillsVerdict(t *testing.T) {
	m := New(nil)
	var tm tea.Model = m
	first := m.Init()
	if first == nil {
		t.Fatal("Init started no spread")
	}
	tm, _ = tm.Update(tea.WindowSizeMsg{Width: 120, Height: 40})
	before := ansi.Strip(tm.View())
	if !strings.Contains(before, "working…") {
		t.Fatalf("before the spread ran, no \"working…\":\n%s", before)
	}
	tm = settle(t, tm, first)
	view := ansi.Strip(tm.View())
	d := m.shared.design()
	rep, err := tolerance.Analyse(&d, m.scen.Tolerances, m.scen.Samples, m.scen.Seed)
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"9 of 10 run", "≥ " + hours(rep.Stats.P10H), "(p10), worst " + hours(rep.Corner.WorstH()), "p10–p90 cut-off"} {
		if !strings.Contains(view, want) {
			t.Errorf("no %q after the spread ran:\n%s", want, view)
		}
	}
	// A knob step makes the spread stale at once: the verdict says so
	// and Update hands back the command for the next one.
	tm, cmd := tm.Update(keyRight)
	if v := ansi.Strip(tm.View()); !strings.Contains(v, "working…") {
		t.Errorf("after a knob step the old spread is still shown:\n%s", v)
	}
	if cmd == nil {
		t.Error("a knob step started no spread")
	}
}

// At 80×24 the verdict keeps one line a figure; the worst corner's unit is
// whole ("44.9 min", not "44.9 m…" as before the compact line dropped
// "(p10)", which its label says in words).
func TestSpreadVerdictCompact(t *testing.T) {
	m := New(nil)
	var tm tea.Model = m
	first := m.Init()
	tm, _ = tm.Update(tea.WindowSizeMsg{Width: 80, Height: 24})
	tm = settle(t, tm, first)
	view := ansi.Strip(tm.View())
	d := m.shared.design()
	rep, err := tolerance.Analyse(&d, m.scen.Tolerances, m.scen.Samples, m.scen.Seed)
	if err != nil {
		t.Fatal(err)
	}
	want := "9 of 10 run     ≥ " + hours(rep.Stats.P10H) + ", worst " + hours(rep.Corner.WorstH()) + " "
	if !strings.Contains(view, want) {
		t.Errorf("no %q at 80×24:\n%s", want, view)
	}
}

// The spread view at 100×30 (colour stripped) against its golden file;
// go test ./tui -run TestSpreadView -update rewrites it.
func TestSpreadView(t *testing.T) {
	m := New(nil)
	var tm tea.Model = m
	first := m.Init()
	tm, _ = tm.Update(tea.WindowSizeMsg{Width: 100, Height: 30})
	tm = settle(t, tm, first)
	tm, _ = tm.Update(runes("4"))
	got := ansi.Strip(tm.View())
	checkSize(t, got, 100, 30)
	for _, want := range []string{"What to tighten", "floor", "ambient", "█"} {
		if !strings.Contains(got, want) {
			t.Errorf("no %q in the spread view:\n%s", want, got)
		}
	}
	goldentest.Check(t, filepath.Join("testdata", "TestSpreadView.golden"), got)
}

// At 80 columns the line-up's bars give way before its headings: the
// Stranded column's heading is whole (it read "Strande…").
func TestLineupHeadingsAt80(t *testing.T) {
	m := New(nil)
	var tm tea.Model = m
	first := m.Init()
	tm, _ = tm.Update(tea.WindowSizeMsg{Width: 80, Height: 24})
	tm = settle(t, tm, first)
	tm, cmd := tm.Update(runes("2"))
	tm = settle(t, tm, cmd)
	view := ansi.Strip(tm.View())
	if !strings.Contains(view, "Cost/hour  Stranded") || strings.Contains(view, "Strande…") {
		t.Errorf("the line-up's headings are cut at 80×24:\n%s", view)
	}
}

// A design that never starts says so on the Runtime row, as run does, not
// "0 h of use" over "0 h at 1 h a day".
func TestVerdictNeverStarts(t *testing.T) {
	m := New(nil)
	var tm tea.Model = m
	tm, _ = tm.Update(tea.WindowSizeMsg{Width: 120, Height: 40})
	for range 6 { // down to the floor
		tm, _ = tm.Update(keyDown)
	}
	tm, _ = tm.Update(keyEnter)
	tm, _ = tm.Update(runes("5V"))
	tm, _ = tm.Update(keyEnter)
	view := ansi.Strip(tm.View())
	if !strings.Contains(view, "Floor        5.00 V") {
		t.Fatalf("the floor was not set to 5 V:\n%s", view)
	}
	if !strings.Contains(view, "Runtime         0 h (the product does not start)") || strings.Contains(view, "0 h at 1 h a day") {
		t.Errorf("runtime rows of a design that never starts:\n%s", view)
	}
}

// At 80×24 the example scenario's protection heat row is whole: its
// "(72.5 mWh in all)" was cut to "in al…" before the compact row dropped
// the brackets.
func TestCompactHeatRowWhole(t *testing.T) {
	s, err := scenario.Load(filepath.Join("..", "testdata", "scenarios", "example.toml"))
	if err != nil {
		t.Fatal(err)
	}
	var tm tea.Model = New(s)
	tm, _ = tm.Update(tea.WindowSizeMsg{Width: 80, Height: 24})
	view := ansi.Strip(tm.View())
	for _, l := range strings.Split(view, "\n") {
		if strings.HasPrefix(l, "Protection heat") && (strings.Contains(string([]rune(l)[:46]), "…") || !strings.Contains(l, "in all")) {
			t.Errorf("heat row cut: %q", l)
		}
	}
}
