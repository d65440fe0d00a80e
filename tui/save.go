package tui

import (
	"errors"
	"path/filepath"
	"strings"

	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"

	"headroom/internal/guard"
	"headroom/internal/scenario"
)

// defaultSaveName is offered when the user presses s.
const defaultSaveName = "headroom-design.toml"

// saveState is where the save flow is.
type saveState int

const (
	saveIdle    saveState = iota
	saveName              // asking for a file name
	saveConfirm           // the file exists: asking whether to overwrite
	saveWriting           // a write is running
)

// saveModel is the save flow: a file name, a yes/no question when the file
// exists, and a line saying what happened.
type saveModel struct {
	sh     *shared
	state  saveState
	input  fieldModel
	path   string
	data   []byte
	status string
	failed bool
}

// savedMsg reports a finished write.
type savedMsg struct {
	path      string
	overwrite bool
	err       error
}

func newSave(sh *shared) saveModel {
	return saveModel{sh: sh, input: newField("Save the design as: ", 4096, sh.styles.Cursor)}
}

// active reports whether the flow is waiting for the user or a write.
func (m saveModel) active() bool { return m.state != saveIdle }

// Start asks for a file name.
func (m saveModel) Start() (saveModel, tea.Cmd) {
	m.state, m.status, m.failed = saveName, "", false
	m.input.SetValue(defaultSaveName)
	m.input.Focus()
	return m, nil
}

// write runs the atomic write in a command, off the key loop.
func write(path string, data []byte, overwrite bool) tea.Cmd {
	return func() tea.Msg {
		return savedMsg{path: path, overwrite: overwrite, err: scenario.WriteFile(path, data, overwrite)}
	}
}

// Update takes the keys of the flow and the result of a write.
func (m saveModel) Update(msg tea.Msg) (saveModel, tea.Cmd) {
	k := m.sh.keys
	if sm, ok := msg.(savedMsg); ok {
		switch {
		case sm.err == nil:
			m.state, m.failed = saveIdle, false
			p := sm.path
			if abs, err := filepath.Abs(p); err == nil {
				p = abs
			}
			m.status = "Saved the design to " + p
		case errors.Is(sm.err, scenario.ErrExists) && !sm.overwrite:
			m.state = saveConfirm
		default:
			m.state, m.failed = saveIdle, true
			m.status = "Not saved: " + guard.Clean(sm.err.Error())
		}
		return m, nil
	}
	km, isKey := msg.(tea.KeyMsg)
	switch m.state {
	case saveName:
		if isKey {
			switch {
			case key.Matches(km, k.Cancel):
				m.state, m.status, m.failed = saveIdle, "Not saved.", false
				m.input.Blur()
				return m, nil
			case key.Matches(km, k.Accept):
				name := strings.TrimSpace(m.input.Value())
				if name == "" {
					m.status, m.failed = "Type a file name, or press esc.", true
					return m, nil
				}
				if !filepath.IsAbs(name) && m.sh.saveDir != "" {
					name = filepath.Join(m.sh.saveDir, name)
				}
				m.path, m.data = name, m.sh.saved()
				m.state, m.status = saveWriting, ""
				m.input.Blur()
				return m, write(m.path, m.data, false)
			}
		}
		var cmd tea.Cmd
		m.input, cmd = m.input.Update(msg)
		return m, cmd
	case saveConfirm:
		if isKey {
			switch {
			case key.Matches(km, k.Yes):
				m.state = saveWriting
				return m, write(m.path, m.data, true)
			case key.Matches(km, k.No):
				m.state, m.failed = saveIdle, false
				m.status = "Not saved: " + m.path + " is left as it was."
			}
		}
	}
	return m, nil
}

// View is the flow's one status line.
func (m saveModel) View() string {
	st := &m.sh.styles
	switch m.state {
	case saveName:
		return m.input.View()
	case saveConfirm:
		return st.Prompt.Render(m.path+" already exists. Overwrite it? ") + st.Value.Render("y/n")
	case saveWriting:
		return st.Dim.Render("Saving " + m.path + " …")
	}
	if m.failed {
		return st.Bad.Render(m.status)
	}
	return st.Status.Render(m.status)
}

// saved is the current design as scenario file text.
func (sh *shared) saved() []byte {
	d := sh.design()
	name := sh.scen.Name
	if name == "" {
		name = "headroom design"
	}
	return scenario.Format(scenario.Saved{Name: name, Note: sh.scen.Note, Design: d,
		ProtectSpec: sh.vals.elem.Spec(), Budget: sh.scen.Budget,
		Tolerances: sh.scen.Tolerances, Samples: sh.scen.Samples, Seed: sh.scen.Seed})
}
