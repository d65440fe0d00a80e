package tui

import (
	"math"
	"sort"

	"headroom/curves"
	"headroom/discharge"
	"headroom/internal/scenario"
	"headroom/protect"
)

// tracePoints is how many points of the voltage trace the chart asks for:
// about one per braille dot column of a chart at 120 columns (a straight
// line joins them, so wider charts lose nothing visible).
const tracePoints = 120

// values is the design as the knobs set it.
type values struct {
	cell     int // index into shared.cells
	series   int
	parallel int
	kind     int // index into shared.kinds
	elem     protect.Element
	scale    float64 // load level: every phase's demand times scale
	floor    float64 // volts at the load
	tempC    float64
	hours    float64 // hours of use a day, above 0, at most 24
}

// shared is the state every part of the screen reads: size, styles, keys,
// the scenario, the knob values and what the engine made of them.
type shared struct {
	width, height int
	styles        Styles
	keys          KeyMap

	scen    *scenario.Scenario
	cells   []*curves.Cell // library cells, then the file's own
	kinds   []string
	vals    values
	saveDir string // folder a relative save name is written in; "" is the working folder

	res         *discharge.Result // nil when err is set
	err         error
	lineupRows  []lineupRow
	reverseRows []reverseRow
	spread      spreadState
}

// newShared builds the state for scenario s.
func newShared(s *scenario.Scenario) *shared {
	sh := &shared{styles: DefaultStyles(), keys: DefaultKeyMap(), scen: s, kinds: protect.Kinds()}
	sh.cells = curves.Library()
	for _, c := range s.FileCells {
		sh.addCell(c)
	}
	for _, c := range s.Cells {
		sh.addCell(c)
	}
	d := s.Design
	v := values{series: d.Series, parallel: d.Parallel, scale: 1, floor: d.Floor, tempC: d.TempC, hours: d.HoursPerDay}
	v.cell = sh.addCell(d.Cell)
	v.elem = d.Protect
	if v.elem == nil {
		v.elem = protect.Default("none")
	}
	v.kind = sh.kindIndex(v.elem.Kind())
	if v.hours <= 0 {
		v.hours = 24
	}
	sh.vals = v
	sh.evaluate()
	return sh
}

// addCell adds c to the cycling list unless it is there, and returns its
// index.
func (sh *shared) addCell(c *curves.Cell) int {
	for i, x := range sh.cells {
		if x == c {
			return i
		}
	}
	sh.cells = append(sh.cells, c)
	return len(sh.cells) - 1
}

func (sh *shared) kindIndex(kind string) int {
	for i, k := range sh.kinds {
		if k == kind {
			return i
		}
	}
	// An element of a kind the list does not know: keep it selectable.
	sh.kinds = append(sh.kinds, kind)
	return len(sh.kinds) - 1
}

func (sh *shared) cell() *curves.Cell { return sh.cells[sh.vals.cell] }

// profile is the scenario's load profile at the current load level.
func (sh *shared) profile() []discharge.Phase {
	return scenario.ScaleProfile(sh.scen.Design.Profile, sh.vals.scale)
}

// design is the current design, without a trace.
func (sh *shared) design() discharge.Design {
	d := sh.scen.Design
	v := sh.vals
	d.Cell = sh.cell()
	d.Series, d.Parallel = v.series, v.parallel
	d.Protect = v.elem
	d.Profile = sh.profile()
	d.Floor, d.TempC, d.HoursPerDay = v.floor, v.tempC, v.hours
	d.TracePoints = 0
	if sh.scen.Design.Cell != d.Cell || sh.scen.Design.Series != d.Series || sh.scen.Design.Parallel != d.Parallel {
		d.PackPrice = 0 // a price given for the file's pack is not this pack's
	}
	return d
}

// evaluate runs the engine for the design, the line-up and the reverse
// view. It takes a few milliseconds at most (BenchmarkKnobStep), so it runs
// inside Update and the screen never shows a stale verdict.
func (sh *shared) evaluate() {
	d := sh.design()
	d.TracePoints = tracePoints
	sh.res, sh.err = evaluateFinite(&d)
	sh.spread.gen++ // the spread shown is now stale; Update starts the next
	sh.lineupRows = sh.evaluateLineup()
	sh.reverseRows = sh.evaluateReverse()
}

// evaluateFinite is discharge.Evaluate, with a result holding a number that
// is not finite turned into an error, so the screen never prints NaN.
func evaluateFinite(d *discharge.Design) (*discharge.Result, error) {
	r, err := discharge.Evaluate(d)
	if err != nil {
		return nil, err
	}
	for _, x := range []float64{r.RuntimeH, r.RuntimeDays, r.DeliveredMAh, r.StrandedMAh, r.ReferenceMAh,
		r.StrandedByProtectionMAh, r.StrandedByFloorMAh, r.ProtectionLossWh, r.ProtectionPeakW,
		r.JunctionC, r.StandbyShare, r.CostPerHour, r.CutoffLoadV, r.CutoffAmps, r.FreshV, r.PackPrice} {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return nil, errNotFinite
		}
	}
	for _, p := range r.Trace {
		if math.IsNaN(p.Hours+p.PackV+p.LoadV) || math.IsInf(p.Hours+p.PackV+p.LoadV, 0) {
			return nil, errNotFinite
		}
	}
	return r, nil
}

type finiteError struct{}

func (finiteError) Error() string {
	return "the engine gave a number that is not finite for this design; change a knob"
}

var errNotFinite error = finiteError{}

// lineupRow is one cell of the line-up.
type lineupRow struct {
	cell   *curves.Cell
	idx    int // index into shared.cells
	series int // cells in series for this row
	res    *discharge.Result
	err    error
}

// evaluateLineup tries every cell in the product (scenario.Lineup, the
// rule compare uses too).
func (sh *shared) evaluateLineup() []lineupRow {
	base := sh.design()
	rows := scenario.Lineup(&base, sh.cells, evaluateFinite)
	out := make([]lineupRow, len(rows))
	for i, r := range rows {
		out[i] = lineupRow{cell: r.Cell, idx: i, series: r.Series, res: r.Result, err: r.Err}
	}
	return out
}

// ranked returns the line-up in scenario.LineupBefore's order.
func ranked(rows []lineupRow, byRuntime bool) []lineupRow {
	out := append([]lineupRow(nil), rows...)
	sort.SliceStable(out, func(i, j int) bool {
		a, b := out[i], out[j]
		return scenario.LineupBefore(scenario.LineupRow{Cell: a.cell, Series: a.series, Result: a.res, Err: a.err},
			scenario.LineupRow{Cell: b.cell, Series: b.series, Result: b.res, Err: b.err}, byRuntime)
	})
	return out
}

// reverseRow is one protection kind's answer to wrong insertion.
type reverseRow struct {
	kind    string
	current bool
	rev     protect.Reversal
}

// reversePack describes the current pack for protect's Reverse
// (discharge.ReversePack, the rule the report and the search use too).
func (sh *shared) reversePack() protect.Pack {
	d := sh.design()
	return discharge.ReversePack(&d)
}

func (sh *shared) evaluateReverse() []reverseRow {
	p := sh.reversePack()
	out := make([]reverseRow, 0, len(sh.kinds))
	for i, k := range sh.kinds {
		e := protect.Default(k)
		cur := i == sh.vals.kind
		if cur {
			e = sh.vals.elem
		}
		if e == nil {
			continue
		}
		out = append(out, reverseRow{kind: k, current: cur, rev: e.Reverse(p)})
	}
	return out
}
