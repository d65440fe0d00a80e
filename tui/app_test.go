package tui

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/ansi"
	"github.com/charmbracelet/x/exp/teatest"

	"headroom/internal/scenario"
)

// Key messages as a terminal sends them.
var (
	keyUp    = tea.KeyMsg{Type: tea.KeyUp}
	keyDown  = tea.KeyMsg{Type: tea.KeyDown}
	keyLeft  = tea.KeyMsg{Type: tea.KeyLeft}
	keyRight = tea.KeyMsg{Type: tea.KeyRight}
	keyEnter = tea.KeyMsg{Type: tea.KeyEnter}
	keyEsc   = tea.KeyMsg{Type: tea.KeyEsc}
)

func runes(s string) tea.KeyMsg { return tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune(s)} }

// startTest runs model m under teatest in a w × h terminal.
func startTest(t *testing.T, m Model, w, h int) *teatest.TestModel {
	t.Helper()
	return teatest.NewTestModel(t, m, teatest.WithInitialTermSize(w, h))
}

// waitText waits until the program's output holds every one of want.
func waitText(t *testing.T, tm *teatest.TestModel, want ...string) {
	t.Helper()
	teatest.WaitFor(t, tm.Output(), func(b []byte) bool {
		s := ansi.Strip(string(b))
		for _, w := range want {
			if !strings.Contains(s, w) {
				return false
			}
		}
		return true
	}, teatest.WithDuration(5*time.Second), teatest.WithCheckInterval(10*time.Millisecond))
}

// finish quits the program and returns its last model.
func finish(t *testing.T, tm *teatest.TestModel) Model {
	t.Helper()
	tm.Send(runes("q"))
	return tm.FinalModel(t, teatest.WithFinalTimeout(5*time.Second)).(Model)
}

// shownRuntime is the runtime text the verdict panel shows, as drawn.
func shownRuntime(t *testing.T, view string) string {
	t.Helper()
	for _, l := range strings.Split(ansi.Strip(view), "\n") {
		if i := strings.Index(l, "Runtime "); i >= 0 {
			f := strings.Fields(l[i+len("Runtime "):])
			if len(f) >= 2 {
				return f[0] + " " + f[1]
			}
		}
	}
	t.Fatalf("no runtime on the screen:\n%s", ansi.Strip(view))
	return ""
}

func mustResult(t *testing.T, m Model) float64 {
	t.Helper()
	r, err := m.Result()
	if err != nil {
		t.Fatalf("design does not run: %v", err)
	}
	return r.RuntimeH
}

func TestDemoOpensWithRuntime(t *testing.T) {
	tm := startTest(t, New(nil), 120, 40)
	waitText(t, tm, "Tumble Pup", "Runtime", "h of use", "Cut-off")
	m := finish(t, tm)
	h := mustResult(t, m)
	if !(h > 0) {
		t.Fatalf("demo runtime %v h, want above 0", h)
	}
	// The runtime on screen is the model's, as formatted.
	if got, want := shownRuntime(t, m.View()), hours(h); got != want {
		t.Errorf("screen shows runtime %q, model has %q", got, want)
	}
}

func TestLoadRightLowersRuntime(t *testing.T) {
	m0 := New(nil)
	m0.width, m0.height = 120, 40
	before, shownBefore := mustResult(t, m0), shownRuntime(t, m0.View())

	tm := startTest(t, New(nil), 120, 40)
	waitText(t, tm, "Runtime")
	for range int(knobLoad) {
		tm.Send(keyDown)
	}
	tm.Send(keyRight)
	// The load knob's first step from 1× is ×1.1 (2 significant digits).
	waitText(t, tm, "1.1× (495 mA peak)")
	m := finish(t, tm)
	if m.knobs.sel != knobLoad {
		t.Fatalf("selected knob %d, want the load knob %d", m.knobs.sel, knobLoad)
	}
	after := mustResult(t, m)
	if !(after < before) {
		t.Errorf("runtime at a 10 %% heavier load: %v h, want below %v h", after, before)
	}
	shown := shownRuntime(t, m.View())
	if shown == shownBefore || shown != hours(after) {
		t.Errorf("screen shows %q after the step (was %q), model has %q", shown, shownBefore, hours(after))
	}
}

func TestDiodeToPMOSRaisesRuntime(t *testing.T) {
	tm := startTest(t, New(nil), 120, 40)
	waitText(t, tm, "Runtime")
	for range int(knobProtect) {
		tm.Send(keyDown)
	}
	m := New(nil)
	if m.vals.elem.Kind() != "diode" {
		t.Fatalf("demo protection %q, want diode", m.vals.elem.Kind())
	}
	diode := mustResult(t, m)
	// The kinds run none, diode, schottky, pmos: two steps from diode.
	tm.Send(keyRight)
	tm.Send(keyRight)
	waitText(t, tm, "(Vth ")
	end := finish(t, tm)
	if k := end.vals.elem.Kind(); k != "pmos" {
		t.Fatalf("protection after two steps: %q, want pmos", k)
	}
	pmos := mustResult(t, end)
	// A P-MOSFET drops millivolts where the diode drops ~0.8 V (docs/protection.md),
	// so the pack reaches the 1.8 V floor much later: any rise passes, the
	// direction is what is checked.
	if !(pmos > diode) {
		t.Errorf("runtime with pmos %v h, want above the diode's %v h", pmos, diode)
	}
	if got := shownRuntime(t, end.View()); got != hours(pmos) {
		t.Errorf("screen shows %q, model has %q", got, hours(pmos))
	}
}

func TestSaveAsksBeforeOverwriting(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, defaultSaveName)
	old := []byte("# a file the user wrote by hand\n")
	if err := os.WriteFile(path, old, 0o644); err != nil {
		t.Fatal(err)
	}
	m := New(nil)
	m.saveDir = dir
	tm := startTest(t, m, 120, 40)
	waitText(t, tm, "Runtime")
	tm.Send(runes("s"))
	waitText(t, tm, "Save the design as: "+defaultSaveName)
	tm.Send(keyEnter)
	waitText(t, tm, "already exists. Overwrite it? y/n")
	tm.Send(runes("n"))
	waitText(t, tm, "is left as it was")
	if got, _ := os.ReadFile(path); !bytes.Equal(got, old) {
		t.Fatalf("after answering no the file holds %q, want the old %q", got, old)
	}
	// Change the design, then save again and agree.
	tm.Send(keyDown) // series
	tm.Send(keyRight)
	tm.Send(runes("s"))
	tm.Send(keyEnter)
	waitText(t, tm, "Overwrite it?")
	if got, _ := os.ReadFile(path); !bytes.Equal(got, old) {
		t.Fatalf("while asking, the file holds %q, want the old %q", got, old)
	}
	tm.Send(runes("y"))
	waitText(t, tm, "Saved the design to")
	end := finish(t, tm)
	s, err := scenario.Load(path)
	if err != nil {
		t.Fatalf("saved file does not load: %v", err)
	}
	if s.Design.Series != 3 || s.Design.Cell != end.cell() || s.Design.Protect.Spec() != end.vals.elem.Spec() {
		t.Errorf("saved design: %d × %s, %s; want 3 × %s, %s", s.Design.Series, s.Design.Cell.ID,
			s.Design.Protect.Spec(), end.cell().ID, end.vals.elem.Spec())
	}
}

func TestSaveNewFileAndCancel(t *testing.T) {
	dir := t.TempDir()
	m := New(nil)
	m.saveDir = dir
	var tm tea.Model = m
	press := func(msgs ...tea.Msg) {
		for _, msg := range msgs {
			var cmd tea.Cmd
			tm, cmd = tm.Update(msg)
			for cmd != nil { // run the write the way the program would
				var next tea.Cmd
				tm, next = tm.Update(cmd())
				cmd = next
			}
		}
	}
	press(runes("s"), keyEsc)
	if _, err := os.Stat(filepath.Join(dir, defaultSaveName)); err == nil {
		t.Fatal("esc at the name prompt wrote a file")
	}
	// Clear the offered name with ctrl+u and type another.
	press(runes("s"), tea.KeyMsg{Type: tea.KeyCtrlU}, runes("toy.toml"), keyEnter)
	got := tm.(Model).save.status
	if !strings.Contains(got, "Saved the design to") {
		t.Fatalf("status after saving: %q", got)
	}
	s, err := scenario.Load(filepath.Join(dir, "toy.toml"))
	if err != nil {
		t.Fatalf("saved file does not load: %v", err)
	}
	if s.Design.Floor != 1.8 || s.Design.Series != 2 {
		t.Errorf("saved floor %v V and %d in series, want the demo's 1.8 V and 2", s.Design.Floor, s.Design.Series)
	}
}

func TestTinyTerminalSaysSize(t *testing.T) {
	tm := startTest(t, New(nil), 20, 5)
	waitText(t, tm, "80×24")
	m := finish(t, tm)
	view := m.View()
	lines := strings.Split(view, "\n")
	if len(lines) > 5 {
		t.Errorf("%d lines in a 5-line terminal", len(lines))
	}
	for _, l := range lines {
		if w := ansi.StringWidth(l); w > 20 {
			t.Errorf("line %q is %d wide in a 20-column terminal", l, w)
		}
	}
}
