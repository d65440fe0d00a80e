// Operating points: each phase's current and voltages at one charge.

package discharge

import (
	"math"

	"headroom/protect"
)

// solve finds the operating point of load l with the pack source (E, Rp)
// behind element v.
func (e *evaluator) solve(l Load, k int, v *variant, E, Rp float64) op {
	T := e.T
	iq := v.el.Quiescent(E, T)
	vin := func(i float64) float64 { return E - (i+iq)*Rp }
	vload := func(i float64) float64 {
		x := vin(i)
		return x - v.el.Drop(i, x, T)
	}
	var i float64
	switch l.Kind {
	case ConstantCurrent:
		i = l.Amps
	case ConstantResistance:
		g := func(i float64) float64 { return i*l.Ohms - vload(i) }
		if vload(0) <= 0 {
			i = 0
		} else {
			i = e.warmRoot(g, k, E/l.Ohms)
		}
	case LED:
		g := func(i float64) float64 { return i*l.Ohms + l.Vf - vload(i) }
		if vload(0) <= l.Vf {
			i = 0
		} else {
			i = e.warmRoot(g, k, (E-l.Vf)/l.Ohms)
		}
	case ConstantPower:
		pin := l.InputPower()
		if pin > 0 {
			var ok bool
			// Behind an element whose drop jumps (a MOSFET handing over
			// to its body diode) i·vload(i) is not concave and meets pin
			// twice; a warm start from the upper branch would find the
			// upper root. Only the element-free source is always concave.
			hint := e.hint[k]
			_, none := v.el.(protect.None)
			if !none {
				hint = 0
			}
			i, ok = powerPoint(vload, pin, E, hint)
			if !ok && !none {
				i, ok = scanPower(vload, pin, i)
			}
			if ok {
				e.hint[k] = i
			} else {
				return op{I: i, Ipack: i + iq, Vin: vin(i), Vload: 0, Fail: CauseCollapse}
			}
		}
	}
	o := op{I: i, Ipack: i + iq}
	o.Vin = vin(i)
	o.Vdrop = v.el.Drop(i, o.Vin, T)
	o.Vload = o.Vin - o.Vdrop
	// A resistive or LED load sets its own voltage, i·R (+ Vf). Where the
	// element's drop jumps (a FET out of gate drive hands over to its
	// body diode) the root sits on the jump and vin − Drop(i) reads the
	// far side of it; the element takes up the difference, as a
	// saturated FET does.
	if i > 0 && (l.Kind == ConstantResistance || l.Kind == LED) {
		o.Vload = i * l.Ohms
		if l.Kind == LED {
			o.Vload += l.Vf
		}
		o.Vdrop = math.Max(o.Vin-o.Vload, 0) // not −1e-17 from rounding
	}
	switch {
	case i > v.lim.Trip:
		o.Fail = CauseFuse
	case i > v.lim.Clamp:
		o.Fail = CauseLimit
	case o.Vload <= 0 && i > 0:
		// The pack cannot push this current at all: no voltage is left
		// for the load.
		o.Fail = CauseCollapse
	case o.Vload < v.floor:
		o.Fail = CauseFloor
	}
	return o
}

// warmRoot finds the root of an increasing g on [0, hi] for phase k,
// first within 1 % of the phase's last current: successive solves come at
// nearby charges, so that narrow bracket usually holds the root and saves
// half the iterations. Otherwise it searches the whole range.
func (e *evaluator) warmRoot(g func(float64) float64, k int, hi float64) float64 {
	if h := e.hint[k]; h > 0 {
		a, b := 0.9*h, min(1.1*h, hi)
		if a < b {
			if fa, fb := g(a), g(b); fa <= 0 && fb >= 0 {
				i := bracketRootF(g, a, b, fa, fb)
				e.hint[k] = i
				return i
			}
		}
	}
	i := bracketRoot(g, 0, hi)
	e.hint[k] = i
	return i
}

// powerPoint finds the lower (stable) current at which i·vload(i) = pin by
// Newton's method from zero current. i·vload(i) is concave for every element
// headroom models, so the iterates rise monotonically to the root without
// overshooting; if the slope turns non-positive first there is no operating
// point: the load collapses (DESIGN §4: Voc²/(4·R) < Pin for a resistive
// source).
//
// A warm start i0 > 0 (the phase's last current) is tried first, from just
// below it. Where the slope there is positive, the first Newton step lands
// at or below the lower root (a concave function lies under its tangent),
// and the iterates rise from there as from zero; any failure on the warm
// path falls back to the start from zero, so a collapse is only ever
// declared from there.
func powerPoint(vload func(float64) float64, pin, E, i0 float64) (float64, bool) {
	if i0 > 0 {
		if i, ok := newtonPower(vload, pin, E, 0.99*i0); ok {
			return i, true
		}
	}
	return newtonPower(vload, pin, E, 0)
}

// scanPower looks again for the lowest current at which i·vload(i) = pin
// after Newton gave up at current at: behind an element whose drop jumps
// the product is not concave, and Newton can stop at a false peak or at
// the jump. It scans from zero to where the load voltage runs out and
// brackets the first crossing; false when there is none (a collapse).
func scanPower(vload func(float64) float64, pin, at float64) (float64, bool) {
	hi := math.Max(at, 1e-9)
	for k := 0; k < 60 && vload(hi) > 0; k++ {
		hi *= 2
	}
	const n = 128
	P := func(x float64) float64 { return x*vload(x) - pin }
	lo, flo := 0.0, -pin
	for j := 1; j <= n; j++ {
		x := hi * float64(j) / n
		fx := P(x)
		if fx >= 0 {
			return bracketRootF(P, lo, x, flo, fx), true
		}
		lo, flo = x, fx
	}
	return at, false
}

// newtonPower is powerPoint's Newton iteration from current i.
func newtonPower(vload func(float64) float64, pin, E, i float64) (float64, bool) {
	for k := 0; k < 200; k++ {
		v := vload(i)
		f := i*v - pin
		if v <= 0 {
			return i, false
		}
		h := 1e-7 * math.Max(i, pin/E)
		v2 := vload(i + h)
		df := ((i+h)*v2 - i*v) / h
		if df <= 0 {
			return i, false
		}
		step := -f / df
		if i+step < 0 { // a warm start above the root stepped past zero
			step = -i
		}
		i += step
		if math.Abs(step) <= 1e-13*i {
			return i, i*vload(i) >= pin*(1-1e-9)
		}
	}
	v := vload(i)
	return i, math.Abs(i*v-pin) <= 1e-9*pin
}

// phases solves every phase at qs; it returns the first failure.
func (e *evaluator) phases(qs float64, v *variant, out []op) (fail Cause, phase int) {
	fail, phase = "", -1
	if qs >= e.end {
		return CauseEndPoint, 0
	}
	E, Rp, _ := e.pack(qs)
	e.lastE, e.lastRp = E, Rp
	for k, l := range e.loads {
		o := e.solve(l, k, v, E, Rp)
		o.CellV = (E - o.Ipack*Rp) / e.S
		if o.Fail == "" && o.CellV < e.cell.EndPoint {
			o.Fail = CauseEndPoint
		}
		if out != nil {
			out[k] = o
		}
		if o.Fail != "" && (fail == "" || rank(o.Fail) < rank(fail)) {
			fail, phase = o.Fail, k
		}
	}
	return fail, phase
}

// rank orders causes when several phases fail at once: the most telling first.
func rank(c Cause) int {
	switch c {
	case CauseFuse:
		return 0
	case CauseLimit:
		return 1
	case CauseCollapse:
		return 2
	case CauseFloor:
		return 3
	}
	return 4
}
