package tui

import (
	"fmt"
	"strings"
	"time"

	tea "github.com/charmbracelet/bubbletea"

	"headroom/tolerance"
)

// spreadState is the spread over the tolerances for the current design:
// computed off the key path in a tea.Cmd (a few tens of milliseconds),
// filled in when ready and started again when the design has moved on.
type spreadState struct {
	gen     uint64 // bumped by every evaluation of the design
	doneGen uint64 // the generation rep is for
	waiting uint64 // the generation a pause is running for
	busy    bool
	rep     *tolerance.Report
	err     error
}

// spreadMsg carries a finished spread back to Update.
type spreadMsg struct {
	gen uint64
	rep *tolerance.Report
	err error
}

// ready reports whether the spread shown is the current design's.
func (s *spreadState) ready() bool { return s.doneGen == s.gen && (s.rep != nil || s.err != nil) }

// spreadPause is how long the design must stay still before its spread
// starts, so that a held key's evaluations do not share the cores with
// spreads of designs already left behind.
const spreadPause = 120 * time.Millisecond

// spreadTickMsg says the design of generation gen has been still for
// spreadPause.
type spreadTickMsg struct{ gen uint64 }

// spreadCmd waits spreadPause for the current design, unless its spread
// is running, done or already waited for; nil then.
func (sh *shared) spreadCmd() tea.Cmd {
	s := &sh.spread
	if s.busy || s.ready() || sh.err != nil || s.waiting == s.gen {
		return nil
	}
	s.waiting = s.gen
	gen := s.gen
	return tea.Tick(spreadPause, func(time.Time) tea.Msg { return spreadTickMsg{gen: gen} })
}

// gotTick starts the spread when the design is still the one waited for.
func (sh *shared) gotTick(msg spreadTickMsg) tea.Cmd {
	s := &sh.spread
	if msg.gen != s.gen {
		return sh.spreadCmd()
	}
	return sh.startSpread()
}

// startSpread runs the spread of the current design in a command.
func (sh *shared) startSpread() tea.Cmd {
	s := &sh.spread
	if s.busy || s.ready() || sh.err != nil {
		return nil
	}
	s.busy = true
	d := sh.design()
	gen := s.gen
	tols, n, seed := sh.scen.Tolerances, sh.scen.Samples, sh.scen.Seed
	if tols == nil {
		tols = tolerance.Defaults()
	}
	if n <= 0 {
		n = 2000
	}
	return func() tea.Msg {
		rep, err := tolerance.Analyse(&d, tols, n, seed)
		return spreadMsg{gen: gen, rep: rep, err: err}
	}
}

// gotSpread stores a finished spread when it is for the current design,
// and returns the command for the next one when it is not.
func (sh *shared) gotSpread(msg spreadMsg) tea.Cmd {
	s := &sh.spread
	s.busy = false
	if msg.gen == s.gen {
		s.rep, s.err, s.doneGen = msg.rep, msg.err, msg.gen
		return nil
	}
	return sh.spreadCmd()
}

// spreadBand gives the p10 and p90 runtimes for the chart's band; ok is
// false while the spread is not ready.
func (sh *shared) spreadBand() (p10, p90 float64, ok bool) {
	s := &sh.spread
	if !s.ready() || s.rep == nil {
		return 0, 0, false
	}
	return s.rep.Stats.P10H, s.rep.Stats.P90H, true
}

// spreadVerdict is the verdict's spread lines: the p10 in words and the
// worst corner. Compact (80×24) leaves out "(p10)", which the label says
// in words, so that the worst corner's unit is not cut ("44.9 m…").
func (sh *shared) spreadVerdict(line func(label, value, note string), compact bool) {
	s := &sh.spread
	switch {
	case sh.err != nil:
		return
	case !s.ready():
		line("Spread", "working…", "over the tolerances")
	case s.err != nil:
		line("Spread", "—", s.err.Error())
	default:
		st, c := s.rep.Stats, s.rep.Corner
		worst := "worst " + hours(c.WorstH())
		if !(c.WorstH() > 0) {
			worst = "worst never starts" // not "0 h" beside a p10 in minutes
		}
		if compact {
			line("9 of 10 run", "≥ "+hours(st.P10H)+",", worst)
		} else {
			line("9 of 10 run", "≥ "+hours(st.P10H), "(p10), "+worst)
		}
	}
}

// spreadModel is the spread view: the corners, the quantiles and each
// tolerance's sensitivity as a bar of the hours it can cost.
type spreadModel struct {
	width, height int
}

// SetSize sets the view's size.
func (m *spreadModel) SetSize(w, h int) { m.width, m.height = w, h }

// View draws the spread view.
func (m spreadModel) View(sh *shared) string {
	st := &sh.styles
	w := max(m.width, 40)
	s := &sh.spread
	var b strings.Builder
	b.WriteString(st.Heading.Render("Spread over the tolerances") + "\n")
	switch {
	case sh.err != nil:
		b.WriteString(st.Bad.Render(wrap("This design cannot run: "+sh.err.Error(), w)))
		return b.String()
	case !s.ready():
		b.WriteString(st.Dim.Render("Working out the spread…"))
		return b.String()
	case s.err != nil:
		b.WriteString(st.Bad.Render(wrap("No spread: "+s.err.Error(), w)))
		return b.String()
	}
	rep := s.rep
	c, q := rep.Corner, rep.Stats
	row := func(label, value, note string) {
		b.WriteString(st.Label.Render(pad(label, 16)) + st.Value.Render(value) + " " + st.Dim.Render(note) + "\n")
	}
	row("Nominal", hours(c.NominalH()), "of use")
	row("9 of 10 run", "≥ "+hours(q.P10H), "(p10)")
	row("p50 / p90", hours(q.P50H)+" / "+hours(q.P90H), fmt.Sprintf("(%d samples, seed %d)", q.Samples, q.Seed))
	row("Worst corner", hours(c.WorstH()), "every tolerance at the limit that shortens the run")
	row("Best corner", hours(c.BestH()), "")
	b.WriteString("\n" + st.Heading.Render("What to tighten") + st.Dim.Render("  hours lost at the worse limit, the rest nominal") + "\n")
	nameW := 14
	maxLost := 0.0
	for _, sd := range c.Sides {
		maxLost = max(maxLost, sd.LostH)
	}
	barW := min(40, max(4, w-nameW-2-34))
	for _, sd := range c.Sides {
		n := 0
		if maxLost > 0 {
			n = int(float64(barW)*sd.LostH/maxLost + 0.5)
		}
		bar := strings.Repeat("█", n) + strings.Repeat(" ", barW-n)
		lim := sd.HighText
		if sd.WorstLow {
			lim = sd.LowText
		}
		b.WriteString(st.Label.Render(pad(sd.Name, nameW)) + "  " + st.Warn.Render(bar) + " " +
			st.Value.Render(pad("−"+hours(sd.LostH), 10)) + st.Dim.Render(" at "+lim) + "\n")
	}
	for _, x := range rep.Warnings {
		b.WriteString(st.Warn.Render(wrap("⚠ "+x, w)) + "\n")
	}
	b.WriteString(st.Dim.Render(wrap("Default tolerances are typical values from memory: set yours in the scenario's [tolerance] table.", w)))
	return b.String()
}
