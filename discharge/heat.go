package discharge

import (
	"math"
	"slices"

	"headroom/protect"
)

// heat is the protection element's electro-thermal state for one
// evaluation: each phase's junction temperature, and the element with its
// temperature terms worked out there (protect.Fixed), so that the drop of
// phase k is taken at the temperature phase k's heat holds it at.
//
// The temperatures come from the element's thermal network in the
// periodic steady state of the profile (protect.Heating), solved together
// with the drops that cause them, at every charge at which the engine
// solves the variant (settleNode): the cut-off search's margins, the
// quadrature's nodes, the trace and the report's points. That is
// quasi-static in charge: a small package's thermal time constants are
// seconds to minutes, a run hours, so at each charge the junction has
// long settled to what the pack and load give there. The temperatures
// are then a function of charge alone — of the pack, the load and the
// element, never of the floor — so a higher floor ends the run earlier on
// the same integrand.
//
// Behind constant currents and an element whose drop and drain do not
// depend on the pack (still: evaluator.linear) they do not move with
// charge at all: one solve, with the fresh pack, holds for the whole run.
type heat struct {
	h    *protect.Heating // made at the first settle (heating)
	th   protect.Thermal
	base protect.Element   // the element as given
	amb  protect.Element   // base with its terms at ambient
	tj   []float64         // per phase: junction temperature, °C (mean over the phase)
	els  []protect.Element // per phase: base with its terms at tj
	// still is set when the temperatures cannot move with charge:
	// every phase a constant current behind an element whose drop and
	// drain ignore the pack's voltage (evaluator.linear). One solve, with
	// the fresh pack, is then exact for the whole run.
	still bool
	// holding is set while a settle solves the node at the temperatures
	// as they stand (solveNode does not settle again).
	holding bool
	// rec is set while the run's own charges are solved (the fresh pack,
	// the quadrature's nodes, the trace, the cut-off): their settles give
	// the reported peak and the warning.
	rec          bool
	seen         bool    // a recorded settle has run
	peakC, meanC float64 // the hottest recorded peak, °C, and its cycle mean
	ok           bool    // every recorded settle settled
	// memo holds the settled temperatures at recent charges: the four
	// runs' searches and the quadrature come back to the same charges
	// (the breakpoints above all).
	memo              *[16]settledAt // made at the first settle
	scratch, src, res []float64
	keep              []float64
	keepEls           []protect.Element
	// fixed holds base with its terms worked out (protect.Fixed) at
	// recent temperatures (fixedAt).
	fixed [8]fixedEl
}

// fixedEl is the element with its temperature terms worked out at t.
type fixedEl struct {
	t  float64
	el protect.Element
}

// fixedAt is protect.Fixed(s.base, t), each a fresh value worth two
// allocations, kept at the temperatures met recently: every settle
// starts from the ambient and takes its first slope 0.01 °C above it
// (protect.Heating), and the settled temperatures come back with the
// memo's charges. The element worked out at t is the same arithmetic
// whichever call made it, so a kept one gives the same drops.
func (s *heat) fixedAt(t float64) protect.Element {
	b := math.Float64bits(t)
	c := &s.fixed[(b^b>>17^b>>31)%uint64(len(s.fixed))]
	if c.el == nil || c.t != t {
		*c = fixedEl{t: t, el: protect.Fixed(s.base, t)}
	}
	return c.el
}

// settledAt is the junctions settled at one charge for one current limit
// (the limit decides a limited phase's heat).
type settledAt struct {
	qs, clamp float64
	tj        []float64
	els       []protect.Element
	cyc       protect.Cycle
	ok        bool
	present   bool
}

// settleSteps is the iterations a junction solve may take
// (protect.Heating.SettleWithin) before it counts as not settling. The
// solves that settle take a few (seven or fewer in nearly all of the
// 10,080-combination benchmark sweep, a handful 11–43); those that never
// do (a limiter's heat jumping across its current limit, a load that has
// collapsed) would run all 50 at every charge the engine solves.
const settleSteps = 24

// outerPasses bounds the passes between the junction solve and the
// cells' polarisation: the temperatures move the phases' currents, which
// move the other phases' share of the polarisation each phase sees. They
// settle in two or three; where four do not, the junction counts as not
// settled there.
const outerPasses = 4

// outerTol is the change of a phase's temperature, °C, below which those
// passes have settled: a drop's temperature slope of a few mV/°C makes
// that nanovolts.
const outerTol = 1e-6

// newHeat prepares the electro-thermal state of element el for the
// evaluator's profile, all phases at ambient; nil for an element with an
// ideal heat sink (θja 0: the junction stays at ambient) or none. It is
// the evaluator's own (heatV): one per evaluation. el has
// its terms worked out at the ambient already (protect.Fixed(·, e.T), as
// evaluateWith makes it): it is the phases' element at ambient as it
// stands, since every AtTemp works its terms out from the element's own
// parameters, and fixing it again at e.T would give the same drops.
func (e *evaluator) newHeat(el protect.Element) *heat {
	th := el.Thermal()
	if _, none := el.(protect.None); none || th.ThetaJA == 0 {
		return nil
	}
	n := len(e.loads)
	// The figures in the evaluator's kept arrays (evalBufs): no
	// allocation once a recycled evaluator has had as many phases.
	buf := e.bufs.heatF.take(5 * n)
	els := e.bufs.heatEls.take(2 * n)
	cut := func() []float64 { s := buf[:n:n]; buf = buf[n:]; return s }
	s := &e.heatV // in the evaluator: no allocation of its own
	*s = heat{th: th, base: el, amb: el, ok: true,
		tj: cut(), els: els[:n:n], scratch: cut(), src: cut(), res: cut(),
		keep: cut(), keepEls: els[n:]}
	s.ambient(e.T)
	return s
}

// heating is the element's thermal network on the profile's durations
// secs, made at the first call: a junction whose one settle is shared
// across evaluations (stillMemo) never needs it.
func (s *heat) heating(secs []float64) *protect.Heating {
	if s.h == nil {
		s.h = protect.NewHeating(s.th, secs)
	}
	return s.h
}

// ambient puts every phase's junction at ambient tC.
func (s *heat) ambient(tC float64) {
	for k := range s.tj {
		s.tj[k], s.els[k] = tC, s.amb
	}
}

// phaseElement returns the element and its junction temperature for
// phase k of variant v: the per-phase state when v carries heat, else the
// element at ambient.
func (e *evaluator) phaseElement(v *variant, k int) (protect.Element, float64) {
	if v.heat != nil {
		return v.heat.els[k], v.heat.tj[k]
	}
	return v.el, e.T
}

// settles reports whether solveNode must settle v's junctions at the
// charge it solves: v has heat that moves with charge and no settle is
// under way.
func (s *heat) settles() bool { return s != nil && !s.still && !s.holding }

// byWork reports whether the cut-off search must step on whether the
// variant works alone (bisection) rather than on its margin: its
// junctions settle at every charge, and their settled state can jump with
// charge — a MOSFET handing over to its body diode, a limiter at its
// limit, a polyfuse's resistance or a Schottky's leakage rising with its
// heat, even a diode on a resistive load whose pack is under twice its
// drop (a cooler drop then heats it more). The margin then has several
// roots between two breakpoints, and steps taken on its size would land
// on one or another depending on the floor. Steps that depend only on
// where the run works are the same for two floors until one run fails
// where the other works, so a higher floor can only end earlier (the
// breakpoints' scan is such a search too). It costs about 25 more solves
// per search than Illinois steps, so only the design's own run (ordered)
// takes it: the stranded split's run without the floor has no floor to
// keep in order.
func (v *variant) byWork() bool { return v.ordered && v.heat != nil && !v.heat.still }

// settleNode solves variant v at scaled charge qs into nd with every
// phase's junction at the temperature its own heat sets there: the
// phases' dissipations — drop times current, plus the standing drain's
// heat — heat the network to exactly those temperatures
// (protect.Heating.SettleWithin). Each phase is solved against the source
// its mean operating point sees at qs (the pack and, with polarisation,
// the other phases' share of it held); with polarisation that source is
// solved again at the new temperatures until no phase moves by more than
// outerTol.
//
// The solve always starts from ambient, whatever charge was solved
// before: where several temperatures are consistent with their own heat
// (a MOSFET handing over to its body diode, a limiter's heat jumping at
// its limit) it is the one that solve reaches — the junction warming from
// ambient as the product is switched on — and the result is a function
// of the charge alone, to the node's own rounding. A start from the last
// charge's temperatures would save a step or two but could land on
// another state, and then the runtime would depend on the path of the
// search (on the floor). Recent charges are remembered (memo), so the
// searches' returns to the same charge cost a node solve only.
func (e *evaluator) settleNode(qs float64, v *variant, nd *node) {
	s := v.heat
	s.holding = true
	defer func() { s.holding = false }()
	if s.memo == nil {
		s.memo = new([16]settledAt)
	}
	b := math.Float64bits(qs)
	m := &s.memo[(b^b>>17^b>>31)%uint64(len(s.memo))]
	if m.present && m.qs == qs && m.clamp == v.lim.Clamp {
		copy(s.tj, m.tj)
		copy(s.els, m.els)
		e.solveNode(qs, v, nd)
		s.record(m.cyc, m.ok)
		return
	}
	s.ambient(e.T)
	n := len(e.loads)
	var st protect.Settled
	// Each pass solves the node at the temperatures as they stand and the
	// temperatures for the sources it gives. With no polarisation, or a
	// lone phase (its own share of it is solved with it), and cells that
	// do not heat themselves, those sources do not move with the
	// temperatures and one pass is exact; otherwise
	// the passes go on until a pass moves no phase by more than outerTol,
	// and the node and temperatures of the pass before it are kept (the
	// same to a few nanovolts, and one node solve fewer).
	exact := e.therm == nil && (e.pol == nil || n == 1) // a self-heating cell's resistance follows the currents
	keep, keepEls := s.keep, s.keepEls                  // the temperatures the node was solved at
	for pass := 0; ; pass++ {
		u := e.unsettled
		e.solveNode(qs, v, nd)
		// Where the phases and the polarisation themselves do not settle
		// at this charge (near a collapse), more passes cannot: one.
		exact = exact || e.unsettled > u
		if pass == 0 && e.cold(v, nd) {
			// Nothing heats the junctions at ambient (every phase
			// collapsed or drawing nothing): they stay there.
			st = protect.Settled{OK: true, Cycle: protect.Cycle{PeakC: e.T, MeanC: e.T}}
			break
		}
		copy(keep, s.tj)
		copy(keepEls, s.els)
		moved := e.settlePhases(v, nd, &st)
		if !st.OK {
			// No settled state from ambient (runaway, or a heat that
			// jumps across the temperature it would settle at: a
			// limiter reaching its limit as it warms, a MOSFET handing
			// over to its body diode). Where the solve stopped would
			// move erratically from charge to charge; the drops are
			// taken at ambient instead, a smooth function of charge,
			// and the warning says so. The cycle reported is the
			// hottest step the solve reached.
			s.ambient(e.T)
			e.solveNode(qs, v, nd)
			break
		}
		if exact {
			e.solveNode(qs, v, nd)
			break
		}
		if moved <= outerTol {
			copy(s.tj, keep)
			copy(s.els, keepEls)
			break
		}
		if pass == outerPasses-1 {
			st.OK = false // the passes did not settle
			e.solveNode(qs, v, nd)
			break
		}
	}
	if m.tj == nil {
		m.tj, m.els = make([]float64, n), make([]protect.Element, n)
	}
	copy(m.tj, s.tj)
	copy(m.els, s.els)
	m.qs, m.clamp, m.cyc, m.ok, m.present = qs, v.lim.Clamp, st.Cycle, st.OK, true
	s.record(st.Cycle, st.OK)
}

// cold reports whether no phase of v, solved into nd at ambient, heats
// the element.
func (e *evaluator) cold(v *variant, nd *node) bool {
	for k := range e.loads {
		if e.heatOf(nd.mean[k], v, e.T) > 0 {
			return false
		}
	}
	return true
}

// record notes a settle's cycle for the report when the run's own
// charges are being solved.
func (s *heat) record(c protect.Cycle, ok bool) {
	if !s.rec {
		return
	}
	if !s.seen || c.PeakC > s.peakC {
		s.peakC, s.meanC = c.PeakC, c.MeanC
	}
	s.seen = true
	s.ok = s.ok && ok
}

// settlePhases solves the junction temperatures of variant v for the
// sources nd (solved at the temperatures as they stand) gives each phase,
// from those temperatures, into v.heat; it leaves the solve's outcome in
// st and returns the largest change of a phase's temperature, °C.
func (e *evaluator) settlePhases(v *variant, nd *node, st *protect.Settled) float64 {
	s := v.heat
	src, res := s.src, s.res
	for k := range e.loads {
		src[k], res[k] = nd.Epack, nd.Rp
		if e.pol != nil {
			self := nd.pol.self[k]
			other := nd.pol.mean[k] - self*nd.icell[k]
			src[k], res[k] = e.S*(nd.E-other), nd.Rp+e.S*self/e.P
		}
	}
	power := func(k int, t float64) float64 {
		el0, t0 := s.els[k], s.tj[k]
		if t == t0 {
			return e.heatOf(nd.mean[k], v, t)
		}
		// The element's own law at t; behind a load whose solve takes
		// many drops, with its terms worked out at t once — except a
		// junction's, whose own law costs a Log and an Exp a drop more,
		// less than the two allocations of fixing it for one solve at a
		// temperature met once (the same drops: protect.Fixed).
		s.els[k], s.tj[k] = s.base, t
		if e.loads[k].Kind != ConstantCurrent && !junction(s.base) {
			s.els[k] = s.fixedAt(t)
		}
		o := e.solve(e.loads[k], k, v, src[k], res[k])
		s.els[k], s.tj[k] = el0, t0
		return e.heatOf(o, v, t)
	}
	tj := append(s.scratch[:0], s.tj...)
	*st = s.heating(e.secs).SettleWithin(e.T, power, tj, settleSteps)
	moved := 0.0
	for k, t := range tj {
		moved = math.Max(moved, math.Abs(t-s.tj[k]))
		if t != s.tj[k] {
			s.tj[k], s.els[k] = t, s.fixedAt(t)
		}
	}
	return moved
}

// settleStill solves the junctions of a still variant once, with the
// fresh pack (nd solved there at ambient), and holds them for the run.
//
// Its outcome is a function of the inputs stillKey names, and is shared
// across evaluations (stillMemo) unless the evaluation takes no shortcut.
func (e *evaluator) settleStill(v *variant, nd *node) {
	s := v.heat
	var st protect.Settled
	key, keyed := e.stillKeyOf(nd)
	switch {
	case !keyed || e.general:
		e.settlePhases(v, nd, &st)
	default:
		h := key.hash()
		if o, ok := stillMemo.Find(h, key); ok {
			copy(s.tj, o.tj)
			copy(s.els, o.els)
			st.Cycle, st.OK = o.cyc, o.ok
			break
		}
		e.settlePhases(v, nd, &st)
		stillMemo.Keep(h, key.kept(), &stillOutcome{tj: slices.Clone(s.tj), els: slices.Clone(s.els), cyc: st.Cycle, ok: st.OK})
	}
	s.rec = true
	s.record(st.Cycle, st.OK)
	s.rec = false
}

// heatOf is the heat an operating point puts into the element at junction
// temperature t, W: drop times current and the standing drain across the
// pack; at a current limit the clamped current across the whole input
// (the load collapsed), and nothing at a collapse (no operating point).
// It is the same whatever the variant's floor, so that the junctions'
// settled state is a function of the charge alone.
func (e *evaluator) heatOf(o op, v *variant, t float64) float64 {
	p := o.Vdrop*o.I + o.Vin*(o.Ipack-o.I)
	switch o.Fail {
	case failLimit:
		if o.Vload > 0 && o.I <= v.lim.Clamp {
			// A resistive or LED load sitting on a limiter's jump, named
			// a limit only because its voltage is under the floor
			// (solve): the element takes up what the load leaves, as
			// with the floor lower. The heat never depends on the floor.
			break
		}
		clamp := v.lim.Clamp
		if _, ok := v.heat.base.(protect.Clamper); ok {
			// Fixed at t: the same clamp to the bit (protect.Fixed), its
			// bisection's many drops without working the terms out at
			// each.
			clamp = v.heat.fixedAt(t).(protect.Clamper).ClampAt(o.Vin, t)
		}
		p = o.Vin * math.Min(clamp, o.I)
	case failCollapse:
		p = 0
	}
	if !(p >= 0) {
		p = 0
	}
	return p
}

// heatWarning is the warning for a junction whose temperature did not
// settle, naming the element; "" when it did.
func heatWarning(s *heat) string {
	if s == nil || s.ok {
		return ""
	}
	return "the " + s.base.Kind() + "'s junction does not settle over part of the run: its dissipation rises with temperature faster than its package sheds the heat, or jumps across the temperature it would settle at (thermal runaway, or a current limit reached as it warms); there its drop is taken at ambient, and a junction figure (junction_C) is only the hottest step the solve reached — use a bigger part, more copper or less current"
}
