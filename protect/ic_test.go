package protect

import (
	"math"
	"strings"
	"testing"
)

func TestIC(t *testing.T) {
	c := DefaultIC()
	// I·Ron and the settable limit: exact to rounding.
	if d := c.Drop(0.2, 3, 25); math.Abs(d-0.02) > 1e-15 {
		t.Errorf("drop %g V, want 0.02 V", d)
	}
	if l := c.Limit(25); l.Clamp != 0.5 || !math.IsInf(l.Trip, 1) {
		t.Errorf("limit %+v, want clamp 0.5 A", l)
	}
	if q := c.Quiescent(3, 25); q != 20e-6 {
		t.Errorf("quiescent %g A, want 20 µA", q)
	}
	// 4×AA fresh at about 1.6 V per cell (IEC 60086 maximum open-circuit
	// about 1.65 V, from memory) is 6.4 V: above the 5.8 V threshold.
	if w := strings.Join(c.Warnings(Operating{VFresh: 6.4, TempC: 25}), "|"); !strings.Contains(w, "over-voltage") {
		t.Errorf("6.4 V: warnings %q", w)
	}
	if w := c.Warnings(Operating{VFresh: 3.2, Currents: []float64{0.3}, TempC: 25}); len(w) != 0 {
		t.Errorf("3.2 V, 0.3 A: unexpected warnings %q", w)
	}
	if w := strings.Join(c.Warnings(Operating{VFresh: 3.2, Currents: []float64{0.6}, TempC: 25}), "|"); !strings.Contains(w, "current limit") {
		t.Errorf("0.6 A phase: warnings %q", w)
	}
}
