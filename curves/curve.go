package curves

import (
	"fmt"
	"math"
	"sort"
)

// Curve is a validated piecewise-linear discharge curve: terminal (or rest)
// voltage in volts against delivered charge in mAh. Charge strictly
// increases from point to point, voltage never rises, and every value is
// finite. The zero value is not usable; build one with NewCurve.
type Curve struct {
	q []float64 // mAh, strictly increasing, q[0] >= 0
	v []float64 // volts, non-increasing
}

// MaxCapacityMAh is the most charge a cell may claim, in its curve or its
// rating: 1000 Ah, far above any cell a small product carries (a D cell
// holds about 15 Ah), and far enough below overflow that every figure
// derived from it stays finite.
const MaxCapacityMAh = 1e6

// CurveError says what is wrong with a curve and at which point (0-based
// index into the points given).
type CurveError struct {
	Index int
	Msg   string
}

func (e *CurveError) Error() string { return e.Msg }

// NewCurve checks the points and returns a Curve. q is delivered charge in
// mAh, v the voltage in volts, one entry per point; at least two points.
func NewCurve(q, v []float64) (*Curve, error) {
	if len(q) != len(v) {
		panic("curves: NewCurve: q and v differ in length")
	}
	if len(q) < 2 {
		return nil, &CurveError{Index: len(q) - 1, Msg: fmt.Sprintf("a curve needs at least 2 points, got %d", len(q))}
	}
	for i := range q {
		switch {
		case math.IsNaN(q[i]) || math.IsInf(q[i], 0):
			return nil, &CurveError{i, fmt.Sprintf("charge %v is not a finite number", q[i])}
		case math.IsNaN(v[i]) || math.IsInf(v[i], 0):
			return nil, &CurveError{i, fmt.Sprintf("voltage %v is not a finite number", v[i])}
		case q[i] < 0:
			return nil, &CurveError{i, fmt.Sprintf("charge %g mAh is negative", q[i])}
		case v[i] <= 0:
			return nil, &CurveError{i, fmt.Sprintf("voltage %g V must be above 0 V", v[i])}
		case v[i] > 60:
			return nil, &CurveError{i, fmt.Sprintf("voltage %g V is above 60 V: not a small cell", v[i])}
		case q[i] > MaxCapacityMAh:
			return nil, &CurveError{i, fmt.Sprintf("charge %g mAh is above %.0f mAh (1000 Ah): not a small cell", q[i], MaxCapacityMAh)}
		}
		if i == 0 {
			continue
		}
		if q[i] == q[i-1] {
			return nil, &CurveError{i, fmt.Sprintf("charge %g mAh repeats the previous point", q[i])}
		}
		if q[i] < q[i-1] {
			return nil, &CurveError{i, fmt.Sprintf("charge falls from %g to %g mAh: points must be in order of increasing charge", q[i-1], q[i])}
		}
		if v[i] > v[i-1] {
			return nil, &CurveError{i, fmt.Sprintf("voltage rises from %g V to %g V: a discharge curve must not rise", v[i-1], v[i])}
		}
	}
	c := &Curve{q: append([]float64(nil), q...), v: append([]float64(nil), v...)}
	return c, nil
}

// MustCurve is NewCurve for built-in data; it panics on bad points.
func MustCurve(q, v []float64) *Curve {
	c, err := NewCurve(q, v)
	if err != nil {
		panic("curves: built-in curve: " + err.Error())
	}
	return c
}

// Len is the number of points.
func (c *Curve) Len() int { return len(c.q) }

// Point returns the i-th point: charge in mAh and voltage in volts.
func (c *Curve) Point(i int) (mAh, volts float64) { return c.q[i], c.v[i] }

// Charges returns the breakpoints' charges in mAh (a copy).
func (c *Curve) Charges() []float64 { return append([]float64(nil), c.q...) }

// End is the charge in mAh at the last point.
func (c *Curve) End() float64 { return c.q[len(c.q)-1] }

// At returns the voltage at charge q (mAh), holding the end values outside
// the curve.
func (c *Curve) At(q float64) float64 {
	n := len(c.q)
	if q <= c.q[0] {
		return c.v[0]
	}
	if q >= c.q[n-1] {
		return c.v[n-1]
	}
	i := sort.SearchFloat64s(c.q, q) // c.q[i-1] < q <= c.q[i]
	if q == c.q[i] {
		return c.v[i] // exact at a point: the formula below can miss by an ulp
	}
	t := (q - c.q[i-1]) / (c.q[i] - c.q[i-1])
	return c.v[i-1] + t*(c.v[i]-c.v[i-1])
}

// ChargeAt returns the first charge (mAh) at which the curve falls to volts,
// and false when it never does within the curve.
func (c *Curve) ChargeAt(volts float64) (float64, bool) {
	if c.v[0] <= volts {
		return c.q[0], true
	}
	for i := 1; i < len(c.q); i++ {
		if c.v[i] <= volts {
			t := (c.v[i-1] - volts) / (c.v[i-1] - c.v[i])
			return c.q[i-1] + t*(c.q[i]-c.q[i-1]), true
		}
	}
	return c.End(), false
}

// Scale returns a copy with every charge multiplied by fq and every voltage
// by fv; both must be positive.
func (c *Curve) Scale(fq, fv float64) *Curve {
	if !(fq > 0) || !(fv > 0) {
		panic("curves: Scale: factors must be positive")
	}
	q := make([]float64, len(c.q))
	v := make([]float64, len(c.v))
	for i := range q {
		q[i], v[i] = c.q[i]*fq, c.v[i]*fv
	}
	return &Curve{q: q, v: v}
}
