// The voltage trace for charts.

package discharge

import (
	"math"
)

// trace samples the voltages at evenly spaced charges, integrating the
// time between samples with the quadrature's rules.
func (e *evaluator) trace(v *variant, qsCut, scale, f float64, r *Result, nd *node, quad *quadrature) {
	n := e.d.TracePoints
	r.Trace = make([]TracePoint, n)
	hours := 0.0
	var prev float64
	for k := 0; k < n; k++ {
		q := qsCut * float64(k) / float64(n-1)
		if k == n-1 {
			q = qsCut * (1 - 1e-12)
		}
		if k > 0 {
			half, mid := 0.5*(q-prev), 0.5*(q+prev)
			gx, gw := quad.nodesOn(prev)
			for j, x := range gx {
				rt := e.rates(mid+half*x, v, nd)
				hours += gw[j] * half * scale / rt.calendar
			}
		}
		prev = q
		e.solveNode(q, v, nd)
		tp := TracePoint{Hours: hours * f, MAh: q * scale, LoadV: math.Inf(1), IdleV: math.Inf(-1)}
		for _, o := range nd.worst {
			if o.Vload < tp.LoadV {
				tp.LoadV, tp.PackV = o.Vload, o.Vin
			}
			tp.IdleV = math.Max(tp.IdleV, o.Vload)
		}
		r.Trace[k] = tp
	}
	if n > 1 {
		// The trace and the runtime integrate over different spans; where
		// the integrand has a corner between breakpoints (an LED going
		// dark) they differ by a few per cent. Scale the trace onto the
		// runtime so that it ends there and still moves forward in time.
		if last := r.Trace[n-1].Hours; last > 0 {
			k := r.RuntimeH / last
			for j := range r.Trace {
				r.Trace[j].Hours *= k
			}
		}
		r.Trace[n-1].Hours = r.RuntimeH
	}
}
