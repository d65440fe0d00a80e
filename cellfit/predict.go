package cellfit

import (
	"math"
	"slices"

	"headroom/curves"
	"headroom/internal/rc"
)

// extendShare is how far past the logs' deepest charge the open-circuit
// curve may be extrapolated, as a share of that charge.
const extendShare = 0.1

// Extend returns a copy of the model whose open-circuit curve goes on
// past its last knot with the slope of its last twentieth, down to volts
// but at most extendShare further. A curve that ends flat, or already at
// or below volts, is not extended. The fit itself never reads the curve
// past the logs; only predictions beyond the deepest log do.
func (m *Model) Extend(volts float64) *Model {
	c := &Model{QE: slices.Clone(m.QE), E: slices.Clone(m.E), QR: slices.Clone(m.QR), R0: slices.Clone(m.R0), RC: slices.Clone(m.RC)}
	n := len(c.QE)
	qmax, last := c.QE[n-1], c.E[n-1]
	if n < 2 || qmax <= 0 || last <= volts {
		return c
	}
	slope := (last - c.OCV(0.95*qmax)) / (0.05 * qmax) // V per mAh, below 0 when falling
	if !(slope < -1e-9) {
		return c
	}
	q := math.Min(qmax+(volts-last)/slope, qmax*(1+extendShare))
	c.QE = append(c.QE, q)
	c.E = append(c.E, math.Max(volts, last+slope*(q-qmax)))
	return c
}

// SampledCutoff runs the model on the log's own current record and reads
// its voltage at the log's sample instants, the way a bench tester that
// samples the cell stops a discharge: it returns the first loaded sample
// at which the model's voltage is at or below volts, and false when there
// is none in the record.
func (m *Model) SampledCutoff(l *Log, volts float64) (k int, ok bool) {
	v := m.Simulate(l, nil)
	rest := restCurrent(l.Peak())
	for k := range v {
		if l.I[k] > rest && v[k] <= volts {
			return k, true
		}
	}
	return 0, false
}

// ModelOf is the model a cell file describes at ambient tempC: its curve
// as the open-circuit voltage (a curve taken at a reference current gets
// that current's drop added back), R0 from its resistance table, its
// polarisation branches, all moved to tempC by the cell's temperature
// table. It lets a written cell be checked with the fit's own simulation.
func ModelOf(c *curves.Cell, tempC float64) *Model {
	fc, fr := c.TempFactors(tempC)
	end := c.Curve.End()
	m := &Model{}
	for i := 0; i < c.Curve.Len(); i++ {
		q, v := c.Curve.Point(i)
		m.QE = append(m.QE, q*fc)
		m.E = append(m.E, v+c.RefCurrent*c.ResistanceAt(q, tempC))
	}
	for _, r := range c.Resistance {
		m.QR = append(m.QR, r.Depth*end*fc)
		m.R0 = append(m.R0, r.Ohm*fr)
	}
	for _, s := range c.RC {
		m.RC = append(m.RC, rc.Stage{R: s.R * fr, Tau: s.Tau})
	}
	return m
}

// LoadCurrent is the log's current up to its last loaded sample, then
// the load's last period repeated for as long as needed (a constant load
// held; a pulse train continued), so that a model whose cell lasts longer
// than the logged one can still be run to its cut-off. The period is the
// shortest run of samples that the last loaded samples repeat within 5 %
// of the peak current. The continuation stops after twice the record's
// samples (and a thousand more) whatever mAh asks.
func (l *Log) LoadCurrent(mAh float64) Current {
	last := l.LastLoaded()
	peak := l.Peak()
	m := 1
	for p := 1; p <= 64 && p <= last/3; p++ {
		same := true
		for j := 0; j < 2*p && same; j++ {
			same = math.Abs(l.I[last-j]-l.I[last-j-p]) <= 0.05*peak
		}
		if same {
			m = p
			break
		}
	}
	c := Current{T: slices.Clone(l.T[:last+1]), I: slices.Clone(l.I[:last+1])}
	// Durations of the repeated samples: each sample's own interval, the
	// last loaded one taking that of the sample one period earlier.
	dur := make([]float64, m)
	cur := make([]float64, m)
	for j := 0; j < m; j++ {
		k := last - m + 1 + j
		cur[j] = l.I[k]
		if k+1 <= last {
			dur[j] = l.T[k+1] - l.T[k]
		} else {
			dur[j] = l.T[k-m+1] - l.T[k-m]
		}
	}
	q := l.Charge(last)
	t := l.T[last]
	for p := m - 1; q < mAh || p != m-1; {
		t += dur[p]
		q += cur[p] * dur[p] / 3.6
		p = (p + 1) % m
		c.T, c.I = append(c.T, t), append(c.I, cur[p])
		if len(c.T) > 2*l.Len()+1000 {
			break // far past the record: no prediction there
		}
	}
	return c
}
