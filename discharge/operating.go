// Operating points: each phase's current and voltages at one charge.

package discharge

import (
	"math"
	"slices"

	"headroom/protect"
)

// solve finds the operating point of load l with the pack source (E, Rp)
// behind element v.
func (e *evaluator) solve(l Load, k int, v *variant, E, Rp float64) op {
	var o op
	e.solveTo(&o, l, k, v, E, Rp)
	return o
}

// solveTo is solve into o (no copy of an op on the nodes' hot path).
func (e *evaluator) solveTo(o *op, l Load, k int, v *variant, E, Rp float64) {
	el, T := e.phaseElement(v, k)
	iq := el.Quiescent(E, T)
	// lastI and lastD are the current and the drop of the load's solve's
	// last solve of the element's law (loadCurrent): the root finders end
	// on one at the current they return, whose drop the operating point
	// takes again (the same arguments, so the same value without a second
	// solve of the law). A constant current solves nothing.
	i, lastI, lastD := l.Amps, math.NaN(), 0.0
	if l.Kind != ConstantCurrent {
		var collapsed bool
		if i, lastI, lastD, collapsed = e.loadCurrent(l, k, v, el, T, E, Rp, iq); collapsed {
			*o = op{I: i, Ipack: i + iq, Vin: E - (i+iq)*Rp, Vload: 0, Fail: failCollapse}
			return
		}
	}
	*o = op{I: i, Ipack: i + iq}
	o.Vin = E - (i+iq)*Rp
	if i == lastI && reuseDrop {
		o.Vdrop = lastD // el.Drop(i, o.Vin, T), o.Vin being vin(i)
	} else {
		o.Vdrop = e.drop(v, k, el, i, o.Vin, T)
	}
	o.Vload = o.Vin - o.Vdrop
	d0 := o.Vdrop // the element's own drop at i (a Clamper is no junction: e.drop is el.Drop)
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
		o.Fail = failFuse
	case i > v.lim.Clamp:
		o.Fail = failLimit
	case o.Vload <= 0 && i > 0:
		// The pack cannot push this current at all: no voltage is left
		// for the load.
		o.Fail = failCollapse
	case o.Vload < v.floor:
		o.Fail = failFloor
	case dim(l, i, v): // limits.go
		o.Fail = failDim
	}
	// A limiter whose clamp depends on the pack (protect.Clamper) has no
	// operating point above it: its drop takes the whole input. That is
	// its current limit, not a collapse of the source.
	if o.Fail == failCollapse || o.Fail == failFloor {
		if _, ok := el.(protect.Clamper); ok && i > 0 && d0 >= o.Vin {
			o.Fail = failLimit
		}
	}
}

// loadCurrent is solveTo's current for phase k's load l other than a
// constant current, behind el at T on the source (E, Rp) with iq drawn
// standing; lastI and lastD are the current and the drop of the law's
// last solve, and collapsed is set where a constant-power load finds no
// operating point (i is then where the search stopped).
func (e *evaluator) loadCurrent(l Load, k int, v *variant, el protect.Element, T, E, Rp, iq float64) (i, lastI, lastD float64, collapsed bool) {
	vin := func(i float64) float64 { return E - (i+iq)*Rp }
	lastI, lastD = math.NaN(), 0.0
	// A junction's law at T worked out once for the solve (its drop
	// depends on the current alone): the same drops to the bit, one
	// Log1p a call where the element is not fixed at T.
	fw, isFw := forwardOf(el, T)
	// An element whose drop's partial derivatives are known
	// (protect.Sloped) gives them with each drop of a constant-power
	// solve (lastDi, lastDv), for Newton's slope: the same drops to the
	// bit.
	var sl protect.Sloped
	isSl := false
	if l.Kind == ConstantPower && !isFw && !e.general {
		sl, isSl = el.(protect.Sloped)
	}
	lastDi, lastDv := 0.0, 0.0
	vload := func(i float64) float64 {
		x := vin(i)
		switch {
		case isFw:
			lastI, lastD = i, fw.Drop(i)
		case isSl:
			var d float64
			d, lastDi, lastDv = sl.DropSlopes(i, x, T)
			lastI, lastD = i, d
		default:
			lastI, lastD = i, el.Drop(i, x, T)
		}
		return x - lastD
	}
	switch l.Kind {
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
			// upper root. Behind a steady element (none, a diode, a
			// resistance) it is always concave.
			hint := e.hint[k]
			_, none := v.el.(protect.None)
			if !v.steady {
				hint = 0
			}
			// d vload/di where the law gives it; the general path (the
			// tests' reference) keeps the finite difference.
			var slope func(float64) float64
			switch {
			case e.general:
			case isFw:
				slope = func(i float64) float64 { return -Rp - fw.Slope(i) }
			case isSl:
				// Along vin = E − (i + iq)·Rp: d/di of vin − Drop(i, vin).
				slope = func(i float64) float64 {
					if i != lastI {
						vload(i)
					}
					return -Rp - lastDi + Rp*lastDv
				}
			}
			i, ok = powerPoint(vload, slope, pin, E, hint)
			if !ok && !none && !(junction(v.el) && scanMisses(vload, pin, i)) {
				i, ok = scanPower(vload, pin, i, protect.LoadVoltageFalls(el) && !e.general, E)
			}
			if !ok {
				return i, lastI, lastD, true
			}
			e.hint[k] = i
		}
	}
	return i, lastI, lastD, false
}

// forwardOf is a junction element's forward law at t (protect.Forward):
// its Drop(i) is el.Drop(i, vin, t) for any vin. False for other elements.
func forwardOf(el protect.Element, t float64) (protect.Forward, bool) {
	switch x := el.(type) {
	case protect.Diode:
		return x.ForwardAt(t), true
	case protect.Schottky:
		return x.ForwardAt(t), true
	}
	return protect.Forward{}, false
}

// reuseDrop lets solveTo take the drop of vload's last call at the
// current it returns (a test switches it off to compare).
var reuseDrop = true

// dropMemo is the last drop worked out for one phase: variant v's element
// at current i and junction temperature t gave drop.
type dropMemo struct {
	v       *variant
	i, t    float64
	drop    float64
	present bool
}

// drop is el.Drop(i, vin, t) for phase k of variant v, el being that
// phase's element (phaseElement). A diode's drop is a function of the
// current and the temperature alone (protect.Shockley.Drop), and within
// one variant the phase's element at a temperature is always the same
// junction (fixed there or not: the same arithmetic), so when v, i and t
// are those of the phase's last call the drop is that call's, to the last
// bit. Behind a constant current with the temperatures held that is every
// call after the first: a Log1p saved per phase per charge.
func (e *evaluator) drop(v *variant, k int, el protect.Element, i, vin, t float64) float64 {
	switch el.(type) {
	case protect.Diode, protect.Schottky:
	default:
		return el.Drop(i, vin, t)
	}
	m := &e.drops[k]
	if m.present && m.v == v && m.i == i && m.t == t {
		return m.drop
	}
	d := el.Drop(i, vin, t)
	*m = dropMemo{v: v, i: i, t: t, drop: d, present: true}
	return d
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

// powerPoint finds the lower (stable) current at which i·vload(i) = pin by
// Newton's method from zero current. i·vload(i) is concave for every element
// headroom models, so the iterates rise monotonically to the root without
// overshooting; if the slope turns non-positive first there is no operating
// point: the load collapses (docs/loads.md: Voc²/(4·R) < Pin for a resistive
// source).
//
// A warm start i0 > 0 (the phase's last current) is tried first, from just
// below it. Where the slope there is positive, the first Newton step lands
// at or below the lower root (a concave function lies under its tangent),
// and the iterates rise from there as from zero; any failure on the warm
// path falls back to the start from zero, so a collapse is only ever
// declared from there.
//
// slope, when not nil, is d vload/di (a junction's law gives it in closed
// form): Newton's slope is then exact and costs no second solve of the
// element's law; otherwise it is a finite difference.
func powerPoint(vload, slope func(float64) float64, pin, E, i0 float64) (float64, bool) {
	if i0 > 0 {
		if i, ok := newtonPower(vload, slope, pin, E, 0.99*i0); ok {
			return i, true
		}
	}
	return newtonPower(vload, slope, pin, E, 0)
}

// scanPower looks again for the lowest current at which i·vload(i) = pin
// after Newton gave up at current at: behind an element whose drop jumps
// the product is not concave, and Newton can stop at a false peak or at
// the jump. It scans from zero to where the load voltage runs out and
// brackets the first crossing; false when there is none (a collapse).
//
// falls says that the load voltage never rises with the current
// (protect.LoadVoltageFalls; E is the source's voltage). Then a point
// past x_j draws at most x·vload(x_j): the grid points where that stays
// under pin cannot cross and are not solved, and from the first point
// where the voltage is at or below zero none can; the scan takes the
// points that could, and gives the answer the whole grid gives (the
// bracket's lower end is solved where it was skipped). Rounding could
// leave a later point's voltage a few ulps of E above what the fall
// allows: 1e-9·E is allowed for it, and the stop is taken only where
// that much at the grid's end is under pin. TestScanStopMatchesWholeScan
// checks the answers against the whole grid's, to the bit.
func scanPower(vload func(float64) float64, pin, at float64, falls bool, E float64) (float64, bool) {
	hi := math.Max(at, 1e-9)
	for k := 0; k < 60 && vload(hi) > 0; k++ {
		hi *= 2
	}
	const n = 128
	slack := 1e-9 * math.Abs(E)
	falls = falls && hi*slack < pin
	P := func(x float64) float64 { return x*vload(x) - pin }
	lo, flo, last := 0.0, -pin, 0 // last: the grid point lo holds
	for j := 1; j <= n; j++ {
		x := hi * float64(j) / n
		v := vload(x)
		fx := x*v - pin
		if fx >= 0 {
			if last != j-1 {
				lo = hi * float64(j-1) / n
				flo = P(lo)
			}
			return bracketRootF(P, lo, x, flo, fx), true
		}
		if falls && v <= 0 {
			break // no later point reaches pin
		}
		lo, flo, last = x, fx, j
		if falls {
			// Up to lim a point's power is under pin whatever its voltage.
			lim := pin * (1 - 1e-12) / ((v + slack) * (1 + 1e-12))
			for j < n && hi*float64(j+1)/n < lim {
				j++
			}
		}
	}
	return at, false
}

// junction reports whether el is a PN or Schottky junction: its drop,
// nVt·ln(1 + i/Is) + i·Rs at one temperature, is concave in the current
// and draws nothing standing, so the load's voltage E − i·Rp − drop is
// concave and falling, and i·vload(i) concave (its second derivative
// 2·dv/di + i·d²v/di² is negative).
func junction(el protect.Element) bool {
	switch el.(type) {
	case protect.Diode, protect.Schottky:
		return true
	}
	return false
}

// scanMisses reports, for a concave i·vload(i), whether scanPower from
// current at is sure to find no crossing, at a fraction of its cost: it
// takes scanPower's grid, and on a concave function the grid's values
// rise to one peak and fall, so a walk uphill from the grid point nearest
// at (where Newton stopped, just past the peak) reaches the largest
// value in a few evaluations instead of 128. Rounding can stop the walk
// on a tie short of the peak only where the values are flat to a few
// ulps a step, no more than about 1e-13 relative below it over the whole
// grid; so when the value reached is under pin by more than 1e-9
// relative, no grid point reaches pin and scanPower would return (at,
// false) — the caller's own values. Near a double root (the value within
// 1e-9 of pin) it says false and the scan runs as before: the result is
// always the scan's. TestScanMissesAgreesWithScan checks it against the
// scan on randomised junctions and sources.
func scanMisses(vload func(float64) float64, pin, at float64) bool {
	hi := math.Max(at, 1e-9)
	for k := 0; k < 60 && vload(hi) > 0; k++ {
		hi *= 2
	}
	const n = 128 // scanPower's grid
	P := func(j int) float64 {
		x := hi * float64(j) / n
		return x*vload(x) - pin
	}
	j := min(max(int(math.Round(at/hi*n)), 1), n)
	if !(at > 0) {
		j = 1
	}
	best := P(j)
	for _, d := range [2]int{1, -1} {
		for k := j + d; k >= 1 && k <= n; k += d {
			p := P(k)
			if !(p > best) {
				break
			}
			best, j = p, k
		}
	}
	return best < -1e-9*pin
}

// newtonPower is powerPoint's Newton iteration from current i.
//
// Near a double root (a load at the edge of collapse) the steps, a
// finite-difference slope over rounding-sized residuals, need not shrink
// under 1e-13: the iterates fall into a short cycle, bit for bit, and the
// loop would run out its 200 steps to judge the last one. Each step is a
// function of the current alone, so once an iterate repeats one of the
// last newtonCycle the sequence is periodic from there, and the 200th
// iterate is known without taking the steps: the same current, to the
// last bit, as running them.
//
// The slope of i·vload(i) is i·slope(i) + vload(i) where slope is given
// (powerPoint), else a finite difference over 1e-7 of the current. The
// two differ by the difference's truncation, about 1e-7 of the slope:
// Newton lands on the same root to its 1e-13, and judges a collapse
// differently only where the input power is within about 1e-14 of the
// most the source gives (TestNewtonSlopeMatchesDifference).
func newtonPower(vload, slope func(float64) float64, pin, E, i float64) (float64, bool) {
	const steps = 200
	var ring [newtonCycle]float64 // ring[k%newtonCycle]: the current at step k
	for k := 0; k < steps; k++ {
		for p := 1; p <= min(k, newtonCycle); p++ {
			if ring[(k-p)%newtonCycle] == i {
				// i_k = i_(k−p): periodic with period p from m = k−p on.
				m := k - p
				i = ring[(m+(steps-m)%p)%newtonCycle]
				v := vload(i)
				return i, math.Abs(i*v-pin) <= 1e-9*pin
			}
		}
		ring[k%newtonCycle] = i
		v := vload(i)
		f := i*v - pin
		if v <= 0 {
			return i, false
		}
		var df float64
		if slope != nil {
			df = v + i*slope(i)
		} else {
			h := 1e-7 * math.Max(i, pin/E)
			v2 := vload(i + h)
			df = ((i+h)*v2 - i*v) / h
		}
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

// newtonCycle is the longest cycle of newtonPower's iterates it
// recognises (those seen in the benchmark designs have periods 2 to 7).
const newtonCycle = 8

// node is what one charge gives for one variant: the cells' source and
// every phase's operating points, at the polarisation the whole periodic
// history gives (see polarisation.go). The caller owns it and passes it
// in; it is reused from charge to charge to save allocations, and its
// currents are the starting guess of the next solve.
type node struct {
	E, R0     float64 // one cell: open-circuit voltage and instant resistance
	Epack, Rp float64 // the pack: S·E and S·R0/P
	// mean holds each phase at its mean polarisation: the charge it
	// draws and the power it delivers. worst holds each phase at its
	// worst instant: what the floor, a limit or a fuse sees.
	mean, worst []op
	// cellAvg is one cell's voltage averaged over the time it delivers
	// current in a day's use (each phase at its mean polarisation; rests
	// weigh nothing, see activeAverage): what the end-point, a rating
	// convention, applies to — never the bottom of a pulse. An explicit
	// rest phase and the daily pattern's rest give the same.
	cellAvg float64
	// late is one cell's voltage the cut-off delay before the end of each
	// phase (the worst cycle); NaN where the phase is shorter than the
	// delay or the cell has no cut-off.
	late  []float64
	icell []float64 // per-cell phase currents driving the RC branches, A
	pol   *polState
	// polI, polRest and polT are the currents and the time pol was
	// worked out for: a node where none has moved reuses it.
	polI          []float64
	polRest, polT float64
	ps            polState // what pol points at
	// polA is the branches' polarisation at the ambient's resistances,
	// the one worked out (and reused) from the currents; pol is it at the
	// cell's temperature (cellheat.go, warm). The same state without
	// self-heating; nil without branches.
	polA *polState
	psA  polState // what polA points at with self-heating
	// cellC is one cell's temperature the resistances are taken at, °C;
	// cellPeakC its hottest around this charge (the end of a day's
	// session). The ambient without self-heating.
	cellC, cellPeakC float64
	// target is the rise (K) the cells would settle at if this charge's
	// power were held: θ times the power at the cell's temperature.
	target float64
	// iraw holds the per-cell currents the last pass solved, before the
	// passes' damping (the cells' heat follows them).
	iraw []float64
}

// newNode is the evaluation's node: it lives in the evaluator, its
// figures in two arrays the evaluator keeps (evalBufs).
func (e *evaluator) newNode() *node {
	n := len(e.loads)
	ops := e.bufs.ops.take(2 * n)
	nb := 0 // the branches whose heat a self-heating cell's state keeps
	if e.pol != nil && e.therm != nil {
		nb = len(e.pol.br)
	}
	hot := 0
	if nb > 0 {
		hot = 10*n + 2*nb
	}
	f := e.bufs.nodeF.take(14*n + hot)
	nd := &e.nd
	*nd = node{mean: ops[:n:n], worst: ops[n:], late: f[:n:n], icell: f[n : 2*n : 2*n],
		polI: f[2*n : 3*n : 3*n], iraw: f[3*n : 4*n : 4*n], polRest: math.NaN(), cellC: e.T, cellPeakC: e.T}
	nd.ps.init(f[4*n : 14*n : 14*n])
	nd.pol = &nd.ps
	switch {
	case e.pol == nil:
	case nb > 0:
		nd.psA.initHeat(f[14*n:], n, nb)
		nd.polA = &nd.psA
	default:
		nd.polA = nd.pol
	}
	return nd
}

// maxPasses bounds the fixed-point passes per charge: a phase's current
// sets the branches' voltages, which set every voltage-dependent phase's
// current. The map contracts by about ΣRᵢ·I/V per pass; near a collapse
// it may oscillate, so later passes are damped; where it still does not
// settle, the evaluation warns.
const maxPasses = 40

// dampFrom is the pass from which the currents move half way only.
const dampFrom = 4

// passCurrent takes phase k's pack current ipack from this pass into nd
// (per cell, in iraw as solved and in icell for the next pass) and
// returns how far it moved, relative. From pass dampFrom on the passes
// are not settling by plain steps (phases pulling each other near a
// collapse or a MOSFET's handover): icell takes half steps, unless the
// cells' temperature factor has closed on its value (thermPass), where
// the phases' own solve is exact.
func (e *evaluator) passCurrent(nd *node, k, pass int, ipack float64, tp *thermPass) float64 {
	ic := ipack / e.P
	change := math.Abs(ic-nd.icell[k]) / math.Max(math.Abs(ic), 1e-12)
	nd.iraw[k] = ic
	if pass >= dampFrom && !tp.closed {
		ic = 0.5 * (ic + nd.icell[k])
	}
	nd.icell[k] = ic
	return change
}

// solveNode solves every phase of variant v at scaled charge qs into nd.
func (e *evaluator) solveNode(qs float64, v *variant, nd *node) {
	if v.heat.settles() { // the junctions as their heat sets them at qs (heat.go)
		e.settleNode(qs, v, nd)
		return
	}
	e.nodes++
	nd.E, nd.R0 = e.source(qs)
	nd.Epack, nd.Rp = e.S*nd.E, e.S*nd.R0/e.P
	nd.cellC, nd.cellPeakC = e.T, e.T
	if e.pol == nil && e.therm != nil {
		e.solveWarm(qs, v, nd)
		return
	}
	if e.pol == nil {
		for k, l := range e.loads {
			o := e.solve(l, k, v, nd.Epack, nd.Rp)
			o.CellV = (nd.Epack - o.Ipack*nd.Rp) / e.S
			nd.mean[k], nd.worst[k] = o, o
			nd.late[k] = math.NaN()
			if e.cutoffV > 0 && e.pLate[k] {
				nd.late[k] = o.CellV
			}
		}
		nd.cellAvg = e.activeAverage(nd.mean)
		return
	}
	// The rest between sessions carries the standby drain and the
	// element's standing drain, shared by the strings; t is the seconds
	// of use since the fresh pack at this charge.
	irest, t := e.restAndClock(qs, v, nd)
	R0a := nd.R0 // at the ambient: warm scales it to the cell's temperature
	fresh := true
	for _, x := range nd.icell {
		fresh = fresh && x == 0
	}
	if fresh { // no guess yet: the currents without polarisation
		for k, l := range e.loads {
			nd.icell[k] = e.solve(l, k, v, nd.Epack, nd.Rp).Ipack / e.P
		}
	}
	settled := false
	var tp thermPass
	for pass := 0; pass < maxPasses && !settled; pass++ {
		if irest != nd.polRest || t != nd.polT || !slices.Equal(nd.icell, nd.polI) {
			e.pol.state(nd.icell, irest, t, nd.polA)
			copy(nd.polI, nd.icell)
			nd.polRest, nd.polT = irest, t
		}
		hot, off := false, 0.0 // the cell's temperature still moving; its factor off the currents'
		if e.therm != nil {
			g := nd.R0
			off = e.warm(nd, R0a, irest, t, &tp)
			hot = pass == 0 || math.Abs(nd.R0-g) > 1e-10*nd.R0
		}
		change, failed := 0.0, false
		for k, l := range e.loads {
			// Phase k's own share of its polarisation acts as a series
			// resistance (self[k] per cell); only the other phases' share
			// is held from the last pass.
			self := nd.pol.self[k]
			other := nd.pol.mean[k] - self*nd.icell[k]
			src := e.S * (nd.E - other)
			o := &nd.mean[k]
			e.solveTo(o, l, k, v, src, nd.Rp+e.S*self/e.P)
			o.CellV = (src-o.Ipack*nd.Rp)/e.S - self*o.Ipack/e.P
			change = max(change, e.passCurrent(nd, k, pass, o.Ipack, &tp))
			failed = failed || o.Fail == failCollapse
		}
		// A collapse has no current to settle on: the phase fails
		// whatever the branches do. A lone phase settles in one pass:
		// its own polarisation is solved with it, and nothing else moves;
		// the branches then only need its final current.
		// (With self-heating the lone phase's current also sets the
		// cell's temperature, and so its resistance: it takes the passes
		// like several phases.)
		// With self-heating a collapse at a temperature that is still
		// moving is not yet one: the collapsing current heats the cell,
		// and the next pass may find the point (thermPass). It is final
		// when the temperature stops moving, or when the factors that
		// work and those that collapse close in on each other with no
		// consistent point between.
		settled = change <= 1e-10 && off <= 1e-10 || failed && (!hot || tp.gone)
		if !settled && len(e.loads) == 1 && e.therm == nil {
			// (A constant current comes back unchanged: the state just
			// worked out, or kept from the last charge, is already its.)
			if irest != nd.polRest || t != nd.polT || !slices.Equal(nd.icell, nd.polI) {
				e.pol.state(nd.icell, irest, t, nd.polA)
				copy(nd.polI, nd.icell)
				nd.polRest, nd.polT = irest, t
			}
			settled = true
		}
	}
	if !settled {
		e.notSettled(v)
	}
	for k, l := range e.loads {
		if w, m := nd.pol.worst[k], nd.pol.mean[k]; math.Abs(w-m) <= 1e-12*math.Abs(m) {
			// A steady load: its worst instant is its mean (up to
			// rounding), and so is its operating point.
			nd.worst[k] = nd.mean[k]
			nd.late[k] = math.NaN()
			if e.cutoffV > 0 && e.pLate[k] {
				nd.late[k] = nd.E - nd.icell[k]*nd.R0 - nd.pol.late[k]
			}
			continue
		}
		src := e.S * (nd.E - nd.pol.worst[k])
		o := &nd.worst[k]
		e.solveTo(o, l, k, v, src, nd.Rp)
		o.CellV = (src - o.Ipack*nd.Rp) / e.S
		nd.late[k] = math.NaN()
		if e.cutoffV > 0 && e.pLate[k] {
			nd.late[k] = nd.E - nd.icell[k]*nd.R0 - nd.pol.late[k]
		}
	}
	nd.cellAvg = e.activeAverage(nd.mean)
}

// cellAt is one cell's open-circuit voltage and instant resistance at
// one scaled charge.
type cellAt struct {
	qs, E, R0 float64
	present   bool
}

// source returns one cell's open-circuit voltage and instant resistance
// at scaled charge qs and the evaluation's ambient. The searches of the
// four runs (stranded.go) and the quadrature come back to the same
// charges (the curve's breakpoints, above all): a small table keyed by
// the charge's bits keeps the last answer at each slot, the same to the
// last bit as working it out again.
func (e *evaluator) source(qs float64) (E, R0 float64) {
	b := math.Float64bits(qs)
	m := &e.cellAt[(b^b>>17^b>>31)%uint64(len(e.cellAt))]
	if m.present && m.qs == qs {
		return m.E, m.R0
	}
	E, R0 = e.cell.OpenCircuit(qs, e.T), e.cell.ResistanceAt(qs, e.T)
	*m = cellAt{qs: qs, E: E, R0: R0, present: true}
	return E, R0
}

// activeAverage is the cell voltage of the phases ops averaged over the
// time they draw current: each phase whose load draws any, weighted by
// its duration; a phase that draws none (a rest written into the
// profile, a dark LED) does not count, as the day's rest does not. The
// plain duty-weighted mean where none draws any. A heavier load lowers
// every phase's voltage and can only darken a phase, never light one, so
// the average never rises with the load.
func (e *evaluator) activeAverage(ops []op) float64 {
	var tv, t, v float64
	for k, o := range ops {
		v += e.w[k] * o.CellV
		if o.I > 0 {
			tv += e.w[k] * o.CellV
			t += e.w[k]
		}
	}
	if t > 0 {
		return tv / t
	}
	return v
}

// judge says whether variant v fails at the charge nd was solved at, and
// gives the smallest margin: load voltage above the floor, current below
// the clamp and the trip (each phase at its worst instant), the cycle's
// average cell voltage above the end-point, each long-enough phase's cell
// voltage above the pack's cut-off. The margin is continuous in charge
// and crosses zero where the first rule fails, except where a
// constant-power load collapses (no operating point, no margin): there it
// is NaN. phase is the failing phase (-1 when none fails).
func (e *evaluator) judge(nd *node, v *variant) (fail Cause, phase int, m float64) {
	fail, phase, m, _ = e.judgeRules(nd, v)
	return fail, phase, m
}

// rules are a node's margins rule by rule (judgeRules): the load's
// voltage above the floor, the current below the limits, the cells above
// the pack's cut-off, the cycle's average above the end-point (+Inf for
// a rule that does not apply; NaN where the smallest margin is).
type rules struct{ floor, limit, cutoff, end float64 }

// of is the margin of the rule that fails as cause c; NaN for a rule
// with none (a collapse, an LED too dim, the charge spent).
func (r rules) of(c Cause) float64 {
	switch c {
	case CauseFloor:
		return r.floor
	case CauseLimit, CauseFuse:
		return r.limit
	case CauseCutoff:
		return r.cutoff
	case CauseEndPoint:
		return r.end
	}
	return math.NaN()
}

// noRules is the rules of a node not judged.
var noRules = rules{math.NaN(), math.NaN(), math.NaN(), math.NaN()}

// judgeRules is judge with the margins rule by rule.
func (e *evaluator) judgeRules(nd *node, v *variant) (fail Cause, phase int, m float64, r rules) {
	fail, phase, m = "", -1, math.Inf(1)
	r = rules{math.Inf(1), math.Inf(1), math.Inf(1), math.Inf(1)}
	note := func(c Cause, k int) {
		if fail == "" || rank(c) < rank(fail) {
			fail, phase = c, k
		}
	}
	low := 0 // the phase whose cell voltage dips lowest: named for an end-point
	for k, o := range nd.worst {
		if nd.mean[k].Fail == failCollapse {
			// No operating point with the phase's polarisation following
			// its own current: it cannot be sustained, whatever the worst
			// instant alone would give.
			o.Fail = failCollapse
		}
		if o.Fail != failNone {
			note(o.Fail.cause(), k)
		}
		if o.Fail == failCollapse {
			m = math.NaN()
		} else if !math.IsNaN(m) {
			m = min(m, o.Vload-v.floor, v.lim.Clamp-o.I, v.lim.Trip-o.I)
			r.floor, r.limit = min(r.floor, o.Vload-v.floor), min(r.limit, v.lim.Clamp-o.I, v.lim.Trip-o.I)
		}
		if o.CellV < nd.worst[low].CellV {
			low = k
		}
		if v.cutoff && !math.IsNaN(nd.late[k]) {
			d := nd.late[k] - e.cutoffV
			if d < 0 {
				note(CauseCutoff, k)
			}
			if !math.IsNaN(m) {
				m = min(m, d)
				r.cutoff = min(r.cutoff, d)
			}
		}
	}
	if v.over != nil {
		// A polyfuse opens on the profile as a whole: its heating over
		// the cycle, each phase at its mean current.
		for k, o := range nd.mean {
			e.cur[k] = o.I
		}
		load, k := v.over.Overload(e.cur, e.secs, e.T)
		if load >= 1 {
			note(CauseFuse, k)
		}
		if !math.IsNaN(m) {
			m = min(m, 1-load)
			r.limit = min(r.limit, 1-load)
		}
	}
	d := nd.cellAvg - e.cell.EndPoint
	if d < 0 {
		note(CauseEndPoint, low)
	}
	if !math.IsNaN(m) {
		m = min(m, d)
		r.end = d
	}
	if fail != "" && m > 0 || fail == "" && m < 0 { // a rule the margin does not see
		m = math.NaN()
	}
	if math.IsNaN(m) {
		r = noRules
	}
	return fail, phase, m, r
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
	case CauseFloor, CauseDim:
		return 3
	case CauseCutoff:
		return 4
	}
	return 5
}
