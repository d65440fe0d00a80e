// The evaluation: the design's variants, the cut-offs and the totals.

package discharge

import (
	"fmt"
	"math"

	"headroom/curves"
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
	Fail  Cause   // "" while the phase works
}

// variant is the design seen with a given element and floor: the real one,
// the same without the element, and the reference (no element, no floor).
type variant struct {
	el    protect.Element
	lim   protect.Limit
	floor float64
}

type evaluator struct {
	d     *Design
	cell  *curves.Cell
	S, P  float64
	T     float64
	w     []float64 // duty weights of the phases, summing to 1
	loads []Load
	end   float64 // curve end, mAh (scaled, per cell)
	// hint holds each phase's last solved current, A: the next solve, at
	// a nearby charge, starts from it (0: none yet).
	hint []float64
	// lastE and lastRp are the pack source of the last phases call.
	lastE, lastRp float64
	breaks        []float64
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
}

// pack gives the pack's Thevenin source at scaled charge qs: E is the
// voltage at zero current and Rp the pack resistance, so that
// Vpack(I) = E − I·Rp (DESIGN §2: Vpack = S·Vcell, Rpack = S·R/P).
func (e *evaluator) pack(qs float64) (E, Rp, Rcell float64) {
	c := e.cell
	Rcell = c.ResistanceAt(qs, e.T)
	E = e.S * (c.Curve.At(qs) + c.RefCurrent*Rcell)
	Rp = e.S * Rcell / e.P
	return E, Rp, Rcell
}

// Evaluate computes runtime, capacity and losses for design d.
func Evaluate(d *Design) (*Result, error) { return evaluate(d, gaussX, gaussW) }

// evaluate is Evaluate with the quadrature rule given.
func evaluate(d *Design, gx, gw []float64) (*Result, error) {
	if err := d.Validate(); err != nil {
		return nil, err
	}
	el := d.Protect
	if el == nil {
		el = protect.None{}
	}
	// The ambient is fixed for the whole run: work out the element's
	// temperature terms once.
	el = protect.Fixed(el, d.TempC)
	e := &evaluator{d: d, cell: d.Cell, S: float64(d.Series), P: float64(d.Parallel), T: d.TempC, gx: gx, gw: gw}
	e.end = d.Cell.Curve.End()
	total := 0.0
	for _, p := range d.Profile {
		total += p.Seconds
	}
	n := len(d.Profile)
	e.w, e.loads, e.hint = make([]float64, 0, n), make([]Load, 0, n), make([]float64, n)
	for _, p := range d.Profile {
		e.steepEnd = e.steepEnd || p.Load.Kind == ConstantPower || p.Load.Kind == LED
		e.w = append(e.w, p.Seconds/total)
		e.loads = append(e.loads, p.Load)
	}
	e.breaks = breakpoints(d.Cell)
	e.duty = 1.0
	if d.HoursPerDay > 0 {
		e.duty = d.HoursPerDay / 24
	}
	e.self = e.selfDischarge()

	real := &variant{el: el, lim: el.Limit(d.TempC), floor: d.Floor}
	bare := &variant{el: protect.None{}, lim: protect.NoLimit, floor: d.Floor}
	ref := &variant{el: protect.None{}, lim: protect.NoLimit, floor: 0}
	buf := make([]op, len(e.loads))

	// Rate effect: one effective per-cell current at half depth, the
	// Peukert-weighted average of the phases (see doc.go).
	k := d.Cell.Peukert
	e.phases(0.5*e.end, real, buf)
	sum := 0.0
	for j, o := range buf {
		sum += e.w[j] * math.Pow(math.Max(o.Ipack, 0)/e.P, k)
	}
	ieff := math.Pow(sum, 1/k)
	F := d.Cell.CapacityFactor(ieff, d.TempC)
	scale := e.P * F // pack mAh per scaled cell mAh

	r := &Result{EffectiveA: ieff, CapacityFac: F}
	E0, _, _ := e.pack(0)
	r.FreshV = E0
	r.QuiescentA = el.Quiescent(E0, d.TempC)

	// Each variant asks less of the pack than the one before, so its scan
	// resumes near the previous cut-off; without an element the bare
	// variant is the real one.
	qsCut := e.cutoff(real, buf, 0)
	qsBare := qsCut
	if _, none := el.(protect.None); !none {
		qsBare = e.cutoff(bare, buf, qsCut)
	}
	qsRef := e.cutoff(ref, buf, qsBare)

	// Cut-off cause: the first failure just past the cut.
	past := math.Min(qsCut+1e-9*e.end, e.end)
	if qsCut == 0 {
		past = 0
	}
	fail, ph := e.phases(past, real, buf)
	if fail == "" { // numerical edge: call it the end of the curve
		fail, ph = CauseEndPoint, 0
	}
	r.CutoffCause = fail
	r.CutoffPhase = d.Profile[ph].Label()
	e.phases(qsCut, real, buf)
	r.CutoffLoadV, r.CutoffPackV, r.CutoffAmps = buf[ph].Vload, buf[ph].Vin, buf[ph].I
	// A hopeless design can solve to negative volts: report what a meter
	// would show, nothing below zero.
	r.CutoffLoadV = math.Max(r.CutoffLoadV, 0)
	r.CutoffPackV = math.Max(r.CutoffPackV, 0)

	// Charges, in pack mAh; see Result for the reference's definition.
	qA := qsCut * scale
	qB := math.Max(qsBare*scale, qA)
	qC := math.Max(qsRef*scale, qB)
	r.DeliveredMAh = qA
	r.StrandedByProtectionMAh = qB - qA
	r.StrandedByFloorMAh = qC - qB
	r.StrandedMAh = qC - qA
	r.ReferenceMAh = qC

	e.integrate(real, qsCut, scale, r, buf)
	if !finite(r.RuntimeH) || !finite(r.DeliveredWh) || !finite(r.ProtectionLossWh) || !finite(r.CellLossWh) {
		// The drain fell to nothing before any cut-off: a load of zero, or
		// an LED below its forward voltage, with no standby and a cell with
		// no self-discharge. Time to empty is unbounded; say so rather
		// than print an infinite runtime.
		return nil, fmt.Errorf("load: the pack is never run down: the design stops drawing current before any cut-off (a zero load, or an LED below its forward voltage with the floor under it); give the load some current, a standby drain or a floor")
	}
	e.priceAndNotes(el, r, buf)
	return r, nil
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }
