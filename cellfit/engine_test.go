package cellfit

import (
	"math"
	"testing"

	"headroom/discharge"
)

// The cell fitted to the two constant-current NASA records (see
// TestNASAFitConstantCurrent), run by the runtime engine instead of the
// fit's own model: discharge.Evaluate with one cell, no protection, the
// tester's cut-off as the floor, at the logs' 24 °C. The engine keeps the
// charge-domain quadrature and puts each branch in its periodic steady
// state; the fit's model steps the same train exactly from rest. Checks:
// the measured charges within the acceptance bounds (2 % for the records the
// cell was fitted to, 3.5 % for the square wave of a sister cell), and
// engine against the fit's stepping within 0.5 % (two independent
// computations of one model; a few early pulses differ while the slow
// branch settles).
func TestEngineRunsFittedCell(t *testing.T) {
	cc4, cc2 := nasaLog(t, cc4File), nasaLog(t, cc2File)
	_, cell, _ := fitAndWrite(t, []*Log{cc4, cc2})
	m := ModelOf(cell, 24)
	cc := func(a float64) []discharge.Phase {
		return []discharge.Phase{{Load: discharge.Load{Kind: discharge.ConstantCurrent, Amps: a}, Seconds: 1}}
	}
	square := []discharge.Phase{
		{Load: discharge.Load{Kind: discharge.ConstantCurrent, Amps: 4.0256}, Seconds: 10},
		{Load: discharge.Load{Kind: discharge.ConstantCurrent, Amps: 0}, Seconds: 10},
	}
	for _, c := range []struct {
		name            string
		prof            []discharge.Phase
		floor, mAh, tol float64
		own             Current
	}{
		{cc4File, cc(4.0262), cc4Cut, cc4MAh, 0.02, SquareWave(4.0262, 1e6, 1, 3000)},
		{cc2File, cc(1.9976), cc2Cut, cc2MAh, 0.02, SquareWave(1.9976, 1e6, 1, 3000)},
		{sqFile, square, sqCut, sqMAh, 0.035, SquareWave(4.0256, 10, 10, 3000)},
	} {
		r, err := discharge.Evaluate(&discharge.Design{Cell: cell, Series: 1, Parallel: 1, Profile: c.prof, Floor: c.floor, TempC: 24, HoursPerDay: 24})
		if err != nil {
			t.Fatal(err)
		}
		_, own, ok := m.Cutoff(c.own, c.floor, 0.1)
		t.Logf("%s to %g V: engine %.1f mAh (%+.2f %% from the measured %.1f), own model %.1f mAh", c.name, c.floor, r.DeliveredMAh, 100*(r.DeliveredMAh/c.mAh-1), c.mAh, own)
		if math.Abs(r.DeliveredMAh/c.mAh-1) > c.tol {
			t.Errorf("%s: the engine gives %.1f mAh, measured %.1f mAh: more than %g %% apart", c.name, r.DeliveredMAh, c.mAh, 100*c.tol)
		}
		if !ok || math.Abs(r.DeliveredMAh/own-1) > 0.005 {
			t.Errorf("%s: engine %.1f mAh against the fit's own stepping %.1f mAh (%v)", c.name, r.DeliveredMAh, own, ok)
		}
	}
}
