package tui

import (
	"fmt"
	"strconv"
	"strings"

	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"

	"headroom/discharge"
	"headroom/internal/guard"
	"headroom/internal/scenario"
	"headroom/internal/units"
)

// The product form: what a scenario file says about the product beyond
// the knobs — its name, its load profile (phases: name, load, duration),
// its standby drain and its pack price — edited on the screen through the
// same parsers the file and the flags use.

// productField is one row of the product form.
type productField int

const (
	fieldName productField = iota
	fieldNote
	fieldPhases
	fieldStandby
	fieldPrice
	fieldCount
)

func (f productField) label() string {
	return [...]string{"Name", "Note", "Load phases", "Standby", "Pack price"}[f]
}

func (f productField) hint() string {
	return [...]string{
		"any text: the product's name in the header and in a saved file",
		"any text: a line about the product, kept in a saved file",
		"phases separated by ; each a name (may be empty) then LOAD/DURATION: motor 450mA/3s; idle 15mA/27s (loads as in a file: 120mA, 0.8W@85%, 33ohm, led:vf=2,r=47)",
		"the drain when not in use, such as 30uA",
		"dollars for one pack, such as 1.10; 0 for a free pack; empty for the cells' price",
	}[f]
}

// productModel is the form: a selection, and a text field while typing.
type productModel struct {
	open bool
	sel  productField
	editor
}

func newProduct(sh *shared) productModel {
	return productModel{editor: editor{input: newField("new value: ", 2000, sh.styles.Cursor)}}
}

// text is a product field's value as the user types it.
func (sh *shared) productText(f productField) string {
	v := sh.vals
	switch f {
	case fieldName:
		return v.name
	case fieldNote:
		return v.note
	case fieldPhases:
		return phasesText(v.base)
	case fieldStandby:
		return units.Format(v.standby, units.Current)
	case fieldPrice:
		if !v.priceGiven && v.price == 0 {
			return ""
		}
		return strconv.FormatFloat(v.price, 'f', -1, 64)
	}
	return ""
}

// shown is a product field's value for people.
func (sh *shared) productShown(f productField) string {
	v := sh.vals
	switch f {
	case fieldPhases:
		return profileLabel(v.base)
	case fieldStandby:
		return units.TrimZeros(units.Eng(v.standby, units.Current, 3)) // "30 µA", as run writes it
	case fieldPrice:
		if !v.priceGiven && v.price == 0 {
			return "the cells' price"
		}
		return units.Dollars(v.price)
	}
	return sh.productText(f)
}

// setProduct sets a product field from typed text and re-evaluates.
func (sh *shared) setProduct(f productField, s string) error {
	v := &sh.vals
	t := strings.TrimSpace(s)
	switch f {
	case fieldName:
		v.name = guard.Clean(t)
	case fieldNote:
		v.note = guard.Clean(t)
	case fieldPhases:
		p, err := parsePhases(t)
		if err != nil {
			return err
		}
		v.base = p
	case fieldStandby:
		x, err := scenario.ParseStandby(t)
		if err != nil {
			return err
		}
		v.standby = x
	case fieldPrice:
		if t == "" {
			v.price, v.priceGiven = 0, false
			break
		}
		x, err := scenario.ParsePrice(t)
		if err != nil {
			return err
		}
		v.price, v.priceGiven = x, true
	}
	sh.evaluate()
	return nil
}

// phasesText writes a profile in the form's syntax, which parsePhases
// reads back: "motor wag 450mA/3s; idle 15mA/25s".
func phasesText(p []discharge.Phase) string {
	var parts []string
	for _, ph := range p {
		s := ph.Load.String() + "/" + strconv.FormatFloat(ph.Seconds, 'g', -1, 64) + "s"
		if ph.Name != "" {
			s = ph.Name + " " + s
		}
		parts = append(parts, s)
	}
	return strings.Join(parts, "; ")
}

// parsePhases reads the form's profile syntax: phases separated by ";",
// each an optional name then LOAD/DURATION (or one LOAD alone for a steady
// load), the load and duration read by discharge.ParseProfile.
func parsePhases(s string) ([]discharge.Phase, error) {
	if strings.TrimSpace(s) == "" {
		return nil, fmt.Errorf("empty: type at least one load, such as 120mA")
	}
	var out []discharge.Phase
	for i, seg := range strings.Split(s, ";") {
		fs := strings.Fields(seg)
		if len(fs) == 0 {
			return nil, fmt.Errorf("phase %d is empty", i+1)
		}
		p, err := discharge.ParseProfile(fs[len(fs)-1])
		if err != nil {
			return nil, fmt.Errorf("phase %d: %w", i+1, err)
		}
		if len(p) != 1 {
			return nil, fmt.Errorf("phase %d: %q is %d phases: separate phases with ;", i+1, fs[len(fs)-1], len(p))
		}
		p[0].Name = strings.Join(fs[:len(fs)-1], " ")
		out = append(out, p[0])
	}
	if len(out) > 1 {
		for i, p := range out {
			if !strings.Contains(strings.Split(s, ";")[i], "/") {
				return nil, fmt.Errorf("phase %d (%s): give its duration, such as %s/3s", i+1, p.Load.Label(), p.Load.String())
			}
		}
	}
	if len(out) > discharge.MaxPhases {
		return nil, fmt.Errorf("%d phases, at most %d", len(out), discharge.MaxPhases)
	}
	return out, nil
}

// Update handles the form's keys.
func (m productModel) Update(sh *shared, msg tea.Msg) (productModel, tea.Cmd) {
	k := sh.keys
	km, isKey := msg.(tea.KeyMsg)
	if m.editing {
		var cmd tea.Cmd
		m.editor, cmd = m.editor.update(k, msg, func(v string) error { return sh.setProduct(m.sel, v) })
		return m, cmd
	}
	if !isKey {
		return m, nil
	}
	switch {
	case key.Matches(km, k.Back), key.Matches(km, k.Product):
		m.open = false
	case key.Matches(km, k.Up):
		m.sel = (m.sel + fieldCount - 1) % fieldCount
	case key.Matches(km, k.Down):
		m.sel = (m.sel + 1) % fieldCount
	case key.Matches(km, k.Type):
		m.editing, m.errText = true, ""
		m.input.SetValue(sh.productText(m.sel))
		m.input.Focus()
	}
	return m, nil
}

// View draws the form in a w × h body.
func (m productModel) View(sh *shared, w, h int) string {
	st := &sh.styles
	var b strings.Builder
	b.WriteString(st.Heading.Render("The product") + "\n")
	b.WriteString(st.Dim.Render(wrap("What the scenario file says about the product besides the knobs. ↑/↓ choose, enter to type a value, e or esc to go back to the design.", w)) + "\n\n")
	const lw = 14
	for f := range fieldCount {
		mark, name := "  ", st.Label.Render(pad(f.label(), lw))
		if f == m.sel {
			mark, name = st.Selected.Render("▸ "), st.Selected.Render(pad(f.label(), lw))
		}
		b.WriteString(mark + name + st.Value.Render(wrapAfter(sh.productShown(f), w, lw+2)) + "\n")
	}
	b.WriteString("\n")
	if m.editing {
		b.WriteString(st.Prompt.Render("Type "+m.sel.label()) + st.Dim.Render(": "+wrapAfter(m.sel.hint(), w, len("Type "+m.sel.label())+2)) + "\n")
		m.input.Width = max(5, w-len(m.input.Prompt)-2)
		b.WriteString(m.input.View() + "\n")
		if m.errText != "" {
			b.WriteString(st.Bad.Render(wrap(m.errText, w)) + "\n")
		}
	} else {
		b.WriteString(st.Dim.Render(wrap(m.sel.hint(), w)) + "\n")
	}
	return strings.Join(fitLines(strings.TrimRight(b.String(), "\n"), w, h), "\n")
}
