package scenario

import (
	"headroom/discharge"
)

// Combo is one row of a runtime table: a design and what makes it differ.
type Combo struct {
	Index     int
	Design    discharge.Design
	CellID    string
	Series    int
	Parallel  int
	Protect   string // element spec
	Load      string // profile spec
	Floor     float64
	TempC     float64
	LoadScale float64
}

// Count is the number of combinations of options and sweeps.
func (s *Scenario) Count() int {
	return len(s.Cells) * len(s.Series) * len(s.Parallel) * len(s.Protects) *
		len(s.Loads) * len(s.Floors) * len(s.Temps) * len(s.LoadScales)
}

// Combo returns combination i (0 ≤ i < Count) without building the others,
// so workers can take indices independently. The last sweep varies fastest.
// Profiles are shared with the scenario when the scale is 1; Evaluate only
// reads them.
func (s *Scenario) Combo(i int) Combo {
	if i < 0 || i >= s.Count() {
		panic("scenario: Combo index out of range")
	}
	idx := i
	take := func(n int) int { k := idx % n; idx /= n; return k }
	sc := s.LoadScales[take(len(s.LoadScales))]
	tc := s.Temps[take(len(s.Temps))]
	fl := s.Floors[take(len(s.Floors))]
	li := take(len(s.Loads))
	pi := take(len(s.Protects))
	el := s.Protects[pi]
	par := s.Parallel[take(len(s.Parallel))]
	ser := s.Series[take(len(s.Series))]
	cell := s.Cells[take(len(s.Cells))]

	d := s.Design
	d.Cell, d.Series, d.Parallel, d.Protect = cell, ser, par, el
	d.Floor, d.TempC = fl, tc
	d.Profile = ScaleProfile(s.Loads[li], sc)
	d.TracePoints = 0
	return Combo{Index: i, Design: d, CellID: cell.ID, Series: ser, Parallel: par,
		Protect: s.ProtectSpecs[pi], Load: s.LoadSpecs[li], Floor: fl, TempC: tc, LoadScale: sc}
}

// ScaleProfile returns the profile with every phase's demand times f; the
// same slice when f is 1.
func ScaleProfile(p []discharge.Phase, f float64) []discharge.Phase {
	if f == 1 {
		return p
	}
	out := make([]discharge.Phase, len(p))
	for i, ph := range p {
		out[i] = ph
		out[i].Load = ph.Load.Scale(f)
	}
	return out
}
