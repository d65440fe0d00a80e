package scenario

import (
	"errors"
	"testing"

	"headroom/curves"
	"headroom/discharge"
)

// Lineup's rule: the design's own cell keeps its series count and price,
// every other cell takes FitSeries at its own price, and a cell with no
// fitting count is ErrNoFit.
func TestLineupRule(t *testing.T) {
	d := Demo().Design
	d.PackPrice = 123 // a price only the design's own pack may keep
	cells := curves.Library()
	rows := Lineup(&d, cells, nil)
	if len(rows) != len(cells) {
		t.Fatalf("%d rows for %d cells", len(rows), len(cells))
	}
	noFit := 0
	for i, r := range rows {
		if r.Cell != cells[i] {
			t.Errorf("row %d is %s, want %s: rows follow the cells", i, r.Cell.ID, cells[i].ID)
		}
		own := r.Cell == d.Cell
		want := FitSeries(r.Cell, &d)
		if own {
			want = d.Series
		}
		if r.Series != want {
			t.Errorf("%s: %d in series, want %d", r.Cell.ID, r.Series, want)
		}
		if want == 0 {
			noFit++
			if !errors.Is(r.Err, ErrNoFit) || r.Result != nil {
				t.Errorf("%s: no count fits, got err %v", r.Cell.ID, r.Err)
			}
			continue
		}
		if r.Err != nil {
			t.Errorf("%s: %v", r.Cell.ID, r.Err)
			continue
		}
		// Exact: the price is copied or worked out the same way.
		wantPrice := r.Cell.Price * float64(r.Series*d.Parallel)
		if own {
			wantPrice = 123
		}
		if r.Result.PackPrice != wantPrice {
			t.Errorf("%s: pack price %v, want %v", r.Cell.ID, r.Result.PackPrice, wantPrice)
		}
	}
	// The demo's 2×AA product cannot take a 9 V block (one block alone
	// starts above FreshLimit × the 3.2 V fresh pack): the rule must
	// refuse at least that one.
	if noFit == 0 {
		t.Errorf("every library cell fits the demo; the 6LR61 block should not")
	}
}

// RankLineup puts rows that run first, those lasting a day of use before
// those that do not, cheapest per hour (or longest) first, and keeps the
// order of rows that do not run.
func TestRankLineup(t *testing.T) {
	res := func(h, cost float64) *discharge.Result {
		return &discharge.Result{RuntimeH: h, RuntimeDays: h, CostPerHour: cost} // 1 h of use a day
	}
	a := LineupRow{Cell: &curves.Cell{ID: "a"}, Result: res(10, 0.5)}
	b := LineupRow{Cell: &curves.Cell{ID: "b"}, Result: res(20, 0.9)}
	c := LineupRow{Cell: &curves.Cell{ID: "c"}, Err: ErrNoFit}
	z := LineupRow{Cell: &curves.Cell{ID: "z"}, Result: res(0, 0)}
	// s is the cheapest per hour but lasts half a day's use.
	s := LineupRow{Cell: &curves.Cell{ID: "s"}, Result: res(0.5, 0.01)}
	for _, tc := range []struct {
		byRuntime bool
		want      string
	}{{false, "abscz"}, {true, "bascz"}} {
		got := ""
		for _, r := range RankLineup([]LineupRow{c, s, b, z, a}, tc.byRuntime) {
			got += r.Cell.ID
		}
		// Rows that do not run keep their input order: c before z.
		if want := tc.want; got != want {
			t.Errorf("byRuntime %v: order %s, want %s", tc.byRuntime, got, want)
		}
	}
	if !s.Short() || a.Short() || z.Short() || c.Short() {
		t.Errorf("Short: s %v a %v z %v c %v; want only s", s.Short(), a.Short(), z.Short(), c.Short())
	}
}
