package rc

import "math"

// Ladder is a Foster network: first-order stages in series, driven by the
// same input, whose values add. A part's transient thermal impedance is
// written this way (junction temperature rise = Σ stage values, each a
// stage in K/W driven by the dissipated watts), as is a cell's chain of
// polarisation branches. Source: Zth(t) = Σ Rᵢ·(1 − e^(−t/τᵢ)), the Foster
// form of a thermal impedance (JEDEC JESD51-14 uses the same network for
// transient measurements).
type Ladder []Stage

// R is the ladder's steady resistance, Σ Rᵢ: the value it settles on per
// unit of a constant input.
func (l Ladder) R() float64 {
	s := 0.0
	for _, st := range l {
		s += st.R
	}
	return s
}

// Z is the ladder's response from rest to a unit step after t seconds:
// Σ Rᵢ·(1 − e^(−t/τᵢ)) (the transient thermal impedance Zth(t)).
func (l Ladder) Z(t float64) float64 {
	s := 0.0
	for _, st := range l {
		s += st.R * -math.Expm1(-t/st.Tau)
	}
	return s
}

// Segment is the ladder's sum over one segment of a repeating train:
// its value at the segment's start and end, its time average over the
// segment, and its highest value within it.
type Segment struct {
	Start, End, Mean, Peak float64
}

// Train holds a ladder and the segment durations of a repeating train with
// the exponentials worked out once, so that the periodic steady state for
// any inputs on those durations costs only multiplications. Make one with
// NewTrain; it is not safe for concurrent use (it keeps scratch space).
type Train struct {
	l   Ladder
	dur []float64
	// per stage j, segment k (index j*n+k): decay e^(−d/τ) and the mean
	// factor τ/d·(1 − e^(−d/τ)).
	decay, meanf []float64
	// per stage: 1/(1 − e^(−T/τ)) for the whole period T, or 0 when the
	// stage does not decay over a period at all (the average is used).
	gain  []float64
	v, v0 []float64 // scratch: per-stage values now and at a segment's start
}

// NewTrain prepares ladder l for a train of segments with durations dur
// (seconds, each above 0). It copies both.
func NewTrain(l Ladder, dur []float64) *Train {
	n, m := len(dur), len(l)
	// One backing array for every slice: a train is made once per
	// evaluation, and allocations cost more than the arithmetic here.
	buf := make([]float64, n+2*m*n+3*m)
	cut := func(k int) []float64 { s := buf[:k:k]; buf = buf[k:]; return s }
	t := &Train{l: append(Ladder(nil), l...), dur: cut(n),
		decay: cut(m * n), meanf: cut(m * n), gain: cut(m), v: cut(m), v0: cut(m)}
	copy(t.dur, dur)
	total := 0.0
	for _, d := range dur {
		total += d
	}
	for j, st := range l {
		for k, d := range dur {
			em := -math.Expm1(-d / st.Tau) // 1 − e^(−d/τ), exact for d ≪ τ
			t.decay[j*n+k] = 1 - em
			t.meanf[j*n+k] = 1
			if d > 0 {
				t.meanf[j*n+k] = em * st.Tau / d
			}
		}
		if st.Tau/total <= 1e12 {
			t.gain[j] = 1 / -math.Expm1(-total/st.Tau)
		}
	}
	return t
}

// Clone returns a train on the same ladder and durations that shares t's
// exponentials (never written after NewTrain) and has scratch space of
// its own: the clone and t may then be used on different goroutines.
func (t *Train) Clone() *Train {
	c := *t
	m := len(t.l)
	buf := make([]float64, 2*m)
	c.v, c.v0 = buf[:m:m], buf[m:]
	return &c
}

// Periodic fills out[k] with the ladder's sum over segment k in the
// periodic steady state of the train repeating for ever, input x[k] held
// over segment k. Each stage follows Stage.Periodic's closed form (the
// fixed point of one period's map, a geometric series over past periods);
// a stage that does not decay over a period sits at its average input
// times R. Within a segment each stage moves monotonically towards
// x·R, but stages may move in opposite directions, so the sum can peak
// inside a segment: the peak is then found where the sum's slope is zero
// (bisection; the slope of a sum of two exponentials changes sign at most
// once).
func (t *Train) Periodic(x []float64, out []Segment) { t.periodic(x, out, true) }

// Means is Periodic without the search for a peak inside a segment: each
// Peak is only the larger of its segment's ends. For callers that need
// the means and ends alone (an iteration), at a fraction of the cost.
func (t *Train) Means(x []float64, out []Segment) { t.periodic(x, out, false) }

func (t *Train) periodic(x []float64, out []Segment, inside bool) {
	n := len(t.dur)
	if n == 0 {
		return
	}
	for k := range out[:n] {
		out[k] = Segment{}
	}
	total := 0.0
	for _, d := range t.dur {
		total += d
	}
	// Each stage's value at the start of segment 0 in the steady state.
	for j, st := range t.l {
		if t.gain[j] == 0 {
			avg := 0.0
			for k := 0; k < n; k++ {
				avg += x[k] * t.dur[k]
			}
			t.v[j] = st.R * avg / total
			continue
		}
		b := 0.0
		for k := 0; k < n; k++ {
			f := st.R * x[k]
			b = f + (b-f)*t.decay[j*n+k]
		}
		t.v[j] = b * t.gain[j]
	}
	for k := 0; k < n; k++ {
		s := &out[k]
		for j, st := range t.l {
			f := st.R * x[k]
			v0 := t.v[j]
			t.v0[j] = v0
			v1 := f + (v0-f)*t.decay[j*n+k]
			s.Start += v0
			s.End += v1
			s.Mean += f + (v0-f)*t.meanf[j*n+k]
			t.v[j] = v1
		}
		s.Peak = math.Max(s.Start, s.End)
		if inside && len(t.l) > 1 {
			s.Peak = math.Max(s.Peak, t.inner(k, x[k]))
		}
	}
}

// inner is the sum's highest value strictly inside segment k, or −Inf
// when its slope does not change from rising to falling there. t.v0 holds
// the stage values at the segment's start.
func (t *Train) inner(k int, x float64) float64 {
	d := t.dur[k]
	// Stage j is f + b·e^(−s/τ) for s in [0, d], b = v0 − f.
	slope := func(s float64) float64 {
		g := 0.0
		for j, st := range t.l {
			f := st.R * x
			g -= (t.v0[j] - f) / st.Tau * math.Exp(-s/st.Tau)
		}
		return g
	}
	if !(slope(0) > 0 && slope(d) < 0) {
		return math.Inf(-1)
	}
	lo, hi := 0.0, d
	for range 100 {
		m := 0.5 * (lo + hi)
		if slope(m) > 0 {
			lo = m
		} else {
			hi = m
		}
		if hi-lo <= 1e-12*d {
			break
		}
	}
	s := 0.5 * (lo + hi)
	sum := 0.0
	for j, st := range t.l {
		f := st.R * x
		sum += f + (t.v0[j]-f)*math.Exp(-s/st.Tau)
	}
	return sum
}
