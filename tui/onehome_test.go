package tui

import (
	"fmt"
	"testing"

	"headroom/discharge"
	"headroom/internal/scenario"
)

// TestLimitsOneHome: the screen takes its series, parallel and ambient limits from their one
// home, discharge's ranges (ranges.go): the slider ends there and a typed value one
// past it is refused, as the flags and the scenario reader refuse it
// (cmd/headroom TestLimitsOneHome).
func TestLimitsOneHome(t *testing.T) {
	sh := newShared(scenario.Demo())
	for _, c := range []struct {
		k      knob
		lo, hi float64
	}{
		{knobSeries, 1, discharge.MaxSeries},
		{knobParallel, 1, discharge.MaxParallel},
		{knobTemp, discharge.MinTempC, discharge.MaxTempC},
	} {
		r, ok := sh.rangeOf(c.k)
		// Exact: the slider's ends are the constants themselves.
		if !ok || r.lo != c.lo || r.hi != c.hi {
			t.Errorf("knob %d: slider %v–%v, want %v–%v", c.k, r.lo, r.hi, c.lo, c.hi)
		}
	}
	for _, c := range []struct {
		k   knob
		max int
	}{{knobSeries, discharge.MaxSeries}, {knobParallel, discharge.MaxParallel}} {
		if err := sh.setText(c.k, fmt.Sprint(c.max)); err != nil {
			t.Errorf("knob %d: typing %d: %v, want it taken", c.k, c.max, err)
		}
		if err := sh.setText(c.k, fmt.Sprint(c.max+1)); err == nil {
			t.Errorf("knob %d: typing %d was taken, want it refused", c.k, c.max+1)
		}
		if err := sh.setText(c.k, "1"); err != nil {
			t.Fatal(err)
		}
	}
}

// The screen's line-up is scenario.Lineup's, row for row, in
// scenario.LineupBefore's order (compare uses both too: cmd/headroom
// TestCompareIsTheLineup).
func TestLineupOneHome(t *testing.T) {
	sh := newShared(scenario.Demo())
	base := sh.design()
	want := scenario.Lineup(&base, sh.cells, nil)
	rows := sh.evaluateLineup()
	if len(rows) != len(want) {
		t.Fatalf("%d rows, scenario.Lineup gives %d", len(rows), len(want))
	}
	for i, r := range rows {
		w := want[i]
		if r.cell != w.Cell || r.series != w.Series || (r.err == nil) != (w.Err == nil) {
			t.Errorf("row %d: %s %dS err %v, scenario.Lineup: %s %dS err %v", i, r.cell.ID, r.series, r.err, w.Cell.ID, w.Series, w.Err)
			continue
		}
		// Exact: the same evaluation of the same design.
		if r.err == nil && (r.res.RuntimeH != w.Result.RuntimeH || r.res.CostPerHour != w.Result.CostPerHour) {
			t.Errorf("row %d %s: runtime %v $/h %v, scenario.Lineup %v %v", i, r.cell.ID, r.res.RuntimeH, r.res.CostPerHour, w.Result.RuntimeH, w.Result.CostPerHour)
		}
	}
	for _, byRuntime := range []bool{false, true} {
		got, rank := ranked(rows, byRuntime), scenario.RankLineup(want, byRuntime)
		for i := range got {
			if got[i].cell != rank[i].Cell {
				t.Errorf("byRuntime %v: rank %d is %s, scenario.RankLineup has %s", byRuntime, i+1, got[i].cell.ID, rank[i].Cell.ID)
			}
		}
	}
}
