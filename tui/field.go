package tui

import (
	"github.com/charmbracelet/bubbles/cursor"
	"github.com/charmbracelet/bubbles/key"
	"github.com/charmbracelet/bubbles/textinput"
	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/lipgloss"

	"headroom/internal/guard"
)

// fieldModel is a one-line text field: bubbles' textinput (cursor
// movement, word deletion and paste come with it) plus one thing it lacks,
// a selected pre-filled value: the value a field starts with is shown
// selected, and typing replaces it while an arrow key keeps it to edit.
type fieldModel struct {
	Prompt    string
	CharLimit int
	Width     int // columns for the text; 0 for no limit
	in        textinput.Model
	selected  bool // the whole value is selected: typing replaces it
	selStyle  lipgloss.Style
}

func newField(prompt string, limit int, cursorStyle lipgloss.Style) fieldModel {
	in := textinput.New()
	in.Prompt = prompt
	in.CharLimit = limit
	in.Cursor.Style = cursorStyle
	// A steady cursor: no blink timer ticking through the program (and
	// through tests that run every command the screen returns).
	in.Cursor.SetMode(cursor.CursorStatic)
	return fieldModel{Prompt: prompt, CharLimit: limit, in: in, selStyle: lipgloss.NewStyle().Reverse(true)}
}

// SetValue replaces the text, puts the cursor at its end and selects it.
func (f *fieldModel) SetValue(s string) {
	f.in.SetValue(s)
	f.in.CursorEnd()
	f.selected = s != ""
}

// Value is the text.
func (f fieldModel) Value() string { return f.in.Value() }

// Focus lets the field take keys.
func (f *fieldModel) Focus() { f.in.Focus() }

// Blur stops the field taking keys.
func (f *fieldModel) Blur() { f.in.Blur(); f.selected = false }

// Update edits the text. While the pre-filled value is selected, typed or
// pasted text replaces it and backspace or delete clears it; any other key
// (an arrow, home, end) drops the selection and acts as usual.
func (f fieldModel) Update(msg tea.Msg) (fieldModel, tea.Cmd) {
	if km, ok := msg.(tea.KeyMsg); ok && f.selected {
		f.selected = false
		switch km.Type {
		case tea.KeyRunes, tea.KeySpace, tea.KeyCtrlV:
			f.in.SetValue("")
		case tea.KeyBackspace, tea.KeyDelete:
			f.in.SetValue("")
			return f, nil
		}
	}
	f.in.Width = f.Width
	var cmd tea.Cmd
	f.in, cmd = f.in.Update(msg)
	return f, cmd
}

// View draws the prompt and the text with its cursor; a selected value is
// drawn reversed.
func (f fieldModel) View() string {
	if f.selected {
		v := []rune(f.in.Value())
		if f.Width > 1 && len(v) > f.Width {
			v = append(v[:f.Width-1:f.Width-1], '…')
		}
		return f.Prompt + f.selStyle.Render(string(v))
	}
	in := f.in
	in.Width = f.Width
	return in.View()
}

// editor is a value being typed into a form: the field, whether it is
// open, and why the last value typed was refused. The knobs and the
// product form share it.
type editor struct {
	editing bool
	input   fieldModel
	errText string // why the typed value was refused
}

// update takes a key (or any message for the field) while the editor is
// open: esc closes it, enter hands the value to accept and closes it unless
// accept refuses it (its reason is kept, cleaned for the terminal).
func (e editor) update(k KeyMap, msg tea.Msg, accept func(string) error) (editor, tea.Cmd) {
	if km, ok := msg.(tea.KeyMsg); ok {
		switch {
		case key.Matches(km, k.Cancel):
			e.editing, e.errText = false, ""
			e.input.Blur()
			return e, nil
		case key.Matches(km, k.Accept):
			if err := accept(e.input.Value()); err != nil {
				e.errText = guard.Clean(err.Error())
				return e, nil
			}
			e.editing, e.errText = false, ""
			e.input.Blur()
			return e, nil
		}
	}
	var cmd tea.Cmd
	e.input, cmd = e.input.Update(msg)
	return e, cmd
}
