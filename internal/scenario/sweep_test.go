package scenario

import (
	"testing"

	"headroom/discharge"
)

// Sweep's rows are the evaluations of Combo(i), whichever goroutine made
// them: the same results, exactly, as evaluating each combination alone,
// and as many rows as the product of the options and sweeps.
func TestSweepRowsAreTheCombos(t *testing.T) {
	s := Demo()
	want := len(s.Cells) * len(s.Series) * len(s.Parallel) * len(s.Protects) * len(s.Loads) * len(s.Floors) * len(s.Temps) * len(s.LoadScales)
	if s.Count() != want || want < 10 {
		t.Fatalf("Count %d, product of the options %d (the demo should sweep at least 10)", s.Count(), want)
	}
	n := 0
	s.Sweep(func(r Row) bool {
		c := s.Combo(r.Combo.Index)
		alone, err := evaluateAlone(&c)
		if (err == nil) != (r.Err == nil) {
			t.Errorf("row %d: error %v, alone %v", r.Combo.Index, r.Err, err)
		} else if err == nil && (alone.RuntimeH != r.Result.RuntimeH || alone.StrandedMAh != r.Result.StrandedMAh) {
			t.Errorf("row %d: %v h, %v mAh stranded; alone %v h, %v", r.Combo.Index, r.Result.RuntimeH, r.Result.StrandedMAh, alone.RuntimeH, alone.StrandedMAh)
		}
		if r.Combo.CellID != c.Design.Cell.ID || r.Combo.Floor != c.Design.Floor {
			t.Errorf("row %d: labels %s %v, design %s %v", r.Combo.Index, r.Combo.CellID, r.Combo.Floor, c.Design.Cell.ID, c.Design.Floor)
		}
		n++
		return true
	})
	if n != want {
		t.Errorf("%d rows, want %d", n, want)
	}
}

func evaluateAlone(c *Combo) (*discharge.Result, error) { return discharge.Evaluate(&c.Design) }
