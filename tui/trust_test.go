package tui

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/ansi"

	"headroom/discharge"
	"headroom/internal/scenario"
)

// Typing on a knob replaces the pre-filled value (it is selected); an
// arrow keeps it to edit. Driven through teatest as a user types.
func TestTypingReplacesTheValue(t *testing.T) {
	tm := startTest(t, New(nil), 80, 24)
	waitText(t, tm, "Runtime")
	for range int(knobProtect) {
		tm.Send(keyDown)
	}
	tm.Send(keyEnter)
	tm.Send(runes("pmos:vth=1.2"))
	tm.Send(keyEnter)
	waitText(t, tm, "pmos")
	m := finish(t, tm)
	if m.knobs.errText != "" || m.vals.elem.Kind() != "pmos" {
		t.Fatalf("typed pmos:vth=1.2: element %s, error %q", m.vals.elem.Spec(), m.knobs.errText)
	}
	if !strings.Contains(m.vals.elem.Spec(), "vth=1.2V") {
		t.Errorf("spec %s: want vth=1.2V", m.vals.elem.Spec())
	}

	// An arrow first keeps the value: typing then appends to it.
	var mm tea.Model = New(nil)
	mm, _ = mm.Update(tea.WindowSizeMsg{Width: 80, Height: 24})
	for _, k := range []tea.Msg{keyUp, keyUp, keyUp, keyEnter, keyLeft, tea.KeyMsg{Type: tea.KeyEnd}, runes("5")} {
		mm, _ = mm.Update(k)
	}
	if v := mm.(Model).knobs.input.Value(); v != "1.8 V5" {
		t.Errorf("after an arrow and typing 5: field %q, want the value kept and 5 appended", v)
	}
}

// The typing hint is whole, wrapped, never cut.
func TestTypingHintWhole(t *testing.T) {
	v := ansi.Strip(sized(80, 24, keyDown, keyDown, keyDown, keyEnter).View())
	flat := strings.Join(strings.Fields(v), " ")
	if !strings.Contains(flat, "or a spec such as pmos:vth=1.2") {
		t.Errorf("hint cut at 80×24:\n%s", v)
	}
}

// At 80×24 every verdict row shows, and the notes are counted with a key
// to read them all.
func TestEveryVerdictRowAt80x24(t *testing.T) {
	v := ansi.Strip(sized(80, 24).View())
	for _, label := range []string{"Runtime", "Delivered", "Stranded", "drop / floor", "Protection heat", "Junction", "Standby share", "Cost per hour", "press w"} {
		if !strings.Contains(v, label) {
			t.Errorf("80×24: no %q:\n%s", label, v)
		}
	}
	if strings.Contains(v, "taller wind") {
		t.Errorf("80×24: a note cut mid-word:\n%s", v)
	}
	w := ansi.Strip(sized(80, 24, runes("w")).View())
	if !strings.Contains(w, "Do not recharge primary cells") || !strings.Contains(w, "Never mix old and new cells") {
		t.Errorf("w: the notes view lacks the cautions:\n%s", w)
	}
}

// The part knob reads in plain words: the drop the part gives at the
// load's peak, with the model's key beside it.
func TestPartKnobInPlainWords(t *testing.T) {
	m := New(nil)
	r := m.row(knobPart)
	if !strings.Contains(r.name, "drop") || !strings.Contains(r.value, "V (") || !strings.Contains(r.value, "Is") {
		t.Errorf("part row %q %q: want the drop in volts and the key", r.name, r.value)
	}
	drop, at := m.peakDrop()
	// A silicon diode at 450 mA drops roughly 0.7–1 V (common practice).
	if at != 0.45 || drop < 0.6 || drop > 1.1 {
		t.Errorf("drop %v V at %v A: want a silicon diode's at the 450 mA peak", drop, at)
	}
}

// The voltage axis fits the curves: with the floor at 0 V the bottom of
// the chart sits near the lowest curve, not at 0 V.
func TestChartAxisFitsCurves(t *testing.T) {
	tr := []discharge.TracePoint{{PackV: 3.1, LoadV: 2.9}, {PackV: 2.6, LoadV: 2.4}}
	lo, hi, off := chartRange(tr, 0)
	// Curves from 2.4 to 3.1 V, 6 % margins: 2.358 to 3.142 V.
	if !off || lo < 2.3 || hi > 3.2 {
		t.Errorf("floor 0: axis %v–%v V (floor off %v), want about 2.36–3.14 V with the floor named off the chart", lo, hi, off)
	}
	lo, _, off = chartRange(tr, 2.3)
	if off || lo > 2.3 {
		t.Errorf("floor 2.3 V near the curves: axis from %v V (off %v), want it drawn", lo, off)
	}
}

// A pack that costs nothing still has a runtime: the cost line says $0,
// not "no runtime".
func TestFreePackCostLine(t *testing.T) {
	s := scenario.Demo()
	s.Design.PackPrice, s.Design.PriceGiven = 0, true
	v := ansi.Strip(func() string { m := New(s); m.width, m.height = 100, 30; return m.View() }())
	if strings.Contains(v, "no runtime") || !strings.Contains(v, "Cost per hour   $0") {
		t.Errorf("free pack:\n%s", v)
	}
}

// Saving over the scenario file the screen opened keeps its options,
// sweeps, comments and note, and writes the design's new values.
func TestSaveOverSourceKeepsTheRest(t *testing.T) {
	dir := t.TempDir()
	orig, err := os.ReadFile("../testdata/scenarios/example.toml")
	if err != nil {
		t.Fatal(err)
	}
	src := filepath.Join(dir, "example.toml")
	if err := os.WriteFile(src, orig, 0o644); err != nil {
		t.Fatal(err)
	}
	s, err := scenario.Load(src)
	if err != nil {
		t.Fatal(err)
	}
	var tm tea.Model = New(s)
	press := func(msgs ...tea.Msg) {
		for _, msg := range msgs {
			var cmd tea.Cmd
			tm, cmd = tm.Update(msg)
			for cmd != nil {
				var next tea.Cmd
				tm, next = tm.Update(cmd())
				cmd = next
			}
		}
	}
	press(tea.WindowSizeMsg{Width: 100, Height: 30}, keyDown, keyRight, runes("s"), keyEnter, runes("y"))
	if st := tm.(Model).save.status; !strings.Contains(st, "Saved the design to") {
		t.Fatalf("status %q", st)
	}
	back, err := scenario.Load(src)
	if err != nil {
		t.Fatal(err)
	}
	if back.Design.Series != s.Design.Series+1 {
		t.Errorf("series %d, want %d", back.Design.Series, s.Design.Series+1)
	}
	if back.Note != s.Note || back.Count() != s.Count() {
		t.Errorf("note %q (was %q), %d combinations (was %d)", back.Note, s.Note, back.Count(), s.Count())
	}
	data, _ := os.ReadFile(src)
	if !strings.Contains(string(data), "[sweep]") || !strings.Contains(string(data), "[options]") {
		t.Errorf("saved file lost its tables:\n%s", data)
	}
}

// The product's own load, standby, pack price and name are entered on the
// screen through the file's parsers, and they reach the engine and a save.
func TestProductFormEditsTheLoad(t *testing.T) {
	var tm tea.Model = New(nil)
	press := func(msgs ...tea.Msg) {
		for _, msg := range msgs {
			tm, _ = tm.Update(msg)
		}
	}
	before := tm.(Model).res.RuntimeH
	press(tea.WindowSizeMsg{Width: 80, Height: 24}, runes("e"))
	if !strings.Contains(ansi.Strip(tm.(Model).View()), "Load phases") {
		t.Fatalf("e: no product form:\n%s", ansi.Strip(tm.(Model).View()))
	}
	// Name, then the phases: type over the selected values.
	press(keyEnter, runes("Night owl lamp"), keyEnter, keyDown, keyEnter, runes("bedside, 3xAAA"), keyEnter,
		keyDown, keyEnter, runes("glow 20mA/10s; flash 300mA/1s"), keyEnter)
	press(keyDown, keyEnter, runes("5uA"), keyEnter, keyDown, keyEnter, runes("0"), keyEnter)
	m := tm.(Model)
	if m.product.errText != "" {
		t.Fatalf("form error: %s", m.product.errText)
	}
	p := m.profile()
	if len(p) != 2 || p[0].Name != "glow" || p[1].Name != "flash" || p[1].Load.Amps != 0.3 || p[1].Seconds != 1 {
		t.Fatalf("profile %+v", p)
	}
	d := m.design()
	if d.Standby != 5e-6 || d.PackPrice != 0 || !d.PriceGiven {
		t.Errorf("standby %v, price %v given %v", d.Standby, d.PackPrice, d.PriceGiven)
	}
	if m.res.RuntimeH == before || m.res.CostPerHour != 0 {
		t.Errorf("runtime %v h (was %v), cost %v: the new load and free pack did not reach the engine", m.res.RuntimeH, before, m.res.CostPerHour)
	}
	if !strings.Contains(ansi.Strip(m.View()), "Night owl lamp") {
		t.Error("the new name is not in the header")
	}
	back, err := scenario.Parse(m.saved(), "x.toml", "")
	if err != nil {
		t.Fatal(err)
	}
	if back.Name != "Night owl lamp" || back.Note != "bedside, 3xAAA" || len(back.Design.Profile) != 2 || back.Design.Standby != 5e-6 {
		t.Errorf("saved: %q %q, %d phases, standby %v", back.Name, back.Note, len(back.Design.Profile), back.Design.Standby)
	}
	// A bad phase says which, through the load parser.
	press(keyUp, keyUp, keyEnter, runes("glow 20mA/10s; flash 3 amps/1s"), keyEnter)
	if e := tm.(Model).product.errText; !strings.Contains(e, "phase") {
		t.Errorf("bad phase: error %q", e)
	}
}

// The screen's state is a value: a copy of the model taken before a key
// does not change when the key changes the design (it used to, through a
// shared pointer).
func TestModelCopiesDoNotAlias(t *testing.T) {
	var before tea.Model = New(nil)
	before, _ = before.Update(tea.WindowSizeMsg{Width: 100, Height: 30})
	after, _ := before.Update(keyDown)
	after, _ = after.Update(keyRight)
	b, a := before.(Model), after.(Model)
	if a.vals.series != b.vals.series+1 {
		t.Fatalf("series after → %d, want %d", a.vals.series, b.vals.series+1)
	}
	if b.vals.series != 2 || b.res == a.res {
		t.Errorf("the earlier copy changed with the later one: series %d, same result %v", b.vals.series, b.res == a.res)
	}
}

// The same as a user sees it, through teatest at 80×24: every verdict row,
// the notes behind w, the product form behind e.
func TestStrangerAt80x24(t *testing.T) {
	tm := startTest(t, New(nil), 80, 24)
	waitText(t, tm, "Runtime", "Junction", "Standby share", "Cost per hour", "press w")
	tm.Send(runes("w"))
	waitText(t, tm, "Warnings and cautions", "Never mix old and new cells")
	tm.Send(keyEsc)
	tm.Send(runes("e"))
	waitText(t, tm, "The product", "Load phases", "Pack price", "30 µA") // standby as run writes it, not "30.0 µA"
	tm.Send(keyDown)
	tm.Send(keyDown)
	tm.Send(keyEnter)
	tm.Send(runes("hum 40mA"))
	tm.Send(keyEnter)
	waitText(t, tm, "hum 40 mA") // the commands' words (discharge.ProfileWords)
	m := finish(t, tm)
	if p := m.profile(); len(p) != 1 || p[0].Name != "hum" || p[0].Load.Amps != 0.04 {
		t.Errorf("profile after typing one steady phase: %+v", p)
	}
}

// Big figures do not push a verdict row off an 80×24 screen: a note that
// does not fit is cut, not wrapped.
func TestCompactVerdictBigFigures(t *testing.T) {
	s := scenario.Demo()
	s.Design.Parallel = 8 // eight strings: five-digit charges
	m := New(s)
	m.width, m.height = 80, 24
	v := ansi.Strip(m.View())
	for _, label := range []string{"Stranded", "drop / floor", "Junction", "Standby share", "Cost per hour"} {
		if !strings.Contains(v, label) {
			t.Errorf("no %q at 80×24 with big figures:\n%s", label, v)
		}
	}
}
