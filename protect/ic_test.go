package protect

import (
	"math"
	"strings"
	"testing"
)

// The protector read from a spec of our own values (not the defaults, so
// the test does not restate DefaultIC's literals) behaves as its data
// says: a switch of Ron (Ohm's law, I·Ron at 25 °C), a supply current Iq
// while the pack is the right way round, a clamp at Ilim, and warnings on
// either side of Vovp and Ilim.
func TestIC(t *testing.T) {
	const ron, iq, ilim, vovp = 0.25, 7e-6, 0.3, 5.0
	e, err := Parse("ic:ron=250m,iq=7u,ilim=300m,vovp=5")
	if err != nil {
		t.Fatal(err)
	}
	for _, i := range []float64{1e-3, 0.05, 0.2, 0.29} {
		// Ohm's law; 1e-15 relative covers one rounding of the product.
		if d := e.Drop(i, 3, 25); math.Abs(d-i*ron) > 1e-15*i*ron {
			t.Errorf("drop at %g A: %g V, want I·Ron = %g V", i, d, i*ron)
		}
	}
	if d := e.Drop(0, 3, 25); d != 0 {
		t.Errorf("drop with no current: %g V, want 0", d)
	}
	if l := e.Limit(25); l.Clamp != ilim || !math.IsInf(l.Trip, 1) {
		t.Errorf("limit %+v, want a clamp at %g A and no trip", l, ilim)
	}
	if q := e.Quiescent(3, 25); q != iq {
		t.Errorf("quiescent %g A, want %g A", q, iq)
	}
	if q := e.Quiescent(-3, 25); q != 0 {
		t.Errorf("quiescent reversed %g A, want 0 (blocked)", q)
	}
	has := func(w []string, s string) bool { return strings.Contains(strings.Join(w, "|"), s) }
	for _, c := range []struct {
		v, i float64
		ov   bool
		lim  bool
	}{
		{vovp * 1.01, 0.1, true, false},
		{vovp * 0.99, 0.1, false, false},
		{3, ilim * 1.01, false, true},
		{3, ilim * 0.99, false, false},
	} {
		w := e.Warnings(Operating{VFresh: c.v, Currents: []float64{c.i}, TempC: 25})
		if has(w, "over-voltage") != c.ov || has(w, "current limit") != c.lim {
			t.Errorf("%g V, %g A: warnings %q; want over-voltage %v, current limit %v", c.v, c.i, w, c.ov, c.lim)
		}
	}
	// A fresh 4×AA pack at about 1.6 V a cell (IEC 60086 maximum
	// open-circuit about 1.65 V, from memory) is above the default part's
	// threshold: the default must say so.
	if w := DefaultIC().Warnings(Operating{VFresh: 6.4, TempC: 25}); !has(w, "over-voltage") {
		t.Errorf("default part at 6.4 V: warnings %q", w)
	}
}
