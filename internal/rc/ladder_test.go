package rc

import (
	"math"
	"testing"
)

// A two-stage Foster ladder in K/W, as for a small package: a fast
// (package) stage and a slow (board) stage.
var testLadder = Ladder{{R: 75, Tau: 0.3}, {R: 175, Tau: 30}}

// The step response of a Foster ladder is Zth(t)·P = Σ Rᵢ·P·(1 − e^(−t/τᵢ))
// (docs/references.md, thermal; JEDEC JESD51-14's network), to 1e-9 relative: the
// same closed form written out by hand; rounding is ~1e-15.
func TestLadderStepClosedForm(t *testing.T) {
	p := 1.58
	for _, tt := range []float64{0, 1e-4, 0.3, 1, 3, 30, 300, 1e5} {
		want := p * (75*(1-math.Exp(-tt/0.3)) + 175*(1-math.Exp(-tt/30)))
		got := p * testLadder.Z(tt)
		if math.Abs(got-want) > 1e-9*math.Max(want, 1e-9) {
			t.Errorf("Z(%g)·P = %.12g, closed form %.12g", tt, got, want)
		}
	}
	if r := testLadder.R(); r != 250 {
		t.Errorf("R = %g, want θ = 250 K/W", r)
	}
	// Zth tends to θ (docs/references.md): after 100 slow time constants, within 1e-12.
	if z := testLadder.Z(3000); math.Abs(z-250) > 1e-9 {
		t.Errorf("Z(3000 s) = %.12g, want θ = 250", z)
	}
}

// A periodic pulse train (power P for t1, nothing for t2) has a closed
// periodic steady state per stage (TestPeriodicSquareWave's geometric
// series); the ladder's value is their sum. Checked at the segment ends, the
// means (∫ of the closed form: f + (v0 − f)·τ/d·(1 − e^(−d/τ))) and the
// peak (the end of the pulse: both stages rise during it), to 1e-9.
func TestLadderPeriodicPulseTrain(t *testing.T) {
	for _, c := range []struct{ p, t1, t2 float64 }{
		{1.58, 0.3, 30},
		{0.389, 3, 27},
		{5, 10, 10},
		{2, 1e-3, 1e4},
	} {
		tr := NewTrain(testLadder, []float64{c.t1, c.t2})
		out := make([]Segment, 2)
		tr.Periodic([]float64{c.p, 0}, out)
		var top, bottom, m1, m2 float64
		for _, st := range testLadder {
			a1, a2 := math.Exp(-c.t1/st.Tau), math.Exp(-c.t2/st.Tau)
			hi := c.p * st.R * (1 - a1) / (1 - a1*a2)
			lo := hi * a2
			top += hi
			bottom += lo
			f := c.p * st.R
			m1 += f + (lo-f)*st.Tau/c.t1*(1-a1)
			m2 += hi * st.Tau / c.t2 * (1 - a2)
		}
		tol := 1e-9 * top
		check := func(name string, got, want float64) {
			if math.Abs(got-want) > tol {
				t.Errorf("%+v: %s = %.12g, closed form %.12g", c, name, got, want)
			}
		}
		check("end of pulse", out[0].End, top)
		check("end of rest", out[1].End, bottom)
		check("start of pulse", out[0].Start, bottom)
		check("mean over pulse", out[0].Mean, m1)
		check("mean over rest", out[1].Mean, m2)
		check("peak", out[0].Peak, top)
		// The cycle average of the sum is θ times the average power, the
		// ladder being linear with every stage's average R·P̄ (exact).
		avg := (out[0].Mean*c.t1 + out[1].Mean*c.t2) / (c.t1 + c.t2)
		check("cycle mean", avg, testLadder.R()*c.p*c.t1/(c.t1+c.t2))
	}
}

// Where the stages move in opposite directions the sum can peak inside a
// segment: after a long heavy segment and a short rest, a moderate segment
// recharges the fast stage quickly while the slow stage, above its new
// target, falls slowly. Checked against a dense scan of the closed form
// (1e-9: the bisection pins the instant to 1e-12 of the segment, and at a
// flat top a 1e-5 s scan step misses by a second-order amount).
func TestLadderPeakInsideSegment(t *testing.T) {
	l := Ladder{{R: 10, Tau: 0.05}, {R: 40, Tau: 5}}
	dur := []float64{20, 0.5, 5}
	x := []float64{2, 0, 1}
	tr := NewTrain(l, dur)
	out := make([]Segment, 3)
	tr.Periodic(x, out)
	// Dense scan of segment 2 from its stage start values.
	end := make([]float64, 3)
	var v0 [2]float64
	for j, st := range l {
		st.Periodic(x, dur, end)
		v0[j] = end[1]
	}
	best := math.Inf(-1)
	for s := 0.0; s <= dur[2]; s += 1e-5 {
		sum := 0.0
		for j, st := range l {
			sum += st.Step(v0[j], x[2], s)
		}
		best = math.Max(best, sum)
	}
	if math.Abs(out[2].Peak-best) > 1e-9*best {
		t.Errorf("peak inside the segment %.12g, dense scan %.12g", out[2].Peak, best)
	}
	// The case must really peak inside: well above both ends.
	if !(out[2].Peak > out[2].Start+1 && out[2].Peak > out[2].End+1) {
		t.Errorf("peak %.6g not inside (ends %.6g, %.6g): the case does not test what it says", out[2].Peak, out[2].Start, out[2].End)
	}
}

// The train's result agrees with each stage's own Periodic summed (the
// one home of the closed form), to 1e-12 relative.
func TestTrainMatchesStagePeriodic(t *testing.T) {
	dur := []float64{3, 2, 25}
	x := []float64{0.389, 0.1, 0.01}
	tr := NewTrain(testLadder, dur)
	out := make([]Segment, 3)
	tr.Periodic(x, out)
	sum := make([]float64, 3)
	end := make([]float64, 3)
	for _, st := range testLadder {
		st.Periodic(x, dur, end)
		for k := range end {
			sum[k] += end[k]
		}
	}
	for k := range sum {
		if math.Abs(out[k].End-sum[k]) > 1e-12*sum[k] {
			t.Errorf("segment %d: %.15g, stages summed %.15g", k, out[k].End, sum[k])
		}
	}
	// Means gives the same starts, ends and means, bit for bit.
	m := make([]Segment, 3)
	tr.Means(x, m)
	for k := range m {
		if m[k].Start != out[k].Start || m[k].End != out[k].End || m[k].Mean != out[k].Mean {
			t.Errorf("segment %d: Means %+v, Periodic %+v", k, m[k], out[k])
		}
	}
}
