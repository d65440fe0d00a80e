package tui

import (
	"strings"

	"github.com/charmbracelet/bubbles/help"
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

// hintLine is the one-line key hint for the active view and mode.
func (m Model) hintLine() string {
	h := m.help
	h.Width = m.width
	return h.ShortHelpView(m.viewKeys().ShortHelp())
}

// helpOverlay is the full help, framed, in the middle of a w × h area.
func (m Model) helpOverlay(w, h int) string {
	hm := m.help
	hm.Width = max(10, w-4)
	body := m.styles.Heading.Render("Keys") + "\n\n" + hm.FullHelpView(m.viewKeys().FullHelp()) + "\n\n" +
		m.styles.Dim.Render(strings.Join([]string{
			"Each knob row: name, value with its unit, and a slider.",
			"← → move a knob in small steps, shift+← → or [ ] in big ones;",
			"enter lets you type a value with its unit (1.8V, 10nA, 150%).",
			"Press ? or esc to close this.",
		}, "\n"))
	box := m.styles.Overlay.Render(body)
	return lipgloss.Place(w, h, lipgloss.Center, lipgloss.Center, box)
}

func (m Model) viewKeys() viewKeys { return viewKeys{k: m.keys, view: m.view, mode: m.mode()} }
