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
	solved     bool
	p, scratch []float64
}

// newHeat prepares the electro-thermal state of element el for the
// evaluator's profile, all phases at ambient; nil for an element with an
// ideal heat sink (θja 0: the junction stays at ambient) or none.
func (e *evaluator) newHeat(el protect.Element) *heat {
	th := el.Thermal()
	if _, none := el.(protect.None); none || th.ThetaJA == 0 {
		return nil
	}
	n := len(e.loads)
	secs := make([]float64, n)
	for k, p := range e.d.Profile {
		secs[k] = p.Seconds
	}
	s := &heat{h: protect.NewHeating(th, secs), base: el, tj: make([]float64, n), els: make([]protect.Element, n), ok: true,
		p: make([]float64, n), scratch: make([]float64, n)}
	fixed := protect.Fixed(el, e.T)
	for k := range s.tj {
		s.tj[k], s.els[k] = e.T, fixed
	}
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
// heat — produce those temperatures through the network. It leaves the
// temperatures and fixed elements in v.heat and returns the largest change
// of a phase's temperature, °C. When every phase dissipates what it did at
// the last solve (to 1e-12), the temperatures cannot have moved and no
// solve is run: behind constant currents and a drop that ignores the pack
// voltage that is every solve after the first.
func (e *evaluator) settle(v *variant, qs float64) float64 {
	s := v.heat
	E, Rp, _ := e.pack(math.Min(qs, e.end))
	power := func(k int, t float64) float64 {
		el0, t0 := s.els[k], s.tj[k]
		if t != t0 {
			s.els[k], s.tj[k] = s.base, t // the element's own law at t
		}
		o := e.solve(e.loads[k], k, v, E, Rp)
		s.els[k], s.tj[k] = el0, t0
		p := o.Vdrop*o.I + o.Vin*(o.Ipack-o.I)
		switch o.Fail {
		case CauseLimit:
			// Held at its clamp with the load collapsed: the element takes
			// the whole input at the clamped current.
			clamp := v.lim.Clamp
			if c, ok := s.base.(protect.Clamper); ok {
				clamp = c.ClampAt(o.Vin, t)
			}
			p = o.Vin * math.Min(clamp, o.I)
		case CauseCollapse: // no operating point: no heat worth the name
			p = 0
		}
		if !(p >= 0) {
			p = 0
		}
		return p
	}
	if s.solved {
		same := true
		for k := range s.tj {
			p := power(k, s.tj[k])
			if math.Abs(p-s.p[k]) > 1e-12*math.Max(p, 1e-9) {
				same = false
				break
			}
		}
		if same {
			return 0
		}
	}
	tj := append(s.scratch[:0], s.tj...)
	s.st = s.h.Settle(e.T, power, tj)
	s.ok = s.ok && s.st.OK
	s.solved = true
	moved := 0.0
	for k, t := range tj {
		moved = math.Max(moved, math.Abs(t-s.tj[k]))
		s.tj[k], s.els[k] = t, protect.Fixed(s.base, t)
	}
	for k := range s.tj {
		s.p[k] = power(k, s.tj[k])
	}
	return moved
}

// heatCutoff finds the cut-off of the real variant with its junctions at
// the temperatures their own heat sets there: the cut-off at the current
// temperatures, then the temperatures at that cut-off, until they move by
// less than 0.05 °C (a drop's temperature slope of 2 mV/°C makes that
// 0.1 mV; each round takes the change down some thirtyfold on a constant-
// power load, the hardest case), at most four rounds. The temperatures move a little between
// rounds, and the cut-off with them: each new search starts at the last
// cut-off and brackets the new one nearby (recut).
func (e *evaluator) heatCutoff(v *variant, buf []op) float64 {
	q := e.cutoff(v, buf, 0)
	if v.heat == nil {
		return q
	}
	for range 4 {
		if e.settle(v, q) < 0.05 {
			break
		}
		q = e.recut(v, buf, q)
	}
	return q
}

// recut finds the first failure of v near q, its cut-off before the
// junction temperatures last moved: steps of 1e-4 of the curve, growing
// fourfold, away from q until the margin changes sign, then narrow. A
// bracket that runs to either end of the curve, or a margin without a
// sign (a collapse), falls back to the full search.
func (e *evaluator) recut(v *variant, buf []op, q float64) float64 {
	f, m := e.margin(q, v, buf)
	if math.IsNaN(m) {
		return e.cutoff(v, buf, 0)
	}
	d := 1e-4 * e.end
	for range 12 {
		if !f { // still works at q: the cut-off lies later
			hi := math.Min(q+d, e.end)
			f2, m2 := e.margin(hi, v, buf)
			if f2 {
				if math.IsNaN(m2) {
					return e.cutoff(v, buf, q)
				}
				return e.narrow(v, buf, q, m, hi, m2)
			}
			if hi >= e.end {
				break
			}
			q, m = hi, m2
		} else { // fails at q: the cut-off lies earlier
			lo := math.Max(q-d, 0)
			f2, m2 := e.margin(lo, v, buf)
			if !f2 {
				return e.narrow(v, buf, lo, m2, q, m)
			}
			if lo <= 0 || math.IsNaN(m2) {
				break
			}
			q, m = lo, m2
		}
		d *= 4
	}
	return e.cutoff(v, buf, 0)
}

// reportHeat works out the junction's peak and cycle mean for the result:
// the hotter of the fresh pack and the cut-off (a resistive load heats
// most when fresh, a MOSFET on a sagging pack at the end), each from the
// profile's periodic steady state. The fresh pack is solved only when some
// phase dissipates more there than at the cut-off. The run's temperatures
// (those at the cut-off) are left in place.
func (e *evaluator) reportHeat(v *variant) {
	s := v.heat
	cut := s.st.Cycle
	s.peakC, s.meanC = cut.PeakC, cut.MeanC
	keepP := append([]float64(nil), s.p...)
	E, Rp, _ := e.pack(0)
	hotter := false
	for k := range s.tj {
		o := e.solve(e.loads[k], k, v, E, Rp)
		if o.Vdrop*o.I+o.Vin*(o.Ipack-o.I) > keepP[k]*(1+1e-9) {
			hotter = true
			break
		}
	}
	if !hotter {
		return
	}
	keep := append([]float64(nil), s.tj...)
	keepEls := append([]protect.Element(nil), s.els...)
	keepSt := s.st
	e.settle(v, 0)
	if fresh := s.st.Cycle; fresh.PeakC > cut.PeakC {
		s.peakC, s.meanC = fresh.PeakC, fresh.MeanC
	}
	copy(s.tj, keep)
	copy(s.els, keepEls)
	copy(s.p, keepP)
	s.st = keepSt
}

// heatWarning is the warning for a junction whose temperature did not
// settle, naming the element; "" when it did.
func heatWarning(s *heat) string {
	if s == nil || s.ok {
		return ""
	}
	return "the " + s.base.Kind() + "'s junction does not settle: its dissipation rises with temperature faster than its package sheds the heat (thermal runaway, or no operating point); figures are at the last step the solve reached — use a bigger part, more copper or less current"
}
