package cellfit

import (
	"math"
	"sort"

	"headroom/internal/rc"
)

// Model is the Thevenin equivalent of one cell that the fit adjusts: the
// terminal voltage is
//
//	V = E(q) − I·R0(q) − Σ vᵢ,   dvᵢ/dt = (I·Rᵢ − vᵢ)/τᵢ,
//
// with q the charge delivered since the start of the log (mAh), I the
// current (A, positive discharging), E the open-circuit voltage and R0
// the instant resistance, both piecewise linear in q between knots and held
// beyond them.
type Model struct {
	QE []float64  // charge knots of E, mAh, increasing
	E  []float64  // open-circuit volts at QE, non-increasing
	QR []float64  // charge knots of R0, mAh, increasing; empty means R0 = 0
	R0 []float64  // ohms at QR, at least 0
	RC []rc.Stage // polarisation branches, ohms and seconds
}

// hat finds the two knots around x and the weight of the upper one: the
// value there is (1−f)·y[j] + f·y[j+1]. Outside the knots it returns the
// end knot with f = 0.
func hat(xs []float64, x float64) (j int, f float64) {
	n := len(xs)
	if n == 1 || x <= xs[0] {
		return 0, 0
	}
	if x >= xs[n-1] {
		return n - 1, 0
	}
	j = sort.SearchFloat64s(xs, x) - 1 // xs[j] < x <= xs[j+1]
	if j < 0 {
		j = 0
	}
	return j, (x - xs[j]) / (xs[j+1] - xs[j])
}

func interp(xs, ys []float64, x float64) float64 {
	if len(xs) == 0 {
		return 0
	}
	j, f := hat(xs, x)
	if f == 0 {
		return ys[j]
	}
	return ys[j] + f*(ys[j+1]-ys[j])
}

// OCV is the open-circuit voltage at charge q (mAh).
func (m *Model) OCV(q float64) float64 { return interp(m.QE, m.E, q) }

// Resistance is R0 at charge q (mAh), ohms.
func (m *Model) Resistance(q float64) float64 { return interp(m.QR, m.R0, q) }

// Simulate returns the model's terminal voltage at every sample of the
// log, the cell starting rested (every vᵢ = 0) at q = 0. Each sample's
// current is held until the next sample, and the branches step exactly
// (rc.Stage.Step) across each interval; the voltage at a sample includes
// the drop of that sample's own current. out is reused when long enough.
func (m *Model) Simulate(l *Log, out []float64) []float64 {
	n := l.Len()
	if cap(out) < n {
		out = make([]float64, n)
	}
	out = out[:n]
	v := make([]float64, len(m.RC))
	q := 0.0
	for k := 0; k < n; k++ {
		i := l.I[k]
		sum := 0.0
		for _, x := range v {
			sum += x
		}
		out[k] = m.OCV(q) - i*m.Resistance(q) - sum
		if k+1 < n {
			dt := l.T[k+1] - l.T[k]
			for b, s := range m.RC {
				v[b] = s.Step(v[b], i, dt)
			}
			q += i * dt / 3.6
		}
	}
	return out
}

// Current is a record of piecewise-constant current: I[k] amperes from
// T[k] to T[k+1] seconds; the last current holds for ever.
type Current struct {
	T, I []float64
}

// Cutoff runs the model on the current record from rest at q = 0 and
// returns the first moment the terminal voltage falls to volts while the
// cell is loaded (current above load amperes), with the charge delivered
// then in mAh. The voltage inside an interval moves continuously, so the
// crossing is found by bisection inside the interval where it happens. ok
// is false when the record ends first.
func (m *Model) Cutoff(c Current, volts, load float64) (t, mAh float64, ok bool) {
	v := make([]float64, len(m.RC))
	w := make([]float64, len(m.RC))
	q := 0.0
	at := func(v []float64, q, i, dt float64) float64 { // terminal voltage dt into an interval
		sum := 0.0
		for b, s := range m.RC {
			sum += s.Step(v[b], i, dt)
		}
		qq := q + i*dt/3.6
		return m.OCV(qq) - i*m.Resistance(qq) - sum
	}
	for k := 0; k+1 < len(c.T); k++ {
		i, dt := c.I[k], c.T[k+1]-c.T[k]
		if i > load {
			if at(v, q, i, 0) <= volts {
				return c.T[k], q, true
			}
			if at(v, q, i, dt) <= volts {
				lo, hi := 0.0, dt
				for range 60 {
					mid := (lo + hi) / 2
					if at(v, q, i, mid) <= volts {
						hi = mid
					} else {
						lo = mid
					}
				}
				return c.T[k] + hi, q + i*hi/3.6, true
			}
		}
		for b, s := range m.RC {
			w[b] = s.Step(v[b], i, dt)
		}
		v, w = w, v
		q += i * dt / 3.6
	}
	return 0, q, false
}

// LogCurrent is the log's current record.
func (l *Log) LogCurrent() Current { return Current{T: l.T, I: l.I} }

// SquareWave is a train of pulses of amps for on seconds with off
// seconds of rest, repeated until charge mAh has been drawn at least.
func SquareWave(amps, on, off, mAh float64) Current {
	n := int(math.Ceil(mAh*3.6/(amps*on))) + 2
	c := Current{T: make([]float64, 0, 2*n+1), I: make([]float64, 0, 2*n+1)}
	t := 0.0
	for range n {
		c.T, c.I = append(c.T, t), append(c.I, amps)
		t += on
		c.T, c.I = append(c.T, t), append(c.I, 0)
		t += off
	}
	c.T, c.I = append(c.T, t), append(c.I, 0)
	return c
}
