package tui

import (
	"headroom/internal/units"
	"math"
	"strings"
	"testing"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/ansi"

	"headroom/curves"
	"headroom/discharge"
	"headroom/protect"
)

// TestTypedValues types into each knob's field. Accepted texts go through
// the same parsers as the command line's flags (scenario.ParseFloor and
// friends); refused ones leave the knob as it was and say why on screen.
func TestTypedValues(t *testing.T) {
	ctrlU := tea.KeyMsg{Type: tea.KeyCtrlU}
	cases := []struct {
		k    knob
		text string
		get  func(Model) float64
		want float64 // ignored when refused
		bad  bool
	}{
		{knobFloor, "2.1V", func(m Model) float64 { return m.vals.floor }, 2.1, false},
		{knobFloor, "2.1", func(m Model) float64 { return m.vals.floor }, 2.1, false},
		{knobFloor, "2 volts", func(m Model) float64 { return m.vals.floor }, 1.8, true},
		{knobFloor, "-1V", func(m Model) float64 { return m.vals.floor }, 1.8, true},
		{knobTemp, "-10C", func(m Model) float64 { return m.vals.tempC }, -10, false},
		{knobTemp, "200C", func(m Model) float64 { return m.vals.tempC }, 20, true},
		{knobHours, "90min", func(m Model) float64 { return m.vals.hours }, 1.5, false},
		{knobHours, "25", func(m Model) float64 { return m.vals.hours }, 1, true},
		{knobSeries, "3", func(m Model) float64 { return float64(m.vals.series) }, 3, false},
		{knobSeries, "0", func(m Model) float64 { return float64(m.vals.series) }, 2, true},
		{knobSeries, "2.5", func(m Model) float64 { return float64(m.vals.series) }, 2, true},
		{knobParallel, "4", func(m Model) float64 { return float64(m.vals.parallel) }, 4, false},
		{knobLoad, "150%", func(m Model) float64 { return m.vals.scale }, 1.5, false},
		{knobLoad, "2x", func(m Model) float64 { return m.vals.scale }, 2, false},
		{knobLoad, "0", func(m Model) float64 { return m.vals.scale }, 1, true},
		{knobLoad, "lots", func(m Model) float64 { return m.vals.scale }, 1, true},
		{knobPart, "20n", func(m Model) float64 { k, _ := protect.PrimaryOf(m.vals.elem); return k.Value }, 20e-9, false},
		{knobPart, "5V", func(m Model) float64 { k, _ := protect.PrimaryOf(m.vals.elem); return k.Value }, 10e-9, true},
	}
	for _, c := range cases {
		m := sized(120, 40, repeat(keyDown, int(c.k))...)
		m = press(m, keyEnter, ctrlU, runes(c.text), keyEnter)
		mm := m.(Model)
		got := c.get(mm)
		// Parsed decimals are exact to a few ulps.
		if math.Abs(got-c.want) > 1e-12*math.Max(1, math.Abs(c.want)) {
			t.Errorf("%s %q: value %v, want %v", c.k.name(), c.text, got, c.want)
		}
		if mm.knobs.editing != c.bad {
			t.Errorf("%s %q: still typing = %v, want %v (error %q)", c.k.name(), c.text, mm.knobs.editing, c.bad, mm.knobs.errText)
		}
		if c.bad && (mm.knobs.errText == "" || !strings.Contains(ansi.Strip(mm.View()), firstWord(mm.knobs.errText))) {
			t.Errorf("%s %q: refused without a message on screen", c.k.name(), c.text)
		}
	}
}

func firstWord(s string) string { return strings.Fields(s)[0] }

// TestTypedCellAndProtection: a cell by id in any case, a protection by
// full spec, and errors for unknown ones.
func TestTypedCellAndProtection(t *testing.T) {
	ctrlU := tea.KeyMsg{Type: tea.KeyCtrlU}
	m := press(sized(120, 40), keyEnter, ctrlU, runes("FR6"), keyEnter).(Model)
	if m.cell().ID != "fr6" {
		t.Errorf("typed FR6: cell %q", m.cell().ID)
	}
	m = press(sized(120, 40), keyEnter, ctrlU, runes("no-such-cell"), keyEnter).(Model)
	if m.cell().ID != "lr6" || !m.knobs.editing {
		t.Errorf("typed an unknown cell: cell %q, still typing %v", m.cell().ID, m.knobs.editing)
	}
	m = press(sized(120, 40, repeat(keyDown, int(knobProtect))...), keyEnter, ctrlU, runes("pmos:vth=1.2"), keyEnter).(Model)
	if m.vals.elem.Kind() != "pmos" || m.sh().kinds[m.vals.kind] != "pmos" {
		t.Fatalf("typed pmos:vth=1.2: element %q", m.vals.elem.Spec())
	}
	if k, _ := protect.PrimaryOf(m.vals.elem); k.Value != 1.2 {
		t.Errorf("typed vth=1.2: Vth %v", k.Value)
	}
}

func (m Model) sh() *shared { return &m.shared }

// TestStepIsTidy: a ratio knob's steps land on two significant digits and
// a linear knob's on whole steps.
func TestStepIsTidy(t *testing.T) {
	r := knobRange{lo: 0.1, hi: 5, log: true, fine: math.Pow(50, 1.0/40), sig: 2}
	v := 1.0
	for range 10 {
		n := r.step(v, 1, false)
		if !(n > v) || units.RoundSig(n, 2) != n {
			t.Fatalf("log step from %v gave %v", v, n)
		}
		v = n
	}
	lin := knobRange{lo: 0, hi: 3.2, fine: 0.05, coarse: 0.5}
	if got := lin.step(1.8, 1, false); got != 1.85 {
		t.Errorf("floor step from 1.8 V: %v, want 1.85", got)
	}
	// A value typed outside the slider is not pulled in by the arrows.
	if got := lin.step(10, 1, false); got != 10 {
		t.Errorf("floor 10 V stepped up: %v, want it kept at 10", got)
	}
}

// TestLineupPick: enter on a line-up row makes that cell the design's and
// the verdict is the engine's for it.
func TestLineupPick(t *testing.T) {
	m := press(sized(120, 40), runes("2"), keyDown, keyDown).(Model)
	rows := m.lineup.rows(m.sh())
	want := rows[m.lineup.sel].cell
	var tm tea.Model = m
	tm, cmd := tm.Update(keyEnter)
	if cmd == nil {
		t.Fatal("enter in the line-up returned no command")
	}
	tm, _ = tm.Update(cmd())
	m = tm.(Model)
	if m.view != screenDesign || m.cell() != want {
		t.Fatalf("after enter: view %v, cell %s; want the design view with %s", m.view, m.cell().ID, want.ID)
	}
	d := m.design()
	r, err := discharge.Evaluate(&d)
	if err != nil {
		t.Fatal(err)
	}
	if got, _ := m.Result(); got.RuntimeH != r.RuntimeH {
		t.Errorf("verdict runtime %v h, engine says %v h for %s", got.RuntimeH, r.RuntimeH, want.ID)
	}
}

// TestLineupRanks: every cell of the library appears once, ranked by cost
// per hour and then by runtime, cells lasting less than a day of use after
// those that last one, with cells that cannot run last.
func TestLineupRanks(t *testing.T) {
	m := sized(120, 40).(Model)
	if len(m.lineupRows()) != len(curves.Library()) {
		t.Fatalf("%d line-up rows, want the %d library cells", len(m.lineupRows()), len(curves.Library()))
	}
	for _, byRuntime := range []bool{false, true} {
		rows := ranked(m.lineupRows(), byRuntime)
		for i := 1; i < len(rows); i++ {
			a, b := rows[i-1], rows[i]
			if b.err != nil || b.res.RuntimeH == 0 {
				continue
			}
			if a.err != nil || a.res.RuntimeH == 0 {
				t.Fatalf("a cell that cannot run (%s) ranks above %s", a.cell.ID, b.cell.ID)
			}
			if a.short() && !b.short() {
				t.Errorf("rank %d %s lasts less than a day's use but ranks above %s", i, a.cell.ID, b.cell.ID)
			}
			if a.short() != b.short() {
				continue // a new tier
			}
			if byRuntime && a.res.RuntimeH < b.res.RuntimeH || !byRuntime && a.res.CostPerHour > b.res.CostPerHour {
				t.Errorf("rank %d %s before %s out of order", i, a.cell.ID, b.cell.ID)
			}
		}
	}
}

// TestReverseView: one row per protection kind; with no element the
// reversed pack reaches the load and a series diode blocks it (docs/protection.md).
func TestReverseView(t *testing.T) {
	m := sized(120, 40, runes("3")).(Model)
	if len(m.reverseRows) != len(protect.Kinds()) {
		t.Fatalf("%d rows, want %d kinds", len(m.reverseRows), len(protect.Kinds()))
	}
	got := map[string]protect.Outcome{}
	for _, r := range m.reverseRows {
		got[r.kind] = r.rev.WholePack.Outcome
	}
	if got["none"] != protect.LoadReversed || got["diode"] != protect.Blocked {
		t.Errorf("whole pack reversed: none %v, diode %v; want reaches the load, blocked", got["none"], got["diode"])
	}
	s := ansi.Strip(m.View())
	for _, k := range protect.Kinds() {
		if !strings.Contains(s, k) {
			t.Errorf("reverse view lacks %q", k)
		}
	}
}
