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
	modeNotes            // every warning and caution is open
	modeProduct          // the product form is open
	modeProductEdit      // typing a value in the product form
)

// Model is the root of the screen.
type Model struct {
	shared    // the state, held by value: a copy of the Model is a copy of it
	view      screen
	showHelp  bool
	showNotes bool

	knobs   knobsModel
	chart   chartModel
	verdict verdictModel
	notes   notesModel
	lineup  lineupModel
	reverse reverseModel
	spread  spreadModel
	pick    pickModel
	save    saveModel
	product productModel
	// laidW and laidH are the size layout last sized the parts for.
	laidW, laidH int
	help         help.Model
}

// New builds the screen for scenario s; nil means the built-in demo.
func New(s *scenario.Scenario) Model {
	if s == nil {
		s = scenario.Demo()
	}
	sh := newShared(s)
	m := Model{shared: *sh,
		knobs: newKnobs(sh), chart: chartModel{}, verdict: verdictModel{}, notes: notesModel{},
		lineup: lineupModel{}, reverse: reverseModel{}, spread: spreadModel{}, pick: newPick(sh), save: newSave(sh), product: newProduct(sh), help: newHelp(sh.styles)}
	return m
}

// Run opens the screen on scenario s (nil for the demo) in the terminal's
// alternate screen and returns when the user quits. A hangup, quit,
// terminate or interrupt signal closes the screen, restores the terminal
// (main screen, cursor, line mode) and returns a *SignalError.
func Run(s *scenario.Scenario, opts ...Option) error {
	return run(s, opts)
}

// run is Run with the program's options added (tests give it pipes).
func run(s *scenario.Scenario, screenOpts []Option, opts ...tea.ProgramOption) error {
	opts = append([]tea.ProgramOption{tea.WithAltScreen(), tea.WithoutSignalHandler()}, opts...)
	m := New(s)
	for _, o := range screenOpts {
		o(&m)
	}
	p := tea.NewProgram(m, opts...)
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
	case m.showNotes:
		return modeNotes
	case m.product.editing:
		return modeProductEdit
	case m.product.open:
		return modeProduct
	}
	return modeNone
}

// Update handles a message, then starts the spread of the design when it
// has changed (off the key path, after a short pause: it fills in when
// ready). A panic anywhere below it puts the knobs back as they were
// before the message and says so on the status line: the screen stays
// open and the design can still be saved. The state is a value: each step
// below changes m (or next) and then returns it, never a copy taken
// before the change.
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
		cmd = m.gotSpread(sm)
		return m, cmd
	case spreadTickMsg:
		cmd = m.gotTick(sm)
		return m, cmd
	}
	next, c := m.update(msg)
	nm, ok := next.(Model)
	if !ok {
		return next, c
	}
	nm.layout()
	// The message c brings back passes here again and starts the spread
	// then; a command stays a single one for its callers.
	if c == nil {
		c = nm.spreadCmd()
	}
	return nm, c
}

func (m Model) update(msg tea.Msg) (tea.Model, tea.Cmd) {
	var cmd tea.Cmd
	switch msg := msg.(type) {
	case tea.WindowSizeMsg:
		m.width, m.height = max(0, msg.Width), max(0, msg.Height)
		return m, nil
	case savedMsg:
		m.save, cmd = m.save.Update(&m.shared, msg)
		return m, cmd
	case reportMsg:
		m.reported(msg)
		return m, nil
	case pickedMsg:
		m.view = screenDesign
		m.knobs.sel = knobCell
		return m, nil
	case lineupMsg:
		m.takeLineup(msg)
		if m.view == screenLineup {
			m.lineup.selectCurrent(&m.shared)
			cmd := m.lineupCmd() // the design changed meanwhile
			return m, cmd
		}
		return m, nil
	case pickDoneMsg:
		m.pick, cmd = m.pick.Update(&m.shared, msg)
		return m, cmd
	case tea.KeyMsg:
		nm, cmd := m.key(msg)
		if next, ok := nm.(Model); ok && next.view == screenPick && next.mode() == modeNone {
			// Off the key path: the search runs in a command.
			cmd = tea.Batch(cmd, next.pick.search(&next.shared))
			return next, cmd
		}
		return nm, cmd
	}
	// Anything else (a cursor blink) goes to the text field in use.
	switch {
	case m.save.active():
		m.save, cmd = m.save.Update(&m.shared, msg)
	case m.knobs.editing:
		m.knobs, cmd = m.knobs.Update(&m.shared, msg)
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
		m.save, cmd = m.save.Update(&m.shared, km)
		return m, cmd
	case modeEdit:
		m.knobs, cmd = m.knobs.Update(&m.shared, km)
		return m, cmd
	case modeHelp:
		switch {
		case key.Matches(km, k.Quit):
			return m, tea.Quit
		case key.Matches(km, k.Help), key.Matches(km, k.Back):
			m.showHelp = false
		}
		return m, nil
	case modeProduct, modeProductEdit:
		if m.mode() == modeProduct && key.Matches(km, k.Quit) {
			return m, tea.Quit
		}
		m.product, cmd = m.product.Update(&m.shared, km)
		return m, cmd
	case modeNotes:
		switch {
		case key.Matches(km, k.Quit):
			return m, tea.Quit
		case key.Matches(km, k.Notes), key.Matches(km, k.Back):
			m.showNotes = false
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
	case key.Matches(km, k.Notes):
		m.showNotes = true
		return m, nil
	case key.Matches(km, k.Product):
		m.product.open = true
		return m, nil
	case key.Matches(km, k.Save):
		m.save, cmd = m.save.Start(&m.shared)
		return m, cmd
	case key.Matches(km, k.Report):
		if m.writeReport == nil {
			m.save.status, m.save.failed = "No report writer here: use headroom report on the command line.", true
			return m, nil
		}
		m.save.status, m.save.failed = "Writing the report…", false
		return m, reportCmd(m.writeReport, m.currentScenario(), m.reportBase())
	case key.Matches(km, k.NextView):
		cmd := m.show((m.view + 1) % screenCount)
		return m, cmd
	case key.Matches(km, k.PrevView):
		cmd := m.show((m.view + screenCount - 1) % screenCount)
		return m, cmd
	case key.Matches(km, k.Design):
		cmd := m.show(screenDesign)
		return m, cmd
	case key.Matches(km, k.Lineup):
		cmd := m.show(screenLineup)
		return m, cmd
	case key.Matches(km, k.Reverse):
		cmd := m.show(screenReverse)
		return m, cmd
	case key.Matches(km, k.Spread):
		m.show(screenSpread)
	case key.Matches(km, pickKeys.Open):
		cmd := m.show(screenPick)
		return m, cmd
	case key.Matches(km, k.Back):
		cmd := m.show(screenDesign)
		return m, cmd
	}
	switch m.view {
	case screenLineup:
		m.lineup, cmd = m.lineup.Update(&m.shared, km)
	case screenReverse:
		m.reverse, cmd = m.reverse.Update(&m.shared, km)
	case screenPick:
		m.pick, cmd = m.pick.Update(&m.shared, km)
	default:
		m.knobs, cmd = m.knobs.Update(&m.shared, km)
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
		m.lineup.selectCurrent(&m.shared)
	case screenReverse:
		m.reverse.selectCurrent(&m.shared)
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
	if m.laidW != w || m.laidH != h {
		m.layout() // a size set without a window-size message (tests)
	}
	bodyH := h - 3
	var body []string
	switch {
	case m.showHelp:
		body = fitLines(m.helpOverlay(w, bodyH), w, bodyH)
	case m.showNotes:
		body = fitLines(m.notesOverlay(w, bodyH), w, bodyH)
	case m.product.open:
		body = fitLines(m.product.View(&m.shared, w, bodyH), w, bodyH)
	case m.view == screenLineup:
		body = fitLines(m.lineup.View(&m.shared), w, bodyH)
	case m.view == screenReverse:
		body = fitLines(m.reverse.View(&m.shared), w, bodyH)
	case m.view == screenSpread:
		body = fitLines(m.spread.View(&m.shared), w, bodyH)
	case m.view == screenPick:
		body = fitLines(m.pick.View(&m.shared), w, bodyH)
	default:
		body = m.designView(w, bodyH)
	}
	out := make([]string, 0, h)
	out = append(out, m.header(w))
	out = append(out, body...)
	status := m.save.View(&m.shared)
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
	name := m.vals.name
	if m.scen.Path != "" {
		name += " (" + guard.Clean(m.scen.Path) + ")"
	}
	left := st.Title.Render("headroom") + " " + st.Scenario.Render(pad(name, max(0, w-rw-10)))
	return padRight(left, w-rw) + right
}

// designView lays out knobs and verdict on the left, chart and notes on
// the right.
func (m Model) designView(w, h int) []string {
	leftW, rightW, chartH := m.knobs.width, m.notes.width, m.chart.height
	knobs := m.knobs.View(&m.shared) + "\n\n"
	col := knobs + m.verdict.View(&m.shared)
	if strings.Count(col, "\n") >= h { // full: the cells' temperature gives way to the rows below it
		v := m.verdict
		v.noCells = true
		col = knobs + v.View(&m.shared)
	}
	left := fitLines(col, leftW, h)
	notes := m.noteLines()
	chart := m.chart.View(&m.shared)
	chartH = min(chartH, strings.Count(chart, "\n")+1)
	right := fitLines(chart, rightW, chartH)
	room := h - chartH - 1
	if room > 0 {
		right = append(right, "")
		if len(notes) > room {
			more := len(notes) - room + 1
			notes = append(notes[:room-1:room-1], m.styles.Dim.Render(fmt.Sprintf("… %d more lines: press w to read them", more)))
		}
		right = append(right, fitLines(strings.Join(notes, "\n"), rightW, room)...)
	}
	return besides(left, leftW, right, 3)
}

// layout sizes every part of the screen for the terminal's size and the
// current design: it runs in Update (on the window-size message and after
// every change), so that View only draws.
func (m *Model) layout() {
	w, h := m.width, m.height
	m.laidW, m.laidH = w, h
	bodyH := max(h-3, 1)
	m.lineup.SetSize(w, bodyH)
	m.reverse.SetSize(w, bodyH)
	m.spread.SetSize(w, bodyH)
	m.pick.SetSize(w, bodyH)
	leftW := 45
	if w >= 110 {
		leftW = 48
	}
	rightW := max(w-leftW-3, 1)
	// A short terminal (80×24) gets the compact layout: the verdict one
	// line a figure, so that every row shows; the selected knob's
	// explanation and a count of the warnings beside the chart.
	compact := bodyH < 27
	m.knobs.SetWidth(leftW)
	m.knobs.compact = compact
	m.verdict.SetWidth(leftW)
	m.verdict.compact = compact
	m.notes.SetWidth(rightW)
	m.notes.compact = compact
	// The chart keeps at least 3/5 of the height; notes that do not fit
	// below it end in a line saying how many more there are.
	n := len(m.notesOnly())
	m.chart.SetSize(rightW, min(bodyH, max(bodyH*3/5, bodyH-n-1)))
}

// notesOnly is the notes panel's lines (none when it is empty).
func (m Model) notesOnly() []string {
	notes := strings.Split(m.notes.View(&m.shared), "\n")
	if len(notes) == 1 && notes[0] == "" {
		return nil
	}
	return notes
}

// noteLines is what goes under the chart: the notes, and in the compact
// layout the selected knob's explanation when it fits.
func (m Model) noteLines() []string {
	notes := m.notesOnly()
	h := max(m.height-3, 1)
	if m.knobs.compact && !m.knobs.editing {
		detail := strings.Split(m.styles.Dim.Render(wrap(m.detail(m.knobs.sel), m.notes.width)), "\n")
		if h-m.chart.height-1-len(notes) >= len(detail)+1 {
			notes = append(append(notes, ""), detail...)
		}
	}
	return notes
}

// viewKeys feeds bubbles' help.
var _ help.KeyMap = viewKeys{}
