package discharge

import (
	"math"
	"math/rand/v2"
	"testing"

	"headroom/protect"
)

// powerCase is a random constant-power solve behind a junction (a PN
// diode or a Schottky at a random temperature) on a resistive source,
// its input power drawn near the most the source can deliver through the
// junction: half the cases a little above it (a collapse), half a little
// below (a double root nearby) — the solves a load at the edge of
// collapse takes, where the shortcuts below act.
func powerCase(rng *rand.Rand) (vload func(float64) float64, pin, E float64) {
	var el protect.Element = protect.DefaultDiode()
	if rng.IntN(2) == 0 {
		el = protect.DefaultSchottky()
	}
	el = protect.Fixed(el, -20+rng.Float64()*120)
	E = 1 + rng.Float64()*8
	Rp := 0.05 + rng.Float64()*3
	vload = func(i float64) float64 {
		x := E - i*Rp
		return x - el.Drop(i, x, 0)
	}
	// The most i·vload(i) reaches, by a fine scan (the product is concave).
	top := 0.0
	for j := 1; j <= 2000; j++ {
		i := E / Rp * float64(j) / 2000
		top = math.Max(top, i*vload(i))
	}
	// Within 1e-3 of it, and a tenth of the cases within 1e-12.
	rel := (rng.Float64()*2 - 1) * 1e-3
	if rng.IntN(10) == 0 {
		rel = (rng.Float64()*2 - 1) * 1e-12
	}
	return vload, top * (1 + rel), E
}

// newtonPowerPlain is newtonPower without the cycle shortcut: every one
// of the 200 steps taken.
func newtonPowerPlain(vload func(float64) float64, pin, E, i float64) (float64, bool) {
	for k := 0; k < 200; k++ {
		v := vload(i)
		f := i*v - pin
		if v <= 0 {
			return i, false
		}
		h := 1e-7 * math.Max(i, pin/E)
		v2 := vload(i + h)
		df := ((i+h)*v2 - i*v) / h
		if df <= 0 {
			return i, false
		}
		step := -f / df
		if i+step < 0 {
			step = -i
		}
		i += step
		if math.Abs(step) <= 1e-13*i {
			return i, i*vload(i) >= pin*(1-1e-9)
		}
	}
	v := vload(i)
	return i, math.Abs(i*v-pin) <= 1e-9*pin
}

// newtonPower's cycle shortcut against every step taken, on 1200 random
// solves at the edge of collapse, cold and warm (from just below and
// above the root, as powerPoint starts): the same current and outcome to
// the last bit (tolerance 0 — the shortcut is exact by construction: a
// step is a function of the current alone). The check fails if no case
// fell into a cycle (the shortcut never taken).
func TestNewtonCycleMatchesEveryStep(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 5))
	cycles := 0
	for n := 0; n < 1200; n++ {
		vload, pin, E := powerCase(rng)
		for _, i0 := range []float64{0, 0.99 * pin / E, 1.5 * pin / E} {
			gi, gok := newtonPower(vload, pin, E, i0)
			wi, wok := newtonPowerPlain(vload, pin, E, i0)
			if math.Float64bits(gi) != math.Float64bits(wi) || gok != wok {
				t.Fatalf("case %d from %g: shortcut %v %v, every step %v %v", n, i0, gi, gok, wi, wok)
			}
			if cycled(vload, pin, E, i0) {
				cycles++
			}
		}
	}
	if cycles == 0 {
		t.Fatal("no solve fell into a cycle: the shortcut was never taken")
	}
	t.Logf("%d of 3600 solves cycled", cycles)
}

// cycled reports whether newtonPowerPlain from i runs all its 200 steps
// with an iterate repeating: the case newtonPower's shortcut takes.
func cycled(vload func(float64) float64, pin, E, i float64) bool {
	seen := map[float64]bool{}
	for k := 0; k < 200; k++ {
		if seen[i] {
			return true
		}
		seen[i] = true
		v := vload(i)
		if v <= 0 {
			return false
		}
		h := 1e-7 * math.Max(i, pin/E)
		df := ((i+h)*vload(i+h) - i*v) / h
		if df <= 0 {
			return false
		}
		step := -(i*v - pin) / df
		if i+step < 0 {
			step = -i
		}
		i += step
		if math.Abs(step) <= 1e-13*i {
			return false
		}
	}
	return false
}

// scanMisses against scanPower behind junctions: wherever it says the
// scan misses, the scan finds no crossing and returns the current it was
// given (tolerance 0: it is the caller's own value, kept). On 3000
// random solves at the edge of collapse, from where Newton from zero
// stopped (solveTo calls it after a failure; here the cases with a root
// are kept too, where it must leave it to the scan). The check fails if
// the shortcut never said so, or never declined.
func TestScanMissesAgreesWithScan(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 2))
	said, declined := 0, 0
	for n := 0; n < 1200; n++ {
		vload, pin, E := powerCase(rng)
		at, _ := newtonPower(vload, pin, E, 0)
		si, sok := scanPower(vload, pin, at)
		if !scanMisses(vload, pin, at) {
			declined++
			continue
		}
		said++
		if sok || math.Float64bits(si) != math.Float64bits(at) {
			t.Fatalf("case %d: scanMisses said no crossing, the scan found %v (%v)", n, si, sok)
		}
	}
	if said == 0 || declined == 0 {
		t.Fatalf("the shortcut was taken %d times and declined %d: the cases miss its two sides", said, declined)
	}
	t.Logf("scan skipped %d times, left to the scan %d times", said, declined)
}
