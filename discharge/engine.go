package discharge

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"gonum.org/v1/gonum/integrate/quad"

	"headroom/curves"
	"headroom/protect"
)

// gaussN is the Gauss–Legendre order used on each smooth span. The
// integrand between breakpoints is a smooth function of charge (a ratio of
// low-order polynomials and logarithms); 8 nodes integrate it to about 1e-9
// relative on typical designs and 2e-5 at worst (constant power near
// collapse), against a 48-node rule (TestQuadratureConverges).
const gaussN = 8

// gauss holds the nodes and weights on [-1, 1]; computed once, read-only.
var gaussX, gaussW = func() ([]float64, []float64) {
	x := make([]float64, gaussN)
	w := make([]float64, gaussN)
	quad.Legendre{}.FixedLocations(x, w, -1, 1)
	return x, w
}()

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
	// heat is the element's per-phase junction state (heat.go); nil
	// when the element is taken at ambient.
	heat *heat
	// over is the element when it opens on the profile as a whole (a
	// polyfuse; lim.Trip is then +Inf); nil otherwise.
	over protect.Overloader
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
	// secs are the phases' durations and cur the currents of the last
	// phases call; overMargin is 1 − a polyfuse's overload there (+Inf
	// without one).
	secs, cur  []float64
	overMargin float64
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

// solve finds the operating point of load l with the pack source (E, Rp)
// behind element v.
func (e *evaluator) solve(l Load, k int, v *variant, E, Rp float64) op {
	el, T := e.phaseElement(v, k)
	iq := el.Quiescent(E, T)
	vin := func(i float64) float64 { return E - (i+iq)*Rp }
	vload := func(i float64) float64 {
		x := vin(i)
		return x - el.Drop(i, x, T)
	}
	var i float64
	switch l.Kind {
	case ConstantCurrent:
		i = l.Amps
	case ConstantResistance:
		g := func(i float64) float64 { return i*l.Ohms - vload(i) }
		if vload(0) <= 0 {
			i = 0
		} else {
			i = e.warmRoot(g, k, E/l.Ohms)
		}
	case LED:
		g := func(i float64) float64 { return i*l.Ohms + l.Vf - vload(i) }
		if vload(0) <= l.Vf {
			i = 0
		} else {
			i = e.warmRoot(g, k, (E-l.Vf)/l.Ohms)
		}
	case ConstantPower:
		pin := l.InputPower()
		if pin > 0 {
			var ok bool
			// Behind an element whose drop jumps (a MOSFET handing over
			// to its body diode) i·vload(i) is not concave and meets pin
			// twice; a warm start from the upper branch would find the
			// upper root. Only the element-free source is always concave.
			hint := e.hint[k]
			_, none := el.(protect.None)
			if !none {
				hint = 0
			}
			i, ok = powerPoint(vload, pin, E, hint)
			if !ok && !none {
				i, ok = scanPower(vload, pin, i)
			}
			if ok {
				e.hint[k] = i
			} else {
				return op{I: i, Ipack: i + iq, Vin: vin(i), Vload: 0, Fail: CauseCollapse}
			}
		}
	}
	o := op{I: i, Ipack: i + iq}
	o.Vin = vin(i)
	o.Vdrop = el.Drop(i, o.Vin, T)
	o.Vload = o.Vin - o.Vdrop
	// A resistive or LED load sets its own voltage, i·R (+ Vf). Where the
	// element's drop jumps (a FET out of gate drive hands over to its
	// body diode) the root sits on the jump and vin − Drop(i) reads the
	// far side of it; the element takes up the difference, as a
	// saturated FET does.
	if i > 0 && (l.Kind == ConstantResistance || l.Kind == LED) {
		o.Vload = i * l.Ohms
		if l.Kind == LED {
			o.Vload += l.Vf
		}
		o.Vdrop = math.Max(o.Vin-o.Vload, 0) // not −1e-17 from rounding
	}
	switch {
	case i > v.lim.Trip:
		o.Fail = CauseFuse
	case i > v.lim.Clamp:
		o.Fail = CauseLimit
	case o.Vload <= 0 && i > 0:
		// The pack cannot push this current at all: no voltage is left
		// for the load.
		o.Fail = CauseCollapse
	case o.Vload < v.floor:
		o.Fail = CauseFloor
	}
	// A limiter whose clamp depends on the pack (protect.Clamper) has no
	// operating point above it: its drop takes the whole input. That is
	// its current limit, not a collapse of the source.
	if o.Fail == CauseCollapse || o.Fail == CauseFloor {
		if _, ok := el.(protect.Clamper); ok && i > 0 && el.Drop(i, o.Vin, T) >= o.Vin {
			o.Fail = CauseLimit
		}
	}
	return o
}

// warmRoot finds the root of an increasing g on [0, hi] for phase k,
// first within 1 % of the phase's last current: successive solves come at
// nearby charges, so that narrow bracket usually holds the root and saves
// half the iterations. Otherwise it searches the whole range.
func (e *evaluator) warmRoot(g func(float64) float64, k int, hi float64) float64 {
	if h := e.hint[k]; h > 0 {
		a, b := 0.9*h, min(1.1*h, hi)
		if a < b {
			if fa, fb := g(a), g(b); fa <= 0 && fb >= 0 {
				i := bracketRootF(g, a, b, fa, fb)
				e.hint[k] = i
				return i
			}
		}
	}
	i := bracketRoot(g, 0, hi)
	e.hint[k] = i
	return i
}

// bracketRoot finds the root of an increasing g on [lo, hi] with g(lo) ≤ 0
// ≤ g(hi) by the Illinois variant of regula falsi, to about 1e-13 relative.
func bracketRoot(g func(float64) float64, lo, hi float64) float64 {
	return bracketRootF(g, lo, hi, g(lo), g(hi))
}

// bracketRootF is bracketRoot with g(lo) and g(hi) already known.
func bracketRootF(g func(float64) float64, lo, hi, flo, fhi float64) float64 {
	if flo >= 0 {
		return lo
	}
	if fhi <= 0 {
		return hi
	}
	side := 0
	for k := 0; k < 100; k++ {
		x := (lo*fhi - hi*flo) / (fhi - flo)
		if !(x > lo && x < hi) {
			x = 0.5 * (lo + hi)
		}
		fx := g(x)
		if math.Abs(fx) <= 1e-14 || hi-lo <= 1e-13*math.Max(hi, 1e-12) {
			return x
		}
		if fx < 0 {
			lo, flo = x, fx
			if side == -1 {
				fhi /= 2
			}
			side = -1
		} else {
			hi, fhi = x, fx
			if side == 1 {
				flo /= 2
			}
			side = 1
		}
	}
	return 0.5 * (lo + hi)
}

// powerPoint finds the lower (stable) current at which i·vload(i) = pin by
// Newton's method from zero current. i·vload(i) is concave for every element
// headroom models, so the iterates rise monotonically to the root without
// overshooting; if the slope turns non-positive first there is no operating
// point: the load collapses (DESIGN §4: Voc²/(4·R) < Pin for a resistive
// source).
//
// A warm start i0 > 0 (the phase's last current) is tried first, from just
// below it. Where the slope there is positive, the first Newton step lands
// at or below the lower root (a concave function lies under its tangent),
// and the iterates rise from there as from zero; any failure on the warm
// path falls back to the start from zero, so a collapse is only ever
// declared from there.
func powerPoint(vload func(float64) float64, pin, E, i0 float64) (float64, bool) {
	if i0 > 0 {
		if i, ok := newtonPower(vload, pin, E, 0.99*i0); ok {
			return i, true
		}
	}
	return newtonPower(vload, pin, E, 0)
}

// scanPower looks again for the lowest current at which i·vload(i) = pin
// after Newton gave up at current at: behind an element whose drop jumps
// the product is not concave, and Newton can stop at a false peak or at
// the jump. It scans from zero to where the load voltage runs out and
// brackets the first crossing; false when there is none (a collapse).
func scanPower(vload func(float64) float64, pin, at float64) (float64, bool) {
	hi := math.Max(at, 1e-9)
	for k := 0; k < 60 && vload(hi) > 0; k++ {
		hi *= 2
	}
	const n = 128
	P := func(x float64) float64 { return x*vload(x) - pin }
	lo, flo := 0.0, -pin
	for j := 1; j <= n; j++ {
		x := hi * float64(j) / n
		fx := P(x)
		if fx >= 0 {
			return bracketRootF(P, lo, x, flo, fx), true
		}
		lo, flo = x, fx
	}
	return at, false
}

// newtonPower is powerPoint's Newton iteration from current i.
func newtonPower(vload func(float64) float64, pin, E, i float64) (float64, bool) {
	for k := 0; k < 200; k++ {
		v := vload(i)
		f := i*v - pin
		if v <= 0 {
			return i, false
		}
		h := 1e-7 * math.Max(i, pin/E)
		v2 := vload(i + h)
		df := ((i+h)*v2 - i*v) / h
		if df <= 0 {
			return i, false
		}
		step := -f / df
		if i+step < 0 { // a warm start above the root stepped past zero
			step = -i
		}
		i += step
		if math.Abs(step) <= 1e-13*i {
			return i, i*vload(i) >= pin*(1-1e-9)
		}
	}
	v := vload(i)
	return i, math.Abs(i*v-pin) <= 1e-9*pin
}

// phases solves every phase at qs; it returns the first failure.
func (e *evaluator) phases(qs float64, v *variant, out []op) (fail Cause, phase int) {
	fail, phase = "", -1
	if qs >= e.end {
		return CauseEndPoint, 0
	}
	E, Rp, _ := e.pack(qs)
	e.lastE, e.lastRp = E, Rp
	for k, l := range e.loads {
		o := e.solve(l, k, v, E, Rp)
		o.CellV = (E - o.Ipack*Rp) / e.S
		if o.Fail == "" && o.CellV < e.cell.EndPoint {
			o.Fail = CauseEndPoint
		}
		if out != nil {
			out[k] = o
		}
		e.cur[k] = o.I
		if o.Fail != "" && (fail == "" || rank(o.Fail) < rank(fail)) {
			fail, phase = o.Fail, k
		}
	}
	e.overMargin = math.Inf(1)
	if v.over != nil {
		load, k := v.over.Overload(e.cur, e.secs, e.T)
		e.overMargin = 1 - load
		if load >= 1 && (fail == "" || rank(CauseFuse) < rank(fail)) {
			fail, phase = CauseFuse, k
		}
	}
	return fail, phase
}

// rank orders causes when several phases fail at once: the most telling first.
func rank(c Cause) int {
	switch c {
	case CauseFuse:
		return 0
	case CauseLimit:
		return 1
	case CauseCollapse:
		return 2
	case CauseFloor:
		return 3
	}
	return 4
}

// margin solves every phase at qs and returns whether any fails and the
// smallest of their margins: load voltage above the floor, cell voltage
// above the end-point, current below the clamp and the trip, charge left
// on the curve. The margin is continuous in qs and crosses zero where the
// first phase fails, except where a constant-power load collapses (no
// operating point, no margin): there it is NaN.
func (e *evaluator) margin(qs float64, v *variant, buf []op) (bool, float64) {
	fail, _ := e.phases(qs, v, buf)
	if qs >= e.end {
		return true, e.end - qs
	}
	m := math.Inf(1)
	for _, o := range buf {
		if o.Fail == CauseCollapse {
			return true, math.NaN()
		}
		m = min(m, o.Vload-v.floor, o.CellV-e.cell.EndPoint, v.lim.Clamp-o.I, v.lim.Trip-o.I)
	}
	m = min(m, e.overMargin)                        // a polyfuse's heating short of a trip
	if fail != "" && m > 0 || fail == "" && m < 0 { // a rule the margin does not see
		m = math.NaN()
	}
	return fail != "", m
}

// cutoff returns the scaled charge at which variant v first fails. It
// scans the breakpoints, from the last one at or below from where v
// still works (0: from the start), then narrows the first span that
// fails. Failure is taken to be permanent once it starts, as the scan
// always has.
func (e *evaluator) cutoff(v *variant, buf []op, from float64) float64 {
	first := 1
	lo, mlo := 0.0, 0.0
	if from > 0 {
		j := sort.SearchFloat64s(e.breaks, from)
		if j == len(e.breaks) || e.breaks[j] > from {
			j--
		}
		if j > 0 {
			if f, m := e.margin(e.breaks[j], v, buf); !f {
				first, lo, mlo = j+1, e.breaks[j], m
			}
		}
	}
	if first == 1 {
		f, m := e.margin(0, v, buf)
		if f {
			return 0
		}
		mlo = m
	}
	for _, b := range e.breaks[first:] {
		f, m := e.margin(b, v, buf)
		if !f {
			lo, mlo = b, m
			continue
		}
		return e.narrow(v, buf, lo, mlo, b, m)
	}
	return lo
}

// narrow finds the first failure in [lo, hi], where v works at lo with
// margin mlo and fails at hi with margin mhi, to 1e-12 of the curve. It
// takes Illinois (modified regula falsi) steps on the margin while both
// ends have one, and bisects otherwise; the result is the last charge
// found to work. About ten evaluations instead of bisection's forty.
func (e *evaluator) narrow(v *variant, buf []op, lo, mlo, hi, mhi float64) float64 {
	tol := 1e-12 * e.end
	side := 0
	for k := 0; k < 200 && hi-lo > tol; k++ {
		x := 0.5 * (lo + hi)
		if mlo > 0 && mhi < 0 {
			x = lo + (hi-lo)*mlo/(mlo-mhi)
			// Keep a little inside the bracket, so that it shrinks from
			// both ends once the estimate is good.
			x = min(max(x, lo+0.25*tol), hi-0.25*tol)
		}
		if !(x > lo && x < hi) {
			x = 0.5 * (lo + hi)
		}
		f, m := e.margin(x, v, buf)
		if f {
			hi, mhi = x, m
			if side == 1 {
				mlo /= 2
			}
			side = 1
		} else {
			lo, mlo = x, m
			if side == -1 {
				mhi /= 2
			}
			side = -1
		}
	}
	return lo
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
	e.secs, e.cur = make([]float64, 0, n), make([]float64, n)
	for _, p := range d.Profile {
		e.secs = append(e.secs, p.Seconds)
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
	if o, ok := el.(protect.Overloader); ok {
		real.over, real.lim.Trip = o, math.Inf(1)
	}
	real.heat = e.newHeat(el)
	bare := &variant{el: protect.None{}, lim: protect.NoLimit, floor: d.Floor}
	ref := &variant{el: protect.None{}, lim: protect.NoLimit, floor: 0}
	buf := make([]op, len(e.loads))

	// Rate effect: one effective per-cell current at half depth, the
	// Peukert-weighted average of the phases (see doc.go).
	k := d.Cell.Peukert
	if real.heat != nil {
		e.settle(real, 0.5*e.end)
	}
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
	qsCut := e.heatCutoff(real, buf)
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
	if real.heat != nil {
		e.reportHeat(real)
	}
	e.priceAndNotes(el, real, r, buf)
	return r, nil
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// breakpoints are the scaled charges where the curve or the resistance
// table has a corner, sorted, from 0 to the curve's end.
func breakpoints(c *curves.Cell) []float64 {
	end := c.Curve.End()
	b := []float64{0, end}
	b = append(b, c.Curve.Charges()...)
	for _, r := range c.Resistance {
		b = append(b, r.Depth*end)
	}
	sort.Float64s(b)
	out := b[:0]
	for _, x := range b {
		if x < 0 || x > end || len(out) > 0 && x-out[len(out)-1] <= 1e-12*end {
			continue
		}
		out = append(out, x)
	}
	return out
}

// rates gathers the per-node quantities the quadrature sums.
type rates struct {
	calendar float64 // pack drain over a calendar hour, mA
	loadW    float64 // power into the load, W (averaged over the day)
	protW    float64 // power in the element, W
	cellW    float64 // power in the cells' resistance, W
	standby  float64 // standby drain, mA
	self     float64 // self-discharge, mA
	peakW    float64 // highest element dissipation among the phases, W
}

func (e *evaluator) rates(qs float64, v *variant, buf []op) rates {
	d := e.d
	e.phases(qs, v, buf)
	E, Rp := e.lastE, e.lastRp
	if qs >= e.end { // phases stopped before solving the pack
		E, Rp, _ = e.pack(qs)
	}
	f := e.duty
	var r rates
	var use, loadW, protW, cellW float64
	for j, o := range buf {
		w := e.w[j]
		use += w * o.Ipack
		loadW += w * o.Vload * o.I
		pw := o.Vdrop*o.I + o.Vin*(o.Ipack-o.I)
		protW += w * pw
		cellW += w * o.Ipack * o.Ipack * Rp
		if pw > r.peakW {
			r.peakW = pw
		}
	}
	iq := v.el.Quiescent(E, e.T)
	idle := d.Standby + iq
	r.standby = (1 - f) * idle * 1000
	r.self = e.self
	r.calendar = f*use*1000 + r.standby + r.self
	r.loadW = f * loadW
	r.protW = f*protW + (1-f)*E*iq
	r.cellW = f*cellW + (1-f)*idle*idle*Rp
	return r
}

// selfDischarge is the pack's self-discharge as a steady drain in mA: the
// cell's fraction per month of the rated capacity, doubling for every 10 °C
// above the reference (common practice rule of thumb for the Arrhenius
// rise of side reactions).
func (e *evaluator) selfDischarge() float64 {
	c := e.cell
	return c.SelfDischarge * c.RatedMAh * e.P / hoursPerMonth * math.Pow(2, (e.T-curves.RefTempC)/10)
}

// integrate fills the time, energy and drain totals from 0 to qsCut and
// the trace.
func (e *evaluator) integrate(v *variant, qsCut, scale float64, r *Result, buf []op) {
	d := e.d
	f := e.duty
	var tot sums
	nodes := make([]rates, len(e.gx))
	splits := 0
	// rule applies the Gauss rule on [a, b] to the sampled nodes.
	rule := func(a, b float64) sums {
		half, mid := 0.5*(b-a), 0.5*(a+b)
		var s sums
		for j, x := range e.gx {
			nodes[j] = e.rates(mid+half*x, v, buf)
		}
		for j := range e.gx {
			rt := &nodes[j]
			dt := e.gw[j] * half * scale / rt.calendar // hours per node
			s.h += dt
			s.loadWh += rt.loadW * dt
			s.protWh += rt.protW * dt
			s.cellWh += rt.cellW * dt
			s.stby += rt.standby * dt
			s.self += rt.self * dt
			s.peak = math.Max(s.peak, rt.peakW)
		}
		return s
	}
	var span func(a, b float64, depth int, last bool) sums
	span = func(a, b float64, depth int, last bool) sums { // calendar hours and energies on [a, b]
		if b <= a {
			return sums{}
		}
		whole := rule(a, b)
		if depth >= maxSplit || splits >= maxSplits {
			return whole
		}
		mid := 0.5 * (a + b)
		// Between breakpoints the integrand is smooth unless an operating
		// point jumps: a MOSFET running out of gate drive hands the current
		// to its body diode, a limiter's pass FET saturates. A fixed rule
		// across such a jump errs by up to the jump times the node spacing,
		// so a span whose samples look like a step (one gap between
		// neighbouring nodes holding most of the span's change) is halved
		// until the step is pinned down.
		if stepLike(nodes) {
			splits++
			return span(a, mid, depth+1, false).add(span(mid, b, depth+1, last))
		}
		// The last span ends at the cut-off, which can sit just short of a
		// constant-power load's collapse, where the current rises like a
		// square root (or where an LED's current fades to nothing): there
		// the rule is checked against its two halves and halved until they
		// agree. Constant-current and resistive loads have no such point.
		if last && e.steepEnd && e.steepTail(nodes) {
			l, r := rule(a, mid), rule(mid, b)
			if math.Abs(l.h+r.h-whole.h) > 1e-10*whole.h {
				splits++
				return span(a, mid, depth+1, false).add(span(mid, b, depth+1, true))
			}
			return l.add(r)
		}
		return whole
	}
	prev := 0.0
	for _, b := range e.breaks[1:] {
		if b >= qsCut {
			tot = tot.add(span(prev, qsCut, 0, true))
			break
		}
		tot = tot.add(span(prev, b, 0, false))
		prev = b
	}
	cal, loadWh, protWh, cellWh, stby, self, peak := tot.h, tot.loadWh, tot.protWh, tot.cellWh, tot.stby, tot.self, tot.peak
	// The element's peak dissipation can sit at either end of the run.
	for _, q := range []float64{0, qsCut} {
		if q < e.end {
			peak = math.Max(peak, e.rates(q, v, buf).peakW)
		}
	}
	r.RuntimeDays = cal / 24
	r.RuntimeH = cal * f
	r.DeliveredWh = loadWh
	r.ProtectionLossWh = protWh
	r.CellLossWh = cellWh
	r.StandbyMAh = stby
	r.SelfDischargeMAh = self
	if r.DeliveredMAh > 0 {
		r.StandbyShare = math.Min(1, (stby+self)/r.DeliveredMAh)
	}
	r.ProtectionPeakW = peak

	if d.TracePoints > 1 && qsCut > 0 {
		e.trace(v, qsCut, scale, f, r, buf)
	}
}

// steepTail reports whether the integrand's slope at the span's end is
// over twice its slope in the middle: the mark of a singular point just
// past the end. gx need not be ordered; the nodes nearest the end (x → 1)
// and nearest the middle (x → 0) are compared.
func (e *evaluator) steepTail(nodes []rates) bool {
	end, next, m0, m1 := -1, -1, -1, -1
	for j, x := range e.gx {
		switch {
		case end < 0 || x > e.gx[end]:
			next, end = end, j
		case next < 0 || x > e.gx[next]:
			next = j
		}
	}
	for j, x := range e.gx {
		if m0 < 0 || math.Abs(x) < math.Abs(e.gx[m0]) {
			m1, m0 = m0, j
		} else if m1 < 0 || math.Abs(x) < math.Abs(e.gx[m1]) {
			m1 = j
		}
	}
	if end < 0 || next < 0 || m0 < 0 || m1 < 0 || e.gx[m0] == e.gx[m1] {
		return true
	}
	g := func(j int) float64 { return 1 / nodes[j].calendar }
	slopeEnd := math.Abs(g(end)-g(next)) / (e.gx[end] - e.gx[next])
	slopeMid := math.Abs(g(m0)-g(m1)) / math.Abs(e.gx[m0]-e.gx[m1])
	return slopeEnd > 2*slopeMid
}

// sums are the quadrature's totals over a span: calendar hours, energies
// into the load, the element and the cells, standby and self-discharge
// charge, and the highest element dissipation seen.
type sums struct {
	h, loadWh, protWh, cellWh, stby, self, peak float64
}

func (s sums) add(t sums) sums {
	return sums{s.h + t.h, s.loadWh + t.loadWh, s.protWh + t.protWh, s.cellWh + t.cellWh,
		s.stby + t.stby, s.self + t.self, math.Max(s.peak, t.peak)}
}

// maxSplit bounds how often a span with a step in it is halved: 2⁻¹⁶ of a
// span pins a step to well under 1e-4 of the runtime.
const maxSplit = 16

// maxSplits bounds the halvings in one evaluation, whatever the integrand
// does: a few steps pinned to 2⁻¹⁶ each.
const maxSplits = 96

// stepLike reports whether the samples at the nodes (in order of charge)
// change mostly across one gap — the mark of a jump, not of a smooth curve,
// whose change spreads over several gaps — in the integrand 1/calendar or
// in the power into the element or the load (a jump in one phase can hide
// in the sum of the currents but not in the element's heat).
func stepLike(nodes []rates) bool {
	// The powers are judged against the total power, so rounding noise in
	// a near-zero element loss (no element) never looks like a step.
	power := 0.0
	for j := range nodes {
		power = math.Max(power, math.Abs(nodes[j].loadW)+math.Abs(nodes[j].protW))
	}
	return steppy(nodes, 0, func(r *rates) float64 { return 1 / r.calendar }) ||
		steppy(nodes, power, func(r *rates) float64 { return r.protW }) ||
		steppy(nodes, power, func(r *rates) float64 { return r.loadW })
}

// steppy is stepLike for one quantity; changes below 1e-9 of scale (or of
// the quantity itself when scale is 0) count as no change.
func steppy(nodes []rates, scale float64, g func(*rates) float64) bool {
	lo, hi := math.Inf(1), math.Inf(-1)
	maxGap, prev := 0.0, 0.0
	for j := range nodes {
		x := g(&nodes[j])
		lo, hi = math.Min(lo, x), math.Max(hi, x)
		if j > 0 {
			maxGap = math.Max(maxGap, math.Abs(x-prev))
		}
		prev = x
	}
	if scale == 0 {
		scale = math.Max(math.Abs(hi), math.Abs(lo))
	}
	spread := hi - lo
	return spread > 1e-9*scale && maxGap > 0.6*spread
}

// trace samples the voltages at evenly spaced charges, integrating the
// time between samples with the same rule.
func (e *evaluator) trace(v *variant, qsCut, scale, f float64, r *Result, buf []op) {
	n := e.d.TracePoints
	r.Trace = make([]TracePoint, n)
	hours := 0.0
	var prev float64
	for k := 0; k < n; k++ {
		q := qsCut * float64(k) / float64(n-1)
		if k == n-1 {
			q = qsCut * (1 - 1e-12)
		}
		if k > 0 {
			half, mid := 0.5*(q-prev), 0.5*(q+prev)
			for j, x := range e.gx {
				rt := e.rates(mid+half*x, v, buf)
				hours += e.gw[j] * half * scale / rt.calendar
			}
		}
		prev = q
		e.phases(q, v, buf)
		tp := TracePoint{Hours: hours * f, MAh: q * scale, LoadV: math.Inf(1), IdleV: math.Inf(-1)}
		for _, o := range buf {
			if o.Vload < tp.LoadV {
				tp.LoadV, tp.PackV = o.Vload, o.Vin
			}
			tp.IdleV = math.Max(tp.IdleV, o.Vload)
		}
		r.Trace[k] = tp
	}
	if n > 1 {
		// The trace and the runtime integrate over different spans; where
		// the integrand has a corner between breakpoints (an LED going
		// dark) they differ by a few per cent. Scale the trace onto the
		// runtime so that it ends there and still moves forward in time.
		if last := r.Trace[n-1].Hours; last > 0 {
			k := r.RuntimeH / last
			for j := range r.Trace {
				r.Trace[j].Hours *= k
			}
		}
		r.Trace[n-1].Hours = r.RuntimeH
	}
}

// priceAndNotes fills cost, heat, warnings and cautions.
func (e *evaluator) priceAndNotes(el protect.Element, real *variant, r *Result, buf []op) {
	d := e.d
	c := d.Cell
	r.PackPrice = d.PackPrice
	if r.PackPrice == 0 {
		r.PackPrice = c.Price * e.S * e.P
	}
	if r.RuntimeH > 0 {
		if c.Rechargeable {
			elec := d.ElectricityPrice
			if elec == 0 {
				elec = DefaultElectricityPrice
			}
			// Charging energy per cycle: the charge put back at the pack's
			// nominal voltage, divided by the charge efficiency.
			nominal := c.NominalV
			if nominal == 0 {
				nominal = c.Curve.At(0.5 * e.end)
			}
			chargeKWh := r.DeliveredMAh / 1000 * nominal * e.S / c.ChargeEfficiency / 1000
			r.CostPerHour = (r.PackPrice/float64(c.CycleLife) + chargeKWh*elec) / r.RuntimeH
		} else {
			r.CostPerHour = r.PackPrice / r.RuntimeH
		}
	}
	// The junction at the peak of the hottest pulse and over the cycle,
	// from the element's thermal network (heat.go); ambient with an ideal
	// heat sink.
	r.JunctionC, r.JunctionMeanC = d.TempC, d.TempC
	if s := real.heat; s != nil {
		r.JunctionC, r.JunctionMeanC = s.peakC, s.meanC
	}

	// The highest current of each phase over the run, for the element's
	// warnings (at the fresh pack and at cut-off; currents are monotone in
	// charge for every load law).
	cur := make([]float64, len(e.loads))
	for _, q := range []float64{0, math.Max(0, r.DeliveredMAh/(e.P*r.CapacityFac)*(1-1e-9))} {
		if q >= e.end {
			continue
		}
		v := &variant{el: el, lim: protect.NoLimit, floor: 0, heat: real.heat}
		e.phases(q, v, buf)
		for j, o := range buf {
			cur[j] = math.Max(cur[j], o.I)
		}
	}
	r.Warnings = append(r.Warnings, el.Warnings(protect.Operating{VFresh: r.FreshV, Currents: cur, PeakW: r.ProtectionPeakW,
		TempC: d.TempC, PeakC: r.JunctionC, Seconds: e.secs})...)
	if w := heatWarning(real.heat); w != "" {
		r.Warnings = append(r.Warnings, w)
	}
	for j, p := range d.Profile {
		if p.Load.Kind == LED && cur[j] == 0 {
			r.Warnings = append(r.Warnings, fmt.Sprintf("the LED of %s never lights: the voltage it gets stays below its %.2f V forward voltage (set the floor above it to count that as a stop)", p.Label(), p.Load.Vf))
		}
	}
	if r.StandbyShare > 0.2 {
		r.Warnings = append(r.Warnings, fmt.Sprintf("standby drain and self-discharge take %.0f %% of the charge: the pack goes flat on the shelf", r.StandbyShare*100))
	}
	if r.RuntimeH == 0 {
		r.Warnings = append(r.Warnings, "the product "+d.CutoffText(r))
	}
	r.Cautions = append(r.Cautions, Cautions(c, d.Series*d.Parallel)...)
}

// Cautions are the usual cautions for a pack of n cells of cell c: the
// chemistry's own (curves.Cautions), without the mixing warning for a
// single cell, and the toy-safety reminder.
func Cautions(c *curves.Cell, n int) []string {
	var out []string
	for _, s := range curves.Cautions(c) {
		if n == 1 && strings.HasPrefix(s, "Never mix") {
			continue
		}
		out = append(out, s)
	}
	return append(out, "Electric toys fall under toy-safety standards (IEC 62115 and local equivalents); defer to them and to licensed practice.")
}
