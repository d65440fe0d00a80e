package discharge

import (
	"slices"
	"testing"

	"headroom/curves"
)

// cellBreaks against breakpointsTo worked out afresh, for a library cell
// and for a cell edited in place between calls (same pointer, another
// resistance table): the memo must hand back exactly the fresh corners,
// never the ones of the cell as it was.
func TestCellBreaksNeverStale(t *testing.T) {
	lr6, ok := curves.Lookup("lr6")
	if !ok {
		t.Fatal("no lr6")
	}
	c := *lr6
	c.Resistance = slices.Clone(lr6.Resistance)
	var prev []float64
	for round := range 3 {
		want := breakpointsTo(nil, &c)
		if slices.Equal(want, prev) {
			t.Fatalf("round %d: the edit left the corners as they were: the check cannot tell a stale entry", round)
		}
		prev = want
		for range 2 { // the first may fill the memo, the second reads it
			if got := cellBreaks(make([]float64, 0, 4), &c); !slices.Equal(got, want) {
				t.Fatalf("round %d: memo gave %v, fresh %v", round, got, want)
			}
		}
		// Edit the table in place: one depth moves (kept inside (0, 1)).
		i := len(c.Resistance) / 2
		c.Resistance[i].Depth = 0.5 * (c.Resistance[i].Depth + c.Resistance[i+1].Depth)
	}
}
