package discharge

import (
	"math"
	"math/rand"
	"testing"

	"headroom/curves"
	"headroom/internal/rc"
	"headroom/protect"
)

// refRun is a reference for one design, built apart from the engine's
// junction solve and quadrature: at every charge the junction
// temperatures come from plain fixed-point iteration of the element's
// thermal network (T ← Tamb + the network's mean rise under the phases'
// heat at T, protect.Heating.Junction, from ambient, to 1e-10 °C), with
// the node solved as a whole at those temperatures (the phases and the
// cells' polarisation together); the runtime is the trapezoid rule on an
// even grid. It shares with the engine the operating-point solve at given
// temperatures and the cell model, which other tests check.
type refRun struct {
	e   *evaluator
	v   *variant
	nd  *node
	p   []float64
	seg []rc.Segment
	its int // most iterations one charge took
}

func newRefRun(t *testing.T, d *Design, capFactor float64) *refRun {
	t.Helper()
	e := newEvaluator(d, gaussX, gaussW)
	el := protect.Fixed(d.Protect, d.TempC)
	v := &variant{el: el, lim: el.Limit(d.TempC), floor: d.Floor, cutoff: true, steady: e.steadyElement(el), minLED: d.MinLEDAmps}
	if o, ok := el.(protect.Overloader); ok {
		v.over, v.lim.Trip = o, math.Inf(1)
	}
	v.heat = e.newHeat(el)
	if v.heat == nil {
		t.Fatalf("%s: no heat to check", describeDesign(d))
	}
	v.heat.holding = true // the reference sets the temperatures itself
	r := &refRun{e: e, v: v, nd: e.newNode(), p: make([]float64, len(e.loads)), seg: make([]rc.Segment, len(e.loads))}
	// The time a charge stands for (evaluate's rule: the fresh pack's
	// drain over a calendar hour, the run's capacity factor).
	r.at(0)
	e.clock(v, e.P*capFactor, r.nd)
	return r
}

// at solves the node at scaled charge q with the junctions settled by
// plain iteration from ambient; false when the iteration does not settle
// within 5000 steps.
func (r *refRun) at(q float64) bool {
	e, s := r.e, r.v.heat
	s.ambient(e.T)
	for it := 1; it <= 5000; it++ {
		e.solveNode(q, r.v, r.nd)
		for k := range e.loads {
			r.p[k] = e.heatOf(r.nd.mean[k], r.v, s.tj[k])
		}
		s.heating(e.secs).Junction(e.T, r.p, r.seg)
		moved := 0.0
		for k := range r.seg {
			t := r.seg[k].Mean
			moved = math.Max(moved, math.Abs(t-s.tj[k]))
			s.tj[k], s.els[k] = t, protect.Fixed(s.base, t)
		}
		if moved < 1e-10 {
			e.solveNode(q, r.v, r.nd)
			r.its = max(r.its, it)
			return true
		}
	}
	return false
}

// works reports whether the reference run works at scaled charge q (the
// engine's rules, judge, at the reference's temperatures).
func (r *refRun) works(t *testing.T, q float64) bool {
	if q >= r.e.end {
		return false
	}
	if !r.at(q) {
		t.Fatalf("the plain iteration does not settle at %g mAh", q)
	}
	f, _, _ := r.e.judge(r.nd, r.v)
	return f == ""
}

// cutoff is the reference's first failure: the first of 2,000 even
// steps over the curve that fails, then bisection on whether it works
// to 1e-12 of the curve.
func (r *refRun) cutoff(t *testing.T) float64 {
	e := r.e
	if !r.works(t, 0) {
		return 0
	}
	const n = 2000
	lo, hi := 0.0, e.end
	for i := 1; i <= n; i++ {
		q := e.end * float64(i) / n
		if !r.works(t, q) {
			hi = q
			break
		}
		lo = q
	}
	for hi-lo > 1e-12*e.end {
		mid := 0.5 * (lo + hi)
		if r.works(t, mid) {
			lo = mid
		} else {
			hi = mid
		}
	}
	return lo
}

// runtime is the hours of use from the fresh pack to scaled charge qc by
// the trapezoid rule on n even steps: ∫ scale/calendar dq times the
// share of the day in use (the engine's definition, Result.RuntimeH).
func (r *refRun) runtime(t *testing.T, qc, scale float64, n int) float64 {
	e := r.e
	g := func(q float64) float64 {
		if !r.at(q) {
			t.Fatalf("the plain iteration does not settle at %g mAh", q)
		}
		return scale / e.rates(q, r.v, r.nd).calendar
	}
	h := qc / float64(n)
	sum := 0.5 * (g(0) + g(qc*(1-1e-12)))
	for i := 1; i < n; i++ {
		sum += g(h * float64(i))
	}
	return sum * h * e.duty
}

// TestHeatAgainstReference checks the engine's runtime and cut-off on
// randomised designs where the junction moves with charge — a P-MOSFET
// whose gate drive sags with the pack, a resistive load, a constant-power
// converter, the current limiter — against refRun: plain fixed-point
// iteration of the thermal network at every charge and the trapezoid
// rule on 20,000 steps (no outside source: an independent solve of the
// same model).
//
// Tolerances, derived: the trapezoid's error is estimated from the same
// sum on 10,000 steps (Richardson: the error of the finer is about a
// third of the difference), and three times that is allowed. The junction
// solves stop within about 1e-7 °C, a drop's slope of a few mV/°C making
// that under 1e-9 of the runtime: with the engine's quadrature taken to
// 48 nodes a span the runtimes must agree to 1e-8. The engine's own
// 8-node rule errs by up to a few 1e-7 on these integrands (measured
// 3.5e-7 on the MOSFET's resistive load; 2e-5 at worst near a
// converter's collapse, TestQuadratureConverges): 1e-6 here. The
// cut-offs are placed to 1e-12 of the curve by both; the temperatures'
// differences move them by about the margin's error over its slope,
// well under 1e-7 of the curve.
func TestHeatAgainstReference(t *testing.T) {
	if testing.Short() {
		t.Skip("20,000 junction solves per design")
	}
	rng := rand.New(rand.NewSource(13)) // fixed: the designs are the same every run
	fx, fw := legendre(48)
	type kind struct {
		cell, el string
		s        int
		load     func() string
		floor    float64
	}
	kinds := []kind{
		// A P-MOSFET whose gate drive sags with the pack, behind a
		// resistive load and behind constant currents.
		{"lr6", "pmos", 2, func() string { return ftoa(4+8*rng.Float64()) + "ohm" }, 1.6},
		{"lr20", "pmos", 4, func() string {
			return ftoa(1+2*rng.Float64()) + "A/" + ftoa(0.3+rng.Float64()) + "s," + ftoa(0.05+0.2*rng.Float64()) + "A/10s"
		}, 3.0},
		// A diode in front of a constant-power converter and a resistive load.
		{"lr6", "diode", 2, func() string { return ftoa(0.5+0.7*rng.Float64()) + "W@85%" }, 1.8},
		{"hr6", "schottky", 3, func() string { return ftoa(3+6*rng.Float64()) + "ohm" }, 2.4},
		// The current limiter on a resistive load and on pulses below its limit.
		{"lr6", "limiter", 2, func() string { return ftoa(8+10*rng.Float64()) + "ohm" }, 1.8},
		{"lr14", "limiter", 3, func() string {
			return ftoa(0.2+0.2*rng.Float64()) + "A/" + ftoa(1+rng.Float64()) + "s," + ftoa(0.02+0.05*rng.Float64()) + "A/20s"
		}, 2.5},
		// A P-MOSFET in front of a converter.
		{"li-ion-pouch", "pmos", 1, func() string { return ftoa(1+2*rng.Float64()) + "W@90%" }, 3.0},
	}
	for _, k := range kinds {
		lib, ok := curves.Lookup(k.cell)
		if !ok {
			t.Fatalf("no cell %q", k.cell)
		}
		// The cells at the ambient (no self-heating): this checks the
		// element's junction; the cells' own heat has its reference in
		// TestSelfHeatingAgainstTimeStepped.
		cc := *lib
		cc.ThermalRes = 0
		c := &cc
		el, err := protect.Parse(k.el)
		if err != nil {
			t.Fatal(err)
		}
		ph, err := ParseProfile(k.load())
		if err != nil {
			t.Fatal(err)
		}
		temp := -10 + 50*rng.Float64()
		d := &Design{Cell: c, Series: k.s, Parallel: 1, Protect: el, Profile: ph, Floor: k.floor, TempC: temp}
		res, err := Evaluate(d)
		if err != nil {
			t.Fatal(err)
		}
		name := describeDesign(d)
		if res.JunctionC < temp+1 {
			t.Errorf("%s: junction %.2f °C at %.2f °C ambient: not a heat-relevant design", name, res.JunctionC, temp)
		}
		ref := newRefRun(t, d, res.CapacityFactor)
		scale := ref.e.P * res.CapacityFactor
		qEng := res.DeliveredMAh / scale
		qRef := ref.cutoff(t)
		if math.Abs(qEng-qRef) > 1e-7*ref.e.end {
			t.Errorf("%s: cut-off %.9g mAh (scaled), reference %.9g", name, qEng, qRef)
		}
		fine := ref.runtime(t, qEng, scale, 20000)
		coarse := ref.runtime(t, qEng, scale, 10000)
		trapErr := math.Abs(fine-coarse) / 3
		if d := math.Abs(res.RuntimeH - fine); !(d <= 1e-6*fine+3*trapErr) {
			t.Errorf("%s: runtime %.9g h, reference %.9g h (differ by %.2g of it)", name, res.RuntimeH, fine, d/fine)
		}
		// The same with the engine's quadrature taken out of the
		// comparison (48 nodes a span): the junction solve alone.
		r48, err := evaluate(d, fx, fw)
		if err != nil {
			t.Fatal(err)
		}
		if d := math.Abs(r48.RuntimeH - fine); !(d <= 1e-8*fine+3*trapErr) {
			t.Errorf("%s: runtime with 48 nodes a span %.9g h, reference %.9g h (differ by %.2g of it)", name, r48.RuntimeH, fine, d/fine)
		}
		t.Logf("%s: %.7g h vs %.7g h (%.1e; 48 nodes %.1e; trapezoid ±%.1e); cut-off %.1e of the curve apart; junction %.1f °C; ≤ %d iterations",
			name, res.RuntimeH, fine, res.RuntimeH/fine-1, r48.RuntimeH/fine-1, trapErr/fine, math.Abs(qEng-qRef)/ref.e.end, res.JunctionC, ref.its)
	}
}
