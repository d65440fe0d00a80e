package tui

import (
	"fmt"
	"testing"

	"headroom/discharge"
	"headroom/internal/scenario"
)

// The screen takes its series, parallel and ambient limits from their one
// home, discharge's limits: the slider ends there and a typed value one
// past it is refused, as the flags and the scenario reader refuse it
// (cmd/headroom TestLimitsOneHome).
func TestLimitsOneHome(t *testing.T) {
	sh := newShared(scenario.Demo())
	for _, c := range []struct {
		k      knob
		lo, hi float64
	}{
		{knobSeries, 1, discharge.MaxSeries},
		{knobParallel, 1, discharge.MaxParallel},
		{knobTemp, discharge.MinTempC, discharge.MaxTempC},
	} {
		r, ok := sh.rangeOf(c.k)
		// Exact: the slider's ends are the constants themselves.
		if !ok || r.lo != c.lo || r.hi != c.hi {
			t.Errorf("knob %d: slider %v–%v, want %v–%v", c.k, r.lo, r.hi, c.lo, c.hi)
		}
	}
	for _, c := range []struct {
		k   knob
		max int
	}{{knobSeries, discharge.MaxSeries}, {knobParallel, discharge.MaxParallel}} {
		if err := sh.setText(c.k, fmt.Sprint(c.max)); err != nil {
			t.Errorf("knob %d: typing %d: %v, want it taken", c.k, c.max, err)
		}
		if err := sh.setText(c.k, fmt.Sprint(c.max+1)); err == nil {
			t.Errorf("knob %d: typing %d was taken, want it refused", c.k, c.max+1)
		}
		if err := sh.setText(c.k, "1"); err != nil {
			t.Fatal(err)
		}
	}
}
