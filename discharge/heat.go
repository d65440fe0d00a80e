package discharge

import (
	"math"

	"headroom/protect"
)

// heat is the protection element's electro-thermal state for one
// evaluation: each phase's junction temperature, and the element with its
// temperature terms worked out there (protect.Fixed), so that the drop of
// phase k is taken at the temperature phase k's heat holds it at.
//
// The temperatures come from the element's thermal network in the
// periodic steady state of the profile (protect.Heating), solved together
// with the drops that cause them (protect.Heating.Settle). They depend on
// charge only through the pack voltage and the load's current, and slowly:
// they are solved at the cut-off — the charge where the drop decides the
// runtime — and held there for the whole run (the cut-off is searched
// again with them until they move less than 0.05 °C). Behind a constant-
// current load and an element whose drop does not depend on the pack
// (diodes, polyfuse, protector, fuse) they do not depend on charge at all,
// and this is exact. Where they do (a MOSFET whose gate drive sags with
// the pack, a resistive load), the early run is taken at the end's
// temperatures; the error in energy is the drop's temperature slope times
// the change, a few mV.
type heat struct {
	h     *protect.Heating
	base  protect.Element   // the element as given
	tj    []float64         // per phase: junction temperature, °C (mean over the phase)
	els   []protect.Element // per phase: base with its terms at tj
	st    protect.Settled   // the last solve
	peakC float64           // the reported junction peak, °C
	meanC float64           // the cycle mean at the same point, °C
	ok    bool              // every solve settled
	// solved is set once a solve has run; p holds each phase's
	// dissipation at its temperature then, W.
	solved             bool
	p, scratch         []float64
	scratch2, scratch3 []float64
	// fresh is each phase's heat with the fresh pack, W (freshHeat).
	fresh []float64
	// cause and phase are why and where the run failed at the last
	// failing step of heatScan ("" when it has not run): with the
	// junctions settled at the cut-off itself the run may still work
	// just past it.
	cause Cause
	phase int
	// still is set when the temperatures cannot move with charge:
	// every phase a constant current behind an element whose drop and
	// drain ignore the pack's voltage (evaluator.linear). One solve, with
	// the fresh pack, is then exact for the whole run.
	still bool
	// steps is the iterations a solve may take before it counts as not
	// settling: 0 for protect.Heating.Settle's, scanSteps in heatScan.
	steps uint8
}

// scanSteps is the iterations a junction solve may take within heatScan.
// The scan keeps only the solves that settle, and those take a few
// iterations (seven or fewer in nearly all the 14,000 solves of the
// 10,080-combination benchmark sweep, a handful 11–43); the ones that
// never settle (a limiter's heat jumping across its current limit) ran
// all 50 and were most of the scan's cost.
const scanSteps = 16

// freshHeat keeps each phase's heat with the fresh pack, nd solved there
// for variant v: reportHeat solves the fresh pack again only when some
// phase heats more there than at the cut-off.
func (s *heat) freshHeat(e *evaluator, v *variant, nd *node) {
	s.fresh = s.fresh[:0]
	for k, o := range nd.mean {
		s.fresh = append(s.fresh, e.heatOf(o, v, s.tj[k]))
	}
}

// newHeat prepares the electro-thermal state of element el for the
// evaluator's profile, all phases at ambient; nil for an element with an
// ideal heat sink (θja 0: the junction stays at ambient) or none.
func (e *evaluator) newHeat(el protect.Element) *heat {
	th := el.Thermal()
	if _, none := el.(protect.None); none || th.ThetaJA == 0 {
		return nil
	}
	s := e.heatWith(el, protect.NewHeating(th, e.secs))
	fixed := protect.Fixed(el, e.T)
	for k := range s.tj {
		s.tj[k], s.els[k] = e.T, fixed
	}
	return s
}

// heatWith is a junction state for el with its thermal model h already
// made for the profile; the caller sets the temperatures and elements.
func (e *evaluator) heatWith(el protect.Element, h *protect.Heating) *heat {
	n := len(e.loads)
	buf := make([]float64, 6*n) // one backing array, made once per evaluation
	cut := func() []float64 { s := buf[:n:n]; buf = buf[n:]; return s }
	s := &heat{h: h, base: el, tj: cut(), els: make([]protect.Element, n), ok: true,
		p: cut(), scratch: cut(), scratch2: cut(), scratch3: cut(), fresh: cut()[:0]}
	return s
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

// settle solves the electro-thermal operating point of variant v at
// scaled charge qs: every phase's junction temperature such that the
// phases' dissipations — drop times current, plus the standing drain's
// heat — produce those temperatures through the network. Each phase is
// solved against the source its mean operating point sees at qs (the
// pack and, with polarisation, the other phases' share of it held), so
// a solve costs a few single-phase solves. It leaves the temperatures
// and fixed elements in v.heat (nd solved at qs before they moved) and returns
// the largest change of a phase's temperature, °C. When every phase
// dissipates what it did at the last solve (to 1e-12) the temperatures
// cannot have moved and nothing is solved: behind constant currents and a
// drop that ignores the pack voltage that is every solve after the first.
func (e *evaluator) settle(v *variant, qs float64, nd *node) float64 {
	e.solveNode(math.Min(qs, e.end*(1-1e-12)), v, nd)
	return e.settleAt(v, qs, nd)
}

// settleAt is settle with nd already solved at qs for v.
func (e *evaluator) settleAt(v *variant, qs float64, nd *node) float64 {
	s := v.heat
	if s.solved {
		same := true
		for k, o := range nd.mean {
			p := e.heatOf(o, v, s.tj[k])
			if math.Abs(p-s.p[k]) > 1e-12*math.Max(p, 1e-9) {
				same = false
				break
			}
		}
		if same {
			return 0
		}
	}
	n := len(e.loads)
	src, res := s.scratch2[:n], s.scratch3[:n]
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
		s.els[k], s.tj[k] = s.base, t // the element's own law at t
		o := e.solve(e.loads[k], k, v, src[k], res[k])
		s.els[k], s.tj[k] = el0, t0
		return e.heatOf(o, v, t)
	}
	tj := append(s.scratch[:0], s.tj...)
	s.st = s.h.SettleWithin(e.T, power, tj, int(s.steps))
	s.ok = s.ok && s.st.OK
	s.solved = true
	moved := 0.0
	for k, t := range tj {
		moved = math.Max(moved, math.Abs(t-s.tj[k]))
		s.tj[k], s.els[k] = t, protect.Fixed(s.base, t)
	}
	// The heat at the settled temperatures, against the same sources: the
	// next call compares its phases with these (a constant current behind
	// a drop that ignores the pack matches exactly, whatever the sources).
	// A still state has no next call.
	for k := range e.loads {
		if s.still {
			break
		}
		o := e.solve(e.loads[k], k, v, src[k], res[k])
		s.p[k] = e.heatOf(o, v, s.tj[k])
	}
	return moved
}

// heatOf is the heat an operating point puts into the element at junction
// temperature t, W: drop times current and the standing drain across the
// pack; at a current limit the clamped current across the whole input
// (the load collapsed), and nothing at a collapse (no operating point).
func (e *evaluator) heatOf(o op, v *variant, t float64) float64 {
	p := o.Vdrop*o.I + o.Vin*(o.Ipack-o.I)
	switch o.Fail {
	case failLimit:
		clamp := v.lim.Clamp
		if c, ok := v.heat.base.(protect.Clamper); ok {
			clamp = c.ClampAt(o.Vin, t)
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

// heatCutoff finds the cut-off of the real variant with its junctions at
// the temperatures their own heat sets there (heatSettle), from the
// cut-off at the current temperatures.
func (e *evaluator) heatCutoff(v *variant, nd *node) float64 {
	q := e.cutoff(v, nd, 0)
	if v.heat == nil || v.heat.still {
		return q
	}
	return e.heatSettle(v, nd, q)
}

// heatSettle moves cut-off q of variant v, found at its junctions' current
// temperatures, to where the junctions are at the temperatures their own
// heat sets there: the temperatures at the cut-off, then the cut-off at
// those temperatures, until they move by less than 0.05 °C (a drop's
// temperature slope of 2 mV/°C makes that 0.1 mV; each round takes the
// change down some thirtyfold on a constant-power load, the hardest
// case), at most four rounds and a check. The temperatures move a little
// between rounds, and the cut-off with them: each new search starts at the
// last cut-off and brackets the new one nearby (recut).
//
// Where the rounds do not settle (a MOSFET near its handover to the body
// diode: a warmer junction conducts better, runs longer and warms further,
// and the temperatures at the cut-off's edge jump with the operating
// point), where they stopped would depend on where they started — on the
// floor's last digits — and a higher floor could run longer. The cut-off
// is then searched directly (heatScan). A solve that found no settled
// state (protect.Settled.OK false: runaway, or a heat that jumps with
// temperature) leaves the temperatures where they were, which reads as
// no move: it never counts as settled (it stopped the rounds at the
// temperatures of wherever they started, the fresh pack's or the last
// round's, and a higher floor ran 6 % longer).
func (e *evaluator) heatSettle(v *variant, nd *node, q float64) float64 {
	for range 4 {
		moved := e.settle(v, q, nd)
		if moved < 0.05 && v.heat.st.OK {
			return q
		}
		if moved == 0 && !v.heat.st.OK {
			// The solve found no settled state and left the temperatures
			// exactly where the cut-off was searched: the next rounds
			// would search the same cut-off again and solve the same.
			return e.heatScan(v, nd)
		}
		q = e.recut(v, nd, q)
	}
	if e.settle(v, q, nd) < 0.05 && v.heat.st.OK {
		return q
	}
	return e.heatScan(v, nd)
}

// heatScan returns the first charge at which variant v fails with its
// junctions at the temperatures settled at that same charge: the
// breakpoints in order, then the first span that fails in 64 steps, then
// bisection of the first step that fails, to 1e-12 of the curve. Each step
// settles the junctions (several solves), so it is kept for the runs whose
// rounds do not settle. Its steps depend only on whether v works, never
// on how much margin it has: two runs that differ only in their floor take
// the same steps until one fails where the other works, so a higher floor
// never ends later. Where the junctions find no settled state at a charge
// (the heat jumps with the operating point across a handover), they stay
// where they last settled, and the search's steps past the result do not
// raise the warning of a junction that does not settle (heatWarning): the
// rounds before it do. The temperatures are left settled at the
// result, where the run still works; the cause and phase of the last step
// that failed are kept in cause and phase for the report, since at those
// temperatures the run may go on a little past the result.
func (e *evaluator) heatScan(v *variant, nd *node) float64 {
	s := v.heat
	type state struct {
		tj, p []float64
		els   []protect.Element
		st    protect.Settled
		ok    bool
	}
	n := len(s.tj)
	mk := func() *state {
		return &state{tj: make([]float64, n), p: make([]float64, n), els: make([]protect.Element, n)}
	}
	save := func(x *state) {
		copy(x.tj, s.tj)
		copy(x.p, s.p)
		copy(x.els, s.els)
		x.st, x.ok = s.st, s.ok
	}
	load := func(x *state) {
		copy(s.tj, x.tj)
		copy(s.p, x.p)
		copy(s.els, x.els)
		s.st, s.ok = x.st, x.ok
	}
	last, at := mk(), mk()
	s.steps = scanSteps
	defer func() { s.steps = 0 }()
	works := func(q float64) bool {
		save(last)
		e.settle(v, q, nd)
		if !s.st.OK {
			load(last)
		}
		if q >= e.end {
			s.cause, s.phase = CauseEndPoint, 0
			return false
		}
		e.solveNode(q, v, nd)
		f, k, _ := e.judge(nd, v)
		if f != "" {
			s.cause, s.phase = f, k
		}
		return f == ""
	}
	s.cause = ""
	if !works(0) {
		return 0
	}
	lo, hi := 0.0, e.end
	found := false
	for _, b := range e.breaks[1:] {
		if works(b) {
			lo = b
			continue
		}
		hi, found = b, true
		break
	}
	if !found {
		return lo
	}
	// The run may fail and work again within the span (the junctions
	// settle on either side of a handover): the span is stepped in 64ths
	// before the bisection, so that the search lands near the first
	// failure rather than on whichever the halving meets.
	const steps = 64
	for j, a := 1, lo; j < steps; j++ {
		x := a + (hi-a)*float64(j)/steps
		if !works(x) {
			hi = x
			break
		}
		lo = x
	}
	tol := 1e-12 * e.end
	for k := 0; k < 200 && hi-lo > tol; k++ {
		x := 0.5 * (lo + hi)
		if !(x > lo && x < hi) {
			break
		}
		if works(x) {
			lo = x
		} else {
			hi = x
		}
	}
	cause, phase := s.cause, s.phase
	save(at)
	if !works(lo) {
		load(at) // the path's state, as the search found it
	}
	s.cause, s.phase = cause, phase
	return lo
}

// recut finds the first failure of v near q, its cut-off before the
// junction temperatures last moved: steps of 1e-4 of the curve, growing
// fourfold, away from q until the margin changes sign, then narrow. A
// bracket that runs to either end of the curve, or a margin without a
// sign (a collapse), falls back to the full search.
func (e *evaluator) recut(v *variant, nd *node, q float64) float64 {
	f, m := e.margin(q, v, nd)
	if math.IsNaN(m) {
		return e.cutoff(v, nd, 0)
	}
	d := 1e-4 * e.end
	for range 12 {
		if !f { // still works at q: the cut-off lies later
			hi := math.Min(q+d, e.end)
			f2, m2 := e.margin(hi, v, nd)
			if f2 {
				if math.IsNaN(m2) {
					return e.cutoff(v, nd, q)
				}
				return e.narrow(v, nd, q, m, hi, m2)
			}
			if hi >= e.end {
				break
			}
			q, m = hi, m2
		} else { // fails at q: the cut-off lies earlier
			lo := math.Max(q-d, 0)
			f2, m2 := e.margin(lo, v, nd)
			if !f2 {
				return e.narrow(v, nd, lo, m2, q, m)
			}
			if lo <= 0 || math.IsNaN(m2) {
				break
			}
			q, m = lo, m2
		}
		d *= 4
	}
	return e.cutoff(v, nd, 0)
}

// reportHeat works out the junction's peak and cycle mean for the result:
// the hotter of the fresh pack and the cut-off (a resistive load heats
// most when fresh, a MOSFET on a sagging pack at the end), each from the
// profile's periodic steady state. The fresh pack is solved only when some
// phase dissipates more there than at the cut-off. The run's temperatures
// (those at the cut-off) are left in place.
func (e *evaluator) reportHeat(v *variant, nd *node) {
	s := v.heat
	cut := s.st.Cycle
	s.peakC, s.meanC = cut.PeakC, cut.MeanC
	if s.still {
		return
	}
	keepP := append([]float64(nil), s.p...)
	hotter := false
	for k, p := range s.fresh {
		if p > keepP[k]*(1+1e-9) {
			hotter = true
			break
		}
	}
	if !hotter {
		return
	}
	keep := append([]float64(nil), s.tj...)
	keepEls := append([]protect.Element(nil), s.els...)
	keepSt, keepOK := s.st, s.ok
	e.settle(v, 0, nd)
	if fresh := s.st.Cycle; fresh.PeakC > cut.PeakC {
		s.peakC, s.meanC = fresh.PeakC, fresh.MeanC
	}
	copy(s.tj, keep)
	copy(s.els, keepEls)
	copy(s.p, keepP)
	s.st = keepSt
	s.ok = keepOK && s.st.OK
}

// heatWarning is the warning for a junction whose temperature did not
// settle, naming the element; "" when it did.
func heatWarning(s *heat) string {
	if s == nil || s.ok {
		return ""
	}
	return "the " + s.base.Kind() + "'s junction does not settle: its dissipation rises with temperature faster than its package sheds the heat (thermal runaway, or no operating point); figures are at the last step the solve reached — use a bigger part, more copper or less current"
}
