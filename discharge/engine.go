// The evaluation: the design's variants, the cut-offs and the totals.

package discharge

import (
	"fmt"
	"math"
	"slices"
	"sort"
	"sync"
	"sync/atomic"

	"headroom/curves"
	"headroom/internal/rc"
	"headroom/protect"
)

// hoursPerMonth is the mean month, 365.25·24/12 hours.
const hoursPerMonth = 730.5

// op is one phase's operating point.
type op struct {
	I     float64 // load current, A
	Ipack float64 // pack current (load + element drain), A
	Vin   float64 // pack terminal voltage, V
	Vload float64 // load voltage, V
	Vdrop float64 // element drop, V
	CellV float64 // one cell's terminal voltage, V
	Fail  failure // failNone while the phase works
}

// failure is why one phase's operating point fails, as a small code: an
// op then holds no pointer, so the nodes' many copies of ops cost no
// write barriers. cause names it.
type failure uint8

const (
	failNone failure = iota
	failFloor
	failCollapse
	failLimit
	failFuse
	failDim
)

// cause is f as a Cause ("" for failNone).
func (f failure) cause() Cause {
	switch f {
	case failFloor:
		return CauseFloor
	case failCollapse:
		return CauseCollapse
	case failLimit:
		return CauseLimit
	case failFuse:
		return CauseFuse
	case failDim:
		return CauseDim
	}
	return ""
}

// variant is the design seen with a given element and floor: the real one,
// the same without the element, and the reference (no element, no floor,
// no pack cut-off).
type variant struct {
	el     protect.Element
	lim    protect.Limit
	floor  float64
	cutoff bool    // the pack's own under-voltage cut-off applies
	minLED float64 // least LED current that counts as working, A (limits.go); 0: none
	// steady marks an element whose drop and standing drain do not move
	// with the pack's voltage (none, a diode, a resistance): behind it a
	// constant-power load's i·vload(i) is concave, so a warm start from
	// the last solve is safe (see powerPoint).
	steady bool
	// heat is the element's per-phase junction state (heat.go); nil
	// when the element is taken at ambient.
	heat *heat
	// ordered marks the design's own run, whose cut-off must keep floor
	// order by construction (heat.go, byWork).
	ordered bool
	// over is the element when it opens on the profile as a whole (a
	// polyfuse; lim.Trip is then +Inf); nil otherwise.
	over protect.Overloader
	// usePerQ is the seconds of use per scaled mAh, from this variant's
	// fresh pack drain: the time since the start that a charge stands for,
	// for the polarisation of a pack that started rested (0 until known,
	// see clock). Each variant has its own, as a separate run would.
	usePerQ float64
	// periodicOnly takes every session as day-periodic, the first too:
	// set when the run could span twenty sessions or more (see clock).
	periodicOnly bool
}

// evaluator holds what one evaluation works out once: the design's
// phases, the cell's breakpoints and polarisation branches, the drains
// that do not change with charge.
type evaluator struct {
	d     *Design
	cell  *curves.Cell
	S, P  float64
	T     float64
	w     []float64 // duty weights of the phases, summing to 1
	loads []Load
	end   float64 // curve end, mAh (scaled, per cell)
	// hint holds each phase's last solved current, A: the next solve, at
	// a nearby charge, starts from it (0: none yet). It only saves work:
	// every solve converges to the same root from any start.
	hint   []float64
	breaks []float64
	// drops is each phase's last diode drop (operating.go, drop).
	drops []dropMemo
	// cellAt holds the cell's source at recent charges (operating.go,
	// source).
	cellAt [32]cellAt
	// steepEnd is set when a phase is a constant-power or LED load, whose
	// current can turn steep just before the cut-off.
	steepEnd bool
	// gx and gw are the quadrature rule on [-1, 1]: gaussX and gaussW,
	// or a finer rule in the convergence test.
	gx, gw []float64
	// duty is the share of the day in use, HoursPerDay/24 (1 for
	// continuous use); self is the pack's self-discharge drain, mA. Both
	// are fixed for the run and read at every quadrature node.
	duty, self float64
	// pol is the cell's RC branches under this profile and day (nil for a
	// cell without them).
	pol *polarisation
	// cutoffV is the pack's under-voltage cut-off per cell (0: none);
	// pLate marks the phases long enough to trip it.
	cutoffV float64
	pLate   []bool
	// sess is the seconds of use in a day's session, +Inf in continuous
	// use; therm is the cells' thermal stage (cellheat.go), nil when
	// they stay at the ambient.
	sess   float64
	therm  *cellTherm
	thermV cellTherm
	heatV  heat      // what heat points at when the real variant has one (newHeat)
	trail  heatTrail // the heat targets the quadrature samples (cellheat.go)
	// taus are the time constants of the rested start's transients
	// (setTaus), in tauBuf.
	taus   []float64
	tauBuf [curves.MaxRC + 1]float64
	// unsettled counts the charges at which the phases' currents and the
	// branches' voltages did not settle within maxPasses.
	unsettled int
	// unsettledRun counts those of the real variant (notSettled).
	unsettledRun int
	// secs are the phases' durations, s; cur is scratch for their
	// currents (a polyfuse's overload).
	secs, cur []float64
	// stages is room for the cell's RC branches at the ambient, the
	// inputs newPolarisation is given (and its memo clones to keep).
	stages [curves.MaxRC]rc.Stage
	// heat is the real variant's junction state, for the report (nil
	// with an ideal heat sink).
	heat *heat
	// peak0 and peakCut are the real variant's highest element
	// dissipation with the fresh pack and at the cut-off, W, from the
	// solves evaluate makes there with the element as integrate sees it;
	// NaN when not known (integrate then solves again).
	peak0, peakCut float64
	// rise0 and riseCut are the cells' hottest there, K above the
	// ambient, kept the same way (NaN: not known).
	rise0, riseCut float64
	// last is the last cut-off search's outcome (cutoff.go, search).
	last found
	// quad is the quadrature's working memory (integrate); runs holds the
	// stranded split's other three variants (strandedSplit), real the
	// design's own; nd is the evaluation's node (newNode).
	quad quadrature
	nd   node
	real variant
	runs [3]variant
	// keepRates is set when the real variant's solves at the breakpoints
	// and the cut-off are kept for integrate (solved; quadrature.go).
	keepRates bool
	solved    solvedAt
	spare     solvedAt // a recycled evaluator's arrays for solved
	// atZero is set while nd holds the real variant solved at charge 0,
	// exactly as a solve there would leave it (keepRates).
	atZero bool
	// general is set to take no shortcut (evaluateWith); skipped counts
	// the cut-off searches and capacity scales the shortcuts saved, for
	// the tests, and resumed the searches that resumed at a cut-off found
	// by another run (stranded.go, worksAsBare).
	general bool
	skipped int
	resumed int
	surely  int // breakpoints the scan took as working by the bound (surely.go)
	// bufs are arrays a recycled evaluator keeps for the next evaluation.
	bufs evalBufs
	polV polarisation // what pol points at
	// sure is the margins' lower bound for the cut-off scan (surely.go),
	// sureCur its scratch; noSure switches it off.
	sure    sure
	sureCur []float64
	noSure  bool
	// nodes counts the node solves (solveNode at a charge, each pass of a
	// junction's settle one): the benchmarks report it beside the time,
	// a measure of the work that the machine's load does not move.
	nodes int
}

// Evaluate computes runtime, capacity and losses for design d.
func Evaluate(d *Design) (*Result, error) { return evaluate(d, gaussX, gaussW) }

// evaluate is Evaluate with the quadrature rule given. A finer rule than
// the default is a reference (the convergence test): it takes no
// shortcut.
func evaluate(d *Design, gx, gw []float64) (*Result, error) {
	r, e, err := evaluateWith(d, gx, gw, len(gx) > gaussN)
	if e != nil {
		evaluators.Put(e) // the Result holds nothing of it
	}
	return r, err
}

// labels keeps the loads' labels (Load.Label, a few hundred nanoseconds
// of number formatting each) by load: a sweep names the same few loads
// in every result. At most maxLabels, then it starts afresh.
var labels struct {
	sync.Map
	n atomic.Int64
}

const maxLabels = 4096

// phaseLabel is p.Label(), the load's from labels.
func phaseLabel(p Phase) string {
	if p.Name != "" {
		return p.Name
	}
	if s, ok := labels.Load(p.Load); ok {
		return s.(string)
	}
	s := p.Load.Label()
	if labels.n.Add(1) > maxLabels {
		labels.Clear()
		labels.n.Store(0)
	}
	labels.Store(p.Load, s)
	return s
}

// evaluators recycles the evaluators' memory (the source cache and the
// quadrature's node buffers are most of it), which at a few kilobytes an
// evaluation otherwise sets the garbage collector going every few
// hundred evaluations. newEvaluator sets every field of the one it takes
// afresh: nothing of one evaluation reaches the next.
var evaluators = sync.Pool{New: func() any { return new(evaluator) }}

// evaluateWith is evaluate, taking none of the shortcuts that give the
// same figures for less work when general is set (the tests' reference,
// TestShortcutsMatchGeneral). It returns the evaluator too, for the
// tests to see which shortcuts were taken.
func evaluateWith(d *Design, gx, gw []float64, general bool) (*Result, *evaluator, error) {
	if err := d.Validate(); err != nil {
		return nil, nil, err
	}
	el := d.Protect
	if el == nil {
		el = protect.None{}
	}
	// The ambient is fixed for the whole run: work out the element's
	// temperature terms once.
	el = protect.Fixed(el, d.TempC)
	e := newEvaluator(d, gx, gw)
	e.general = general

	real := &e.real
	*real = variant{el: el, lim: el.Limit(d.TempC), floor: d.Floor, cutoff: true, steady: e.steadyElement(el), minLED: d.MinLEDAmps, ordered: true}
	if o, ok := el.(protect.Overloader); ok {
		real.over, real.lim.Trip = o, math.Inf(1)
	}
	real.heat = e.newHeat(el)
	e.heat = real.heat
	nd := e.newNode()

	// Rate and cold (curves.Cell.CapacityFactor): one effective per-cell
	// current, the Peukert-weighted average (Σ wᵢ·Iᵢᵏ)^(1/k) over the day:
	// the phases' currents with the fresh pack for the hours of use, the
	// standby drain for the rest, so that a daily pattern and the same
	// rest written into the profile give the same. The fresh pack's
	// currents rise with every load's demand, so a bigger load never gets
	// a kinder rate factor (a point deeper in the run can fail, or move
	// with the load).
	if h := real.heat; h != nil && e.linear(real) {
		// Constant currents behind a drop that ignores the pack: the
		// junctions cannot move with charge (still), and their currents
		// do not move with temperature either, so the node solved at
		// ambient gives their sources and one solve holds for the run.
		h.still = true
		e.solveNode(0, real, nd)
		e.settleStill(real, nd)
	} else {
		e.solveNode(0, real, nd) // the junctions settle at every charge solved (heat.go)
	}
	ieff := e.effectiveAmps(real, nd)
	F := d.Cell.CapacityFactor(ieff, d.TempC)
	scale := e.P * F // pack mAh per scaled cell mAh
	// Behind constant currents and a steady element (linear) a node
	// solves to the same figures from any start, so the element's peak
	// with the fresh pack is kept for integrate, when the junctions hold
	// where they are now for the whole run and the fresh pack's
	// polarisation is the rested start's, as clock solves it (not when
	// the run is taken as day-periodic from the start).
	lin := e.linear(real) && !e.general
	if fresh := e.clock(real, scale, nd); lin && (real.heat == nil || real.heat.still) && !real.periodicOnly {
		e.peak0, e.rise0 = fresh.peakW, fresh.cellRise
	}

	// The cut-offs, in scaled charge. Each variant
	// asks less of the pack than the one before, so its scan resumes near
	// the previous cut-off; without an element the bare variant is the
	// real one.
	// Behind constant currents and a steady element whose junctions hold,
	// with cells that do not heat (their resistance then moves with
	// their heat), the design's own search keeps what it solves at the
	// breakpoints for the quadrature (keep). nd holds the real variant
	// solved with the fresh pack (clock), with the rested start's
	// polarisation: unless the run is taken as day-periodic from the
	// start, its search starts from that (atZero).
	held := lin && (real.heat == nil || real.heat.still)
	kept := held && e.therm == nil
	e.keepRates, e.atZero = kept, held && !real.periodicOnly
	qsCut := e.cutoff(real, nd, 0)
	e.keepRates, e.atZero = false, false

	r := &Result{EffectiveA: ieff, CapacityFactor: F}
	r.FreshV = e.S * d.Cell.OpenCircuit(0, d.TempC)
	r.QuiescentA = el.Quiescent(r.FreshV, d.TempC)

	// Cut-off cause: the first failure just past the cut.
	past := math.Min(qsCut+1e-9*e.end, e.end)
	if qsCut == 0 {
		past = 0
	}
	fail, ph := CauseEndPoint, 0
	if past < e.end {
		e.solveNode(past, real, nd)
		if f, p, _ := e.judge(nd, real); f != "" {
			fail, ph = f, p
		}
	}
	r.CutoffCause = fail
	r.CutoffPhase = phaseLabel(d.Profile[ph])
	r.CutoffIndex = ph
	e.solveNode(math.Min(qsCut, e.end), real, nd)
	if lin && qsCut < e.end {
		e.peakCut, e.riseCut = peakOf(nd), nd.cellPeakC-e.T
		if kept {
			e.keep(len(e.breaks), qsCut, nd)
		}
	}
	o := nd.worst[ph]
	r.CutoffLoadV, r.CutoffPackV, r.CutoffAmps = o.Vload, o.Vin, o.I
	switch fail {
	case CauseEndPoint: // the cycle's average, not one instant
		r.CutoffPackV = e.S * nd.cellAvg
	case CauseCutoff:
		if !math.IsNaN(nd.late[ph]) {
			r.CutoffPackV = e.S * nd.late[ph]
		}
	}
	// A hopeless design can solve to negative volts: report what a meter
	// would show, nothing below zero.
	r.CutoffLoadV = math.Max(r.CutoffLoadV, 0)
	r.CutoffPackV = math.Max(r.CutoffPackV, 0)

	e.strandedSplit(real, qsCut, scale, r, nd) // stranded.go

	// The run's own charges — the quadrature's nodes, the trace, the
	// fresh pack and the cut-off — give the junction's reported peak.
	if h := real.heat; h != nil && !h.still {
		h.rec = true
	}
	e.integrate(real, qsCut, scale, r, nd)
	if h := real.heat; h != nil && !h.still {
		e.solveNode(0, real, nd)
		if x := math.Min(qsCut, e.end*(1-1e-12)); x > 0 {
			e.solveNode(x, real, nd)
		}
		h.rec = false
	}
	if !finite(r.RuntimeH) || !finite(r.DeliveredWh) || !finite(r.ProtectionLossWh) || !finite(r.CellLossWh) {
		// The drain fell to nothing before any cut-off: a load of zero, or
		// an LED below its forward voltage, with no standby and a cell with
		// no self-discharge. Time to empty is unbounded; say so rather
		// than print an infinite runtime.
		return nil, nil, fmt.Errorf("load: the pack is never run down: the design stops drawing current before any cut-off (a zero load, or an LED below its forward voltage with the floor under it); give the load some current, a standby drain or a floor")
	}
	e.priceAndNotes(el, r, nd)
	return r, e, nil
}

// effectiveAmps is the one per-cell current the rate and cold factors
// (curves.Cell.CapacityFactor) are taken at for variant v, nd solved for
// v on the fresh pack: the Peukert-weighted average (Σ wᵢ·Iᵢᵏ)^(1/k) over
// the day, the phases' currents for the hours of use and the standby
// drain (with the element's standing drain) for the rest.
func (e *evaluator) effectiveAmps(v *variant, nd *node) float64 {
	d := e.d
	k := d.Cell.Peukert
	sum := 0.0
	for j, o := range nd.mean {
		sum += e.duty * e.w[j] * math.Pow(math.Max(o.Ipack, 0)/e.P, k)
	}
	sum += (1 - e.duty) * math.Pow((d.Standby+v.el.Quiescent(nd.Epack, d.TempC))/e.P, k)
	return math.Pow(sum, 1/k)
}

// clock sets the time a charge stands for in variant v (v.usePerQ and
// v.periodicOnly) from its drain on the fresh pack over a calendar hour
// and the share of it in use; scale is v's pack mAh per scaled mAh. Each
// variant keeps its own, so that the stranded split's runs are the runs
// a separate evaluation of each would make. It returns what it solved
// there (the rates with the fresh pack).
func (e *evaluator) clock(v *variant, scale float64, nd *node) rates {
	v.usePerQ, v.periodicOnly = 0, false
	fresh := e.rates(0, v, nd)
	if rate := fresh.calendar; rate > 0 {
		v.usePerQ = scale / rate * e.duty * 3600
		// A run that could span twenty sessions or more: the first one's
		// rested start is a small part of it and is taken as
		// day-periodic like the rest (docs/cell-model.md).
		if (e.pol != nil || e.therm != nil) && e.end*v.usePerQ >= 20*e.sess {
			v.periodicOnly = true
		}
	}
	return fresh
}

// transientBreaks returns the breakpoints with those added where a pack
// that started rested is half a, two, eight and thirty of a branch's time
// constants into its first session, so that the quadrature resolves the
// polarisation building up (e^(−t/τ)) on spans of its own, and where that
// session ends. A branch faster than 1e-3 of the run (hours of use to
// qsCut) is left out: the rule across its transient errs by about
// 0.1·τ/run of its share of the energies, under 1e-4.
func (e *evaluator) transientBreaks(v *variant, qsCut float64) []float64 {
	taus := e.taus
	if len(taus) == 0 || v.usePerQ <= 0 || v.periodicOnly {
		return e.breaks
	}
	run := qsCut * v.usePerQ
	out := append([]float64(nil), e.breaks...)
	// The end of the first session, where the day-periodic state takes
	// over from the rested start: a step in the polarisation.
	if q := e.sess / v.usePerQ; q < e.end {
		out = append(out, q)
	}
	for _, tau := range taus {
		if tau < 1e-3*run {
			continue
		}
		for _, k := range []float64{0.5, 2, 8, 30} {
			t := k * tau
			if q := t / v.usePerQ; t < e.sess && q < e.end {
				out = append(out, q)
			}
		}
	}
	sort.Float64s(out)
	return slices.Compact(out)
}

// setTaus fills e.taus: the time constants whose build-up from a rested
// start the quadrature resolves with spans of their own — the cells' RC
// branches and their thermal stage (cellheat.go). The thermal stage's
// build-up is resolved by a branch's spans when its τ is within a factor
// of two of that branch's: the spans are then at most four of its τ
// long, where the Gauss rule integrates e^(−t/τ) to far below 1e-9.
func (e *evaluator) setTaus() {
	n := 0
	if e.pol != nil {
		for _, b := range e.pol.br {
			e.tauBuf[n] = b.tau
			n++
		}
	}
	if e.therm != nil {
		near := false
		for _, x := range e.tauBuf[:n] {
			near = near || x/2 <= e.therm.st.Tau && e.therm.st.Tau <= 2*x
		}
		if !near {
			e.tauBuf[n] = e.therm.st.Tau
			n++
		}
	}
	e.taus = e.tauBuf[:n]
}

// newEvaluator works out what stays fixed for the evaluation of d.
func newEvaluator(d *Design, gx, gw []float64) *evaluator {
	if len(gx) > maxGauss {
		panic("discharge: quadrature rule above maxGauss nodes")
	}
	c := d.Cell
	e := evaluators.Get().(*evaluator)
	// The last evaluation's arrays, refilled below and by keep.
	breaks, solved, bufs := e.breaks, e.solved, e.bufs
	*e = evaluator{d: d, cell: c, S: float64(d.Series), P: float64(d.Parallel), T: d.TempC, gx: gx, gw: gw,
		peak0: math.NaN(), peakCut: math.NaN(), rise0: math.NaN(), riseCut: math.NaN(), bufs: bufs}
	e.end = c.Curve.End()
	total := 0.0
	for _, p := range d.Profile {
		total += p.Seconds
	}
	n := len(d.Profile)
	f := e.bufs.f.take(17 * n) // one backing array for the per-phase figures
	e.w, e.hint, e.cur = f[:0:n], f[n:2*n:2*n], f[3*n:4*n:4*n]
	dur := f[2*n : 2*n : 3*n]
	e.sure.dropW, e.sure.dropM, e.sureCur = f[4*n:5*n:5*n], f[5*n:6*n:6*n], f[6*n:7*n:7*n]
	e.sure.ps.init(f[7*n:])
	e.loads, e.drops = e.bufs.loads.take(n)[:0], e.bufs.drops.take(n)
	for _, p := range d.Profile {
		e.steepEnd = e.steepEnd || p.Load.Kind == ConstantPower || p.Load.Kind == LED
		e.w = append(e.w, p.Seconds/total)
		e.loads = append(e.loads, p.Load)
		dur = append(dur, p.Seconds)
	}
	e.secs = dur
	e.breaks = cellBreaks(breaks, c)
	e.spare = solved
	e.duty = 1.0
	if d.HoursPerDay > 0 {
		e.duty = d.HoursPerDay / 24
	}
	e.self = e.selfDischarge()
	e.cutoffV = c.CutoffV
	e.pLate = e.bufs.pLate.take(n)
	for k, p := range d.Profile {
		e.pLate[k] = c.CutoffV > 0 && (n == 1 || p.Seconds >= c.CutoffDelay)
	}
	e.sess = math.Inf(1)
	if d.HoursPerDay > 0 && d.HoursPerDay < 24 {
		e.sess = d.HoursPerDay * 3600
	}
	if c.SelfHeats() {
		e.thermV.set(d, e.sess, &e.bufs.thermF)
		e.therm = &e.thermV // in the evaluator: no allocation of its own
	}
	if len(c.RC) > 0 {
		_, fr := c.TempFactors(d.TempC)
		st := e.stages[:len(c.RC)] // in the evaluator: the memo's key escapes, and would move a local array to the heap
		for i, b := range c.RC {
			st[i] = rc.Stage{R: b.R * fr, Tau: b.Tau}
		}
		e.pol = newPolarisation(st, dur, e.w, d.HoursPerDay, c.CutoffDelay*btoi(c.CutoffV > 0), &e.polV, e.bufs.polF.take(2*n))
	}
	e.setTaus()
	return e
}

func btoi(b bool) float64 {
	if b {
		return 1
	}
	return 0
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// evalBufs are the per-phase arrays of an evaluation, kept by a
// recycled evaluator (evaluators) so that the next one with no more
// phases makes none: each is cleared when taken, and nothing an
// evaluation returns or shares (the Result, the memos' keys, which are
// copies) points into them.
type evalBufs struct {
	f, nodeF, heatF reuse[float64]
	polF, thermF    reuse[float64]
	loads           reuse[Load]
	drops           reuse[dropMemo]
	pLate           reuse[bool]
	ops             reuse[op]
	heatEls         reuse[protect.Element]
}

// reuse is a slice kept from one evaluation for the next.
type reuse[T any] []T

// take returns n cleared elements, in the kept array when it has room.
func (r *reuse[T]) take(n int) []T {
	if cap(*r) < n {
		*r = make([]T, n)
	}
	s := (*r)[:n]
	clear(s)
	return s
}
