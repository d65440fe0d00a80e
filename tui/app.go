// Package tui is headroom's interactive screen: knobs for the pack, the
// protection element, the load and the floor, with the engine's verdict, a
// voltage chart, a line-up of every cell and what each protection does
// with cells put in backwards, all redrawn on every key.
package tui

import (
	"fmt"
	"os"
	"os/signal"
	"strings"
	"syscall"

	"github.com/charmbracelet/bubbles/help"
	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"

	"headroom/discharge"
	"headroom/internal/guard"
	"headroom/internal/scenario"
)

// Smallest terminal the screen draws in; below it, it says so.
const (
	MinWidth  = 80
	MinHeight = 24
)

// screen is one of the views.
type screen int

const (
	screenDesign  screen = iota // knobs, verdict and chart
	screenLineup                // every cell ranked
	screenReverse               // cells put in wrong
	screenSpread                // the spread over the tolerances
	screenPick                  // the cheapest designs for a target
	screenCount
)

func (s screen) String() string {
	switch s {
	case screenDesign:
		return "Design"
	case screenLineup:
		return "Line-up"
	case screenReverse:
		return "Reversed cells"
	case screenSpread:
		return "Spread"
	case screenPick:
		return "Pick"
	}
	return "?"
}

// mode is what the keys go to besides the view.
type mode int

const (
	modeNone        mode = iota
	modeEdit             // typing a knob's value
	modeSaveName         // typing a file name
	modeSaveConfirm      // answering overwrite y/n
	modeHelp             // the full help is open
)

// Model is the root of the screen.
type Model struct {
	*shared
	view     screen
	showHelp bool

	knobs   knobsModel
	chart   chartModel
	verdict verdictModel
	notes   notesModel
	lineup  lineupModel
	reverse reverseModel
	spread  spreadModel
	pick    pickModel
	save    saveModel
	help    help.Model
}

// New builds the screen for scenario s; nil means the built-in demo.
func New(s *scenario.Scenario) Model {
	if s == nil {
		s = scenario.Demo()
	}
	sh := newShared(s)
	m := Model{shared: sh,
		knobs: newKnobs(sh), chart: chartModel{sh: sh}, verdict: verdictModel{sh: sh}, notes: notesModel{sh: sh},
		lineup: lineupModel{sh: sh}, reverse: reverseModel{sh: sh}, spread: spreadModel{sh: sh}, pick: newPick(sh), save: newSave(sh), help: newHelp(sh.styles)}
	return m
}

// Run opens the screen on scenario s (nil for the demo) in the terminal's
// alternate screen and returns when the user quits. A hangup, quit,
// terminate or interrupt signal closes the screen, restores the terminal
// (main screen, cursor, line mode) and returns a *SignalError.
func Run(s *scenario.Scenario) error {
	return run(s)
}

// run is Run with the program's options added (tests give it pipes).
func run(s *scenario.Scenario, opts ...tea.ProgramOption) error {
	opts = append([]tea.ProgramOption{tea.WithAltScreen(), tea.WithoutSignalHandler()}, opts...)
	p := tea.NewProgram(New(s), opts...)
	sigs := make(chan os.Signal, 1)
	signal.Notify(sigs, closingSignals...)
	defer signal.Stop(sigs)
	caught := make(chan os.Signal, 1)
	done := make(chan struct{})
	defer close(done)
	go func() {
		select {
		case sig := <-sigs:
			caught <- sig
			p.Kill() // Run restores the terminal on its way out
		case <-done:
		}
	}()
	_, err := p.Run()
	select {
	case sig := <-caught:
		if n, ok := sig.(syscall.Signal); ok {
			return &SignalError{Signal: n}
		}
		return &SignalError{Signal: syscall.SIGTERM}
	default:
	}
	if err != nil {
		return fmt.Errorf("interactive screen: %w", err)
	}
	return nil
}

// closingSignals are the signals that close the screen.
var closingSignals = []os.Signal{syscall.SIGHUP, syscall.SIGINT, syscall.SIGQUIT, syscall.SIGTERM}

// SignalError says the screen was closed by a signal; the command exits
// with ExitCode, 128 + the signal's number, as shells expect.
type SignalError struct{ Signal syscall.Signal }

func (e *SignalError) Error() string {
	name := map[syscall.Signal]string{syscall.SIGHUP: "SIGHUP (the terminal hung up)", syscall.SIGINT: "SIGINT (an interrupt)",
		syscall.SIGQUIT: "SIGQUIT (a quit)", syscall.SIGTERM: "SIGTERM (a request to stop)"}[e.Signal]
	if name == "" {
		name = e.Signal.String()
	}
	return "the screen was closed by " + name + "; the design was not saved"
}

// ExitCode is 128 + the signal's number.
func (e *SignalError) ExitCode() int { return 128 + int(e.Signal) }

// Result is the engine's verdict for the current design; nil with the
// reason when the design cannot run.
func (m Model) Result() (*discharge.Result, error) { return m.res, m.err }

// Init starts the spread over the tolerances; the first evaluation ran
// in New.
func (m Model) Init() tea.Cmd { return m.spreadCmd() }

func (m Model) mode() mode {
	switch {
	case m.save.state == saveName:
		return modeSaveName
	case m.save.state == saveConfirm:
		return modeSaveConfirm
	case m.knobs.editing:
		return modeEdit
	case m.showHelp:
		return modeHelp
	}
	return modeNone
}

// Update handles a message, then starts the spread of the design when it
// has changed (off the key path, after a short pause: it fills in when
// ready). A panic anywhere below it puts the knobs back as they were
// before the message and says so on the status line: the screen stays
// open and the design can still be saved.
func (m Model) Update(msg tea.Msg) (res tea.Model, cmd tea.Cmd) {
	before := m.vals
	defer func() {
		if p := recover(); p != nil {
			m.vals = before
			func() {
				defer func() { _ = recover() }() // the old design's verdict, if it can be had
				m.evaluate()
			}()
			m.knobs.editing = false
			m.save.state, m.save.failed = saveIdle, true
			m.save.status = guard.Clean(fmt.Sprintf("That step failed inside headroom (%v); the design is as it was. Press s to save it.", p))
			res, cmd = m, nil
		}
	}()
	switch sm := msg.(type) {
	case spreadMsg:
		return m, m.gotSpread(sm)
	case spreadTickMsg:
		return m, m.gotTick(sm)
	}
	next, c := m.update(msg)
	if c != nil {
		// The message c brings back passes here again and starts the
		// spread then; a command stays a single one for its callers.
		return next, c
	}
	return next, m.spreadCmd()
}

func (m Model) update(msg tea.Msg) (tea.Model, tea.Cmd) {
	var cmd tea.Cmd
	switch msg := msg.(type) {
	case tea.WindowSizeMsg:
		m.width, m.height = max(0, msg.Width), max(0, msg.Height)
		return m, nil
	case savedMsg:
		m.save, cmd = m.save.Update(msg)
		return m, cmd
	case pickedMsg:
		m.view = screenDesign
		m.knobs.sel = knobCell
		return m, nil
	case lineupMsg:
		m.takeLineup(msg)
		if m.view == screenLineup {
			m.lineup.selectCurrent()
			return m, m.lineupCmd() // the design changed meanwhile
		}
		return m, nil
	case pickDoneMsg:
		m.pick, cmd = m.pick.Update(msg)
		return m, cmd
	case tea.KeyMsg:
		nm, cmd := m.key(msg)
		if next, ok := nm.(Model); ok && next.view == screenPick && next.mode() == modeNone {
			// Off the key path: the search runs in a command.
			cmd = tea.Batch(cmd, next.pick.search())
			return next, cmd
		}
		return nm, cmd
	}
	// Anything else (a cursor blink) goes to the text field in use.
	switch {
	case m.save.active():
		m.save, cmd = m.save.Update(msg)
	case m.knobs.editing:
		m.knobs, cmd = m.knobs.Update(msg)
	}
	return m, cmd
}

func (m Model) key(km tea.KeyMsg) (tea.Model, tea.Cmd) {
	k := m.keys
	var cmd tea.Cmd
	if km.Type == tea.KeyCtrlC {
		return m, tea.Quit
	}
	switch m.mode() {
	case modeSaveName, modeSaveConfirm:
		m.save, cmd = m.save.Update(km)
		return m, cmd
	case modeEdit:
		m.knobs, cmd = m.knobs.Update(km)
		return m, cmd
	case modeHelp:
		switch {
		case key.Matches(km, k.Quit):
			return m, tea.Quit
		case key.Matches(km, k.Help), key.Matches(km, k.Back):
			m.showHelp = false
		}
		return m, nil
	}
	if m.save.state == saveWriting {
		return m, nil // a write is running: wait for it
	}
	m.save.status = "" // the last save's news is old once the user moves on
	switch {
	case key.Matches(km, k.Quit):
		return m, tea.Quit
	case key.Matches(km, k.Help):
		m.showHelp = true
		return m, nil
	case key.Matches(km, k.Save):
		m.save, cmd = m.save.Start()
		return m, cmd
	case key.Matches(km, k.NextView):
		return m, m.show((m.view + 1) % screenCount)
	case key.Matches(km, k.PrevView):
		return m, m.show((m.view + screenCount - 1) % screenCount)
	case key.Matches(km, k.Design):
		return m, m.show(screenDesign)
	case key.Matches(km, k.Lineup):
		return m, m.show(screenLineup)
	case key.Matches(km, k.Reverse):
		return m, m.show(screenReverse)
	case key.Matches(km, k.Spread):
		m.show(screenSpread)
	case key.Matches(km, pickKeys.Open):
		return m, m.show(screenPick)
	case key.Matches(km, k.Back):
		return m, m.show(screenDesign)
	}
	switch m.view {
	case screenLineup:
		m.lineup, cmd = m.lineup.Update(km)
	case screenReverse:
		m.reverse, cmd = m.reverse.Update(km)
	case screenPick:
		m.pick, cmd = m.pick.Update(km)
	default:
		m.knobs, cmd = m.knobs.Update(km)
	}
	return m, cmd
}

// show switches to view s with its selection on what is in use; the
// command, if any, evaluates the line-up off the key path.
func (m *Model) show(s screen) tea.Cmd {
	if s == m.view {
		return nil
	}
	m.view = s
	var cmd tea.Cmd
	switch s {
	case screenLineup:
		cmd = m.lineupCmd()
		m.lineup.selectCurrent()
	case screenReverse:
		m.reverse.selectCurrent()
	}
	return cmd
}

// View draws the screen; if drawing panics it says so in plain text and
// the keys still work (s saves the design, q quits).
func (m Model) View() (out string) {
	defer func() {
		if p := recover(); p != nil {
			out = wrap(guard.Clean(fmt.Sprintf("headroom could not draw this screen (%v). The design is kept: press s to save it, esc to go back, q to quit.", p)), max(20, m.width))
		}
	}()
	return m.draw()
}

func (m Model) draw() string {
	w, h := m.width, m.height
	if w == 0 && h == 0 {
		return "" // no size yet
	}
	if w < MinWidth || h < MinHeight {
		return m.tooSmall()
	}
	bodyH := h - 3
	var body []string
	switch {
	case m.showHelp:
		body = fitLines(m.helpOverlay(w, bodyH), w, bodyH)
	case m.view == screenLineup:
		m.lineup.SetSize(w, bodyH)
		body = fitLines(m.lineup.View(), w, bodyH)
	case m.view == screenReverse:
		m.reverse.SetSize(w, bodyH)
		body = fitLines(m.reverse.View(), w, bodyH)
	case m.view == screenSpread:
		m.spread.SetSize(w, bodyH)
		body = fitLines(m.spread.View(), w, bodyH)
	case m.view == screenPick:
		m.pick.SetSize(w, bodyH)
		body = fitLines(m.pick.View(), w, bodyH)
	default:
		body = m.designView(w, bodyH)
	}
	out := make([]string, 0, h)
	out = append(out, m.header(w))
	out = append(out, body...)
	status := m.save.View()
	if status == "" && m.err != nil && m.view == screenDesign {
		status = m.styles.Bad.Render("This design cannot run; see the verdict.")
	}
	out = append(out, fitLines(status, w, 1)...)
	out = append(out, fitLines(m.hintLine(), w, 1)...)
	return strings.Join(out, "\n")
}

// tooSmall says how large the terminal needs to be, in whatever room
// there is.
func (m Model) tooSmall() string {
	w, h := max(1, m.width), max(1, m.height)
	msg := fmt.Sprintf("headroom needs a terminal of at least %d×%d characters; this one is %d×%d. Make the window larger, or press q to quit.",
		MinWidth, MinHeight, m.width, m.height)
	return strings.Join(fitLines(wrap(msg, w), w, h), "\n")
}

// header is the top line: the program, the scenario and the views.
func (m Model) header(w int) string {
	st := &m.styles
	var tabs []string
	for s := range screenCount {
		t := fmt.Sprintf(" %d %s ", int(s)+1, s)
		if s == m.view {
			tabs = append(tabs, st.TabOn.Render(t))
		} else {
			tabs = append(tabs, st.Tab.Render(t))
		}
	}
	right := strings.Join(tabs, "")
	rw := 0
	for s := range screenCount {
		rw += len(fmt.Sprintf(" %d %s ", int(s)+1, s))
	}
	name := m.scen.Name
	if m.scen.Path != "" {
		name += " (" + guard.Clean(m.scen.Path) + ")"
	}
	left := st.Title.Render("headroom") + " " + st.Scenario.Render(pad(name, max(0, w-rw-10)))
	return padRight(left, w-rw) + right
}

// designView lays out knobs and verdict on the left, chart and notes on
// the right.
func (m Model) designView(w, h int) []string {
	leftW := 45
	if w >= 110 {
		leftW = 48
	}
	rightW := w - leftW - 3
	m.knobs.SetWidth(leftW)
	m.verdict.SetWidth(leftW)
	left := fitLines(m.knobs.View()+"\n\n"+m.verdict.View(), leftW, h)

	m.notes.SetWidth(rightW)
	notes := strings.Split(m.notes.View(), "\n")
	if len(notes) == 1 && notes[0] == "" {
		notes = nil
	}
	// The chart keeps at least 3/5 of the height; notes that do not fit
	// below it end in a line saying how many more there are.
	chartH := min(h, max(h*3/5, h-len(notes)-1))
	m.chart.SetSize(rightW, chartH)
	chart := m.chart.View()
	chartH = min(chartH, strings.Count(chart, "\n")+1)
	right := fitLines(chart, rightW, chartH)
	room := h - chartH - 1
	if room > 0 {
		right = append(right, "")
		if len(notes) > room {
			more := len(notes) - room + 1
			notes = append(notes[:room-1:room-1], m.styles.Dim.Render(fmt.Sprintf("… %d more lines in a taller window", more)))
		}
		right = append(right, fitLines(strings.Join(notes, "\n"), rightW, room)...)
	}
	return besides(left, leftW, right, 3)
}

// viewKeys feeds bubbles' help.
var _ help.KeyMap = viewKeys{}
