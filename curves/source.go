package curves

import (
	"slices"
	"sort"
)

// SourceTable is a cell's open-circuit voltage (OpenCircuit) and its
// resistance table (R0 at RefTempC) at every corner of the curve and of
// the table. Between corners both are linear in charge, so interpolating
// between the corners gives them again (to rounding) with one search
// instead of two: the engine reads them at every charge it solves. It is
// worked out once per cell and shared; it is never changed.
type SourceTable struct {
	q, e, r []float64 // charge (scaled mAh), E (V), R0 at RefTempC (Ω)
}

// SourceTable returns the cell's table (see the type). A cell whose
// fields change gets a new one.
func (c *Cell) SourceTable() *SourceTable { return rateGrids.of(c).src }

// newSourceTable tabulates c at its corners, from 0 to the curve's end.
func newSourceTable(c *Cell) *SourceTable {
	end := c.Curve.End()
	q := make([]float64, 0, 2+c.Curve.Len()+len(c.Resistance))
	q = append(q, 0, end)
	q = append(q, c.Curve.q...)
	for _, r := range c.Resistance {
		if x := r.Depth * end; x >= 0 && x <= end {
			q = append(q, x)
		}
	}
	slices.Sort(q)
	q = slices.Compact(q)
	t := &SourceTable{q: q, e: make([]float64, len(q)), r: make([]float64, len(q))}
	for i, x := range q {
		t.r[i] = c.resistanceTable(x)
		t.e[i] = c.openCircuit(x, t.r[i])
	}
	return t
}

// At is E and R0 at RefTempC at scaled charge qs, held at the ends.
func (t *SourceTable) At(qs float64) (E, R0 float64) {
	n := len(t.q)
	if qs <= t.q[0] {
		return t.e[0], t.r[0]
	}
	if qs >= t.q[n-1] {
		return t.e[n-1], t.r[n-1]
	}
	i := sort.SearchFloat64s(t.q, qs) // q[i-1] < qs <= q[i]
	if qs == t.q[i] {
		return t.e[i], t.r[i]
	}
	f := (qs - t.q[i-1]) / (t.q[i] - t.q[i-1])
	return t.e[i-1] + f*(t.e[i]-t.e[i-1]), t.r[i-1] + f*(t.r[i]-t.r[i-1])
}
