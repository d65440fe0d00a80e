package tui

import (
	"fmt"
	"math"
	"strings"

	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"

	"headroom/curves"
	"headroom/discharge"
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
	sel knob
	editor
	width   int
	compact bool // no explanation line (a short terminal shows it beside)
}

func newKnobs(sh *shared) knobsModel {
	return knobsModel{editor: editor{input: newField("new value: ", 200, sh.styles.Cursor)}}
}

// Update handles keys while the design view is active; a knob that moves
// re-evaluates the design at once.
func (m knobsModel) Update(sh *shared, msg tea.Msg) (knobsModel, tea.Cmd) {
	k := sh.keys
	km, isKey := msg.(tea.KeyMsg)
	if m.editing {
		var cmd tea.Cmd
		m.editor, cmd = m.editor.update(k, msg, func(v string) error { return sh.setText(m.sel, v) })
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
		sh.adjust(m.sel, -1, false)
	case key.Matches(km, k.More):
		sh.adjust(m.sel, +1, false)
	case key.Matches(km, k.LessCoarse):
		sh.adjust(m.sel, -1, true)
	case key.Matches(km, k.MoreCoarse):
		sh.adjust(m.sel, +1, true)
	case key.Matches(km, k.Type):
		m.editing, m.errText = true, ""
		m.input.SetValue(sh.editText(m.sel))
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

func trimFloat(x float64) string { return units.Short(x, 4) }

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

// peakDrop is the element's drop at the heaviest phase's current on the
// fresh pack at the ambient, and that current: the part value in words a
// designer reads (a resistive or LED load's current is taken at the pack's
// open-circuit voltage, an estimate for a label).
func (sh *shared) peakDrop() (drop, amps float64) {
	v := sh.vals
	vin := sh.cell().OpenCircuit(0, v.tempC) * float64(v.series)
	if sh.res != nil {
		vin = sh.res.FreshV
	}
	best := -1.0
	for _, p := range sh.profile() {
		if p.Demand() <= best {
			continue
		}
		best = p.Demand()
		switch l := p.Load; l.Kind {
		case discharge.ConstantCurrent:
			amps = l.Amps
		case discharge.ConstantPower:
			amps = l.InputPower() / math.Max(vin, 1e-3)
		case discharge.ConstantResistance:
			amps = vin / l.Ohms
		case discharge.LED:
			amps = math.Max(0, vin-l.Vf) / l.Ohms
		}
	}
	el := protect.Fixed(v.elem, v.tempC)
	return el.Drop(amps, vin, v.tempC), amps
}

// cellLabel names a cell in a few words: its designation and name.
func cellLabel(c *curves.Cell) string {
	if c.Designation == "" {
		return c.Name
	}
	return c.Designation + " " + c.Name
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
func (m knobsModel) View(sh *shared) string {
	st := &sh.styles
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
		b.WriteString(mark + name + st.Value.Render(pad(r.value, valW)) + " " + m.slider(sh, r, barW) + "\n")
	}
	if m.editing {
		head := "Type " + strings.TrimSpace(strings.TrimPrefix(sh.row(m.sel).name, " └"))
		hint := strings.SplitN(wrap(head+": "+sh.typingHint(m.sel), w), "\n", 2)
		b.WriteString(st.Prompt.Render(hint[0][:len(head)]) + st.Dim.Render(hint[0][len(head):]) + "\n")
		if len(hint) > 1 {
			b.WriteString(st.Dim.Render(hint[1]) + "\n")
		}
		m.input.Width = max(5, w-len(m.input.Prompt)-2)
		b.WriteString(m.input.View() + "\n")
		if m.errText != "" {
			b.WriteString(st.Bad.Render(wrap(m.errText, w)) + "\n")
		}
	} else if !m.compact {
		b.WriteString(st.Dim.Render(wrap(sh.detail(m.sel), w)) + "\n")
	}
	return strings.TrimRight(b.String(), "\n")
}

// slider draws a bar of width w with a marker where the value sits; a
// cycling knob gets the marker on a dotted track.
func (m knobsModel) slider(sh *shared, r row, w int) string {
	st := &sh.styles
	if r.frac < 0 {
		return st.SliderRest.Render(strings.Repeat("·", w))
	}
	pos := int(math.Round(r.frac * float64(w-1)))
	if r.steps > 0 {
		return st.SliderRest.Render(strings.Repeat("·", pos)) + st.SliderKnob.Render("◆") + st.SliderRest.Render(strings.Repeat("·", w-1-pos))
	}
	return st.SliderFill.Render(strings.Repeat("━", pos)) + st.SliderKnob.Render("◆") + st.SliderRest.Render(strings.Repeat("─", w-1-pos))
}
