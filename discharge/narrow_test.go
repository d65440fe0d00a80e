package discharge

import (
	"testing"

	"headroom/curves"
	"headroom/protect"
)

// The narrowing's false-position steps stall where the smallest margin
// sits at rounding level over a long span and jumps where the run fails:
// every estimate lands within half a tolerance of the working end, which
// creeps by that half tolerance a solve, and Illinois' halvings of the
// failing end take about forty solves to move the estimate each time
// that end moves. Found by a random search over library designs: the
// stranded split's run without the floor of three 6LR61 blocks behind
// the IC, whose over-voltage lock-out (5.8 V, the pack 27 V) leaves the
// load about 7e-15 V above its 0 V floor at every charge while the
// cells' end-point ends the run near 553.47 mAh. It ran out its 200
// steps with a bracket of 2e-4 mAh (the search's resolution is 1e-12 of
// the curve, 5.6e-10 mAh) and cost 432 node solves. No outside source:
// the check is the search's own contract (narrow: the first failure to
// 1e-12 of the curve) and bisection's cost, one solve per halving.
func TestNarrowStuckEstimateBisects(t *testing.T) {
	cell, ok := curves.Lookup("6lr61")
	if !ok {
		t.Fatal("no 6lr61 in the library")
	}
	el, err := protect.Parse("ic")
	if err != nil {
		t.Fatal(err)
	}
	d := &Design{Cell: cell, Series: 3, Parallel: 1, Protect: el,
		Profile: []Phase{{Load: Load{Kind: ConstantResistance, Ohms: 77.03004723216505}, Seconds: 15.326858366646864}},
		Floor:   3.153976963019051, TempC: 12.857402927240905, HoursPerDay: 8, Standby: 4.014578454231513e-05}
	_, e, err := evaluateWith(d, gaussX, gaussW, false)
	if err != nil {
		t.Fatal(err)
	}
	noFloor := &e.runs[1]
	if noFloor.floor != 0 || noFloor.cutoff {
		t.Fatal("runs[1] is no longer the run without the floor")
	}
	n0 := e.nodes
	f := e.search(noFloor, &e.nd, 0, false)
	solves := e.nodes - n0
	tol := 1e-12 * e.end // narrow's resolution
	if f.why != CauseEndPoint {
		t.Fatalf("the run without the floor ends by %q, want the end-point (the case this test is about)", f.why)
	}
	// The end-point margin (the cells' own, a smooth rule) crosses zero
	// between 553.47 and 553.48 mAh (solved there: +2.0e-4 and −3.1e-4 V).
	if !(f.lo > 553.47 && f.lo < 553.48) {
		t.Errorf("cut-off at %.9g mAh, want between 553.47 and 553.48 mAh where the end-point margin changes sign", f.lo)
	}
	if f.hi-f.lo > tol {
		t.Errorf("the bracket closed to %.3g mAh, want at most the search's resolution %.3g mAh", f.hi-f.lo, tol)
	}
	// The scan solves each breakpoint once; bisecting the span to the
	// resolution takes log2(span/tol) ≤ 40 solves (1e12 < 2^40); twice
	// that leaves room for the false-position steps before a stall is
	// seen.
	if limit := len(e.breaks) + 80; solves > limit {
		t.Errorf("the search took %d node solves, want at most %d (%d breakpoints and twice a bisection's 40)", solves, limit, len(e.breaks))
	}
	t.Logf("%d node solves, bracket %.3g mAh, cut-off %.12g mAh", solves, f.hi-f.lo, f.lo)
}
