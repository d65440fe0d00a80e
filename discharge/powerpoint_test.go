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
//
// slope is d vload/di from the junction's law (protect.Forward), as
// solveTo gives powerPoint.
func powerCase(rng *rand.Rand) (vload, slope func(float64) float64, pin, E float64) {
	vload, slope, pin, E, _ = powerCaseAt(rng)
	return vload, slope, pin, E
}

// powerCaseAt is powerCase, saying whether the input power was drawn
// within 1e-12 of the most (edge).
func powerCaseAt(rng *rand.Rand) (vload, slope func(float64) float64, pin, E float64, edge bool) {
	var el protect.Element = protect.DefaultDiode()
	if rng.IntN(2) == 0 {
		el = protect.DefaultSchottky()
	}
	tc := -20 + rng.Float64()*120
	el = protect.Fixed(el, tc)
	fw, _ := forwardOf(el, tc)
	E = 1 + rng.Float64()*8
	Rp := 0.05 + rng.Float64()*3
	vload = func(i float64) float64 {
		x := E - i*Rp
		return x - el.Drop(i, x, tc)
	}
	slope = func(i float64) float64 { return -Rp - fw.Slope(i) }
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
	return vload, slope, top * (1 + rel), E, math.Abs(rel) <= 1e-12
}

// newtonPowerPlain is newtonPower without the cycle shortcut: every one
// of the 200 steps taken.
func newtonPowerPlain(vload, slope func(float64) float64, pin, E, i float64) (float64, bool) {
	for k := 0; k < 200; k++ {
		v := vload(i)
		f := i*v - pin
		if v <= 0 {
			return i, false
		}
		df := newtonSlope(vload, slope, pin, E, i, v)
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

// newtonSlope is newtonPower's slope of i·vload(i) at i, v = vload(i).
func newtonSlope(vload, slope func(float64) float64, pin, E, i, v float64) float64 {
	if slope != nil {
		return v + i*slope(i)
	}
	h := 1e-7 * math.Max(i, pin/E)
	return ((i+h)*vload(i+h) - i*v) / h
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
		vload, slope, pin, E := powerCase(rng)
		for _, sl := range []func(float64) float64{nil, slope} {
			for _, i0 := range []float64{0, 0.99 * pin / E, 1.5 * pin / E} {
				gi, gok := newtonPower(vload, sl, pin, E, i0)
				wi, wok := newtonPowerPlain(vload, sl, pin, E, i0)
				if math.Float64bits(gi) != math.Float64bits(wi) || gok != wok {
					t.Fatalf("case %d from %g: shortcut %v %v, every step %v %v", n, i0, gi, gok, wi, wok)
				}
				if cycled(vload, sl, pin, E, i0) {
					cycles++
				}
			}
		}
	}
	if cycles == 0 {
		t.Fatal("no solve fell into a cycle: the shortcut was never taken")
	}
	t.Logf("%d of 7200 solves cycled", cycles)
}

// Newton on the junction's own slope (protect.Forward.Slope) against
// Newton on the finite difference it replaces, on 1200 random solves at
// the edge of collapse, cold and warm: the same outcome, and the same
// current to 1e-12 relative where the input power is 1e-6 or more below
// the most the source gives (both stop on a step under 1e-13 of the
// current; 1e-12 allows the last step's rounding). Within 1e-12 of that
// most — a tenth of the cases — the root is a double one: i·vload(i) is
// flat to rounding over about 1e-8 of the current, so the current itself
// is fixed only that well, by either slope; there each must meet
// newtonPower's own test (the power within 1e-9), and an outcome that
// differs (the two slopes differ by the difference's truncation, about
// 1e-7 of the slope) is counted, not failed — the check fails if there
// are more than a few, or any far from a double root.
func TestNewtonSlopeMatchesDifference(t *testing.T) {
	rng := rand.New(rand.NewPCG(13, 1))
	worst, flipped, fewer, calls := 0.0, 0, 0, 0
	for n := 0; n < 1200; n++ {
		vload, slope, pin, E, edge := powerCaseAt(rng)
		counted := func(i float64) float64 { calls++; return vload(i) }
		for _, i0 := range []float64{0, 0.99 * pin / E, 1.5 * pin / E} {
			calls = 0
			fi, fok := newtonPower(counted, nil, pin, E, i0)
			byDiff := calls
			calls = 0
			si, sok := newtonPower(counted, slope, pin, E, i0)
			if calls < byDiff {
				fewer++
			}
			if fok != sok {
				if !edge {
					t.Fatalf("case %d from %g: outcomes differ far from a double root: %v %v / %v %v", n, i0, fi, fok, si, sok)
				}
				flipped++
				continue
			}
			if !fok {
				continue
			}
			if edge {
				for _, i := range []float64{fi, si} {
					if math.Abs(i*vload(i)-pin) > 1e-9*pin {
						t.Errorf("case %d from %g: current %v gives %v W, not %v W", n, i0, i, i*vload(i), pin)
					}
				}
				continue
			}
			rel := math.Abs(fi-si) / fi
			worst = math.Max(worst, rel)
			if rel > 1e-12 {
				t.Errorf("case %d from %g: current %v by difference, %v by the law's slope (rel %.2g)", n, i0, fi, si, rel)
			}
		}
	}
	if flipped > 20 {
		t.Errorf("%d of 3600 outcomes differ: more than the cases at a double root", flipped)
	}
	if fewer < 1800 {
		t.Errorf("the law's slope saved calls in only %d of 3600 solves", fewer)
	}
	t.Logf("worst relative difference %.2g; %d outcomes differ at a double root; fewer calls in %d of 3600", worst, flipped, fewer)
}

// cycled reports whether newtonPowerPlain from i runs all its 200 steps
// with an iterate repeating: the case newtonPower's shortcut takes.
func cycled(vload, slope func(float64) float64, pin, E, i float64) bool {
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
		df := newtonSlope(vload, slope, pin, E, i, v)
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
		vload, slope, pin, E := powerCase(rng)
		at, _ := newtonPower(vload, slope, pin, E, 0)
		si, sok := scanPower(vload, pin, at, false, E)
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

// scanPower skipping the grid points that cannot reach the load's power
// and stopping at the first where the load voltage has run out (behind
// an element whose load voltage never rises with the current,
// protect.LoadVoltageFalls) against the whole grid: the same current and
// outcome to the bit (tolerance 0: the points it skips cannot reach the
// load's power, and the bracket it hands on is the whole grid's). Limiters, MOSFETs and clamped MOSFETs at
// their defaults and with a spread of thresholds, sense resistors and
// gate dividers, fixed at random junction temperatures, on random packs
// (1.5 to 9 V behind 0.05 to 2 Ω), the power drawn near the most each
// delivers (a tenth of it to 1.3 times it), from where Newton stopped, as
// solveTo calls it. The check fails if the stop was never taken.
func TestScanStopMatchesWholeScan(t *testing.T) {
	rng := rand.New(rand.NewPCG(4, 44))
	specs := []string{"limiter", "pmos", "pmos-clamp", "pmos:vth=1.8", "limiter:rsh=0.4", "limiter:rsh=2.2,r1=470k,r2=220k",
		"limiter:vbe=0.55", "pmos-clamp:vz=3.3,vth=1.1"}
	stopped, crossed := 0, 0
	for n := 0; n < 1500; n++ {
		el, err := protect.Parse(specs[rng.IntN(len(specs))])
		if err != nil {
			t.Fatal(err)
		}
		tc := -20 + rng.Float64()*140
		el = protect.Fixed(el, tc)
		E, Rp := 1.5+rng.Float64()*7.5, 0.05+rng.Float64()*1.95
		calls := 0
		vload := func(i float64) float64 {
			calls++
			x := E - i*Rp
			return x - el.Drop(i, x, tc)
		}
		top := 0.0
		for j := 1; j <= 400; j++ {
			i := E / Rp * float64(j) / 400
			top = math.Max(top, i*vload(i))
		}
		pin := top * (0.1 + 1.2*rng.Float64())
		at, _ := newtonPower(vload, nil, pin, E, 0)
		calls = 0
		wi, wok := scanPower(vload, pin, at, false, E)
		whole := calls
		calls = 0
		gi, gok := scanPower(vload, pin, at, protect.LoadVoltageFalls(el), E)
		if math.Float64bits(gi) != math.Float64bits(wi) || gok != wok {
			t.Fatalf("case %d (%s at %.3g °C, %.3g V, %.3g Ω, %.4g W): stopping %v %v, whole grid %v %v",
				n, el.Spec(), tc, E, Rp, pin, gi, gok, wi, wok)
		}
		if calls < whole {
			stopped++
			if wok {
				crossed++
			}
		}
	}
	if stopped == 0 || crossed == 0 {
		t.Fatalf("the scan took fewer solves in %d cases, %d of them finding a crossing: the check proves too little", stopped, crossed)
	}
	t.Logf("the scan took fewer solves in %d of 1500 cases, %d of them finding a crossing", stopped, crossed)
}

// Newton on a MOSFET's (plain or clamped) or a limiter's own slopes (protect.Sloped, as
// solveTo gives them) against Newton on the finite difference, on 1500
// random solves: random elements (defaults and a spread of thresholds,
// sense resistors and dividers) fixed at random junction temperatures,
// random packs, the power drawn from a tenth to 1.3 times the most each
// delivers, from zero as solveTo starts these. Both stop on a step under
// 1e-13 of the current; where both find the load's current they agree
// to 1e-12 relative, except within 1e-6 of the most the source gives,
// where the root is a near-double one and fixed only to about the square
// root of the rounding: there each must meet newtonPower's own test
// (the power within 1e-9). An outcome may differ only where Newton
// itself is at the edge of its reach — its iterates near the peak of
// i·vload(i), or across a corner of the law (a channel handing over to
// its body diode, the pass FET saturating), where the two slopes differ
// by more than the difference's truncation; each such case is counted,
// and the check fails if they are more than 2 %. (The scan that follows
// a failure, scanPower, finds the root either way.)
func TestNewtonFETSlopesMatchDifference(t *testing.T) {
	rng := rand.New(rand.NewPCG(12, 6))
	specs := []string{"limiter", "pmos", "pmos:vth=1.8", "limiter:rsh=0.4", "limiter:rsh=2.2,r1=470k,r2=220k",
		"limiter:vbe=0.55", "pmos:ron=0.3", "pmos-clamp", "pmos-clamp:vz=3.3,vth=1.1"}
	worst, flipped, fewer := 0.0, 0, 0
	for n := 0; n < 1500; n++ {
		el, err := protect.Parse(specs[rng.IntN(len(specs))])
		if err != nil {
			t.Fatal(err)
		}
		tc := -20 + rng.Float64()*140
		el = protect.Fixed(el, tc)
		sl := el.(protect.Sloped)
		E, Rp := 1.5+rng.Float64()*7.5, 0.05+rng.Float64()*1.95
		calls := 0
		lastI, di, dv := math.NaN(), 0.0, 0.0
		vload := func(i float64) float64 {
			calls++
			x := E - i*Rp
			var d float64
			d, di, dv = sl.DropSlopes(i, x, tc)
			lastI = i
			return x - d
		}
		slope := func(i float64) float64 {
			if i != lastI {
				vload(i)
			}
			return -Rp - di + Rp*dv
		}
		top := 0.0
		for j := 1; j <= 400; j++ {
			i := E / Rp * float64(j) / 400
			top = math.Max(top, i*vload(i))
		}
		pin := top * (0.1 + 1.2*rng.Float64())
		calls = 0
		fi, fok := newtonPower(vload, nil, pin, E, 0)
		byDiff := calls
		calls = 0
		si, sok := newtonPower(vload, slope, pin, E, 0)
		if calls < byDiff {
			fewer++
		}
		if fok != sok {
			flipped++
			continue
		}
		if !fok {
			continue
		}
		if pin > top*(1-1e-6) {
			for _, i := range []float64{fi, si} {
				if math.Abs(i*vload(i)-pin) > 1e-9*pin {
					t.Errorf("case %d: current %v gives %v W, not %v W", n, i, i*vload(i), pin)
				}
			}
			continue
		}
		rel := math.Abs(fi-si) / fi
		worst = math.Max(worst, rel)
		if rel > 1e-12 {
			t.Errorf("case %d (%s at %.3g °C, %.3g V, %.3g Ω, %.4g W): current %v by difference, %v by the law's slopes (rel %.2g)",
				n, el.Spec(), tc, E, Rp, pin, fi, si, rel)
		}
	}
	if flipped > 30 {
		t.Errorf("%d of 1500 outcomes differ", flipped)
	}
	if fewer < 750 {
		t.Errorf("the law's slopes saved calls in only %d of 1500 solves", fewer)
	}
	t.Logf("worst relative difference %.2g; %d outcomes differ; fewer calls in %d of 1500", worst, flipped, fewer)
}
