package protect

import (
	"math"
	"strings"
	"testing"
)

// Common practice (no published source; DESIGN §3 and §7): the limiter
// starts limiting when the sense voltage reaches Vbe ≈ 0.7 V, so the limit
// is about Vbe/Rsh, and halving Rsh doubles it.
func TestLimiterLimit(t *testing.T) {
	l := DefaultLimiter()
	// Vbe ≈ 0.7 V: the default 0.65 V sits in the 0.6–0.7 V range of the
	// design notes; ±0.1 V because the rule is one figure.
	if v := l.VbeAt(25); math.Abs(v-0.7) > 0.1 {
		t.Errorf("Vbe(25 °C) = %g V, want about 0.7 V", v)
	}
	for _, rsh := range []float64{0.47, 1, 8.2} {
		l.Rsh = rsh
		lim := l.Limit(25).Clamp
		// limit ≈ Vbe/Rsh: this model has no base-current or
		// gain correction, so it is exact to rounding (1e-12).
		if math.Abs(lim-l.VbeAt(25)/rsh) > 1e-12 {
			t.Errorf("Rsh %g Ω: limit %g A, want Vbe/Rsh = %g A", rsh, lim, l.VbeAt(25)/rsh)
		}
		half := l
		half.Rsh = rsh / 2
		// The issue: halving Rsh doubles the limit within 1 %.
		if r := half.Limit(25).Clamp / lim; math.Abs(r-2) > 0.02 {
			t.Errorf("Rsh %g → %g Ω: limit ratio %g, want 2 ± 1 %%", rsh, rsh/2, r)
		}
	}
}

// BJT Vbe falls about 2 mV/°C (Sedra and Smith, Microelectronic Circuits,
// quote −2 mV/°C). The model is that straight line, so over −20…60 °C the
// slope must be −2 mV/°C to rounding (1e-9 V/°C), and the limit current
// must fall with it: about 0.3 %/°C at 0.65 V.
func TestLimiterTemperature(t *testing.T) {
	l := DefaultLimiter()
	if s := (l.VbeAt(60) - l.VbeAt(-20)) / 80; math.Abs(s-(-2e-3)) > 1e-9 {
		t.Errorf("Vbe slope %g V/°C, want −2 mV/°C", s)
	}
	hot, cold := l.Limit(60).Clamp, l.Limit(-20).Clamp
	if !(hot < cold) {
		t.Errorf("limit at 60 °C (%g A) not below limit at −20 °C (%g A)", hot, cold)
	}
}

// Below the limit the drop is I·(Rsh + Rch) (DESIGN §3), Rch at the gate
// drive the divider gives: at small current Rch → Ron·(Vref − Vth)/(k·v' −
// Vth), v' = vin − I·Rsh at the FET. At 1 mA the channel's own drop
// (86 µV) shifts Rch by (k − 1/2)·d/b ≈ 1.8e-5, which is 1.5e-6 of the
// whole drop; we compare to 1e-5.
func TestLimiterNormalDrop(t *testing.T) {
	l := DefaultLimiter()
	i, vin := 1e-3, 3.0
	k := l.R1 / (l.R1 + l.R2)
	want := i * (l.Rsh + l.Channel(k*(vin-i*l.Rsh)))
	if got := l.Drop(i, vin, 25); math.Abs(got/want-1) > 1e-5 {
		t.Errorf("drop %g V, want I·(Rsh + Rch) = %g V", got, want)
	}
	// The divider draws vin/(R1 + R2): 3 V / 1.1 MΩ, exact to rounding.
	if q := l.Quiescent(3, 25); math.Abs(q-3/1.1e6) > 1e-18 {
		t.Errorf("divider drain %g A, want %g A", q, 3/1.1e6)
	}
}

// In a short the pass FET holds the limit with the pack across it:
// P = Vpack·Ilim, Tj = Tamb + θja·P (DESIGN §3). 4×AA fresh (6 V) with the
// default 0.65 A limit: 3.9 W; in SOT-23 at 250 °C/W far above 150 °C.
// Exact arithmetic, 1e-9.
func TestLimiterShortCircuit(t *testing.T) {
	l := DefaultLimiter()
	p, tj := l.ShortCircuit(6, 25)
	if math.Abs(p-3.9) > 1e-9 || math.Abs(tj-(25+250*3.9)) > 1e-9 {
		t.Errorf("short: %g W, Tj %g °C; want 3.9 W, %g °C", p, tj, 25+250*3.9)
	}
	w := l.Warnings(Operating{VFresh: 6, Currents: []float64{0.1}, TempC: 25})
	if len(w) == 0 || !strings.Contains(w[0], "overheats") {
		t.Errorf("no short-circuit warning in %q", w)
	}
	// A 39 Ω sense limits to 17 mA: 0.1 W, Tj 42 °C: no warning.
	l.Rsh = 39
	for _, x := range l.Warnings(Operating{VFresh: 6, Currents: []float64{0.01}, TempC: 25}) {
		if strings.Contains(x, "overheats") {
			t.Errorf("unexpected short-circuit warning %q", x)
		}
	}
	// A phase above the limit collapses the load voltage.
	l = DefaultLimiter()
	if w := l.Warnings(Operating{VFresh: 3, Currents: []float64{0.1, 0.9}, TempC: 25}); !strings.Contains(strings.Join(w, "|"), "collapses") {
		t.Errorf("no limit warning for a 0.9 A phase in %q", w)
	}
}
