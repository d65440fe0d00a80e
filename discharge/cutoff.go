// The cut-off search: the first charge at which a variant fails.

package discharge

import "sort"

// margin solves variant v at qs and returns whether it fails and its
// smallest margin (see judge); past the curve's end the margin is the
// charge left, negative.
func (e *evaluator) margin(qs float64, v *variant, nd *node) (bool, float64) {
	f, m := e.marginWhy(qs, v, nd)
	return f != "", m
}

// causeSpent is marginWhy's cause past the curve's end: the charge has
// run out, whatever the variant.
const causeSpent Cause = "spent"

// marginWhy is margin with the first-ranked failing rule (judge), ""
// when v works at qs.
func (e *evaluator) marginWhy(qs float64, v *variant, nd *node) (Cause, float64) {
	if qs >= e.end {
		return causeSpent, e.end - qs
	}
	e.solveNode(qs, v, nd)
	fail, _, m := e.judge(nd, v)
	return fail, m
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
	return e.search(v, nd, from).lo
}

// search is cutoff with what it found at the failing side; the last
// search is kept in e.last.
func (e *evaluator) search(v *variant, nd *node, from float64) found {
	first := 1
	lo, mlo := 0.0, 0.0
	if from > 0 {
		j := sort.SearchFloat64s(e.breaks, from)
		if j == len(e.breaks) || e.breaks[j] > from {
			j--
		}
		if j > 0 {
			if f, m := e.margin(e.breaks[j], v, nd); !f {
				first, lo, mlo = j+1, e.breaks[j], m
			}
		}
	}
	if first == 1 {
		f, m := e.marginWhy(0, v, nd)
		if f != "" {
			e.last = found{v: v, why: f}
			return e.last
		}
		mlo = m
	}
	// Scan the breakpoints in order for the first that fails: a
	// bisection over them would be faster but could step over a span
	// where a rule fails and then holds again (a MOSFET handing over to
	// its body diode), which the first failure must not miss.
	e.last = found{v: v, lo: lo, hi: lo}
	for _, b := range e.breaks[first:] {
		f, m := e.marginWhy(b, v, nd)
		if f == "" {
			lo, mlo = b, m
			continue
		}
		e.last = e.narrowWhy(v, nd, lo, mlo, b, m, f)
		return e.last
	}
	e.last = found{v: v, lo: lo, hi: lo}
	return e.last
}

// narrow finds the first failure in [lo, hi], where v works at lo with
// margin mlo and fails at hi with margin mhi, to 1e-12 of the curve. It
// takes Illinois (modified regula falsi) steps on the margin while both
// ends have one, and bisects otherwise; the result is the last charge
// found to work. About ten evaluations instead of bisection's forty.
func (e *evaluator) narrow(v *variant, nd *node, lo, mlo, hi, mhi float64) float64 {
	return e.narrowWhy(v, nd, lo, mlo, hi, mhi, "").lo
}

// narrowWhy is narrow with what it found at the failing side, why being
// the rule failing at hi as given.
func (e *evaluator) narrowWhy(v *variant, nd *node, lo, mlo, hi, mhi float64, why Cause) found {
	tol := 1e-12 * e.end
	side := 0
	for k := 0; k < 200 && hi-lo > tol; k++ {
		x := 0.5 * (lo + hi)
		// A failing end with no margin (a limiter's clamp taking the
		// whole input with the floor at zero: 0 V above a 0 V floor) says
		// nothing of where the failure starts: the step would land on hi
		// every time and the bracket shrink by a quarter of tol a step.
		// Bisect then.
		if mlo > 0 && mhi < 0 {
			x = lo + (hi-lo)*mlo/(mlo-mhi)
			// Keep a little inside the bracket, so that it shrinks from
			// both ends once the estimate is good.
			x = min(max(x, lo+0.25*tol), hi-0.25*tol)
		}
		if !(x > lo && x < hi) {
			x = 0.5 * (lo + hi)
		}
		f, m := e.marginWhy(x, v, nd)
		if f == "" && m == 0 {
			// A step that lands on the root: x works with nothing to
			// spare, so it is the cut-off. (Kept as lo with mlo = 0, the
			// next step could only bisect, about 37 more times.)
			return found{v: v, lo: x, hi: hi, why: why}
		}
		if f != "" {
			hi, mhi, why = x, m, f
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
	return found{v: v, lo: lo, hi: hi, why: why}
}
