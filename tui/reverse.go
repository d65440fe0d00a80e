package tui

import (
	"fmt"
	"math"
	"strings"

	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"

	"headroom/protect"
)

// reverseModel is the reverse view: what every protection kind does when
// the whole pack goes in backwards, and when one cell of it is flipped.
type reverseModel struct {
	sel           int
	width, height int
}

// SetSize sets the view's size.
func (m *reverseModel) SetSize(w, h int) { m.width, m.height = w, h }

// Update moves the selection.
func (m reverseModel) Update(sh *shared, msg tea.Msg) (reverseModel, tea.Cmd) {
	km, ok := msg.(tea.KeyMsg)
	if !ok {
		return m, nil
	}
	n := max(1, len(sh.reverseRows))
	switch {
	case key.Matches(km, sh.keys.Up):
		m.sel = (m.sel + n - 1) % n
	case key.Matches(km, sh.keys.Down):
		m.sel = (m.sel + 1) % n
	}
	return m, nil
}

// selectCurrent puts the selection on the protection in use.
func (m *reverseModel) selectCurrent(sh *shared) {
	for i, r := range sh.reverseRows {
		if r.current {
			m.sel = i
		}
	}
}

// caseText is one wrong insertion in a few words.
func caseText(c protect.Case) string {
	s := c.Words() // the report's words too
	v := c.Volts
	if math.Abs(v) < 0.005 {
		v = 0 // no "-0.00 V"
	}
	return s + fmt.Sprintf(", load at %.2f V", v)
}

// View draws one row per protection kind and the notes of the selected one.
func (m reverseModel) View(sh *shared) string {
	st := &sh.styles
	w, h := max(m.width, 40), max(m.height, 6)
	v := sh.vals
	c := sh.cell()
	var b strings.Builder
	b.WriteString(st.Heading.Render("Cells put in wrong") + "\n")
	intro := fmt.Sprintf("For this pack (%d × %s in series, %d in parallel, load %s) and every protection kind: the whole pack reversed, and one cell of it flipped.",
		v.series, cellLabel(c), v.parallel, peakLabel(sh.profile()))
	for _, l := range wrapLines(intro, w) {
		b.WriteString(st.Dim.Render(l) + "\n")
	}
	const kindW = 13
	colW := max(10, (w-kindW-4)/2)
	b.WriteString(st.Label.Render("  "+pad("Protection", kindW)+" "+pad("Whole pack reversed", colW)+" "+pad("One cell flipped", colW)) + "\n")
	for i, r := range sh.reverseRows {
		mark := "  "
		name := r.kind
		if r.current {
			name += " ●"
		}
		name = pad(name, kindW)
		if i == m.sel {
			mark, name = st.Selected.Render("▸ "), st.Selected.Render(name)
		}
		b.WriteString(mark + name + " " + m.outcome(sh, r.rev.WholePack, colW) + " " + m.outcome(sh, r.rev.OneCell, colW) + "\n")
	}
	b.WriteString(st.Dim.Render("● is the protection in use.") + "\n\n")
	if m.sel < len(sh.reverseRows) {
		r := sh.reverseRows[m.sel]
		notes := []string{
			r.kind + ": " + protect.Describe(r.kind) + ".",
			"Whole pack reversed: " + sentence(r.rev.WholePack.Note),
			"One cell flipped: " + sentence(r.rev.OneCell.Note),
		}
		for _, n := range notes {
			b.WriteString(wrap(n, w) + "\n")
		}
	}
	lines := fitLines(strings.TrimRight(b.String(), "\n"), w, h)
	return strings.Join(lines, "\n")
}

// outcome colours a case by how bad it is for the product and the user.
func (m reverseModel) outcome(sh *shared, c protect.Case, w int) string {
	st := &sh.styles
	s := pad(caseText(c), w)
	switch c.Outcome {
	case protect.Blocked:
		return st.Good.Render(s)
	case protect.FuseOpens:
		return st.Warn.Render(s)
	}
	return st.Bad.Render(s)
}

// sentence ends a case's note with a full stop, as the line above it ends.
func sentence(s string) string {
	if s == "" || strings.HasSuffix(s, ".") {
		return s
	}
	return s + "."
}
