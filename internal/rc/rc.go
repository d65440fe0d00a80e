// Package rc gives closed-form responses of first-order RC stages — a
// resistance R in parallel with a capacitance, time constant τ = R·C — to
// piecewise-constant inputs: the step response, the relaxation, and the
// periodic steady state under a repeating train.
//
// The same mathematics serves two trades. A cell's polarisation branch
// (Thevenin equivalent: E − I·R0 − Σ vᵢ) is a stage in ohms driven by a
// current, giving volts; a part's Foster thermal ladder is a set of stages
// in K/W driven by a power, giving kelvin of rise. Source: the first-order
// step response v(t) = x·R·(1 − e^(−t/τ)) + v0·e^(−t/τ), in any circuits
// textbook.
package rc

import "math"

// Stage is one first-order RC stage. R is its resistance (ohms, or K/W
// for a thermal stage), at least 0; Tau its time constant in seconds,
// above 0.
type Stage struct {
	R   float64
	Tau float64
}

// Step is the stage's value t seconds after it held v0, with the input x
// held constant meanwhile: x·R + (v0 − x·R)·e^(−t/τ).
func (s Stage) Step(v0, x, t float64) float64 {
	f := s.R * x
	return f + (v0-f)*math.Exp(-t/s.Tau)
}

// Decay is e^(−t/τ), the fraction of an initial value left after t seconds.
func (s Stage) Decay(t float64) float64 { return math.Exp(-t / s.Tau) }

// Periodic fills end[k] with the stage's value at the end of segment k in
// the periodic steady state of a train that repeats the segments for ever:
// input x[k] held for dur[k] seconds, k = 0 … n−1. The value at the start
// of segment 0 is end[n−1]. The total duration must be above 0.
//
// One period maps a start value v to a·v + b, where a = e^(−T/τ) and b is
// the period's response from zero; the steady state is the fixed point
// b / (1 − a) (a geometric series over past periods). For T ≪ τ, 1 − a is
// computed with expm1 so that the stage settles on the train's average
// input times R, as it must.
func (s Stage) Periodic(x, dur, end []float64) {
	n := len(x)
	if n == 0 {
		return
	}
	total := 0.0
	for _, d := range dur[:n] {
		total += d
	}
	b := 0.0
	for k := 0; k < n; k++ {
		b = s.Step(b, x[k], dur[k])
	}
	v := b / -math.Expm1(-total/s.Tau)
	if s.Tau/total > 1e12 { // no decay over a period at all: the average
		avg := 0.0
		for k := 0; k < n; k++ {
			avg += x[k] * dur[k]
		}
		v = s.R * avg / total
	}
	for k := 0; k < n; k++ {
		v = s.Step(v, x[k], dur[k])
		end[k] = v
	}
}
