package scenario

import (
	"errors"
	"runtime"
	"sort"
	"sync"

	"headroom/curves"
	"headroom/discharge"
)

// LineupRow is one cell tried in the product: the series count it takes
// (FitSeries; 0 when none fits) and what the engine made of it.
type LineupRow struct {
	Cell   *curves.Cell
	Series int
	Result *discharge.Result // nil when Err is set
	Err    error             // ErrNoFit, or the evaluation's error
}

// ErrNoFit marks a line-up cell with no series count that fits the
// product's voltage.
var ErrNoFit = errors.New("no series count fits this product's voltage")

// Lineup tries every cell in the product of design d: the same parallel
// count, load, protection element, floor, ambient and daily pattern. The
// design's own cell keeps its series count and pack price; every other
// cell takes the series count FitSeries gives, at its own price. eval is
// the evaluation to use (nil: discharge.Evaluate). Rows come in the order
// of cells; the cells are evaluated on up to two goroutines. The command
// line's compare and the screen's line-up both call this.
func Lineup(d *discharge.Design, cells []*curves.Cell, eval func(*discharge.Design) (*discharge.Result, error)) []LineupRow {
	if eval == nil {
		eval = discharge.Evaluate
	}
	base := *d
	base.TracePoints = 0
	rows := make([]LineupRow, len(cells))
	workers := min(2, runtime.GOMAXPROCS(0), len(cells))
	var wg sync.WaitGroup
	for w := range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := w; i < len(cells); i += workers {
				rows[i] = lineupRow(&base, cells[i], eval)
			}
		}()
	}
	wg.Wait()
	return rows
}

func lineupRow(base *discharge.Design, cell *curves.Cell, eval func(*discharge.Design) (*discharge.Result, error)) LineupRow {
	cd := *base
	cd.Cell = cell
	if cell != base.Cell {
		cd.Series = FitSeries(cell, base)
		cd.PackPrice = 0 // a price given for the design's pack is not this pack's
	}
	row := LineupRow{Cell: cell, Series: cd.Series}
	if cd.Series == 0 {
		row.Err = ErrNoFit
		return row
	}
	row.Result, row.Err = eval(&cd)
	if row.Err != nil {
		row.Result = nil
	}
	return row
}

// Runs reports whether the row's design runs at all.
func (r LineupRow) Runs() bool { return r.Err == nil && r.Result != nil && r.Result.RuntimeH > 0 }

// Short reports whether the row's design runs but its pack (or one
// charge) lasts less than a day of the product's use: under one calendar
// day at its daily pattern. A product whose cells must be swapped or
// charged more than once a day is seldom one anyone would build, however
// little each hour costs (two NiMH cells behind a diode above a 1.8 V
// floor run a toy for minutes, a hundredth of their charge).
func (r LineupRow) Short() bool { return r.Runs() && r.Result.RuntimeDays < 1 }

// LineupBefore is the line-up's order: rows that run come first, those
// that last a day of use (Short) before those that do not, each ranked
// by runtime (longest first) when byRuntime is set and by cost per hour
// of use (cheapest first) otherwise; rows that do not run keep their
// order.
func LineupBefore(a, b LineupRow, byRuntime bool) bool {
	if a.Runs() != b.Runs() {
		return a.Runs()
	}
	if !a.Runs() {
		return false
	}
	if a.Short() != b.Short() {
		return !a.Short()
	}
	if byRuntime {
		return a.Result.RuntimeH > b.Result.RuntimeH
	}
	return a.Result.CostPerHour < b.Result.CostPerHour
}

// RankLineup returns the rows in the line-up's order (LineupBefore).
func RankLineup(rows []LineupRow, byRuntime bool) []LineupRow {
	out := append([]LineupRow(nil), rows...)
	sort.SliceStable(out, func(i, j int) bool { return LineupBefore(out[i], out[j], byRuntime) })
	return out
}
