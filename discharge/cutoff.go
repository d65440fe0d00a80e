// The cut-off search: the first charge at which a variant fails.

package discharge

import (
	"math"
	"sort"
)

// margin solves variant v at qs and returns whether it fails and its
// smallest margin (see judge); past the curve's end the margin is the
// charge left, negative.
func (e *evaluator) margin(qs float64, v *variant, nd *node) (bool, float64) {
	f, m, _ := e.marginWhy(qs, v, nd)
	return f != "", m
}

// causeSpent is marginWhy's cause past the curve's end: the charge has
// run out, whatever the variant.
const causeSpent Cause = "spent"

// marginWhy is margin with the first-ranked failing rule (judge), ""
// when v works at qs, and the margins rule by rule.
func (e *evaluator) marginWhy(qs float64, v *variant, nd *node) (Cause, float64, rules) {
	if qs >= e.end {
		return causeSpent, e.end - qs, noRules
	}
	e.solveNode(qs, v, nd)
	fail, _, m, r := e.judgeRules(nd, v)
	return fail, m, r
}

// found is what a cut-off search of variant v found: v works at lo and
// fails at hi, hi − lo within the search's resolution (lo = hi = 0 when
// v fails on the fresh pack); why is the first-ranked rule failing at hi
// (judge; causeSpent past the curve's end; "" when not known).
type found struct {
	v      *variant
	lo, hi float64
	why    Cause
}

// hard reports whether a rule other than the product's stops (the floor,
// the least LED current, the pack's own cut-off) fails at f.hi, so that
// v with its stops removed fails there too: judge ranks the stops after
// the fuse, the limit and a collapse but before the end-point, so a
// stop ranked first may hide an end-point failing as well, and is taken
// as not hard.
func (f found) hard() bool {
	switch f.why {
	case "", CauseFloor, CauseDim, CauseCutoff:
		return false
	}
	return true
}

// cutoff returns the scaled charge at which variant v first fails. It
// scans the breakpoints, from the last one at or below from where v
// still works (0: from the start), then narrows the first span that
// fails. Failure is taken to be permanent once it starts, as the scan
// always has.
func (e *evaluator) cutoff(v *variant, nd *node, from float64) float64 {
	return e.search(v, nd, from, false).lo
}

// search is cutoff with what it found at the failing side; the last
// search is kept in e.last. works says that v works wherever the search
// that found from saw its own variant work (v fails only where that one
// does: stops removed, or an element behind constant currents, see
// bareFails): the breakpoint at or below from is then not solved unless
// the span after it fails, where its margin is needed. Behind constant
// currents and a steady element (linear) a node solves to the same
// figures in any order (to the cells' heat's 1e-10 where they heat), so
// the search finds what it would have.
func (e *evaluator) search(v *variant, nd *node, from float64, works bool) found {
	first := 1
	lo := bound{0, 0, noRules}
	lazy, solved := false, false
	if from > 0 {
		j := sort.SearchFloat64s(e.breaks, from)
		if j == len(e.breaks) || e.breaks[j] > from {
			j--
		}
		if j > 0 && works && !e.general && e.linear(v) {
			first, lo, lazy = j+1, bound{e.breaks[j], math.NaN(), noRules}, true
		} else if j > 0 {
			if f, m, r := e.marginWhy(e.breaks[j], v, nd); f == "" {
				first, lo, solved = j+1, bound{e.breaks[j], m, r}, true
			}
		}
	}
	if first == 1 {
		var f Cause
		var m float64
		var r rules
		if e.atZero && v == &e.real {
			f, _, m, r = e.judgeRules(nd, v) // solved there already
		} else {
			f, m, r = e.marginWhy(0, v, nd)
		}
		e.atZero = false
		if e.keepRates && v == &e.real {
			e.keep(0, 0, nd)
		}
		if f != "" {
			e.last = found{v: v, why: f}
			return e.last
		}
		lo.m, lo.r, solved = m, r, true
	}
	// A breakpoint where the margins' lower bound clears every rule
	// works without a solve (surely.go).
	e.sureFor(v, nd, solved)
	// Scan the breakpoints in order for the first that fails: a
	// bisection over them would be faster but could step over a span
	// where a rule fails and then holds again (a MOSFET handing over to
	// its body diode), which the first failure must not miss.
	for i, b := range e.breaks[first:] {
		if e.surelyWorks(v, b) {
			lo, lazy = bound{b, math.NaN(), noRules}, true
			e.surely++
			continue
		}
		f, m, r := e.marginWhy(b, v, nd)
		if e.keepRates && v == &e.real && b < e.end {
			e.keep(first+i, b, nd)
		}
		if f == "" {
			lo, lazy = bound{b, m, r}, false
			continue
		}
		if lazy {
			var fl Cause
			if fl, lo.m, lo.r = e.marginWhy(lo.q, v, nd); fl != "" {
				// Not as promised: as cutoff would, with no bound.
				e.noSure = true
				f := e.search(v, nd, from, false)
				e.noSure = false
				return f
			}
		}
		e.last = e.narrowWhy(v, nd, lo, bound{b, m, r}, f)
		return e.last
	}
	e.last = found{v: v, lo: lo.q, hi: lo.q}
	return e.last
}

// narrow finds the first failure in [lo, hi], where v works at lo with
// margin mlo and fails at hi with margin mhi, to 1e-12 of the curve. It
// takes Illinois (modified regula falsi) steps on the margin while both
// ends have one, and bisects otherwise; the result is the last charge
// found to work. About ten evaluations instead of bisection's forty.
func (e *evaluator) narrow(v *variant, nd *node, lo, mlo, hi, mhi float64) float64 {
	return e.narrowWhy(v, nd, bound{lo, mlo, noRules}, bound{hi, mhi, noRules}, "").lo
}

// bound is one end of a bracket: a charge, its smallest margin and its
// margins rule by rule.
type bound struct {
	q, m float64
	r    rules
}

// oneRoot reports whether variant v's margin has a single root in any
// span past charge q where it changes sign: behind constant currents and
// a steady element whose junctions hold (linear, still), past the rested
// start's first session, every rule's margin is linear in charge between
// breakpoints (the cells' source is; the currents, drops and
// polarisation are fixed), so the smallest of them is concave and each
// rule's own margin is too. Cells that heat move their resistance a
// little with their heat, which bends the margins slightly: the single
// root is then taken, not proved (TestShortcutsMatchGeneral: 5e-13 over
// 400 random designs; the 100,800-combination sweep's sampled results
// the same to the bit).
func (e *evaluator) oneRoot(v *variant, q float64) bool {
	if e.general || !e.linear(v) || v.heat != nil && !v.heat.still {
		return false
	}
	return e.pol == nil || v.periodicOnly || q*v.usePerQ >= e.pol.hs
}

// narrowWhy is narrow with what it found at the failing side, why being
// the rule failing at hi. Where the root is the span's only one
// (oneRoot) and both ends have a margin for that rule, it steps on that
// rule's margin rather than the smallest: the smallest bends where
// another rule takes over (the end-point near the fresh end, the floor
// near the cut-off), and a step across the bend lands short, which
// Illinois recovers from only in several more. Elsewhere the steps are
// narrow's own.
func (e *evaluator) narrowWhy(v *variant, nd *node, lo, hi bound, why Cause) found {
	tol := 1e-12 * e.end
	// (Not where the margin at lo is already nil: a rule standing at
	// its limit throughout, a current equal to a clamp, ends the search
	// at the first point that works, as narrow always has.)
	one := lo.m > 0 && e.oneRoot(v, lo.q)
	// val is the margin a step is taken on at b: the failing rule's own
	// where the span has one root and b has it, else the smallest.
	val := func(b bound) float64 {
		if one {
			if x := b.r.of(why); !math.IsNaN(x) {
				return x
			}
		}
		return b.m
	}
	side := 0
	slo, shi := 1.0, 1.0 // Illinois' halvings of each end's value
	// prev and cur are the last two charges solved (at first the
	// bracket's ends).
	prev, cur := lo, hi
	// pinned is the end (−1 lo, +1 hi, 0 neither) the last step's
	// estimate fell within half a tolerance of.
	pinned := 0
	for k := 0; k < 200 && hi.q-lo.q > tol; k++ {
		flo, fhi := lo.m, hi.m
		if a, b := lo.r.of(why), hi.r.of(why); one && a > 0 && b < 0 {
			flo, fhi = a, b
		}
		flo, fhi = flo*slo, fhi*shi
		x := 0.5 * (lo.q + hi.q)
		pin := 0
		// A failing end with no margin (a limiter's clamp taking the
		// whole input with the floor at zero: 0 V above a 0 V floor) says
		// nothing of where the failure starts: the step would land on hi
		// every time and the bracket shrink by a quarter of tol a step.
		// Bisect then.
		// A junction whose settled state can jump with charge (heat.go,
		// byWork) is narrowed on whether v works alone, never on its margin.
		if flo > 0 && fhi < 0 && !v.byWork() {
			x = lo.q + (hi.q-lo.q)*flo/(flo-fhi)
			// Once two steps have been taken, the secant through the last
			// two charges solved, where it lands inside the bracket and
			// closer to the last than half their distance: on a margin
			// that bends a little (cells that heat) it converges faster
			// than the bracket's ends, one of which stays behind.
			if k >= 1 {
				vp, vc := val(prev), val(cur)
				if xs := cur.q - vc*(cur.q-prev.q)/(vc-vp); xs > lo.q && xs < hi.q &&
					math.Abs(xs-cur.q) < 0.5*math.Abs(cur.q-prev.q) {
					x = xs
				}
			}
			// Keep half a tolerance inside the bracket: once the
			// estimate is good, a step past it closes the bracket from
			// the other side. An estimate pinned there twice running at
			// the same end is not good: the smallest margin sits at
			// rounding level and jumps where the run fails (a rule
			// standing at its limit beside the one that fails), and each
			// step would move that end by half a tolerance. Bisect then
			// (TestNarrowStuckEstimateBisects).
			switch {
			case x < lo.q+0.5*tol:
				pin = -1
			case x > hi.q-0.5*tol:
				pin = 1
			}
			if pin != 0 && pin == pinned {
				x = 0.5 * (lo.q + hi.q)
			} else {
				x = min(max(x, lo.q+0.5*tol), hi.q-0.5*tol)
			}
		}
		pinned = pin
		if !(x > lo.q && x < hi.q) {
			x = 0.5 * (lo.q + hi.q)
		}
		f, m, r := e.marginWhy(x, v, nd)
		if f == "" && m == 0 {
			// A step that lands on the root: x works with nothing to
			// spare, so it is the cut-off. (Kept as lo with mlo = 0, the
			// next step could only bisect, about 37 more times.)
			return found{v: v, lo: x, hi: hi.q, why: why}
		}
		prev, cur = cur, bound{x, m, r}
		if f != "" {
			hi, why, shi = cur, f, 1
			if side == 1 {
				slo /= 2
			}
			side = 1
		} else {
			lo, slo = cur, 1
			if side == -1 {
				shi /= 2
			}
			side = -1
		}
	}
	return found{v: v, lo: lo.q, hi: hi.q, why: why}
}
