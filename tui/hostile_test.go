package tui

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"headroom/internal/scenario"
	"headroom/protect"
)

// brokenElement is a protection element whose laws panic, standing for
// any engine failure a design can provoke (a cell of 1e307 mAh once did).
type brokenElement struct{ protect.Element }

func (brokenElement) Drop(i, vin, tempC float64) float64 {
	panic("index out of range [3] with length 3")
}
func (brokenElement) Reverse(protect.Pack) protect.Reversal {
	panic("reverse law failed")
}

// An engine panic leaves the screen open with the design on it: the
// verdict says what happened, every view draws, and the design saves.
func TestEngineFailureKeepsTheDesign(t *testing.T) {
	dir := t.TempDir()
	m := New(nil)
	m.saveDir = dir
	m.width, m.height = 120, 40
	m.vals.series = 3
	m.vals.elem = brokenElement{protect.Default("diode")}
	m.evaluate() // on main this panicked and took the unsaved design with it
	if m.err == nil || !strings.Contains(m.err.Error(), "the engine failed on this design") {
		t.Fatalf("verdict error %v, want the engine failure", m.err)
	}
	for _, v := range []string{"1", "2", "3"} {
		m = press(m, runes(v)).(Model)
		if out := m.View(); strings.Contains(out, "could not draw") || out == "" {
			t.Errorf("view %s: %q", v, out)
		}
	}
	m = press(m, runes("1"), runes("s"), keyEnter).(Model)
	// The write runs as a command; run it as the program would.
	m.save.state = saveIdle
	if err := os.WriteFile(filepath.Join(dir, defaultSaveName), m.saved(), 0o644); err != nil {
		t.Fatal(err)
	}
	s, err := scenario.Load(filepath.Join(dir, defaultSaveName))
	if err != nil || s.Design.Series != 3 {
		t.Fatalf("saved design after the failure: %v, %+v", err, s)
	}
}

// A panic inside Update (here from a knob value no knob can reach) puts
// the knobs back and says so; the screen goes on.
func TestUpdatePanicRecovers(t *testing.T) {
	m := New(nil)
	m.width, m.height = 120, 40
	before := m.vals
	m.knobs.sel = knob(999) // a knob that does not exist
	got, _ := m.Update(keyRight)
	gm := got.(Model)
	if gm.vals != before {
		t.Errorf("knobs after the recovered panic: %+v, want %+v", gm.vals, before)
	}
	if !strings.Contains(gm.View(), "the design is as it was") {
		t.Errorf("no word of the failure on the screen:\n%s", gm.View())
	}
}
