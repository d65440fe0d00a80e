// A lower bound on a variant's margins, for the cut-off scan: a
// breakpoint where it is positive works without a node solve.

package discharge

import (
	"math"

	"headroom/protect"
)

// Behind constant currents and an element that draws nothing standing
// and drops the same at every charge (none, or a diode or Schottky whose
// junctions hold still), with the cells' polarisation day-periodic (or
// in continuous use), a
// node is the cells' source at the charge and fixed currents: every
// phase k's pack voltage at its worst instant is
//
//	Vin = S·(E − g·p_k) − I_k·S·R0·g/P
//
// (operating.go, solveNode; cellheat.go, warm) with E and R0 the cell's
// open-circuit voltage and resistance at the ambient, p_k the branches'
// polarisation at the ambient for those currents (in continuous use the
// rested start's, which builds up from below to the periodic state the
// bound takes: each branch is its periodic value less v*·e^(−t/τ), v* ≥ 0
// for currents out of the cell), and g the cells'
// resistance factor at their own temperature. The cells only warm above
// the ambient, and where their temperature table's resistance factor
// never rises above the ambient's, g ≤ 1: then with g = 1 every voltage
// the judge looks at (each phase's load voltage at its worst instant
// and on average, the cells' average over the time they deliver, each
// long phase's voltage for the pack's cut-off) is at least what the
// bound below gives, and where each clears its rule the variant works.
// The scan skips the node solve there (a skipped breakpoint counts as
// worked with no margin known, as a lazy start does: search).
//
// This repeats solveNode's arithmetic as inequalities: a change to the
// node's physics must change it too. TestSurelyWorksIsABound holds every
// margin the bound gives under the one a node solve gives, on random
// designs and charges, and TestShortcutsMatchGeneral the whole result to
// the path that takes no shortcut.

// sure holds what the bound needs for one variant in one search.
type sure struct {
	v            *variant
	ok           bool      // the bound applies to v
	dropW, dropM []float64 // each phase's element drop at its worst instant and on average, V
	ps           polState  // the branches at the ambient, day-periodic (when the cell has them)
	psOK         bool
}

// sureMargin is how far each bounded voltage must clear its rule, volts:
// well above the node solve's rounding.
const sureMargin = 1e-9

// sureFor prepares the bound for variant v. nd holds v solved at some
// charge when solved is set (the element's drops are read from it); a
// variant whose element drops anything needs that.
func (e *evaluator) sureFor(v *variant, nd *node, solved bool) {
	s := &e.sure
	s.v, s.ok = v, false
	if e.general || e.noSure || e.keepRates && v == &e.real || !e.linear(v) || v.over != nil || v.minLED != 0 {
		return
	}
	if v.heat != nil && !v.heat.still {
		return
	}
	if e.heatRaisesR() {
		return
	}
	n := len(e.loads)
	for k, l := range e.loads {
		if l.Amps < 0 || l.Amps > v.lim.Clamp || l.Amps > v.lim.Trip {
			return
		}
		s.dropW[k], s.dropM[k] = 0, 0
		if _, none := v.el.(protect.None); !none {
			switch v.el.(type) {
			case protect.Diode, protect.Schottky:
			default:
				return
			}
			if !solved || nd.worst[k].Fail != failNone || nd.mean[k].Fail != failNone {
				return
			}
			s.dropW[k], s.dropM[k] = nd.worst[k].Vdrop, nd.mean[k].Vdrop
		}
	}
	if e.pol != nil && !s.psOK {
		// The currents are the loads' own, the rest's the standby drain
		// (the element draws nothing standing): the same for every
		// variant the bound applies to.
		cur := e.sureCur[:n]
		for k, l := range e.loads {
			cur[k] = l.Amps / e.P
		}
		// Day-periodic with a daily pattern; in continuous use the
		// first session never ends, and its state long after the start
		// (e^(−t/τ) = 0) is the profile's periodic one, which the rested
		// start builds up to from below.
		t := math.Inf(1)
		if math.IsInf(e.sess, 1) {
			t = math.MaxFloat64
		}
		e.pol.state(cur, e.d.Standby/e.P, t, &s.ps)
		s.psOK = true
	}
	s.ok = true
}

// surelyWorks reports whether variant v, prepared by sureFor, works at
// scaled charge qs by the bound, without solving there.
func (e *evaluator) surelyWorks(v *variant, qs float64) bool {
	b, ok := e.sureBound(v, qs)
	return ok && b > sureMargin
}

// sureBound is the bound at scaled charge qs for variant v, prepared by
// sureFor: at most the smallest margin a node solve there would give
// (judge), and at most each phase's load voltage on average; false where
// the bound does not apply.
func (e *evaluator) sureBound(v *variant, qs float64) (float64, bool) {
	s := &e.sure
	if !s.ok || s.v != v || qs >= e.end || qs < 0 {
		return 0, false
	}
	if e.pol != nil && !(v.periodicOnly || qs*v.usePerQ >= e.sess || math.IsInf(e.sess, 1)) {
		// The rested first session of a daily pattern: late in it the
		// branches can stand above the day-periodic session's mean.
		return 0, false
	}
	E, R0 := e.source(qs)
	if !(R0 >= 0) || v.el.Quiescent(e.S*E, e.T) != 0 {
		return 0, false
	}
	b := math.Inf(1)
	var tv, t, all float64
	for k, l := range e.loads {
		var pw, pm, pl float64
		if e.pol != nil {
			pw, pm, pl = math.Max(s.ps.worst[k], 0), math.Max(s.ps.mean[k], 0), math.Max(s.ps.late[k], 0)
		}
		ir := l.Amps / e.P * R0 // one cell's resistive drop at the ambient
		vinW := e.S * (E - pw - ir)
		vinM := e.S * (E - pm - ir)
		b = min(b, vinW-s.dropW[k]-v.floor, vinM-s.dropM[k])
		cell := E - pm - ir // the cell's voltage on average in the phase
		if v.cutoff && e.cutoffV > 0 && e.pLate[k] {
			late := cell // without branches: the phase's own voltage
			if e.pol != nil {
				late = E - ir - pl
			}
			b = min(b, late-e.cutoffV)
		}
		all += e.w[k] * cell
		if l.Amps > 0 {
			tv += e.w[k] * cell
			t += e.w[k]
		}
	}
	avg := all // activeAverage's rule
	if t > 0 {
		avg = tv / t
	}
	return min(b, avg-e.cell.EndPoint), true
}
