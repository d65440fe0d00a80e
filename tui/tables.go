package tui

import (
	tea "github.com/charmbracelet/bubbletea"

	"headroom/curves"
)

// The line-up and the reverse table are the heavy part of a key press
// (every cell of the library evaluated): they run in a tea.Cmd off the key
// path. Each evaluation of the design bumps a generation; a result for an
// older generation is dropped and the current one started instead.

// tablesState is whose design the tables shown are.
type tablesState struct {
	gen     uint64 // bumped by every evaluation of the design
	doneGen uint64 // the generation lineupRows and reverseRows are for
	busy    bool
}

// tablesMsg carries finished tables back to Update.
type tablesMsg struct {
	gen     uint64
	lineup  []lineupRow
	reverse []reverseRow
}

// stale reports whether the tables shown are an older design's.
func (sh *shared) tablesStale() bool { return sh.tables.doneGen != sh.tables.gen }

// tablesNow snapshots what the tables need and returns the work, which
// reads only the snapshot (so it may run on another goroutine).
func (sh *shared) tablesNow() func() ([]lineupRow, []reverseRow) {
	d := sh.design()
	cells := append([]*curves.Cell(nil), sh.cells...)
	kinds := append([]string(nil), sh.kinds...)
	kind, elem := sh.vals.kind, sh.vals.elem
	return func() ([]lineupRow, []reverseRow) {
		return lineupFor(d, cells), reverseFor(d, kinds, kind, elem)
	}
}

// tablesCmd starts the tables of the current design, unless they are
// running or done; nil then.
func (sh *shared) tablesCmd() tea.Cmd {
	t := &sh.tables
	if t.busy || !sh.tablesStale() {
		return nil
	}
	t.busy = true
	gen, work := t.gen, sh.tablesNow()
	return func() tea.Msg {
		l, r := work()
		return tablesMsg{gen: gen, lineup: l, reverse: r}
	}
}

// gotTables stores finished tables when they are the current design's,
// and starts the current design's when they are not.
func (sh *shared) gotTables(msg tablesMsg) tea.Cmd {
	sh.tables.busy = false
	if msg.gen != sh.tables.gen {
		return sh.tablesCmd()
	}
	sh.lineupRows, sh.reverseRows, sh.tables.doneGen = msg.lineup, msg.reverse, msg.gen
	return nil
}
