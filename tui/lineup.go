package tui

import (
	"fmt"
	"math"
	"strings"

	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"

	"headroom/discharge"
	"headroom/internal/scenario"
)

// lineupModel is the line-up view: every cell for the same pack counts,
// load, protection and floor, ranked by cost per hour or by runtime.
type lineupModel struct {
	sel           int // row in the ranked order
	byRuntime     bool
	offset        int // first row shown
	width, height int
}

// SetSize sets the view's size.
func (m *lineupModel) SetSize(w, h int) { m.width, m.height = w, h }

// pickedMsg asks the root to show the design view after a cell was picked.
type pickedMsg struct{}

// Update moves the selection, changes the order, or makes the selected
// row's cell the current one.
func (m lineupModel) Update(sh *shared, msg tea.Msg) (lineupModel, tea.Cmd) {
	km, ok := msg.(tea.KeyMsg)
	if !ok {
		return m, nil
	}
	k := sh.keys
	n := len(sh.lineupReady())
	if n == 0 {
		return m, nil // still being evaluated
	}
	switch {
	case key.Matches(km, k.Up):
		m.sel = (m.sel + n - 1) % max(n, 1)
	case key.Matches(km, k.Down):
		m.sel = (m.sel + 1) % max(n, 1)
	case key.Matches(km, k.Rank):
		cur := m.rows(sh)[min(m.sel, n-1)].idx
		m.byRuntime = !m.byRuntime
		for i, r := range m.rows(sh) { // keep the same cell selected
			if r.idx == cur {
				m.sel = i
			}
		}
	case key.Matches(km, k.Pick):
		rows := m.rows(sh)
		if m.sel < len(rows) && sh.vals.cell != rows[m.sel].idx {
			sh.vals.cell = rows[m.sel].idx
			sh.vals.series = rows[m.sel].series
			sh.evaluate()
		}
		return m, func() tea.Msg { return pickedMsg{} }
	}
	return m, nil
}

func (m lineupModel) rows(sh *shared) []lineupRow { return ranked(sh.lineupReady(), m.byRuntime) }

// selectCurrent puts the selection on the current cell.
func (m *lineupModel) selectCurrent(sh *shared) {
	for i, r := range m.rows(sh) {
		if r.idx == sh.vals.cell {
			m.sel = i
		}
	}
}

// View draws the ranked table and a line about the selected cell.
func (m lineupModel) View(sh *shared) string {
	st := &sh.styles
	w, h := max(m.width, 40), max(m.height, 6)
	v := sh.vals
	var b strings.Builder
	order, other := "cost per hour (cheapest first)", "runtime"
	if m.byRuntime {
		order, other = "runtime (longest first)", "cost per hour"
	}
	b.WriteString(st.Heading.Render("Cell line-up") + "\n")
	strs := fmt.Sprintf("%d strings", v.parallel) // the knob's words: "1 string", "2 strings"
	if v.parallel == 1 {
		strs = "1 string"
	}
	intro := fmt.Sprintf("Every cell, %s in parallel, in the series count (S) whose nominal voltage is closest to this pack's without starting above %.1f× its fresh voltage; same load (%s), protection (%s), floor (%.2f V) and ambient (%s). Ranked by %s; press o to rank by %s.",
		strs, scenario.FreshLimit, profileLabel(sh.profile()), v.elem.Kind(), v.floor, trimFloat(v.tempC)+" °C", order, other)
	intro2 := wrapLines(intro, w)
	if len(intro2) > 4 { // a long profile must not push the table off the screen
		intro2 = append(intro2[:3:3], "… ranked by "+order+"; press o to rank by "+other+".")
	}
	for _, l := range intro2 {
		b.WriteString(st.Dim.Render(l) + "\n")
	}
	rows := m.rows(sh)
	if rows == nil {
		b.WriteString("\n" + st.Dim.Render(fmt.Sprintf("Evaluating %d cells for this design…", len(sh.cells))))
		return b.String()
	}
	maxRun := 0.0
	for _, r := range rows {
		if r.err == nil {
			maxRun = math.Max(maxRun, r.res.RuntimeH)
		}
	}
	const cellW, runW, costW, strW = 30, runtimeW, 10, 9
	// The bar gives way first, so that at 80 columns the Stranded column
	// keeps its heading (it read "Strande…").
	barW := min(12, max(4, w-(5+cellW+1+runW+1+1+costW+1+strW+1)))
	causeW := max(0, w-(5+cellW+1+runW+1+barW+1+costW+1+strW+1))
	head := "   # " + pad("Cell", cellW) + " " + pad("Runtime", runW+1+barW) + " " +
		pad("Cost/hour", costW) + " " + pad("Stranded", strW) + " " + pad("Stops because", causeW)
	b.WriteString(st.Label.Render(pad(head, w)) + "\n")

	note := "Cost/hour: a primary pack's price ÷ its runtime; a rechargeable's price (and charger) ÷ the hours of its cycle life, cycles counted by the charge used, capacity fading to 80 %, plus charging energy."
	for _, r := range rows {
		if r.err == nil && r.short() {
			note = "* lasts less than a day's use: ranked after the cells that last a day. " + note
			break
		}
	}
	noteLines := wrapLines(note, w)
	used := strings.Count(b.String(), "\n")
	room := max(1, h-used-2-len(noteLines)) // below the rows: the scroll line, the note, the enter line
	off := m.offset
	if m.sel < off {
		off = m.sel
	}
	if m.sel >= off+room {
		off = m.sel - room + 1
	}
	for i := off; i < len(rows) && i < off+room; i++ {
		r := rows[i]
		mark := "  "
		if i == m.sel {
			mark = st.Selected.Render("▸ ")
		}
		label := fmt.Sprintf("%dS ", r.series) + cellLabel(r.cell)
		if r.series == 0 {
			label = "   " + cellLabel(r.cell)
		}
		if r.idx == v.cell {
			label = "● " + label
		}
		rank := fmt.Sprintf("%2d ", i+1)
		if r.err != nil {
			b.WriteString(mark + rank + pad(label, cellW) + " " + st.Bad.Render(pad("cannot run: "+r.err.Error(), w-5-cellW-1)) + "\n")
			continue
		}
		res := r.res
		var frac float64
		if maxRun > 0 {
			frac = res.RuntimeH / maxRun
		}
		cost := "—"
		if res.CostPerHour > 0 {
			cost = money(res.CostPerHour)
		}
		name := pad(label, cellW)
		if i == m.sel {
			name = st.Selected.Render(name)
		}
		run := hours(res.RuntimeH)
		if r.short() {
			run += "*"
		}
		b.WriteString(mark + rank + name + " " + st.Value.Render(pad(run, runW)) + " " +
			st.Bar.Render(pad(bar(frac, barW), barW)) + " " + pad(cost, costW) + " " +
			pad(pct(res.StrandedMAh, res.ReferenceMAh), strW) + " " +
			st.Dim.Render(pad(shortCause(res.CutoffCause, res.CutoffPhase), causeW)) + "\n")
	}
	if len(rows) > room {
		b.WriteString(st.Dim.Render(fmt.Sprintf("  rows %d–%d of %d; ↑/↓ scroll", off+1, min(len(rows), off+room), len(rows))) + "\n")
	}
	for _, l := range noteLines {
		b.WriteString(st.Dim.Render(l) + "\n")
	}
	if m.sel < len(rows) {
		r := rows[m.sel]
		s := "enter: use " + cellLabel(r.cell) + " in the design (● marks the cell in use)."
		b.WriteString(st.Dim.Render(pad(s, w)))
	}
	return strings.TrimRight(b.String(), "\n")
}

// bar draws a fraction 0–1 as eighth blocks.
func bar(frac float64, w int) string {
	if !(frac > 0) {
		return ""
	}
	eighths := int(math.Round(math.Min(frac, 1) * float64(w*8)))
	s := strings.Repeat("█", eighths/8)
	if r := eighths % 8; r > 0 {
		s += string([]rune("▏▎▍▌▋▊▉")[r-1])
	}
	return s
}

// shortCause is the cut-off in a few words: "floor on motor wag".
func shortCause(c discharge.Cause, phase string) string {
	return string(c) + " on " + phase
}
