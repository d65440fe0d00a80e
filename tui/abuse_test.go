package tui

import (
	"math"
	"strings"
	"testing"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/ansi"

	"headroom/protect"
)

var (
	keyCoarseUp   = runes("]")
	keyCoarseDown = runes("[")
)

// press sends keys to m and returns the new model.
func press(m tea.Model, keys ...tea.Msg) tea.Model {
	for _, k := range keys {
		m, _ = m.Update(k)
	}
	return m
}

func repeat(k tea.Msg, n int) []tea.Msg {
	out := make([]tea.Msg, n)
	for i := range out {
		out[i] = k
	}
	return out
}

// checkSane fails when a knob left its range or the verdict holds a number
// that is not finite.
func checkSane(t *testing.T, m Model, where string) {
	t.Helper()
	v := m.vals
	in := func(name string, x, lo, hi float64) {
		if !(x >= lo && x <= hi) {
			t.Fatalf("%s: %s = %v, outside %v to %v", where, name, x, lo, hi)
		}
	}
	in("series", float64(v.series), 1, seriesHi)
	in("parallel", float64(v.parallel), 1, parallelHi)
	in("load level", v.scale, loadLo, loadHi)
	in("floor", v.floor, 0, math.Max(1.8, m.floorHi())) // the demo's floor is 1.8 V
	in("ambient", v.tempC, tempLo, tempHi)
	in("hours a day", v.hours, hoursLo, hoursHi)
	in("cell index", float64(v.cell), 0, float64(len(m.cells)-1))
	if kn, ok := protect.PrimaryOf(v.elem); ok {
		lo, hi, _, _ := protect.PrimaryRange(v.elem.Kind())
		// The defaults sit inside their ranges (protect's own tests).
		in(v.elem.Kind()+" "+kn.Key, kn.Value, lo, hi)
	}
	if m.err == nil {
		r := m.res
		for _, x := range []float64{r.RuntimeH, r.RuntimeDays, r.DeliveredMAh, r.StrandedMAh,
			r.ProtectionPeakW, r.ProtectionLossWh, r.JunctionC, r.StandbyShare, r.CostPerHour} {
			if math.IsNaN(x) || math.IsInf(x, 0) {
				t.Fatalf("%s: a verdict number is %v", where, x)
			}
		}
	}
	for _, row := range m.lineupRows() {
		if row.err == nil && (math.IsNaN(row.res.RuntimeH) || math.IsNaN(row.res.CostPerHour)) {
			t.Fatalf("%s: line-up row %s is not finite", where, row.cell.ID)
		}
	}
}

// TestKnobsToBothEnds drives every knob up and down far past its ends in
// fine and coarse steps: it must stop at the slider's ends, and the
// verdict stays finite on the way.
func TestKnobsToBothEnds(t *testing.T) {
	for k := range knobCount {
		var m tea.Model = sized(120, 40, repeat(keyDown, int(k))...)
		ends := func(dir string) {
			mm := m.(Model)
			checkSane(t, mm, k.name()+" "+dir)
			r, ok := mm.rangeOf(k)
			if !ok {
				return
			}
			var x float64
			switch k {
			case knobSeries:
				x = float64(mm.vals.series)
			case knobParallel:
				x = float64(mm.vals.parallel)
			case knobPart:
				kn, _ := protect.PrimaryOf(mm.vals.elem)
				x = kn.Value
			default:
				x = mm.floatOf(k)
			}
			want := r.hi
			if dir == "down" {
				want = r.lo
			}
			if math.Abs(x-want) > 1e-9*math.Max(1, math.Abs(want)) { // ends are hit exactly, bar rounding
				t.Errorf("%s pushed %s stops at %v, want the end %v", k.name(), dir, x, want)
			}
			if s := ansi.Strip(mm.View()); strings.Contains(s, "NaN") || strings.Contains(s, "Inf") {
				t.Errorf("%s %s: the screen shows NaN or Inf", k.name(), dir)
			}
		}
		for range 25 {
			m = press(m, keyCoarseUp, keyRight)
			checkSane(t, m.(Model), k.name()+" up")
		}
		ends("up")
		for range 25 {
			m = press(m, keyCoarseDown, keyLeft)
			checkSane(t, m.(Model), k.name()+" down")
		}
		ends("down")
	}
}

// TestPartKnobEveryKind pushes each protection kind's main parameter to
// both ends of its range.
func TestPartKnobEveryKind(t *testing.T) {
	var m tea.Model = sized(120, 40, repeat(keyDown, int(knobProtect))...)
	for range protect.Kinds() {
		m = press(m, keyRight, keyDown)
		m = press(m, repeat(keyCoarseUp, 12)...)
		checkSane(t, m.(Model), m.(Model).vals.elem.Kind()+" part up")
		m = press(m, repeat(keyCoarseDown, 12)...)
		checkSane(t, m.(Model), m.(Model).vals.elem.Kind()+" part down")
		m = press(m, keyUp)
	}
}

// TestResizeStorm draws every view at sizes from nothing to huge: never a
// panic, never a line wider or a view taller than the terminal.
func TestResizeStorm(t *testing.T) {
	sizes := [][2]int{{0, 0}, {1, 1}, {1, 100}, {100, 1}, {2, 2}, {20, 5}, {79, 24}, {80, 23},
		{80, 24}, {81, 25}, {100, 30}, {120, 40}, {200, 60}, {400, 120}}
	for i := 0; i < 60; i++ { // a storm of odd sizes, deterministic
		sizes = append(sizes, [2]int{(i*37)%260 + 1, (i*23)%90 + 1})
	}
	var m tea.Model = New(nil)
	for _, view := range []tea.Msg{runes("1"), runes("2"), runes("3"), runes("?")} {
		m = press(m, keyEsc, view)
		for _, sz := range sizes {
			m = press(m, tea.WindowSizeMsg{Width: sz[0], Height: sz[1]})
			s := m.View()
			if sz[0] > 0 && sz[1] > 0 {
				checkSize(t, ansi.Strip(s), sz[0], sz[1])
			}
		}
		m = press(m, runes("?")) // close the help if it was open
	}
}

// TestHintKeepsQuit: the hint line names help and quit at every width the
// screen draws at.
func TestHintKeepsQuit(t *testing.T) {
	for w := MinWidth; w <= 200; w += 7 {
		for _, v := range []string{"1", "2", "3"} {
			s := ansi.Strip(sized(w, 30, runes(v)).View())
			last := s[strings.LastIndex(s, "\n")+1:]
			if !strings.Contains(last, "q quit") || !strings.Contains(last, "? help") {
				t.Errorf("width %d view %s: hint %q lacks help or quit", w, v, last)
			}
		}
	}
}
