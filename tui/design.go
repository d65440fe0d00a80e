package tui

import (
	"fmt"
	"math"
	"slices"
	"sort"

	tea "github.com/charmbracelet/bubbletea"

	"headroom/curves"
	"headroom/discharge"
	"headroom/internal/guard"
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

	// The product form's values (product.go). base is the load profile
	// before the load level; it is replaced whole, never changed in place.
	name       string
	note       string
	base       []discharge.Phase
	standby    float64 // amperes
	price      float64 // dollars for one pack
	priceGiven bool    // price set on the screen (even 0), not the file's
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
	// writeReport writes the one-file report of a scenario to a new file
	// (never over one); the command line gives it, nil means none.
	writeReport ReportWriter

	res           *discharge.Result // nil when err is set
	err           error
	lineupCache   []lineupRow // see lineupRows and lineupCmd
	lineupStale   bool        // the cache is not for the current design
	lineupGen     int         // counts design changes
	lineupPending bool        // a line-up is being evaluated off the key path
	reverseRows   []reverseRow
	spread        spreadState
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
	v := values{series: d.Series, parallel: d.Parallel, scale: 1, floor: d.Floor, tempC: d.TempC, hours: d.HoursPerDay,
		name: s.Name, note: s.Note, base: d.Profile, standby: d.Standby, price: d.PackPrice}
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
	return scenario.ScaleProfile(sh.vals.base, sh.vals.scale)
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
	d.Standby = v.standby
	d.TracePoints = 0
	switch {
	case v.priceGiven:
		d.PackPrice, d.PriceGiven = v.price, true
	case sh.scen.Design.Cell != d.Cell || sh.scen.Design.Series != d.Series || sh.scen.Design.Parallel != d.Parallel:
		d.PackPrice, d.PriceGiven = 0, false // a price given for the file's pack is not this pack's
	}
	return d
}

// evaluate runs the engine for the design and the reverse view, and marks
// the line-up for evaluation when it is next looked at. It takes a few
// milliseconds (BenchmarkKnobStep; BenchmarkKnobStepHostile for the
// heaviest input the readers accept), so it runs inside Update and the
// screen never shows a stale verdict.
func (sh *shared) evaluate() {
	d := sh.design()
	d.TracePoints = tracePoints
	sh.res, sh.err = evaluateFinite(&d)
	sh.spread.gen++ // the spread shown is now stale; Update starts the next
	sh.lineupCache, sh.lineupStale = nil, true
	sh.lineupGen++
	sh.reverseRows = sh.evaluateReverse()
}

// lineupRows is the line-up for the current design, evaluated now if it is
// stale: a knob turned on the design view evaluates one design, not one
// per cell.
func (sh *shared) lineupRows() []lineupRow {
	if sh.lineupStale {
		sh.lineupCache, sh.lineupStale = sh.evaluateLineup(), false
	}
	return sh.lineupCache
}

// lineupReady is the line-up if it is up to date, nil while it is being
// evaluated.
func (sh *shared) lineupReady() []lineupRow {
	if sh.lineupStale {
		return nil
	}
	return sh.lineupCache
}

// lineupSyncWork is the most work (curve and resistance points of every
// cell times load phases) the line-up is evaluated for inside a key press:
// about 20 ms on the project's 2-core machine. Past it (a scenario with
// many long cells and a long profile; BenchmarkLineupHostile) it is
// evaluated off the key path and shown when done, so a key never waits.
const lineupSyncWork = 20000

// lineupMsg carries a line-up evaluated off the key path for design
// change gen.
type lineupMsg struct {
	gen  int
	rows []lineupRow
}

// lineupCmd brings the line-up up to date: now when it is cheap, or as a
// command whose lineupMsg Update takes in.
func (sh *shared) lineupCmd() tea.Cmd {
	if !sh.lineupStale || sh.lineupPending {
		return nil
	}
	work := 0
	for _, c := range sh.cells {
		work += c.Curve.Len() + len(c.Resistance)
	}
	if work*len(sh.profile()) <= lineupSyncWork {
		sh.lineupRows()
		return nil
	}
	sh.lineupPending = true
	base, cells, gen := sh.design(), slices.Clone(sh.cells), sh.lineupGen
	return func() tea.Msg { return lineupMsg{gen: gen, rows: lineupFor(base, cells)} }
}

// takeLineup stores a line-up evaluated off the key path, if it is for
// the current design, and says whether another is needed.
func (sh *shared) takeLineup(msg lineupMsg) {
	sh.lineupPending = false
	if msg.gen == sh.lineupGen {
		sh.lineupCache, sh.lineupStale = msg.rows, false
	}
}

// evaluateFinite is discharge.Evaluate, with a result holding a number that
// is not finite turned into an error, so the screen never prints NaN, and a
// panic in the engine turned into an error, so the screen (and the design
// on it, not yet saved) survives any design the knobs can make.
func evaluateFinite(d *discharge.Design) (r *discharge.Result, err error) {
	defer func() {
		if p := recover(); p != nil {
			r, err = nil, engineFailure(p)
		}
	}()
	r, err = discharge.Evaluate(d)
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

// engineFailure is the error a panic inside the engine becomes: the
// design stays on the screen and can still be changed or saved.
func engineFailure(p any) error {
	return fmt.Errorf("the engine failed on this design (%s); change a knob, or save the design and report it",
		guard.Clean(fmt.Sprint(p)))
}

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
	return lineupFor(sh.design(), sh.cells)
}

// lineupFor evaluates every cell of cells for design base. It only reads
// its arguments, so it may run beside Update.
func lineupFor(base discharge.Design, cells []*curves.Cell) []lineupRow {
	rows := scenario.Lineup(&base, cells, evaluateFinite)
	out := make([]lineupRow, len(rows))
	for i, r := range rows {
		out[i] = lineupRow{cell: r.Cell, idx: i, series: r.Series, res: r.Result, err: r.Err}
	}
	return out
}

// short reports whether the row lasts less than a day of use
// (scenario.LineupRow.Short).
func (r lineupRow) short() bool {
	return scenario.LineupRow{Cell: r.cell, Series: r.series, Result: r.res, Err: r.err}.Short()
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

// safeReverse is e.Reverse(p), false when it panics: a row the reverse
// view leaves out rather than a screen that closes.
func safeReverse(e protect.Element, p protect.Pack) (rev protect.Reversal, ok bool) {
	defer func() {
		if recover() != nil {
			ok = false
		}
	}()
	return e.Reverse(p), true
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
		rev, ok := safeReverse(e, p)
		if !ok {
			continue
		}
		out = append(out, reverseRow{kind: k, current: cur, rev: rev})
	}
	return out
}
