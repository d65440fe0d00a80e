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

// Issue 13: above its over-voltage threshold the protector cuts the load
// (its drop is the whole input, nothing reaches the load), below it the
// switch conducts; its on-resistance rises with the junction by tcr
// (0.5 %/°C by default: 1.5× at 125 °C, as a MOSFET's, from memory); and
// the current limit's spread is a key that reads back. Exact arithmetic.
func TestICCutsAboveOVP(t *testing.T) {
	c := DefaultIC()
	if d := c.Drop(0.2, c.Vovp+0.01, 25); d != c.Vovp+0.01 {
		t.Errorf("above Vovp: drop %g V, want the whole input %g V", d, c.Vovp+0.01)
	}
	if d := c.Drop(0.2, c.Vovp, 25); math.Abs(d-0.2*c.Ron) > 1e-15 {
		t.Errorf("at Vovp: drop %g V, want I·Ron", d)
	}
	if r := c.Drop(0.2, 3, 125) / c.Drop(0.2, 3, 25); math.Abs(r-1.5) > 1e-12 {
		t.Errorf("Ron(125 °C)/Ron(25 °C) = %g, want 1.5", r)
	}
	e, err := Parse("ic:spread=15%")
	if err != nil || e.(IC).Spread != 0.15 {
		t.Errorf("spread=15%%: %v, %+v", err, e)
	}
	if _, err := Parse("ic:spread=60%"); err == nil || !strings.Contains(err.Error(), `"spread"`) {
		t.Errorf("spread=60%% accepted or not named: %v", err)
	}
}
