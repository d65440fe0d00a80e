package protect

import (
	"math"
	"strings"
	"testing"
)

// Derating from memory (docs/protection.md: hold falls roughly linearly to about
// half at 85 °C): the model is that line, so the values are exact to
// rounding (1e-12).
func TestPPTCDerating(t *testing.T) {
	f := DefaultPPTC()
	for _, c := range []struct{ tempC, want float64 }{
		{25, 1}, {55, 0.75}, {85, 0.5}, {-35, 1.5},
		{200, 0.05}, // kept above 5 %: a polyfuse never carries nothing
	} {
		if got := f.Factor(c.tempC); math.Abs(got-c.want) > 1e-12 {
			t.Errorf("factor at %g °C = %g, want %g", c.tempC, got, c.want)
		}
	}
	if got := f.Limit(85).Trip; math.Abs(got-0.3) > 1e-12 {
		t.Errorf("trip at 85 °C = %g A, want 0.3 A", got)
	}
	if got := f.Drop(0.2, 3, 25); math.Abs(got-0.1) > 1e-15 {
		t.Errorf("drop at 0.2 A = %g V, want I·R = 0.1 V", got)
	}
}

func TestPPTCWarnings(t *testing.T) {
	f := DefaultPPTC()
	for _, c := range []struct {
		phase, tempC float64
		want         string // "" for none
	}{
		{0.25, 25, ""},
		{0.45, 25, "may trip"},     // above 0.3 A hold, below 0.6 A trip
		{0.7, 25, "it trips"},      // a motor start above trip
		{0.35, 85, "it trips"},     // derated to 0.3 A trip at 85 °C
		{0.2, 85, "may trip"},      // derated hold 0.15 A
		{0.44, -35, ""},            // just below the cold hold of 0.45 A
		{0.46, -35, "may trip"},    // just above the cold hold
		{0.91, -35, "it trips"},    // above the cold trip of 0.9 A
		{0.89, -35, "may trip"},    // just below the cold trip
		{0.05, 25, ""},             // standby
		{0.31, 25, "hold current"}, // names what it is above
		// derated away from 25 °C: the figure quoted is not the one given, so both are named
		// (hold 0.3 A × (1 − (1 − 0.5)·(20 − 25)/60) = 0.3125 A, the derating rule's own arithmetic)
		{0.35, 20, "313 mA hold current at 20 °C (300 mA at 25 °C)"}, // 312.5 mA to three figures
	} {
		w := f.Warnings(Operating{VFresh: 3, Currents: []float64{0.01, c.phase}, TempC: c.tempC})
		got := strings.Join(w, "|")
		if c.want == "" && got != "" || c.want != "" && !strings.Contains(got, c.want) {
			t.Errorf("%g A at %g °C: warnings %q, want %q", c.phase, c.tempC, got, c.want)
		}
	}
}
