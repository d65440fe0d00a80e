package curves

import (
	"errors"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"gonum.org/v1/gonum/interp"
)

func TestNewCurveRejects(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(1)
	// Each rejection class of NewCurve, with the point it names and a
	// piece of its message.
	cases := []struct {
		name  string
		q, v  []float64
		index int
		msg   string
	}{
		{"no points", []float64{}, []float64{}, -1, "at least 2 points, got 0"},
		{"one point", []float64{0}, []float64{1.5}, 0, "at least 2 points, got 1"},
		{"NaN charge", []float64{0, nan}, []float64{1.5, 1.2}, 1, "charge NaN is not a finite number"},
		{"Inf charge", []float64{0, inf}, []float64{1.5, 1.2}, 1, "charge +Inf is not a finite number"},
		{"NaN voltage", []float64{0, 1}, []float64{nan, 1.2}, 0, "voltage NaN is not a finite number"},
		{"Inf voltage", []float64{0, 1}, []float64{1.5, -inf}, 1, "voltage -Inf is not a finite number"},
		{"negative charge", []float64{-1, 1}, []float64{1.5, 1.2}, 0, "charge -1 mAh is negative"},
		{"zero voltage", []float64{0, 1}, []float64{1.5, 0}, 1, "voltage 0 V must be above 0 V"},
		{"over 60 V", []float64{0, 1}, []float64{61, 1.2}, 0, "above 60 V"},
		{"repeated charge", []float64{0, 5, 5}, []float64{1.5, 1.4, 1.3}, 2, "charge 5 mAh repeats the previous point"},
		{"falling charge", []float64{0, 5, 4}, []float64{1.5, 1.4, 1.3}, 2, "charge falls from 5 to 4 mAh"},
		{"rising voltage", []float64{0, 5, 6}, []float64{1.5, 1.21, 1.25}, 2, "voltage rises from 1.21 V to 1.25 V"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			cv, err := NewCurve(c.q, c.v)
			if err == nil {
				t.Fatalf("accepted %v %v: %v", c.q, c.v, cv)
			}
			var ce *CurveError
			if !errors.As(err, &ce) {
				t.Fatalf("error %T is not a *CurveError", err)
			}
			if ce.Index != c.index || !strings.Contains(err.Error(), c.msg) {
				t.Errorf("got index %d %q, want index %d containing %q", ce.Index, err, c.index, c.msg)
			}
		})
	}
}

func TestNewCurveAcceptsFlatAndCopies(t *testing.T) {
	q, v := []float64{0, 10, 20}, []float64{1.5, 1.5, 1.0}
	c, err := NewCurve(q, v)
	if err != nil {
		t.Fatalf("flat segment rejected: %v", err)
	}
	q[1], v[1] = 99, 0.1 // the curve must not alias the caller's slices
	if got, gv := c.Point(1); got != 10 || gv != 1.5 {
		t.Errorf("Point(1) = %g, %g after the caller changed its slices; want 10, 1.5", got, gv)
	}
	ch := c.Charges()
	ch[0] = 7
	if got, _ := c.Point(0); got != 0 {
		t.Errorf("Charges returned the curve's own slice")
	}
}

func TestMustCurvePanics(t *testing.T) {
	defer func() {
		r := recover()
		if s, _ := r.(string); !strings.HasPrefix(s, "curves: ") {
			t.Errorf("panic %v, want a message starting with \"curves: \"", r)
		}
	}()
	MustCurve([]float64{0, 1}, []float64{1, 2})
}

func TestCurveAt(t *testing.T) {
	// Hand-computed linear interpolation on (0, 1.5), (100, 1.3),
	// (300, 1.3), (400, 0.9). Tolerance 1e-12: one interpolation rounds
	// to within a few ulps of these decimal values.
	c := MustCurve([]float64{0, 100, 300, 400}, []float64{1.5, 1.3, 1.3, 0.9})
	cases := []struct{ q, want float64 }{
		{-5, 1.5},    // held before the first point
		{0, 1.5},     // breakpoint
		{25, 1.45},   // 1.5 − 0.25·0.2
		{100, 1.3},   // breakpoint
		{200, 1.3},   // flat segment
		{350, 1.1},   // 1.3 − 0.5·0.4
		{399, 0.904}, // 1.3 − 0.99·0.4
		{400, 0.9},   // end
		{1e6, 0.9},   // held after the end
	}
	for _, k := range cases {
		if got := c.At(k.q); math.Abs(got-k.want) > 1e-12 {
			t.Errorf("At(%g) = %.15g, want %g", k.q, got, k.want)
		}
	}
	if c.End() != 400 || c.Len() != 4 {
		t.Errorf("End, Len = %g, %d; want 400, 4", c.End(), c.Len())
	}
}

func TestCurveChargeAt(t *testing.T) {
	// Hand-computed inverses of the same curve; tolerance 1e-9 mAh, a
	// few ulps of charges near 400.
	c := MustCurve([]float64{0, 100, 300, 400}, []float64{1.5, 1.3, 1.3, 0.9})
	cases := []struct {
		v    float64
		want float64
		ok   bool
	}{
		{1.6, 0, true},    // already below at the start
		{1.5, 0, true},    // the first point
		{1.4, 50, true},   // mid first segment
		{1.3, 100, true},  // first reach of the flat part, not its end
		{1.0, 375, true},  // 300 + 100·(0.3/0.4)
		{0.9, 400, true},  // the last point
		{0.8, 400, false}, // never falls that far: End and false
	}
	for _, k := range cases {
		got, ok := c.ChargeAt(k.v)
		if ok != k.ok || math.Abs(got-k.want) > 1e-9 {
			t.Errorf("ChargeAt(%g) = %g, %v; want %g, %v", k.v, got, ok, k.want, k.ok)
		}
	}
}

func TestCurveScale(t *testing.T) {
	c := MustCurve([]float64{0, 100, 200}, []float64{1.5, 1.2, 1.0}).Scale(2, 6)
	// Exact: multiplying by 2 is exact in binary; 6 × 1.5, 6 × 1.2 and
	// 6 × 1.0 round to the nearest double of 9, 7.2, 6 (tolerance 1e-12).
	if c.End() != 400 || math.Abs(c.At(200)-7.2) > 1e-12 || math.Abs(c.At(0)-9) > 1e-12 {
		t.Errorf("Scale(2, 6): End %g, At(200) %g, At(0) %g; want 400, 7.2, 9", c.End(), c.At(200), c.At(0))
	}
	defer func() {
		if recover() == nil {
			t.Error("Scale(0, 1) did not panic")
		}
	}()
	c.Scale(0, 1)
}

// TestCurveAgreesWithGonum cross-checks At against gonum's
// interp.PiecewiseLinear (source: gonum.org/v1/gonum/interp) on random
// curves and random charges, including outside the curve where both hold
// the end values. Tolerance 1e-12 V: the two compute the same
// interpolation with differently ordered arithmetic (gonum uses a stored
// slope), which differs by a few ulps.
func TestCurveAgreesWithGonum(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for trial := 0; trial < 200; trial++ {
		n := 2 + rng.IntN(20)
		q := make([]float64, n)
		v := make([]float64, n)
		q[0], v[0] = rng.Float64()*10, 1+rng.Float64()*4
		for i := 1; i < n; i++ {
			q[i] = q[i-1] + 0.01 + rng.Float64()*300
			v[i] = v[i-1] - rng.Float64()*0.3*v[i-1]
		}
		c := MustCurve(q, v)
		var pl interp.PiecewiseLinear
		if err := pl.Fit(q, v); err != nil {
			t.Fatal(err)
		}
		for k := 0; k < 50; k++ {
			x := q[0] - 20 + rng.Float64()*(q[n-1]-q[0]+40)
			if got, want := c.At(x), pl.Predict(x); math.Abs(got-want) > 1e-12 {
				t.Fatalf("trial %d: At(%g) = %.17g, gonum %.17g", trial, x, got, want)
			}
		}
	}
}
