package cellfit

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/optimize"

	"headroom/curves"
	"headroom/discharge"
	"headroom/internal/rc"
)

// measuredHeat is a record's dissipation, W, at each sample: the current
// times the overpotential, I·(OCV(q) − V), OCV from model m at the charge
// drawn so far (trapezoid rule). The reversible (entropic) heat, I·T·dU/dT,
// is left out, as the engine leaves it out.
func measuredHeat(l *Log, m *Model) []float64 {
	p := make([]float64, l.Len())
	q := 0.0
	for k := range p {
		if k > 0 {
			q += 0.5 * (l.I[k] + l.I[k-1]) * (l.T[k] - l.T[k-1]) / 3.6
		}
		if l.I[k] > 0.05 { // the rests' few mA of sensor noise carry no heat
			p[k] = math.Max(0, l.I[k]*(m.OCV(q)-l.V[k]))
		}
	}
	return p
}

// thermalTrace steps a lumped cell (rc.Stage{θ, C·θ}) through a record's
// dissipation from its first temperature: exact exponential steps, the
// power held at its mean over each sample interval.
func thermalTrace(l *Log, p []float64, theta, capJ float64) []float64 {
	st := rc.Stage{R: theta, Tau: capJ * theta}
	out := make([]float64, l.Len())
	u := 0.0
	out[0] = l.TempC[0]
	for k := 1; k < l.Len(); k++ {
		u = st.Step(u, 0.5*(p[k]+p[k-1]), l.T[k]-l.T[k-1])
		out[k] = l.TempC[0] + u
	}
	return out
}

func rms(a, b []float64) float64 {
	s := 0.0
	for k := range a {
		s += (a[k] - b[k]) * (a[k] - b[k])
	}
	return math.Sqrt(s / float64(len(a)))
}

func maxOf(x []float64) float64 {
	m := math.Inf(-1)
	for _, v := range x {
		m = math.Max(m, v)
	}
	return m
}

// fitThermal fits θ (K/W) and C (J/K) to one record's surface temperature
// (gonum optimize, Nelder–Mead on the RMS of the model against T_C, in log
// space so both stay positive).
func fitThermal(t *testing.T, l *Log, p []float64) (theta, capJ, res float64) {
	f := func(x []float64) float64 { return rms(thermalTrace(l, p, math.Exp(x[0]), math.Exp(x[1])), l.TempC) }
	r, err := optimize.Minimize(optimize.Problem{Func: f}, []float64{math.Log(10), math.Log(40)}, nil, &optimize.NelderMead{})
	if err != nil && r == nil {
		t.Fatal(err)
	}
	return math.Exp(r.X[0]), math.Exp(r.X[1]), r.F
}

// The cells' self-heating against the measured NASA records (testdata/
// measured/nasa-li-ion; README: B. Saha and K. Goebel, NASA Ames, 2007):
// the surface temperature of a lumped cell, C and θ fitted on one record,
// predicts the others' rise from their own measured dissipation.
//
// The 2 A record's temperature channel is suspect (README: 1.7 K of rise
// where sister cells show 14–17 K), so C and θ are fitted on the 4 A
// square wave (B0026), whose pulses and rests carry both the heating and
// the cooling, and predict the 4 A constant-current record (B0034, a
// sister cell: measured rise 28.2 K, then 28 min of cooling).
//
// Tolerance: the predicted peak rise within 15 % of the measured. The
// dissipation is each record's own (its measured voltage), so the cells'
// spread in resistance is in it; what is not: the reversible heat
// (I·T·dU/dT, left out; for Li-ion at 2C some 10 % of the losses, from
// memory), the surface reading a lumped core (the thermocouple on the can
// lags and reads low), and the two cells' mounting in the chamber.
func TestNASASelfHeating(t *testing.T) {
	cc4, cc2, sq := nasaLog(t, cc4File), nasaLog(t, cc2File), nasaLog(t, sqFile)
	_, cell, _ := fitAndWrite(t, []*Log{cc4, cc2})
	m := ModelOf(cell, 24)
	p4, p2, pq := measuredHeat(cc4, m), measuredHeat(cc2, m), measuredHeat(sq, m)

	theta, capJ, res := fitThermal(t, sq, pq)
	t.Logf("fitted on the square wave: θ %.2f K/W, C %.1f J/K (τ %.0f s), RMS %.2f K", theta, capJ, theta*capJ, res)
	for _, c := range []struct {
		l *Log
		p []float64
	}{{cc4, p4}, {sq, pq}, {cc2, p2}} {
		tr := thermalTrace(c.l, c.p, theta, capJ)
		rise, want := maxOf(tr)-c.l.TempC[0], maxOf(c.l.TempC)-c.l.TempC[0]
		t.Logf("%s: predicted rise %.1f K, measured %.1f K (%+.1f %%), RMS %.2f K over the record", c.l.Name, rise, want, 100*(rise/want-1), rms(tr, c.l.TempC))
		if c.l == cc4 && math.Abs(rise/want-1) > 0.15 {
			t.Errorf("%s: predicted rise %.1f K against the measured %.1f K: beyond 15 %%", c.l.Name, rise, want)
		}
	}
	// The library's 18650 values (formHeat: from memory, a bare cell in
	// still air) beside the fitted ones, for the record.
	lib, _ := curves.Lookup("li-ion-18650")
	tr := thermalTrace(cc4, p4, lib.ThermalRes, lib.HeatCapacity)
	t.Logf("library 18650 values θ %.0f K/W, C %.0f J/K on the 4 A record: rise %.1f K (measured %.1f K)", lib.ThermalRes, lib.HeatCapacity, maxOf(tr)-cc4.TempC[0], maxOf(cc4.TempC)-cc4.TempC[0])

	// The engine: a cell fitted on the 2 A record alone, with the li-ion
	// library's temperature table (the fit folds the 2 A record's own
	// warmth into its resistance), run at the 4 A record's current to its
	// 2.2 V cut-off — at the ambient as today, and self-heating with the
	// θ and C fitted above. Measured: 1758.9 mAh, 53.6 °C at the end.
	r2, err := Fit([]*Log{cc2}, Options{Auto: true})
	if err != nil {
		t.Fatal(err)
	}
	borrow, _ := curves.Lookup("li-ion-18650")
	c2, err := r2.Cell(CellOptions{ID: "fit2A", Borrow: borrow, TempC: 24, EndPoint: 2.2})
	if err != nil {
		t.Fatal(err)
	}
	c2.SelfDischarge, c2.CutoffV, c2.CutoffDelay = 0, 0, 0
	hot := *c2
	hot.ThermalRes, hot.HeatCapacity = theta, capJ
	var got [2]*discharge.Result
	for k, c := range []*curves.Cell{c2, &hot} {
		d := &discharge.Design{Cell: c, Series: 1, Parallel: 1, Protect: nil, TempC: 24,
			Profile: []discharge.Phase{{Load: discharge.Load{Kind: discharge.ConstantCurrent, Amps: 4.0256}, Seconds: 1}}}
		r, err := discharge.Evaluate(d)
		if err != nil {
			t.Fatal(err)
		}
		got[k] = r
		t.Logf("fitted at 2 A, %s: %.1f mAh to 2.2 V at 4 A (%+.2f %% of the measured %.1f), hottest %.1f °C (measured %.1f)",
			[]string{"at the ambient", "self-heating"}[k], r.DeliveredMAh, 100*(r.DeliveredMAh/cc4MAh-1), cc4MAh, r.CellPeakC, maxOf(cc4.TempC))
	}
	// Heat can only help here (the cell warms, its resistance falls):
	// the self-heating run delivers more, and its cell is warm. (Measured
	// on these records it does not predict 4 A better: +3.2 % at the
	// ambient, +4.8 % self-heating — the 2 A fit's resistance already
	// carries that record's own warmth, which its suspect temperature
	// channel cannot undo, and the records are different cells.) The
	// measured rise is a check value: within 25 % (the 2 A fit's
	// resistance is not the 4 A cell's: its dissipation, and so its rise,
	// runs low — measured 23.8 K against 28.3 K).
	if !(got[1].DeliveredMAh > got[0].DeliveredMAh) {
		t.Errorf("self-heating delivers %.1f mAh, at the ambient %.1f: the heat did not lower the resistance", got[1].DeliveredMAh, got[0].DeliveredMAh)
	}
	if rise, want := got[1].CellPeakC-24, maxOf(cc4.TempC)-cc4.TempC[0]; math.Abs(rise/want-1) > 0.25 {
		t.Errorf("engine rise %.1f K, measured %.1f K: beyond 25 %%", rise, want)
	}
}
