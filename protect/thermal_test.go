package protect

import (
	"math"
	"testing"
)

// theta=0 is an ideal heat sink: accepted, the package stage
// follows it down, and the junction stays at ambient whatever it carries.
func TestThetaZeroIsIdealHeatSink(t *testing.T) {
	for _, k := range []string{"diode", "schottky", "pmos", "pmos-clamp", "limiter", "pptc", "crowbar", "ic"} {
		e, err := Parse(k + ":theta=0")
		if err != nil {
			t.Fatalf("%s:theta=0 refused: %v", k, err)
		}
		th := e.Thermal()
		if th.ThetaJA != 0 || th.Fast != 0 {
			t.Errorf("%s:theta=0 gives θ %g, package stage %g", k, th.ThetaJA, th.Fast)
		}
		h := NewHeating(th, []float64{0.3, 30})
		c := h.Junction(25, []float64{5, 1}, nil)
		if c.PeakC != 25 || c.MeanC != 25 {
			t.Errorf("%s:theta=0: junction %g/%g °C, want 25 (ambient, exactly)", k, c.PeakC, c.MeanC)
		}
		// And Parse(Spec()) gives it back.
		back, err := Parse(e.Spec())
		if err != nil || back.Thermal() != th {
			t.Errorf("%s: %q does not read back: %v", k, e.Spec(), err)
		}
	}
}

// The electro-thermal fixed point on a linearised diode has a closed form
// : drop = V0 − a·ΔT with ΔT = θ·I·drop gives
// ΔT = θ·I·V0 / (1 + θ·I·a). One phase (a steady current): the network's
// mean is θ·P exactly. Checked to 1e-6 °C; the solve stops when a step
// moves less than 1e-4 °C (Newton: the error left is of its square).
func TestSettleLinearDiodeClosedForm(t *testing.T) {
	for _, c := range []struct{ v0, a, i, theta, tamb float64 }{
		{0.865, 0.002, 0.45, 100, 20}, // the demo's diode, steady
		{0.47, 0.0015, 1, 150, 25},    // a Schottky at 1 A
		{0.9, 0.002, 3, 100, -10},     // heavy: loop gain θ·I·a = 0.6
		{0.7, 0.002, 0.1, 0, 40},      // theta=0: no rise at all
		{0.3, -0.004, 1, 100, 25},     // a drop that rises when hot: gain 0.4
	} {
		th := Thermal{ThetaJA: c.theta, TjMax: 150, Fast: 0.3 * c.theta, TauFast: 1, Tau: 30}
		h := NewHeating(th, []float64{10})
		tj := []float64{0}
		st := h.Settle(c.tamb, func(k int, tjC float64) float64 {
			return c.i * (c.v0 - c.a*(tjC-c.tamb))
		}, tj)
		want := c.theta * c.i * c.v0 / (1 + c.theta*c.i*c.a)
		if !st.OK || math.Abs(tj[0]-c.tamb-want) > 1e-6 { // the solve stops after a step under 1e-4 °C
			t.Errorf("%+v: ΔT = %.9f (ok %v, %d steps), closed form %.9f", c, tj[0]-c.tamb, st.OK, st.Steps, want)
		}
		if math.Abs(st.Cycle.MeanC-tj[0]) > 1e-6 {
			t.Errorf("%+v: cycle mean %.9f, phase %.9f", c, st.Cycle.MeanC, tj[0])
		}
	}
}

// Two phases (a pulse and a rest) with linearised drops: the settled
// temperatures solve the linear system T − Tamb = M·P, P = p0 − s·(T −
// Tamb), M the network's mean rise in each phase per watt in each phase.
// M comes from the periodic closed forms (checked in internal/rc); the
// 2×2 system is solved here by Cramer's rule, independently of Settle's
// iteration. 1e-6 °C.
func TestSettleTwoPhaseLinear(t *testing.T) {
	th := sma
	secs := []float64{3, 27}
	h := NewHeating(th, secs)
	var M [2][2]float64
	for j := 0; j < 2; j++ {
		w := []float64{0, 0}
		w[j] = 1
		h.train.Periodic(w, h.seg)
		M[0][j], M[1][j] = h.seg[0].Mean, h.seg[1].Mean
	}
	p0 := []float64{0.45 * 0.865, 0.015 * 0.62}
	s := []float64{0.45 * 0.002, 0.015 * 0.0025}
	// (I + M·diag(s))·ΔT = M·p0
	a11, a12 := 1+M[0][0]*s[0], M[0][1]*s[1]
	a21, a22 := M[1][0]*s[0], 1+M[1][1]*s[1]
	b1 := M[0][0]*p0[0] + M[0][1]*p0[1]
	b2 := M[1][0]*p0[0] + M[1][1]*p0[1]
	det := a11*a22 - a12*a21
	want := []float64{(b1*a22 - a12*b2) / det, (a11*b2 - a21*b1) / det}
	tj := make([]float64, 2)
	st := h.Settle(20, func(k int, tjC float64) float64 { return p0[k] - s[k]*(tjC-20) }, tj)
	for k := range want {
		if !st.OK || math.Abs(tj[k]-20-want[k]) > 1e-6 {
			t.Errorf("phase %d: ΔT %.9f, linear solve %.9f (ok %v)", k, tj[k]-20, want[k], st.OK)
		}
	}
}

// A dissipation that grows faster with temperature than the network sheds
// it has no operating point (thermal runaway): Settle says so and returns
// finite temperatures, never NaN (bad input).
func TestSettleRunaway(t *testing.T) {
	h := NewHeating(sot23, []float64{30})
	tj := []float64{0}
	// P = 1 W · (1 + 0.01·(T − 25)): loop gain θ·0.01 W/°C = 2.5.
	st := h.Settle(25, func(k int, tjC float64) float64 { return 1 + 0.01*(tjC-25) }, tj)
	if st.OK {
		t.Errorf("runaway reported as settled at %g °C", tj[0])
	}
	if !isFinite(tj[0]) || !isFinite(st.Cycle.PeakC) {
		t.Errorf("runaway gives %g °C, peak %g", tj[0], st.Cycle.PeakC)
	}
	st = h.Settle(25, func(k int, tjC float64) float64 { return math.NaN() }, tj)
	if st.OK || !isFinite(tj[0]) {
		t.Errorf("NaN power: ok %v, %g °C", st.OK, tj[0])
	}
}

// A short pulse heats a small package by Zth(t)·P, a fraction of θja·P
// (docs/references.md; a 0.3 s, 1.58 W start pulse on SOT-23). The periodic
// junction peaks at the end of the pulse, above the single pulse from
// ambient by the leftover heat of earlier cycles, and below the steady
// figure. The cycle mean is Tamb + θja·P̄ exactly (a linear network's
// average): 1e-9.
func TestPulseJunctionSOT23(t *testing.T) {
	secs := []float64{0.3, 30}
	w := []float64{1.58, 0}
	h := NewHeating(sot23, secs)
	c := h.Junction(20, w, nil)
	single := sot23.Pulse(1.58, 0.3, 20)
	steady := sot23.Junction(1.58, 20)
	if !(c.PeakC >= single && c.PeakC < steady && c.Phase == 0) {
		t.Errorf("peak %.2f °C (phase %d); single pulse %.2f, steady %.2f", c.PeakC, c.Phase, single, steady)
	}
	mean := 20 + sot23.ThetaJA*1.58*0.3/30.3
	if math.Abs(c.MeanC-mean) > 1e-9 {
		t.Errorf("cycle mean %.12f °C, want %.12f", c.MeanC, mean)
	}
	t.Logf("SOT-23, 1.58 W for 0.3 s every 30.3 s at 20 °C: peak %.1f °C (single pulse %.1f, steady θja %.0f), mean %.2f °C",
		c.PeakC, single, steady, c.MeanC)
}
