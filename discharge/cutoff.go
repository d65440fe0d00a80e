// The cut-off search: the first charge at which a variant fails.

package discharge

import (
	"math"
	"sort"
)

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
