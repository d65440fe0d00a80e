package tui

import (
	"bytes"
	"errors"
	"io"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"
	"unicode"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/ansi"

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
	if !reflect.DeepEqual(gm.vals, before) {
		t.Errorf("knobs after the recovered panic: %+v, want %+v", gm.vals, before)
	}
	if !strings.Contains(gm.View(), "the design is as it was") {
		t.Errorf("no word of the failure on the screen:\n%s", gm.View())
	}
}

// syncBuffer is an output the program writes while the test reads.
type syncBuffer struct {
	mu sync.Mutex
	b  bytes.Buffer
}

func (s *syncBuffer) Write(p []byte) (int, error) {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.b.Write(p)
}

func (s *syncBuffer) String() string {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.b.String()
}

// Each catchable signal closes the screen with the terminal restored
// (the alternate screen left, the cursor shown) and a SignalError whose
// exit code is 128 + the signal. Before, SIGHUP left the alternate screen
// on, SIGQUIT left the terminal raw and SIGTERM exited 0.
func TestSignalsRestoreTheTerminal(t *testing.T) {
	for _, sig := range []syscall.Signal{syscall.SIGHUP, syscall.SIGQUIT, syscall.SIGTERM, syscall.SIGINT} {
		in, inW := io.Pipe()
		out := &syncBuffer{}
		errc := make(chan error, 1)
		go func() { errc <- run(nil, nil, tea.WithInput(in), tea.WithOutput(out)) }()
		// Wait for the alternate screen: by then the signals are caught.
		deadline := time.Now().Add(10 * time.Second)
		for !strings.Contains(out.String(), "\x1b[?1049h") {
			if time.Now().After(deadline) {
				t.Fatalf("%v: no frame drawn: %q", sig, out.String())
			}
			time.Sleep(10 * time.Millisecond)
		}
		if err := syscall.Kill(os.Getpid(), sig); err != nil {
			t.Fatal(err)
		}
		var err error
		select {
		case err = <-errc:
		case <-time.After(10 * time.Second):
			t.Fatalf("%v: the screen did not close", sig)
		}
		inW.Close()
		var se *SignalError
		if !errors.As(err, &se) || se.Signal != sig || se.ExitCode() != 128+int(sig) {
			t.Fatalf("%v: got %v, want a SignalError with exit code %d", sig, err, 128+int(sig))
		}
		o := out.String()
		// The terminal codes of ECMA-48 / xterm: ?1049l leaves the
		// alternate screen, ?25h shows the cursor.
		for _, want := range []string{"\x1b[?1049l", "\x1b[?25h"} {
			if !strings.Contains(o[strings.LastIndex(o, "\x1b[?1049h"):], want) {
				t.Errorf("%v: the output does not end with %q restoring the terminal", sig, want)
			}
		}
		if strings.ContainsAny(se.Error(), "\n\x1b") {
			t.Errorf("%v: message %q is not one plain line", sig, se.Error())
		}
	}
}

// On the heaviest input the readers accept, the line-up key returns at
// once with the line-up evaluated off the key path, and the rows arrive
// as a message; a design change meanwhile makes the late rows stale.
func TestHeavyLineupOffTheKeyPath(t *testing.T) {
	var m tea.Model = New(hostileScenario(t))
	m, _ = m.Update(tea.WindowSizeMsg{Width: 120, Height: 40})
	m, cmd := m.Update(runes("2"))
	if cmd == nil {
		t.Fatal("no command: the heavy line-up was evaluated inside the key press")
	}
	if v := m.View(); !strings.Contains(v, "Evaluating") {
		t.Fatalf("while evaluating, the view says:\n%s", v)
	}
	m = press(m, keyDown, runes("o")) // keys while waiting do nothing harmful
	msg := cmd()
	m, _ = m.Update(msg)
	mm := m.(Model)
	if rows := mm.lineupReady(); len(rows) != len(mm.cells) {
		t.Fatalf("%d rows after the message, want %d", len(rows), len(mm.cells))
	}
	// A result for an older design is not shown.
	mm.evaluate()
	m, _ = mm.Update(msg)
	if lm := m.(Model); lm.lineupReady() != nil {
		t.Error("a stale line-up was taken")
	}
}

// The cell field refuses a deeply nested cell file on its shape (it once
// froze the screen for 30 s) and keeps the design.
func TestCellFieldRefusesDeepTOML(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "deep.toml")
	deep := "id = \"x\"\nx = " + strings.Repeat("{a=", 10000) + "1" + strings.Repeat("}", 10000) + "\n"
	if err := os.WriteFile(p, []byte(deep), 0o644); err != nil {
		t.Fatal(err)
	}
	m := New(nil)
	before := m.vals
	err := m.setText(knobCell, p)
	if err == nil || !strings.Contains(err.Error(), "refuses the file before reading it") {
		t.Fatalf("cell field: %v", err)
	}
	if !reflect.DeepEqual(m.vals, before) {
		t.Error("the refused file changed the design")
	}
}

// A scenario, a cell and a file named to drive the terminal reach no view
// with their control characters: once colour is stripped, every view of
// the screen holds none but line breaks (the header once set the
// terminal's title).
func TestScreenShowsNamesClean(t *testing.T) {
	dir := t.TempDir()
	bad := "X\x1b]2;pwned\a\u009b2J"
	path := filepath.Join(dir, "s"+bad+".toml")
	text := "name = \"X\\u001b]2;pwned\\u0007\\u009b2J\"\nnote = \"n\\u001b[31m\"\ncell = \"own\"\n" +
		"[[define_cell]]\nid = \"own\"\nname = \"cell\\u001b]0;t\\u0007\"\nchemistry = \"c\\u0007\"\nsource = \"s\\u001b[2K\"\n" +
		"curve = [[0, 1.5], [1500, 1.1], [2500, 0.9]]\n"
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	s, err := scenario.Load(path)
	if err != nil {
		t.Fatal(err)
	}
	var m tea.Model = New(s)
	m, _ = m.Update(tea.WindowSizeMsg{Width: 120, Height: 40})
	for _, k := range []string{"1", "2", "3", "?"} {
		m, _ = m.Update(runes(k))
		v := ansi.Strip(m.View())
		if k == "1" && !strings.Contains(v, "X]2;pwned2J") {
			t.Fatalf("the header does not show the cleaned name:\n%s", v)
		}
		for i, r := range v {
			if r != '\n' && unicode.IsControl(r) {
				t.Fatalf("view %s: control character %U at %d", k, r, i)
			}
		}
		if k == "?" {
			m, _ = m.Update(runes("?"))
		}
	}
}
