// The cut-off search: the first charge at which a variant fails.

package discharge

import "sort"

// margin solves variant v at qs and returns whether it fails and its
// smallest margin (see judge); past the curve's end the margin is the
// charge left, negative.
func (e *evaluator) margin(qs float64, v *variant, nd *node) (bool, float64) {
	if qs >= e.end {
		return true, e.end - qs
	}
	e.solveNode(qs, v, nd)
	fail, _, m := e.judge(nd, v)
	return fail != "", m
}

// cutoff returns the scaled charge at which variant v first fails. It
// scans the breakpoints, from the last one at or below from where v
// still works (0: from the start), then narrows the first span that
// fails. Failure is taken to be permanent once it starts, as the scan
// always has.
func (e *evaluator) cutoff(v *variant, nd *node, from float64) float64 {
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
		f, m := e.margin(0, v, nd)
		if f {
			return 0
		}
		mlo = m
	}
	// Scan the breakpoints in order for the first that fails: a
	// bisection over them would be faster but could step over a span
	// where a rule fails and then holds again (a MOSFET handing over to
	// its body diode), which the first failure must not miss.
	for _, b := range e.breaks[first:] {
		f, m := e.margin(b, v, nd)
		if !f {
			lo, mlo = b, m
			continue
		}
		return e.narrow(v, nd, lo, mlo, b, m)
	}
	return lo
}

// narrow finds the first failure in [lo, hi], where v works at lo with
// margin mlo and fails at hi with margin mhi, to 1e-12 of the curve. It
// takes Illinois (modified regula falsi) steps on the margin while both
// ends have one, and bisects otherwise; the result is the last charge
// found to work. About ten evaluations instead of bisection's forty.
func (e *evaluator) narrow(v *variant, nd *node, lo, mlo, hi, mhi float64) float64 {
	tol := 1e-12 * e.end
	side := 0
	for k := 0; k < 200 && hi-lo > tol; k++ {
		x := 0.5 * (lo + hi)
		// A failing end with no margin (a limiter's clamp taking the
		// whole input with the floor at zero: 0 V above a 0 V floor) says
		// nothing of where the failure starts: the step would land on hi
		// every time and the bracket shrink by a quarter of tol a step.
		// Bisect then.
		// A junction whose settled state can jump with charge (heat.go,
		// byWork) is narrowed on whether v works alone, never on its margin.
		if mlo > 0 && mhi < 0 && !v.byWork() {
			x = lo + (hi-lo)*mlo/(mlo-mhi)
			// Keep a little inside the bracket, so that it shrinks from
			// both ends once the estimate is good.
			x = min(max(x, lo+0.25*tol), hi-0.25*tol)
		}
		if !(x > lo && x < hi) {
			x = 0.5 * (lo + hi)
		}
		f, m := e.margin(x, v, nd)
		if !f && m == 0 {
			// A step that lands on the root: x works with nothing to
			// spare, so it is the cut-off. (Kept as lo with mlo = 0, the
			// next step could only bisect, about 37 more times.)
			return x
		}
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
