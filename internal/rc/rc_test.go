package rc

import (
	"math"
	"testing"
)

// First-order step response and relaxation, closed forms from any circuits
// textbook: v(t) = I·R·(1 − e^(−t/τ)) from rest; v0·e^(−t/τ) with no input.
func TestStepClosedForm(t *testing.T) {
	s := Stage{R: 0.05, Tau: 12}
	cases := []struct{ v0, x, t, want float64 }{
		{0, 2, 12, 2 * 0.05 * (1 - math.Exp(-1))},
		{0, 2, 0, 0},
		{0.3, 0, 24, 0.3 * math.Exp(-2)},
		{0.1, 2, 1e6, 0.1}, // settled on I·R
	}
	for _, c := range cases {
		if got := s.Step(c.v0, c.x, c.t); math.Abs(got-c.want) > 1e-12 {
			t.Errorf("Step(%v, %v, %v) = %.15g, want %.15g (closed form, 1e-12)", c.v0, c.x, c.t, got, c.want)
		}
	}
}

// The periodic steady state of a square wave has a closed form: with
// current I for t1 and 0 for t2, a1 = e^(−t1/τ), a2 = e^(−t2/τ), the value
// at the end of the pulse is I·R·(1 − a1)/(1 − a1·a2) and at the end of
// the rest that times a2 (the geometric series of past periods).
// Checked against it, and against stepping 400 periods from rest, to 1e-9.
func TestPeriodicSquareWave(t *testing.T) {
	for _, c := range []struct{ R, tau, I, t1, t2 float64 }{
		{0.04, 10, 4, 10, 10},
		{0.02, 600, 4, 10, 10},
		{1.5, 0.2, 0.02, 0.05, 30},
		{0.1, 1e-3, 1, 3, 27},
	} {
		s := Stage{R: c.R, Tau: c.tau}
		end := make([]float64, 2)
		s.Periodic([]float64{c.I, 0}, []float64{c.t1, c.t2}, end)
		a1, a2 := math.Exp(-c.t1/c.tau), math.Exp(-c.t2/c.tau)
		top := c.I * c.R * (1 - a1) / (1 - a1*a2)
		if math.Abs(end[0]-top) > 1e-9*math.Max(top, 1e-12) || math.Abs(end[1]-top*a2) > 1e-9*math.Max(top, 1e-12) {
			t.Errorf("%+v: periodic = %.12g, %.12g; closed form %.12g, %.12g", c, end[0], end[1], top, top*a2)
		}
		// Time-stepping from rest converges on it (only when 400 periods
		// are many time constants).
		if 400*(c.t1+c.t2) > 40*c.tau {
			v := 0.0
			for k := 0; k < 400; k++ {
				v = s.Step(s.Step(v, c.I, c.t1), 0, c.t2)
			}
			if math.Abs(v-end[1]) > 1e-9*math.Max(top, 1e-12) {
				t.Errorf("%+v: stepped %.12g, periodic %.12g", c, v, end[1])
			}
		}
	}
}

// A stage far slower than the train settles on the average input times R.
func TestPeriodicSlowStageIsAverage(t *testing.T) {
	s := Stage{R: 0.03, Tau: 1e9}
	end := make([]float64, 3)
	s.Periodic([]float64{0.45, 0.12, 0.015}, []float64{3, 2, 25}, end)
	avg := (0.45*3 + 0.12*2 + 0.015*25) / 30 * 0.03
	for k, v := range end {
		if math.Abs(v-avg) > 1e-6*avg {
			t.Errorf("end[%d] = %.12g, want the average %.12g (1e-6: a drift of T/τ)", k, v, avg)
		}
	}
}
