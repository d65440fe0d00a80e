package tui

import (
	"errors"
	"os"
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
	return saveModel{input: newField("Save the design as: ", 4096, sh.styles.Cursor)}
}

// active reports whether the flow is waiting for the user or a write.
func (m saveModel) active() bool { return m.state != saveIdle }

// Start asks for a file name.
func (m saveModel) Start(sh *shared) (saveModel, tea.Cmd) {
	m.state, m.status, m.failed = saveName, "", false
	name := defaultSaveName
	if p := sh.scen.Path; p != "" {
		name = p // saving over the source keeps what the screen did not change
	}
	m.input.SetValue(name)
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
func (m saveModel) Update(sh *shared, msg tea.Msg) (saveModel, tea.Cmd) {
	k := sh.keys
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
				if !filepath.IsAbs(name) && sh.saveDir != "" {
					name = filepath.Join(sh.saveDir, name)
				}
				data, err := sh.savedFor(name)
				if err != nil {
					m.status, m.failed = "Not saved: "+err.Error(), true
					return m, nil
				}
				m.path, m.data = name, data
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
func (m saveModel) View(sh *shared) string {
	st := &sh.styles
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

// savedFor is the text to save at path: the scenario file the design came
// from with the design's values rewritten in place (scenario.Update) when
// path is that file, else the design on its own.
func (sh *shared) savedFor(path string) ([]byte, error) {
	src := sh.scen.Path
	if src == "" || !samePath(path, src) {
		return sh.saved(), nil
	}
	orig, err := os.ReadFile(src)
	if err != nil {
		return nil, err
	}
	d := sh.design()
	return scenario.Update(orig, &sh.scen.Design, scenario.Saved{Name: sh.vals.name, Note: sh.vals.note, Design: d,
		ProtectSpec: sh.vals.elem.Spec()}), nil
}

// samePath reports whether a and b name the same file.
func samePath(a, b string) bool {
	sa, errA := os.Stat(a)
	sb, errB := os.Stat(b)
	if errA == nil && errB == nil {
		return os.SameFile(sa, sb)
	}
	x, e1 := filepath.Abs(a)
	y, e2 := filepath.Abs(b)
	return e1 == nil && e2 == nil && x == y
}

// saved is the current design as scenario file text.
func (sh *shared) saved() []byte {
	d := sh.design()
	name := sh.vals.name
	if name == "" {
		name = "headroom design"
	}
	return scenario.Format(scenario.Saved{Name: name, Note: sh.vals.note, Design: d,
		ProtectSpec: sh.vals.elem.Spec(), Budget: sh.scen.Budget,
		Tolerances: sh.scen.Tolerances, Samples: sh.scen.Samples, Seed: sh.scen.Seed})
}
