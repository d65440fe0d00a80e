package tui

import (
	"fmt"
	"strings"

	"github.com/charmbracelet/bubbles/help"
	"github.com/charmbracelet/bubbles/key"
	"github.com/charmbracelet/lipgloss"
)

// newHelp builds the bubbles help with our styles.
func newHelp(st Styles) help.Model {
	h := help.New()
	h.ShortSeparator = "  "
	h.Styles.ShortKey = st.Selected
	h.Styles.ShortDesc = st.Dim
	h.Styles.ShortSeparator = st.Dim
	h.Styles.FullKey = st.Selected
	h.Styles.FullDesc = st.Dim
	h.Styles.FullSeparator = st.Dim
	h.Styles.Ellipsis = st.Dim
	return h
}

// hintLine is the one-line key hint for the active view and mode. Outside
// a text field or a question it always ends with help and quit, however
// narrow the terminal: the view's own keys are dropped from the end first.
func (m Model) hintLine() string {
	h := m.help
	one := func(b key.Binding) string { return h.ShortHelpView([]key.Binding{b}) }
	var tail []string
	switch m.mode() {
	case modeNone:
		tail = []string{one(m.keys.Help), one(m.keys.Quit)}
	case modeHelp, modeNotes, modeProduct:
		tail = []string{one(m.keys.Quit)}
	}
	const sep = "  "
	room := m.width
	for _, t := range tail {
		room -= lipgloss.Width(t) + len(sep)
	}
	var items []string
	for _, b := range m.viewKeys().ShortHelp() {
		s := one(b)
		if lipgloss.Width(s)+len(sep) > room {
			break
		}
		items = append(items, s)
		room -= lipgloss.Width(s) + len(sep)
	}
	return strings.Join(append(items, tail...), sep)
}

// helpOverlay is the full help, framed, in the middle of a w × h area.
func (m Model) helpOverlay(w, h int) string {
	hm := m.help
	hm.Width = max(10, w-4)
	var about []string
	switch m.view {
	case screenLineup:
		about = []string{
			"Every cell, each in the series count that suits this product's",
			"voltage, with the same parallel count, load, protection and",
			"floor; ● marks the cell in use. enter puts the chosen row's cell",
			"into the design; o switches the order.",
		}
	case screenReverse:
		about = []string{
			"What each protection does when the whole pack goes in backwards,",
			"and when one cell of a series pack is flipped. Green: blocked;",
			"amber: a fuse opens; red: the load or the cells take the harm.",
		}
	case screenPick:
		about = pickAbout
	default:
		about = []string{
			"Each knob row: name, value with its unit, and a slider.",
			"← → move a knob in small steps, shift+← → or [ ] in big ones;",
			"enter lets you type a value with its unit (1.8V, 10nA, 150%).",
			"w lists every warning and caution; e edits the product itself:",
			"its name, load phases, standby drain and pack price.",
		}
	}
	about = append(about, "Press ? or esc to close this.")
	body := m.styles.Heading.Render("Keys") + "\n\n" + hm.FullHelpView(m.viewKeys().FullHelp()) + "\n\n" +
		m.styles.Dim.Render(strings.Join(about, "\n"))
	box := m.styles.Overlay.Render(body)
	return lipgloss.Place(w, h, lipgloss.Center, lipgloss.Center, box)
}

// notesOverlay is every warning and caution of the design, wrapped to the
// width, in the w × h body; what does not fit says how many lines are left.
func (m Model) notesOverlay(w, h int) string {
	m.notes.SetWidth(w - 2)
	m.notes.compact = false // the overlay lists them all
	lines := strings.Split(m.styles.Heading.Render("Warnings and cautions")+"\n\n"+m.notes.View(&m.shared), "\n")
	if len(lines) > h {
		more := len(lines) - h + 1
		lines = append(lines[:h-1:h-1], m.styles.Dim.Render(fmt.Sprintf("… %d more lines: make the window taller to read them", more)))
	}
	return strings.Join(lines, "\n")
}

func (m Model) viewKeys() viewKeys { return viewKeys{k: m.keys, view: m.view, mode: m.mode()} }
