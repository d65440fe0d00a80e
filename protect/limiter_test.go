package protect

import (
	"math"
	"math/rand/v2"
	"strings"
	"testing"
)

// Common practice (no published source; docs/protection.md and docs/references.md): the limiter
// starts limiting when the sense voltage reaches Vbe ≈ 0.7 V, so the limit
// is about Vbe/Rsh, and halving Rsh doubles it. The Ebers–Moll knee sits
// lower than the rule of thumb: the PNP needs only the tens of µA that pull
// the pass gate down through R1∥R2, at Vbe ≈ 0.53–0.56 V, so the limit lies
// 10–25 % below Vbe(1 mA)/Rsh; halving Rsh doubles it to within
// 1 % from a 6 V pack (the PNP's Vbe moves by Vt·ln of the collector-
// current ratio only; from 3 V the FETs' own drops at 2.4 A eat enough
// gate drive to take 2 % off).
func TestLimiterLimit(t *testing.T) {
	l := DefaultLimiter()
	// Vbe ≈ 0.7 V at 1 mA: the default 0.65 V sits in the 0.6–0.7 V range
	// of the design notes; ±0.1 V because the rule is one figure.
	if v := l.VbeAt(25); math.Abs(v-0.7) > 0.1 {
		t.Errorf("Vbe(25 °C) = %g V, want about 0.7 V", v)
	}
	// The cached temperature terms give the same Vbe (exact arithmetic).
	if v, w := l.VbeAt(25), l.PNP().At(25).Drop(1e-3, 25); math.Abs(v-w) > 1e-12 {
		t.Errorf("Vbe %g, cached %g", v, w)
	}
	for _, rsh := range []float64{0.47, 1, 8.2} {
		l.Rsh = rsh
		lim := l.ClampAt(6, 25)
		rule := l.VbeAt(25) / rsh
		if r := lim / rule; r < 0.75 || r > 0.9 {
			t.Errorf("Rsh %g Ω: limit %g A is %.3f of Vbe/Rsh = %g A, want 0.75–0.9", rsh, lim, r, rule)
		}
		half := l
		half.Rsh = rsh / 2
		if r := half.ClampAt(6, 25) / lim; math.Abs(r-2) > 0.02 {
			t.Errorf("Rsh %g → %g Ω: limit ratio %g, want 2 ± 1 %%", rsh, rsh/2, r)
		}
		// Limit's Clamp bounds the clamp at any input the gate can take.
		if up := l.Limit(25).Clamp; !(up >= lim) {
			t.Errorf("Rsh %g Ω: Limit().Clamp %g below ClampAt(6 V) %g", rsh, up, lim)
		}
	}
}

// BJT Vbe falls about 2 mV/°C (Sedra and Smith, Microelectronic Circuits,
// quote −2 mV/°C; docs/protection.md −2.1). Here it follows from the PNP's Is(T)
// (Eg 1.11 eV, XTI 3, SPICE's defaults): at 1 mA from −20 to 60 °C the
// slope must be −2 ± 0.3 mV/°C (one figure in the rule), and the limit
// must fall with it: about 0.3 %/°C.
func TestLimiterTemperature(t *testing.T) {
	l := DefaultLimiter()
	if s := (l.VbeAt(60) - l.VbeAt(-20)) / 80; math.Abs(s-(-2e-3)) > 0.3e-3 {
		t.Errorf("Vbe slope %g V/°C, want about −2 mV/°C", s)
	}
	hot, cold := l.ClampAt(3, 60), l.ClampAt(3, -20)
	if !(hot < cold) {
		t.Errorf("limit at 60 °C (%g A) not below limit at −20 °C (%g A)", hot, cold)
	}
	t.Logf("limit from 3 V: %.3f A at −20 °C, %.3f A at 25 °C, %.3f A at 60 °C", cold, l.ClampAt(3, 25), hot)
}

// Below the limit the drop is I·Rsh plus the two channels' drops (docs/protection.md
// names I·(Rsh + Rch) for the one-FET sketch; the circuit has two FETs in
// the rail). At small current each channel is its rated law at the gate
// drive it sees: the blocking FET's |Vgs| is the pack's vin (gate to
// ground), the pass FET's is k·(vin − I·Rsh) from the divider. At 1 mA from
// 3 V the channels' own drops (76 µV and 86 µV) shift those by d1/(2·b1)
// and (k·d1 + d2/2)/b2, which adds up to 5.4e-6 of the whole drop (worked
// by hand from the Shichman–Hodges law); we compare to 1e-5.
func TestLimiterNormalDrop(t *testing.T) {
	l := DefaultLimiter()
	i, vin := 1e-3, 3.0
	k := l.R1 / (l.R1 + l.R2)
	want := i * (l.Rsh + l.Channel(vin) + l.Channel(k*(vin-i*l.Rsh)))
	if got := l.Drop(i, vin, 25); math.Abs(got/want-1) > 1e-5 {
		t.Errorf("drop %g V, want I·(Rsh + Rch1 + Rch2) = %g V", got, want)
	}
	// The divider draws vin/(R1 + R2): 3 V / 1.1 MΩ, exact to rounding.
	if q := l.Quiescent(3, 25); math.Abs(q-3/1.1e6) > 1e-18 {
		t.Errorf("divider drain %g A, want %g A", q, 3/1.1e6)
	}
}

// The closed form must solve the two laws it claims to (exact algebra, so
// 1e-9 relative: a few roundings of sums of order 1): the blocking FET is
// PMOS to the last bit of its expression, and the pass FET's drop d2
// solves (k·vs − Vth)·d2 − d2²/2 = i·A with vs = vin − d1 − i·Rsh. Where
// the pass channel is off or saturated the drop is at least vin (no
// operating point; Element contract). The drop must rise with current
// everywhere (contract) and fall with input voltage wherever the load
// gets any.
func TestLimiterDropLaws(t *testing.T) {
	l := DefaultLimiter()
	pm := PMOS{FET: l.FET}
	f := l.At(25)
	a, k := f.A, l.drive()
	carried := 0
	for _, vin := range []float64{0.3, 0.9, 1.2, 1.5, 1.9, 2.4, 3, 4.5, 6, 9, 13.5} {
		for _, i := range []float64{1e-6, 1e-3, 0.05, 0.3, 1, 3, 10} {
			d := l.Drop(i, vin, 25)
			up := pm.Drop(i, vin, 25) + i*l.Rsh
			b2 := k*(vin-up) - l.Collector(i*l.Rsh, 25)*l.rp() - f.Vth
			if b2 > 0 && i*a <= b2*b2/2 {
				carried++
				d2 := d - up - i*f.Rfix
				if r := b2*d2 - d2*d2/2 - i*a; math.Abs(r) > 1e-9*i*a {
					t.Errorf("%g V %g A: pass FET law residual %g", vin, i, r)
				}
				if !(d < vin) {
					t.Errorf("%g V %g A: drop %g V leaves nothing for the load while the channel carries", vin, i, d)
				}
			} else if d < vin {
				t.Errorf("%g V %g A: pass channel off or saturated, yet drop %g V is below vin", vin, i, d)
			}
			if l.Drop(i*1.01, vin, 25) < d {
				t.Errorf("%g V: drop falls as current rises past %g A", vin, i)
			}
			if d2 := l.Drop(i, vin*1.01, 25); d < vin && d2 > d+1e-15 {
				t.Errorf("%g A: drop rises as input rises past %g V", i, vin)
			}
		}
	}
	// Both branches must be exercised for the test to mean anything.
	if carried < 20 || carried > 70 {
		t.Errorf("%d of 77 points carried by the pass channel; the grid no longer tests both branches", carried)
	}
}

// A fresh single alkaline cell (1.5 V) cannot run a 300 mA load through
// the limiter: the divider gives the pass FET about k·1.13 V = 1.02 V of
// gate drive, 0.22 V over its threshold, and at that drive it saturates at
// K·0.22²/2 ≈ 0.15 A (Shichman–Hodges). A 2×AA pack (3 V) passes it.
func TestLimiterPassSaturates(t *testing.T) {
	l := DefaultLimiter()
	if d := l.Drop(0.3, 1.5, 25); d < 1.5 {
		t.Errorf("300 mA from 1.5 V: drop %g V, want the load collapsed (≥ 1.5 V)", d)
	}
	if d := l.Drop(0.1, 1.5, 25); !(d < 1.5) {
		t.Errorf("100 mA from 1.5 V: drop %g V, want the channel to carry it", d)
	}
	if d := l.Drop(0.3, 3, 25); !(d < 0.5) {
		t.Errorf("300 mA from 3 V: drop %g V, want about 0.34 V", d)
	}
}

// In a short the pass FET holds the limit with the pack across it:
// P = Vpack·Ilim, Tj = Tamb + θja·P when settled (docs/protection.md). 4×AA fresh
// (6 V) with the default limit near 0.6 A: about 3.5 W; in SOT-23 at
// 250 °C/W far above 150 °C, reached within a second or so. Exact
// arithmetic, 1e-9.
func TestLimiterShortCircuit(t *testing.T) {
	l := DefaultLimiter()
	p, tj := l.ShortCircuit(6, 25)
	want := 6 * l.ClampAt(6, 25)
	if math.Abs(p-want) > 1e-9 || math.Abs(tj-(25+250*want)) > 1e-9 {
		t.Errorf("short: %g W, Tj %g °C; want %g W, %g °C", p, tj, want, 25+250*want)
	}
	if s := l.Heat.TimeTo(p, 25, l.Heat.TjMax); !(s > 0.1 && s < 3) {
		t.Errorf("short reaches Tj max after %g s, want within a second or so", s)
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

// Gate warnings for the two FETs: the blocking FET sees the whole fresh
// pack as |Vgs| (9×AA, 13.5 V, is above the default ±12 V), and the pass
// FET gets k·VFresh, so a 0.85 V pack (k·0.85 = 0.77 V) leaves it below its
// 0.8 V threshold. Thresholds are the defaults' (from memory); the checks
// are on which warning appears, not on numbers.
func TestLimiterWarnings(t *testing.T) {
	l := DefaultLimiter()
	l.Rsh = 39 // 17 mA limit: no short-circuit warning to confuse
	has := func(w []string, s string) bool { return strings.Contains(strings.Join(w, "|"), s) }
	if w := l.Warnings(Operating{VFresh: 13.5, Currents: []float64{0.01}, TempC: 25}); !has(w, "blocking FET's gate-source limit") {
		t.Errorf("13.5 V: no blocking-FET gate warning in %q", w)
	}
	if w := l.Warnings(Operating{VFresh: 3, Currents: []float64{0.01}, TempC: 25}); len(w) != 0 {
		t.Errorf("3 V: unexpected warnings %q", w)
	}
	if w := l.Warnings(Operating{VFresh: 0.85, Currents: []float64{0.01}, TempC: 25}); !has(w, "never turns on") {
		t.Errorf("0.85 V: no pass-FET threshold warning in %q", w)
	}
}

// The limiter's e^x − 1 (expm1: Exp(x) − 1 from x = 1 on) against the
// standard library's Expm1 (within 1 ulp by its own documentation) over
// the PNP's whole range, x from 0 to the 700 cap: within 3 ulps (our 2
// and its 1), and Expm1's own value below 1.
func TestExpm1MatchesLibrary(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 9))
	for n := 0; n < 200000; n++ {
		x := rng.Float64() * 700
		if n%2 == 0 {
			x = rng.Float64() * 3
		}
		got, want := expm1(x), math.Expm1(x)
		if x < 1 && got != want {
			t.Fatalf("expm1(%v) = %v, not Expm1's %v below 1", x, got, want)
		}
		if math.Abs(got-want) > 3*0x1p-52*want {
			t.Fatalf("expm1(%v) = %v, Expm1 %v: %.3g ulps apart", x, got, want, math.Abs(got-want)/(0x1p-52*want))
		}
	}
}
