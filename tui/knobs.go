package tui

import (
	"fmt"
	"math"
	"strings"

	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"

	"headroom/curves"
	"headroom/discharge"
	"headroom/internal/guard"
	"headroom/internal/scenario"
	"headroom/internal/units"
	"headroom/protect"
)

// knob names one row of the knobs panel.
type knob int

const (
	knobCell knob = iota
	knobSeries
	knobParallel
	knobProtect
	knobPart
	knobLoad
	knobFloor
	knobTemp
	knobHours
	knobCount // number of knobs
)

// Slider ranges of the knobs that have fixed ones. Typed values may lie
// outside a slider's range when the shared checks allow them; the arrows
// then never push further out.
const (
	loadLo, loadHi   = 0.1, 5.0                               // × the scenario's load
	tempLo, tempHi   = discharge.MinTempC, discharge.MaxTempC // °C
	hoursLo, hoursHi = 0.25, 24                               // hours of use a day
	seriesHi         = discharge.MaxSeries
	parallelHi       = discharge.MaxParallel
)

// knobsModel is the knobs panel: one row per value, a selection, and a
// text field for typing a value.
type knobsModel struct {
	sh      *shared
	sel     knob
	editing bool
	input   fieldModel
	errText string // why the typed value was refused
	width   int
}

func newKnobs(sh *shared) knobsModel {
	return knobsModel{sh: sh, input: newField("new value: ", 200, sh.styles.Cursor)}
}

// Update handles keys while the design view is active; a knob that moves
// re-evaluates the design at once.
func (m knobsModel) Update(msg tea.Msg) (knobsModel, tea.Cmd) {
	k := m.sh.keys
	km, isKey := msg.(tea.KeyMsg)
	if m.editing {
		if isKey {
			switch {
			case key.Matches(km, k.Cancel):
				m.editing, m.errText = false, ""
				m.input.Blur()
				return m, nil
			case key.Matches(km, k.Accept):
				if err := m.sh.setText(m.sel, m.input.Value()); err != nil {
					m.errText = guard.Clean(err.Error())
					return m, nil
				}
				m.editing, m.errText = false, ""
				m.input.Blur()
				return m, nil
			}
		}
		var cmd tea.Cmd
		m.input, cmd = m.input.Update(msg)
		return m, cmd
	}
	if !isKey {
		return m, nil
	}
	switch {
	case key.Matches(km, k.Up):
		m.sel = (m.sel + knobCount - 1) % knobCount
	case key.Matches(km, k.Down):
		m.sel = (m.sel + 1) % knobCount
	case key.Matches(km, k.Less):
		m.sh.adjust(m.sel, -1, false)
	case key.Matches(km, k.More):
		m.sh.adjust(m.sel, +1, false)
	case key.Matches(km, k.LessCoarse):
		m.sh.adjust(m.sel, -1, true)
	case key.Matches(km, k.MoreCoarse):
		m.sh.adjust(m.sel, +1, true)
	case key.Matches(km, k.Type):
		m.editing, m.errText = true, ""
		m.input.SetValue(m.sh.editText(m.sel))
		m.input.Focus()
		return m, nil
	}
	return m, nil
}

// knobRange is a knob's slider: its ends, whether it moves in ratios, and
// its fine and coarse steps (ratios for a log slider).
type knobRange struct {
	lo, hi       float64
	log          bool
	fine, coarse float64
	sig          int // significant digits kept after a ratio step
}

func (sh *shared) floorHi() float64 {
	return math.Max(1, math.Ceil(sh.cell().OpenCircuit(0, sh.vals.tempC)*float64(sh.vals.series)*10)/10)
}

// rangeOf gives the slider of a numeric knob; ok is false for the cycling
// knobs and for a protection element without a main parameter.
func (sh *shared) rangeOf(k knob) (r knobRange, ok bool) {
	switch k {
	case knobSeries:
		return knobRange{lo: 1, hi: seriesHi, fine: 1, coarse: 4}, true
	case knobParallel:
		return knobRange{lo: 1, hi: parallelHi, fine: 1, coarse: 2}, true
	case knobPart:
		lo, hi, lg, ok := protect.MainRange(sh.vals.elem.Kind())
		if !ok {
			return r, false
		}
		if lg {
			return knobRange{lo: lo, hi: hi, log: true, fine: math.Pow(hi/lo, 1.0/40), coarse: math.Pow(hi/lo, 1.0/8), sig: 2}, true
		}
		return knobRange{lo: lo, hi: hi, fine: niceStep((hi - lo) / 50), coarse: niceStep((hi - lo) / 10)}, true
	case knobLoad:
		return knobRange{lo: loadLo, hi: loadHi, log: true, fine: math.Pow(loadHi/loadLo, 1.0/40), coarse: math.Pow(loadHi/loadLo, 1.0/8), sig: 2}, true
	case knobFloor:
		return knobRange{lo: 0, hi: sh.floorHi(), fine: 0.05, coarse: 0.5}, true
	case knobTemp:
		return knobRange{lo: tempLo, hi: tempHi, fine: 1, coarse: 5}, true
	case knobHours:
		return knobRange{lo: hoursLo, hi: hoursHi, fine: 0.25, coarse: 2}, true
	}
	return r, false
}

// niceStep rounds x down to 1, 2 or 5 times a power of ten.
func niceStep(x float64) float64 {
	p := math.Pow(10, math.Floor(math.Log10(x)))
	switch m := x / p; {
	case m >= 5:
		return 5 * p
	case m >= 2:
		return 2 * p
	}
	return p
}

// step moves v one step in direction dir, rounded to a tidy value, within
// the slider's ends (or v itself where v was typed outside them).
func (r knobRange) step(v float64, dir int, coarse bool) float64 {
	lo, hi := math.Min(r.lo, v), math.Max(r.hi, v)
	s := r.fine
	if coarse {
		s = r.coarse
	}
	var n float64
	if r.log {
		n = v * math.Pow(s, float64(dir))
		n = units.RoundSig(n, r.sig)
		if n == v { // rounding undid the step: move one unit of the last digit
			unit := math.Pow(10, math.Ceil(math.Log10(math.Abs(v)))-float64(r.sig))
			n = v + float64(dir)*unit
		}
	} else {
		n = math.Round((v+float64(dir)*s)/s) * s
		n = units.RoundSig(n, 12) // 0.1+0.2 shows as 0.3
	}
	return math.Min(hi, math.Max(lo, n))
}

// frac is where v sits on the slider, 0 to 1.
func (r knobRange) frac(v float64) float64 {
	var f float64
	if r.log {
		f = math.Log(v/r.lo) / math.Log(r.hi/r.lo)
	} else {
		f = (v - r.lo) / (r.hi - r.lo)
	}
	if math.IsNaN(f) {
		return 0
	}
	return math.Min(1, math.Max(0, f))
}

// adjust moves knob k one step and re-evaluates.
func (sh *shared) adjust(k knob, dir int, coarse bool) {
	v := &sh.vals
	cycle := func(i, n int) int {
		s := 1
		if coarse {
			s = 3
		}
		return ((i+dir*s)%n + n) % n
	}
	switch k {
	case knobCell:
		v.cell = cycle(v.cell, len(sh.cells))
	case knobProtect:
		for range len(sh.kinds) {
			v.kind = cycle(v.kind, len(sh.kinds))
			if e := protect.Default(sh.kinds[v.kind]); e != nil {
				v.elem = e
				break
			}
		}
	case knobSeries, knobParallel:
		r, _ := sh.rangeOf(k)
		p := &v.series
		if k == knobParallel {
			p = &v.parallel
		}
		*p = int(r.step(float64(*p), dir, coarse))
	case knobPart:
		r, ok := sh.rangeOf(k)
		if !ok {
			return
		}
		kn, _ := protect.Main(v.elem)
		e, err := protect.WithMain(v.elem, r.step(kn.Value, dir, coarse))
		if err != nil {
			return // the step left the element's valid range: stay put
		}
		v.elem = e
	default:
		r, _ := sh.rangeOf(k)
		p := sh.floatOf(k)
		*p = r.step(*p, dir, coarse)
	}
	sh.evaluate()
}

func (sh *shared) floatOf(k knob) *float64 {
	switch k {
	case knobLoad:
		return &sh.vals.scale
	case knobFloor:
		return &sh.vals.floor
	case knobTemp:
		return &sh.vals.tempC
	case knobHours:
		return &sh.vals.hours
	}
	panic(fmt.Sprintf("tui: knob %d has no float value", k))
}

// editText is the text a knob's field starts with: its value in a form
// the parser reads back.
func (sh *shared) editText(k knob) string {
	v := sh.vals
	switch k {
	case knobCell:
		return sh.cell().ID
	case knobSeries:
		return fmt.Sprint(v.series)
	case knobParallel:
		return fmt.Sprint(v.parallel)
	case knobProtect:
		return v.elem.Spec()
	case knobPart:
		if kn, ok := protect.Main(v.elem); ok {
			return units.Human(kn.Value, kn.Kind, 4)
		}
		return ""
	case knobLoad:
		return trimFloat(v.scale) + "x"
	case knobFloor:
		return trimFloat(v.floor) + " V"
	case knobTemp:
		return trimFloat(v.tempC) + " C"
	case knobHours:
		return trimFloat(v.hours) + " h"
	}
	return ""
}

func trimFloat(x float64) string { return fmt.Sprintf("%.4g", x) }

// setText sets knob k from typed text with the parsers the command line's
// flags use, and re-evaluates. The error says what was wrong.
func (sh *shared) setText(k knob, s string) error {
	s = strings.TrimSpace(s)
	if s == "" {
		return fmt.Errorf("empty: type a value or press esc")
	}
	v := &sh.vals
	switch k {
	case knobCell:
		c, err := sh.scen.ResolveCell(s)
		if err != nil {
			// "LR6" for lr6; a file's own error stands when that fails too.
			if lc, lerr := sh.scen.ResolveCell(strings.ToLower(s)); lerr == nil {
				c, err = lc, nil
			}
		}
		if err != nil {
			return err
		}
		v.cell = sh.addCell(c)
	case knobSeries:
		n, err := scenario.ParseCount(s, scenario.CheckSeries)
		if err != nil {
			return err
		}
		v.series = n
	case knobParallel:
		n, err := scenario.ParseCount(s, scenario.CheckParallel)
		if err != nil {
			return err
		}
		v.parallel = n
	case knobProtect:
		e, err := protect.Parse(s)
		if err != nil {
			return err
		}
		v.kind, v.elem = sh.kindIndex(e.Kind()), e
	case knobPart:
		kn, ok := protect.Main(v.elem)
		if !ok {
			return fmt.Errorf("%s has no part value to set", v.elem.Kind())
		}
		x, err := units.Parse(s, kn.Kind, true)
		if err != nil {
			return err
		}
		e, err := protect.WithMain(v.elem, x)
		if err != nil {
			return err
		}
		v.elem = e
	case knobLoad:
		x, err := parseScale(s)
		if err != nil {
			return err
		}
		v.scale = x
	case knobFloor:
		x, err := scenario.ParseFloor(s)
		if err != nil {
			return err
		}
		v.floor = x
	case knobTemp:
		x, err := scenario.ParseTemp(s)
		if err != nil {
			return err
		}
		v.tempC = x
	case knobHours:
		x, err := scenario.ParseHoursPerDay(s)
		if err != nil {
			return err
		}
		v.hours = x
	}
	sh.evaluate()
	return nil
}

// parseScale reads a load level: "1.5", "1.5x", "1.5×" or "150%".
func parseScale(s string) (float64, error) {
	t := strings.TrimSpace(s)
	t = strings.TrimSpace(strings.TrimSuffix(strings.TrimSuffix(strings.TrimSuffix(t, "x"), "X"), "×"))
	var x float64
	var err error
	if strings.HasSuffix(t, "%") {
		x, err = units.Parse(t, units.Fraction, false)
	} else if _, e := fmt.Sscanf(t, "%g", &x); e != nil || fmt.Sprint(x) == "" {
		err = fmt.Errorf("%q is not a load level: type a factor such as 1.5 or 150%%", s)
	} else if strings.TrimLeft(t, "0123456789.eE+-") != "" {
		err = fmt.Errorf("%q is not a load level: type a factor such as 1.5 or 150%%", s)
	}
	if err != nil {
		return 0, err
	}
	return x, scenario.CheckScale(x)
}

// row is one knob as shown: its name, value with unit, a note, and where
// the slider's marker sits (-1 for none).
type row struct {
	name, value string
	frac        float64
	steps       int // >0: a cycling knob with this many choices
}

func (sh *shared) row(k knob) row {
	v := sh.vals
	c := sh.cell()
	r := row{frac: -1}
	if kr, ok := sh.rangeOf(k); ok {
		switch k {
		case knobSeries:
			r.frac = kr.frac(float64(v.series))
		case knobParallel:
			r.frac = kr.frac(float64(v.parallel))
		case knobPart:
			kn, _ := protect.Main(v.elem)
			r.frac = kr.frac(kn.Value)
		default:
			r.frac = kr.frac(*sh.floatOf(k))
		}
	}
	switch k {
	case knobCell:
		r.name, r.value = "Cell", cellLabel(c)
		r.frac, r.steps = float64(v.cell)/math.Max(1, float64(len(sh.cells)-1)), len(sh.cells)
	case knobSeries:
		r.name, r.value = "In series", plural(v.series, "cell", "cells")
	case knobParallel:
		r.name, r.value = "In parallel", plural(v.parallel, "string", "strings")
	case knobProtect:
		r.name, r.value = "Protection", v.elem.Kind()
		r.frac, r.steps = float64(v.kind)/math.Max(1, float64(len(sh.kinds)-1)), len(sh.kinds)
	case knobPart:
		if kn, ok := protect.Main(v.elem); ok {
			r.name, r.value = " └ its "+partName(kn.Key), units.Human(kn.Value, kn.Kind, 3)
		} else {
			r.name, r.value = " └ its part", "nothing to set"
		}
	case knobLoad:
		r.name, r.value = "Load level", fmt.Sprintf("%s× (%s peak)", trimFloat(v.scale), peakLabel(sh.profile()))
	case knobFloor:
		r.name, r.value = "Floor", fmt.Sprintf("%.2f V at load", v.floor)
	case knobTemp:
		r.name, r.value = "Ambient", units.Human(v.tempC, units.Temperature, 3)
	case knobHours:
		r.name, r.value = "Use a day", trimFloat(v.hours)+" h/day"
	}
	return r
}

func plural(n int, one, many string) string {
	if n == 1 {
		return "1 " + one
	}
	return fmt.Sprintf("%d %s", n, many)
}

// partName turns a spec key into the name engineers use.
func partName(key string) string {
	switch key {
	case "is":
		return "Is"
	case "vth":
		return "Vth"
	case "vz":
		return "Vz"
	case "rsh":
		return "Rsh"
	case "hold":
		return "hold"
	case "fuse":
		return "fuse"
	case "ilim":
		return "Ilim"
	}
	return key
}

// detail explains the selected knob in a sentence or two.
func (sh *shared) detail(k knob) string {
	v := sh.vals
	c := sh.cell()
	switch k {
	case knobCell:
		s := fmt.Sprintf("%s: %s, %s mAh rated, %.2f V nominal, $%.2f a cell", c.ID, c.Name, trimFloat(c.RatedMAh), c.NominalV, c.Price)
		if c.Rechargeable {
			s += fmt.Sprintf(", rechargeable (%d cycles)", c.CycleLife)
		}
		return s + fmt.Sprintf(". Cell %d of %d.", v.cell+1, len(sh.cells))
	case knobSeries:
		return fmt.Sprintf("Cells in each string; the pack is %d × %.2f V = %.2f V nominal.", v.series, c.NominalV, float64(v.series)*c.NominalV)
	case knobParallel:
		return "Strings side by side: more capacity, less sag on pulses."
	case knobProtect:
		return protect.Describe(v.elem.Kind()) + "."
	case knobPart:
		if kn, ok := protect.Main(v.elem); ok {
			return kn.Detail
		}
		return "This element has no part value to set; pick another protection."
	case knobLoad:
		return "Multiplies every phase of the load: " + profileLabel(sh.profile()) + "."
	case knobFloor:
		return "The lowest voltage the product works at, measured at the load after the protection (brown-out, regulator dropout)."
	case knobTemp:
		return "Air temperature around the pack; cold cuts capacity and raises resistance."
	case knobHours:
		return "Hours of use a day; the rest of the day the product draws its standby current."
	}
	return ""
}

// cellLabel names a cell in a few words: its designation and name.
func cellLabel(c *curves.Cell) string {
	if c.Designation == "" {
		return c.Name
	}
	return c.Designation + " " + c.Name
}

// typingHint says what a knob's text field accepts.
func (sh *shared) typingHint(k knob) string {
	switch k {
	case knobCell:
		return "a cell id (" + strings.Join(firstIDs(sh.cells, 4), ", ") + ", …) or a .csv/.toml cell file"
	case knobSeries:
		return fmt.Sprintf("a whole number from 1 to %d", seriesHi)
	case knobParallel:
		return fmt.Sprintf("a whole number from 1 to %d", parallelHi)
	case knobProtect:
		return "a kind (" + strings.Join(sh.kinds, ", ") + ") or a spec such as pmos:vth=1.2"
	case knobPart:
		if kn, ok := protect.Main(sh.vals.elem); ok {
			return kn.Kind.String() + ", e.g. " + units.Human(kn.Value, kn.Kind, 3)
		}
		return "nothing: this element has no part value"
	case knobLoad:
		return "a factor such as 1.5 or 150%"
	case knobFloor:
		return "a voltage such as 1.8V"
	case knobTemp:
		return "a temperature such as -10C"
	case knobHours:
		return "hours such as 2 or 90min"
	}
	return ""
}

func firstIDs(cs []*curves.Cell, n int) []string {
	var out []string
	for i := 0; i < len(cs) && i < n; i++ {
		out = append(out, cs[i].ID)
	}
	return out
}

// SetWidth sets the panel's width in columns.
func (m *knobsModel) SetWidth(w int) { m.width = w }

// View draws the rows, then the selected knob's explanation or its text
// field.
func (m knobsModel) View() string {
	sh, st := m.sh, &m.sh.styles
	w := max(m.width, 20)
	nameW := 13
	barW := max(4, min(14, w/4))
	valW := max(4, w-2-nameW-1-barW)
	var b strings.Builder
	b.WriteString(st.Heading.Render("Knobs") + "\n")
	for k := range knobCount {
		r := sh.row(k)
		mark := "  "
		name := st.Label.Render(pad(r.name, nameW))
		if k == m.sel {
			mark = st.Selected.Render("▸ ")
			name = st.Selected.Render(pad(r.name, nameW))
		}
		b.WriteString(mark + name + st.Value.Render(pad(r.value, valW)) + " " + m.slider(r, barW) + "\n")
	}
	if m.editing {
		b.WriteString(st.Prompt.Render("Type "+strings.TrimSpace(strings.TrimPrefix(sh.row(m.sel).name, " └"))) + st.Dim.Render(": "+sh.typingHint(m.sel)) + "\n")
		m.input.Width = max(5, w-len(m.input.Prompt)-2)
		b.WriteString(m.input.View() + "\n")
		if m.errText != "" {
			b.WriteString(st.Bad.Render(wrap(m.errText, w)) + "\n")
		}
	} else {
		b.WriteString(st.Dim.Render(wrap(sh.detail(m.sel), w)) + "\n")
	}
	return strings.TrimRight(b.String(), "\n")
}

// slider draws a bar of width w with a marker where the value sits; a
// cycling knob gets the marker on a dotted track.
func (m knobsModel) slider(r row, w int) string {
	st := &m.sh.styles
	if r.frac < 0 {
		return st.SliderRest.Render(strings.Repeat("·", w))
	}
	pos := int(math.Round(r.frac * float64(w-1)))
	if r.steps > 0 {
		return st.SliderRest.Render(strings.Repeat("·", pos)) + st.SliderKnob.Render("◆") + st.SliderRest.Render(strings.Repeat("·", w-1-pos))
	}
	return st.SliderFill.Render(strings.Repeat("━", pos)) + st.SliderKnob.Render("◆") + st.SliderRest.Render(strings.Repeat("─", w-1-pos))
}

// name is the knob's row name, for messages.
func (k knob) name() string {
	return [...]string{"cell", "series", "parallel", "protection", "part", "load level", "floor", "ambient", "hours a day"}[k]
}
