package tui

import (
	"strings"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/lipgloss"
)

// fieldModel is a one-line text field: a prompt, the text and a cursor.
// (bubbles' textinput needs a clipboard module this project does not
// carry; typing a value with units needs only this much.)
type fieldModel struct {
	Prompt    string
	CharLimit int
	Width     int // columns for the text; 0 for no limit
	value     []rune
	pos       int
	focused   bool
	cursor    lipgloss.Style
}

func newField(prompt string, limit int, cursor lipgloss.Style) fieldModel {
	return fieldModel{Prompt: prompt, CharLimit: limit, cursor: cursor}
}

// SetValue replaces the text and puts the cursor at its end.
func (f *fieldModel) SetValue(s string) {
	f.value = []rune(s)
	if f.CharLimit > 0 && len(f.value) > f.CharLimit {
		f.value = f.value[:f.CharLimit]
	}
	f.pos = len(f.value)
}

// Value is the text.
func (f fieldModel) Value() string { return string(f.value) }

// Focus lets the field take keys.
func (f *fieldModel) Focus() { f.focused = true }

// Blur stops the field taking keys.
func (f *fieldModel) Blur() { f.focused = false }

// Update edits the text: typing, backspace, delete, ←/→, home/end,
// ctrl+u (clear before the cursor), ctrl+k (clear after it).
func (f fieldModel) Update(msg tea.Msg) (fieldModel, tea.Cmd) {
	km, ok := msg.(tea.KeyMsg)
	if !ok || !f.focused {
		return f, nil
	}
	switch km.Type {
	case tea.KeyRunes, tea.KeySpace:
		rs := km.Runes
		if km.Type == tea.KeySpace {
			rs = []rune{' '}
		}
		var clean []rune
		for _, r := range rs {
			if r >= ' ' && r != 0x7f {
				clean = append(clean, r)
			}
		}
		if f.CharLimit > 0 && len(f.value)+len(clean) > f.CharLimit {
			clean = clean[:max(0, f.CharLimit-len(f.value))]
		}
		f.value = append(f.value[:f.pos], append(clean, f.value[f.pos:]...)...)
		f.pos += len(clean)
	case tea.KeyBackspace:
		if f.pos > 0 {
			f.value = append(f.value[:f.pos-1], f.value[f.pos:]...)
			f.pos--
		}
	case tea.KeyDelete:
		if f.pos < len(f.value) {
			f.value = append(f.value[:f.pos], f.value[f.pos+1:]...)
		}
	case tea.KeyLeft:
		f.pos = max(0, f.pos-1)
	case tea.KeyRight:
		f.pos = min(len(f.value), f.pos+1)
	case tea.KeyHome, tea.KeyCtrlA:
		f.pos = 0
	case tea.KeyEnd, tea.KeyCtrlE:
		f.pos = len(f.value)
	case tea.KeyCtrlU:
		f.value = append([]rune(nil), f.value[f.pos:]...)
		f.pos = 0
	case tea.KeyCtrlK:
		f.value = f.value[:f.pos]
	}
	return f, nil
}

// View draws the prompt and the text with the cursor as a block; a text
// longer than Width scrolls so that the cursor stays in view.
func (f fieldModel) View() string {
	v := f.value
	start := 0
	if f.Width > 0 && f.pos >= f.Width {
		start = f.pos - f.Width + 1
	}
	end := len(v)
	if f.Width > 0 {
		end = min(len(v), start+f.Width)
	}
	var b strings.Builder
	b.WriteString(f.Prompt)
	b.WriteString(string(v[start:min(f.pos, end)]))
	if f.focused {
		c := " "
		if f.pos < len(v) {
			c = string(v[f.pos])
		}
		b.WriteString(f.cursor.Render(c))
		if f.pos < end {
			b.WriteString(string(v[f.pos+1 : end]))
		}
	} else if f.pos < end {
		b.WriteString(string(v[f.pos:end]))
	}
	return b.String()
}
