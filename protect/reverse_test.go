package protect

import (
	"math"
	"testing"
)

// The reverse table (docs/protection.md §Wrong insertion): for every element, the class of
// what a whole reversed pack and one flipped cell do. A flipped cell in a
// series pack is seen by no input element; in a one-cell pack there is
// nothing to flip against.
func TestReverseTable(t *testing.T) {
	// 2×AA alkaline: 1.5 V, 0.15 Ω per cell (typical, from memory).
	aa2 := Pack{Series: 2, CellV: 1.5, CellR: 0.15, Parallel: 1, LoadR: 10, TempC: 25}
	aa4 := aa2
	aa4.Series = 4
	aa2low := aa2
	aa2low.LoadR = 2 // a motor: 1.07 A reversed, above the polyfuse trip
	coin := Pack{Series: 1, CellV: 3, CellR: 15, Parallel: 1, LoadR: 100, TempC: 25}

	for _, c := range []struct {
		kind   string
		p      Pack
		whole  Outcome
		one    Outcome
		leakLE float64 // whole-pack current at most this (blocked cases), A
	}{
		{"none", aa4, LoadReversed, Unseen, math.Inf(1)},
		{"diode", aa4, Blocked, Unseen, 1e-6},
		{"schottky", aa4, Blocked, Unseen, 1e-5},
		{"pmos", aa4, Blocked, Unseen, 1e-6},
		{"pmos-clamp", aa4, Blocked, Unseen, 1e-6},
		{"limiter", aa4, Blocked, Unseen, 1e-6},
		{"ic", aa4, Blocked, Unseen, 1e-5},
		{"pptc", aa4, LoadReversed, Unseen, math.Inf(1)},
		{"pptc", aa2low, FuseOpens, Unseen, math.Inf(1)},
		{"crowbar", aa4, FuseOpens, Unseen, math.Inf(1)},
		{"crowbar", coin, ShortsCells, Blocked, math.Inf(1)},
		{"diode", coin, Blocked, Blocked, 1e-6},
		{"none", coin, LoadReversed, Blocked, math.Inf(1)},
	} {
		e := Default(c.kind)
		r := e.Reverse(c.p)
		if r.WholePack.Outcome != c.whole {
			t.Errorf("%s, %d cells: whole pack %v, want %v", c.kind, c.p.Series, r.WholePack.Outcome, c.whole)
		}
		if r.OneCell.Outcome != c.one {
			t.Errorf("%s, %d cells: one cell %v, want %v", c.kind, c.p.Series, r.OneCell.Outcome, c.one)
		}
		for _, k := range []Case{r.WholePack, r.OneCell} {
			if k.Note == "" || !finite(k.Current, k.Volts, k.Seconds) || k.Current < 0 || k.Seconds < 0 {
				t.Errorf("%s: malformed case %+v", c.kind, k)
			}
		}
		if r.WholePack.Current > c.leakLE {
			t.Errorf("%s: %g A flows when blocked", c.kind, r.WholePack.Current)
		}
		// One cell flipped in 4×AA leaves two cells' worth, less the drop
		// at the load current: the load current and drop must agree
		// (i·R + drop = (S−2)·V to 1 nV; the bisection stops at 1e-12 A).
		if c.p.Series == 4 {
			o := r.OneCell
			drop := e.Drop(o.Current, 3, 25)
			if res := o.Current*c.p.LoadR + drop - 3; math.Abs(res) > 1e-9 {
				t.Errorf("%s: one cell flipped: %g A with drop %g V leaves %g V", c.kind, o.Current, drop, res)
			}
		}
	}
}

func finite(vs ...float64) bool {
	for _, v := range vs {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return false
		}
	}
	return true
}

// Case.Words, the reversed-cells words of the screen and the report;
// expected strings written by hand (two digits, ms below a second).
func TestCaseWords(t *testing.T) {
	cases := []struct {
		c    Case
		want string
	}{
		{Case{Outcome: Blocked, Current: 5.44e-9}, "blocked, 5.4 nA"},
		{Case{Outcome: FuseOpens, Current: 5.14, Seconds: 0.00492}, "fuse opens, 5.1 A for 4.9 ms"},
		{Case{Outcome: FuseOpens, Current: 0.9, Seconds: 12}, "fuse opens, 900 mA for 12 s"},
		{Case{Outcome: Unseen}, "not seen"},
		{Case{Outcome: Blocked, Current: 1e-6}, "blocked, 1.0 µA"},
	}
	for _, c := range cases {
		if got := c.c.Words(); got != c.want {
			t.Errorf("%+v: %q, want %q", c.c, got, c.want)
		}
	}
}
