// The cells' own temperature: each cell a lumped heat capacity with a
// thermal resistance to the ambient, warmed by the power it burns.

package discharge

import (
	"math"
	"sort"

	"headroom/curves"
	"headroom/internal/rc"
)

// Self-heating (docs/cell-model.md, "Self-heating"). Each cell is one
// first-order thermal stage (rc.Stage: R = θ in K/W, τ = C·θ) driven by
// the power it burns, per cell: R0·I² and each RC branch's I·v. The
// profile's phases are short against τ (seconds against many minutes),
// so the stage sees the cycle's mean power P; the daily pattern is not,
// and the session's heating and the rest's cooling follow the same
// day-periodic closed form as the RC branches (polarisation.go), u being
// the rise above the ambient at the session's start and Ps the power the
// standby drain burns in the rest:
//
//	u0 = θ·[Ps·(1 − B) + B·(1 − A)·P] / (1 − A·B),  A = e^(−H/τ), B = e^(−rest/τ)
//	u(t) = θ·P + (u0 − θ·P)·e^(−t/τ) in the session
//
// The resistances take the session's mean rise, θ·(mP·P + mS·Ps); the
// report takes its end, the hottest instant. The first session of a
// fresh pack — the whole run in continuous use — starts at the ambient:
// u(t) = θ·P·(1 − e^(−t/τ)), t the seconds of use a charge stands for
// (charge × usePerQ, the clock the polarisation uses); with RC branches,
// whose own heat builds up from the rested start too, the stage's
// closed-form response to that (first).
//
// P is quasi-static in charge: each charge takes its own P as if it had
// been held (exact for a steady P). What that misses is the lag of the
// temperature behind a P that drifts within τ: the cell's resistance
// falling as it warms and rising towards the end of the discharge; the
// time-stepped reference in the tests bounds it.
//
// What follows the cell's temperature: R0 and the branches' R, by the
// Temperature table's resistance factor, g = fr(T)/fr(Ta) on top of the
// ambient's. What stays at the ambient: the capacity factor (rate and
// cold: one stretch of the charge axis per evaluation, taken with the
// fresh pack) and the open-circuit voltage (no temperature coefficient in
// the model, curves.Cell.OpenCircuit).
//
// The electro-thermal loop: the temperature sets R, R the currents and
// the power, the power the temperature. For given currents the power at
// the cell's temperature is g times the power at the ambient's
// resistances (every resistance scales by g, the branches' voltages
// too), so the rise solves u = K·g(Ta + u), K = θ·(weights)·P at the
// ambient: a scalar equation on the piecewise-linear table, solved
// exactly (rise). The currents then come from the node's fixed-point
// passes (operating.go, solveNode), each pass taking the temperature its
// last currents give: a constant-current load settles in one pass, a
// load whose current moves with the voltage in a few (the loop gains
// θ·P·|d ln fr/dT|, a few per cent for a cell at its limits); near a
// collapse, where the gain can pass 1, a bracket on the factor
// (thermPass) takes over.
type cellTherm struct {
	cell *curves.Cell
	st   rc.Stage
	ta   float64 // ambient, °C
	fra  float64 // resistance factor at the ambient
	hs   float64 // seconds of use in a session; +Inf in continuous use
	// polR is the branches' ΣR at the ambient (ohms): the rest's power.
	polR float64
	// The day-periodic weights: the session's mean rise is
	// θ·(mP·P + mS·Ps), its end θ·(eP·P + eS·Ps).
	mP, mS, eP, eS float64
	// up and gUp are the temperature table's points above the ambient
	// (°C) and their resistance factors relative to the ambient's, for
	// rise.
	up, gUp []float64
}

// newCellTherm is the cell's thermal stage for design d, nil when the
// cell stays at the ambient.
func newCellTherm(d *Design, hs float64) *cellTherm {
	if !d.Cell.SelfHeats() {
		return nil
	}
	h := new(cellTherm)
	h.set(d, hs, nil)
	return h
}

// set fills h for design d (whose cell self-heats), hs seconds of use a
// session, its figures in buf's array when it has one (nil: a new one).
func (h *cellTherm) set(d *Design, hs float64, buf *reuse[float64]) {
	c := d.Cell
	_, fra := c.TempFactors(d.TempC)
	*h = cellTherm{cell: c, st: c.ThermalStage(), ta: d.TempC, fra: fra, hs: hs, polR: c.PolarisationOhms() * fra}
	n := 0
	for _, p := range c.Temperature {
		if p.Celsius > d.TempC {
			n++
		}
	}
	if buf == nil {
		buf = new(reuse[float64])
	}
	f := buf.take(2 * n)
	h.up, h.gUp = f[:0:n], f[n:n]
	for _, p := range c.Temperature {
		if p.Celsius > d.TempC {
			h.up = append(h.up, p.Celsius)
			h.gUp = append(h.gUp, p.Resistance/fra)
		}
	}
	if !math.IsInf(hs, 1) {
		tau := h.st.Tau
		rest := 24*3600 - hs
		A := math.Exp(-hs / tau)
		oneA, oneB, oneAB := -math.Expm1(-hs/tau), -math.Expm1(-rest/tau), -math.Expm1(-(hs+rest)/tau)
		sess := 1.0 // the mean of e^(−t/τ) over the session
		if x := hs / tau; x > 1e-12 {
			sess = oneA / x
		}
		b := oneB / oneAB // 1 − α, α = B·(1 − A)/(1 − A·B); and β = (1 − B)/(1 − A·B)
		h.mP, h.mS = 1-b*sess, b*sess
		h.eP, h.eS = 1-b*A, b*A
	}
}

// heatRaisesR reports whether the cells' own heat can raise their
// resistance: they self-heat, and their temperature table's resistance
// factor somewhere above the ambient is over the ambient's (g > 1). Only
// then can their heat run away — more resistance, more heat — and a
// load collapse at one charge and work again at a later one, where the
// table's factor falls; otherwise g ≤ 1 at every charge (rise).
func (e *evaluator) heatRaisesR() bool {
	if h := e.therm; h != nil {
		for _, g := range h.gUp {
			if !(g <= 1) {
				return true
			}
		}
	}
	return false
}

// at is the resistance factor g and the cell's temperature (°C) for the
// resistances, and its hottest (°C), at a charge whose per-cell power is
// P in use and Ps in the rest (W, both at the ambient's resistances), t
// seconds of use since the fresh pack (+Inf: day-periodic).
func (h *cellTherm) at(P, Ps, t float64) (g, tc, peak float64) {
	var k, kp float64
	if t < h.hs {
		k = h.st.R * -math.Expm1(-t/h.st.Tau) * P
		kp = k
	} else {
		k = h.st.R * (h.mP*P + h.mS*Ps)
		kp = h.st.R * (h.eP*P + h.eS*Ps)
	}
	u, g := h.rise(k)
	return g, h.ta + u, h.ta + kp*g
}

// first is at for the first session of a rested pack with RC branches:
// the power P (W per cell, at the ambient's resistances, at t seconds of
// use) has a part still building up with each branch, decay[i]·e^(−t/τᵢ)
// short of its periodic value, and the thermal stage's response to
// P∞ − Σ cᵢ·e^(−s/τᵢ) from rest is, in closed form (the first-order
// response to a step and to a decaying exponential, any circuits
// textbook):
//
//	u(t) = θ·[P∞·(1 − e^(−t/τ)) − Σ cᵢ·τᵢ·(e^(−t/τᵢ) − e^(−t/τ))/(τᵢ − τ)]
//
// (t/τ·e^(−t/τ) for τᵢ = τ): exact for steady currents and a steady R0,
// where taking u = θ·P(t)·(1 − e^(−t/τ)) would count the branches' heat
// as if it had been there from the start.
func (h *cellTherm) first(P float64, st *polState, pol *polarisation, t float64) (g, tc, peak float64) {
	tau := h.st.Tau
	et := math.Exp(-t / tau)
	pinf := P
	eff := 0.0
	for i, c := range st.decay {
		ti, ni := pol.br[i].tau, st.decayNow[i] // ni = e^(−t/τᵢ)
		pinf += c * ni
		var f float64
		switch d := ti - tau; {
		case math.Abs(d) <= 1e-9*tau:
			f = t / tau * et
		case math.Abs(d) <= 0.25*tau:
			// τᵢ·e^(−t/τ)·(e^(−t·(τ − τᵢ)/(τ·τᵢ)) − 1)/(τᵢ − τ): no
			// cancellation between two close exponentials.
			f = ti * et * math.Expm1(-t*(tau-ti)/(tau*ti)) / d
		default:
			f = ti * (ni - et) / d
		}
		eff -= c * f
	}
	eff += pinf * -math.Expm1(-t/tau)
	u, g := h.rise(h.st.R * eff)
	return g, h.ta + u, h.ta + u
}

// rise solves u = k·g(Ta + u) for the lowest u ≥ 0, g(T) = fr(T)/fr(Ta)
// the resistance factor relative to the ambient's, and returns u and g
// there. fr is piecewise linear in T and held beyond the table's ends
// (curves.Cell.TempFactors), so f(x) = x − Ta − k·g(x) is linear between
// the table's temperatures: walked from the ambient upwards, the first
// one where f turns non-negative brackets the root, found on the
// straight piece (exact, no iteration).
func (h *cellTherm) rise(k float64) (u, g float64) {
	if !(k > 0) {
		return 0, 1
	}
	lo, glo := h.ta, 1.0
	flo := -k // f(Ta) = −k·1
	for i, x := range h.up {
		gx := h.gUp[i]
		fx := x - h.ta - k*gx
		if fx >= 0 {
			w := -flo / (fx - flo) // f is linear on [lo, x]: its root
			return lo + (x-lo)*w - h.ta, glo + (gx-glo)*w
		}
		lo, glo, flo = x, gx, fx
	}
	// Past the table's last temperature the factor is held there.
	return k * glo, glo
}

// thermPass carries one charge's passes over the electro-thermal loop.
// The residual r(g) = (factor the currents solved at factor g give) − g
// falls as g rises (a higher resistance moves the current so that the
// cell's heat follows less than one for one); near a collapse the loop
// gain can pass 1 and plain passes oscillate. So once two passes straddle
// the root — or one works and one collapses — the next factor comes from
// the bracket (false position, Illinois; halving towards a collapse):
// wherever a consistent point exists it is found, and where the points
// run out between a working factor that asks for a higher one and a
// collapsing one the phase collapses (gone).
type thermPass struct {
	n    int     // passes so far
	last float64 // the factor the last pass used
	// The bracket: lo a factor whose currents asked for a higher one
	// (rLo > 0), hi one that asked for a lower one or collapsed (hiGone).
	lo, rLo, hi, rHi float64
	haveLo, haveHi   bool
	hiGone           bool
	side             int  // the bracket end moved last (Illinois)
	gone             bool // the bracket closed on a collapse
	closed           bool // the bracket closed on a consistent factor: held
}

// next is the factor for this pass, given the factor the last pass's
// currents give (gOut) and whether that pass collapsed.
func (tp *thermPass) next(gOut float64, collapsed bool) float64 {
	if tp.n == 0 {
		return gOut
	}
	g, r := tp.last, gOut-tp.last
	if tp.closed {
		return g
	}
	switch {
	case collapsed:
		tp.hi, tp.haveHi, tp.hiGone, tp.rHi = g, true, true, 0
		tp.illinois(1)
	case r > 0:
		tp.lo, tp.rLo, tp.haveLo = g, r, true
		tp.illinois(-1)
	case r < 0:
		tp.hi, tp.rHi, tp.haveHi, tp.hiGone = g, r, true, false
		tp.illinois(1)
	default:
		return gOut
	}
	if !tp.haveLo || !tp.haveHi {
		return gOut // not bracketed yet: a plain pass
	}
	if math.Abs(r) <= 1e-10*g && !collapsed {
		return gOut // settled within the bracket: the currents' own factor
	}
	if math.Abs(tp.hi-tp.lo) <= 1e-12*math.Abs(tp.hi) {
		tp.gone = tp.hiGone
		if !tp.hiGone {
			// The bracket has closed on the consistent factor: near a
			// collapse the currents' factor swings by more than 1e-10
			// over a bracket of 1e-12 (the residual is steep there), so
			// the factor is the bracket's, held from here on.
			tp.closed = true
			return 0.5 * (tp.lo + tp.hi)
		}
		return gOut
	}
	if tp.hiGone {
		return 0.5 * (tp.lo + tp.hi)
	}
	return tp.lo + (tp.hi-tp.lo)*tp.rLo/(tp.rLo-tp.rHi)
}

// illinois halves the residual kept at the end that did not move when the
// same end moves twice in a row (the Illinois variant of false position).
func (tp *thermPass) illinois(side int) {
	if tp.side == side {
		if side > 0 {
			tp.rLo *= 0.5
		} else {
			tp.rHi *= 0.5
		}
	}
	tp.side = side
}

// warm sets nd's cell temperature and resistances at the ambient's R0a
// for its per-cell currents nd.icell (and irest in the rest, t seconds
// of use): nd.R0 and nd.Rp scaled by the factor, and nd.pol the
// branches' voltages nd.polA scaled by it (every branch's R follows the
// same factor, and a branch's voltage is linear in its R). It returns how
// far the factor used is from the one the currents give, relative: 0
// when the currents set it.
func (e *evaluator) warm(nd *node, R0a, irest, t float64, tp *thermPass) float64 {
	h := e.therm
	// The heat follows the currents the last pass solved, before any
	// damping of the passes (the bracket needs r at the factor used).
	cur := nd.icell
	if tp.n > 0 {
		cur = nd.iraw
	}
	P, collapsed := 0.0, false
	for k, ic := range cur {
		m := 0.0
		if nd.polA != nil {
			m = nd.polA.mean[k]
		}
		if tp.n > 0 && nd.mean[k].Fail == failCollapse {
			// A phase with no operating point at the last pass's
			// temperature draws no current of its own: its heat is taken
			// at the most a cell can give into a load, E/(2·R) with R
			// the steady resistance (the warmest it could work at).
			ic = math.Min(ic, nd.E/(2*(R0a+h.polR)))
			m = ic * h.polR
			collapsed = true
		}
		P += e.w[k] * ic * (ic*R0a + m)
	}
	Ps := irest * irest * (R0a + h.polR)
	var gOut, tc, peak float64
	if t < h.hs && nd.polA != nil && !collapsed {
		gOut, tc, peak = h.first(P, nd.polA, e.pol, t)
	} else {
		gOut, tc, peak = h.at(P, Ps, t)
	}
	g, off := gOut, 0.0
	if tp.n > 0 {
		g = tp.next(gOut, collapsed)
		off = math.Abs(g-gOut) / g
		if tp.closed {
			off = 0 // the factor is the closed bracket's (thermPass.next)
		}
	}
	tp.last = g
	tp.n++
	nd.cellC, nd.cellPeakC = tc, peak
	nd.target = h.st.R * g * P
	nd.R0 = R0a * g
	nd.Rp = e.S * nd.R0 / e.P
	if a, s := nd.polA, nd.pol; a != nil && s != a {
		for k := range a.mean {
			s.worst[k], s.mean[k], s.late[k], s.self[k] = g*a.worst[k], g*a.mean[k], g*a.late[k], g*a.self[k]
		}
	}
	return off
}

// solveWarm is solveNode for a self-heating cell without RC branches:
// the passes settle the phases' currents and the temperature they give
// together (see cellTherm).
func (e *evaluator) solveWarm(qs float64, v *variant, nd *node) {
	irest, t := e.restAndClock(qs, v, nd)
	R0a := nd.R0
	var tp thermPass
	settled := false
	for pass := 0; pass < maxPasses && !settled; pass++ {
		g := nd.R0
		off := e.warm(nd, R0a, irest, t, &tp)
		hot := pass == 0 || math.Abs(nd.R0-g) > 1e-10*nd.R0 // see solveNode
		change, failed := 0.0, false
		for k, l := range e.loads {
			o := e.solve(l, k, v, nd.Epack, nd.Rp)
			o.CellV = (nd.Epack - o.Ipack*nd.Rp) / e.S
			nd.mean[k], nd.worst[k] = o, o
			change = max(change, e.passCurrent(nd, k, pass, o.Ipack, &tp))
			failed = failed || o.Fail == failCollapse
		}
		settled = change <= 1e-10 && off <= 1e-10 || failed && (!hot || tp.gone)
	}
	if !settled {
		e.notSettled(v)
	}
	for k := range e.loads {
		nd.late[k] = math.NaN()
		if e.cutoffV > 0 && e.pLate[k] {
			nd.late[k] = nd.mean[k].CellV
		}
	}
	nd.cellAvg = e.activeAverage(nd.mean)
}

// restAndClock is the per-cell current in the day's rest (the standby
// drain and the element's standing drain, shared by the strings) and the
// seconds of use since the fresh pack that scaled charge qs stands for in
// variant v; +Inf once the state is day-periodic (the time no longer
// matters, and the polarisation is reused).
func (e *evaluator) restAndClock(qs float64, v *variant, nd *node) (irest, t float64) {
	irest = (e.d.Standby + v.el.Quiescent(nd.Epack, e.T)) / e.P
	t = qs * v.usePerQ
	if v.periodicOnly || t >= e.sess {
		t = math.Inf(1)
	}
	return irest, t
}

// heatTrail is the cells' heat target (the rise each sampled charge's
// power would settle at) at every charge the quadrature samples in
// continuous use, for the hottest the run's power history gives.
//
// The resistances take each charge's quasi-static rise, which runs
// ahead of the real temperature where the power climbs within τ (R0
// rising at the end of a fast discharge). The report does better at
// the cost of a sort: the thermal stage integrated in the engine's own
// clock (t = charge × usePerQ) over the samples, the target linear in
// time between them — the first-order response to a ramp, exactly:
//
//	u(t+Δ) = T₁ − τ·s + (u(t) − T₀ + τ·s)·e^(−Δ/τ),  s = (T₁ − T₀)/Δ
//
// from the rested start (u = 0), the hottest of the samples and the
// cut-off taken.
type heatTrail struct{ q, u []float64 }

func (h *heatTrail) reset() { h.q, h.u = h.q[:0], h.u[:0] }

func (h *heatTrail) add(q, target float64) {
	h.q = append(h.q, q)
	h.u = append(h.u, target)
}

// Len, Less and Swap sort the samples by charge.
func (h *heatTrail) Len() int           { return len(h.q) }
func (h *heatTrail) Less(i, j int) bool { return h.q[i] < h.q[j] }
func (h *heatTrail) Swap(i, j int) {
	h.q[i], h.q[j] = h.q[j], h.q[i]
	h.u[i], h.u[j] = h.u[j], h.u[i]
}

// hottest is the highest rise (K) of a stage of time constant tau (s)
// driven by the samples' targets from rest, usePerQ seconds a scaled
// mAh, up to the cut-off at scaled charge qsCut.
func (h *heatTrail) hottest(tau, usePerQ, qsCut float64) float64 {
	if len(h.q) == 0 {
		return 0
	}
	sort.Sort(h)
	u, best := 0.0, 0.0
	pq, pt := 0.0, h.u[0] // from the start, the first sample's target
	step := func(q, t float64) {
		dt := (q - pq) * usePerQ
		if dt > 0 {
			s := (t - pt) / dt
			e := math.Exp(-dt / tau)
			u = t - tau*s + (u-pt+tau*s)*e
		}
		pq, pt = q, t
		best = math.Max(best, u)
	}
	for i, q := range h.q {
		if q > qsCut {
			break
		}
		step(q, h.u[i])
	}
	step(qsCut, pt) // the last target held to the cut-off
	return best
}

// notSettled counts a charge at which variant v's passes did not settle:
// in unsettled for every run (heat.go watches it), and in unsettledRun
// when v is the design as built, whose figures the warning is about. The
// stranded split's run without the floor goes on to the load's collapse,
// where the passes often stop short of 1e-10; that moves its cut-off by
// the passes' last step, not the design's figures.
func (e *evaluator) notSettled(v *variant) {
	e.unsettled++
	if v == &e.real {
		e.unsettledRun++
	}
}
