package protect

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"headroom/internal/spice"
	"headroom/internal/spicetest"
)

// kp is the Shichman–Hodges K = KP·W/L matching a FET's rating at 27 °C
// (ngspice's nominal temperature): in the linear region at small
// drain-source voltage Rch = 1/(K·(|Vgs| − Vth)), so the channel part of
// Ron at |Vgs| = Vref fixes K = 1/((Ron − Rfix)·(Vref − Vth)), each at
// its temperature (FET.At).
func kp(f FET) float64 { return f.At(27).K() }

// spiceFET writes a level-1 PMOS model with W = L, so that KP is K, and
// the threshold at 27 °C.
func spiceFET(name string, f FET) string {
	return fmt.Sprintf(".model %s PMOS(LEVEL=1 VTO=%.17g KP=%.17g)\n", name, -f.At(27).Vth, kp(f))
}

// Shichman–Hodges against ngspice's level-1 PMOS with matching KP·W/L and
// VTO: the source is held at |Vgs| above the grounded gate and the drain
// 1 µV below the source, so the channel is deep in its linear region and
// Rch = 1 µV / Id. The level-1 law there is Id = K·Vds·(Vov − Vds/2), so
// the Vds/2 term moves Rch by 1e-6/(2·Vov) < 1e-6 relative; with 12 printed
// digits the only other error is ngspice's own convergence. The issue asks
// 2 %; we hold it to 1e-4, which any change of law would break.
//
// The second part checks Drop itself — the closed-form solution with the
// gate tied to ground (and, for the clamp, a gate held ideally at
// max(0, Vout − Vz); for the limiter, the blocking FET, Rsh and the pass
// FET under its gate divider) — against the same circuit solved by
// ngspice. Our closed form is the level-1 law exactly, so the remaining
// differences are ngspice's convergence and the limiter divider's 2.7 µA,
// which ngspice passes through the blocking FET and Rsh and Drop does not
// (2.7 µA·1.08 Ω over 0.117 V, 2.5e-5 of the drop at 100 mA). Measured: at
// most 4e-6 relative for the FETs, 2.4e-5 for the limiter; we allow 1e-4.
func TestPMOSAgainstNgspice(t *testing.T) {
	spicetest.Require(t)
	fet := defaultFET()
	eol := defaultFET()
	eol.Vth = 1.2
	vgs := []float64{2.5, 3, 4.5}

	type dropCase struct {
		name    string
		e       Element
		vin, i  float64
		circuit func(j int) string
	}
	pm := DefaultPMOS()
	pmEOL := DefaultPMOS()
	pmEOL.FET = eol
	cl := DefaultPMOSClamp()
	li := DefaultLimiter()
	pmosCkt := func(model string, vin, i float64) func(j int) string {
		return func(j int) string {
			// The channel, then Rfix on its load side.
			return fmt.Sprintf("VIN%d a%d 0 DC %g\nM%d a%d 0 c%d c%d %s W=1u L=1u\nRF%d c%d o%d %.17g\nIL%d o%d 0 DC %g\n",
				j, j, vin, j, j, j, j, model, j, j, j, fet.At(27).Rfix, j, j, i)
		}
	}
	clampCkt := func(vin, i float64) func(j int) string {
		return func(j int) string {
			return fmt.Sprintf("VIN%d a%d 0 DC %g\nM%d a%d g%d c%d c%d PA W=1u L=1u\nRF%d c%d o%d %.17g\nB%d g%d 0 V = max(0, v(o%d) - %g)\nIL%d o%d 0 DC %g\n",
				j, j, vin, j, j, j, j, j, j, j, j, fet.At(27).Rfix, j, j, j, cl.Vz, j, j, i)
		}
	}
	limCkt := func(vin, i float64) func(j int) string {
		return func(j int) string {
			// Blocking FET (drain at the pack, gate to ground) and its
			// Rfix, Rsh, pass FET (source and bulk on the pack side,
			// drain to the load) and its Rfix, divider from the pass
			// source to its gate and on to ground, and the PNP (emitter
			// on the pack side of Rsh, base on the load side, collector
			// on the pass gate): ngspice's own Gummel–Poon model with
			// our saturation current and its defaults otherwise.
			rf := fet.At(27).Rfix
			return fmt.Sprintf("VIN%d a%d 0 DC %g\nMB%d a%d 0 bb%d bb%d PA W=1u L=1u\nRFB%d bb%d n%d %.17g\nRSH%d n%d m%d %g\n"+
				"M%d c%d g%d m%d m%d PA W=1u L=1u\nRFP%d c%d o%d %.17g\nR1_%d m%d g%d %g\nR2_%d g%d 0 %g\nQ%d g%d m%d n%d QP\nIL%d o%d 0 DC %g\n",
				j, j, vin, j, j, j, j, j, j, j, rf, j, j, j, li.Rsh, j, j, j, j, j, j, j, j, rf, j, j, j, li.R1, j, j, li.R2, j, j, j, j, j, j, i)
		}
	}
	drops := []dropCase{
		{"pmos 3 V 100 mA", pm, 3, 0.1, pmosCkt("PA", 3, 0.1)},
		{"pmos 3 V 1 A", pm, 3, 1, pmosCkt("PA", 3, 1)},
		{"pmos Vth 1.2, 1.9 V, 100 mA", pmEOL, 1.9, 0.1, pmosCkt("PE", 1.9, 0.1)},
		{"pmos Vth 1.2, 1.9 V, 1 A", pmEOL, 1.9, 1, pmosCkt("PE", 1.9, 1)},
		{"pmos-clamp 9 V 1 A (clamped)", cl, 9, 1, clampCkt(9, 1)},
		{"pmos-clamp 9 V 100 mA (clamped)", cl, 9, 0.1, clampCkt(9, 0.1)},
		{"pmos-clamp 5.12 V 1 A (released)", cl, 5.12, 1, clampCkt(5.12, 1)},
		{"limiter 3 V 100 mA", li, 3, 0.1, limCkt(3, 0.1)},
		{"limiter 3 V 500 mA", li, 3, 0.5, limCkt(3, 0.5)},
		{"limiter 1.9 V 300 mA", li, 1.9, 0.3, limCkt(1.9, 0.3)},
	}

	var b strings.Builder
	b.WriteString("headroom P-channel MOSFET checks\n")
	b.WriteString(spiceFET("PA", fet))
	b.WriteString(spiceFET("PE", eol))
	fmt.Fprintf(&b, ".model QP PNP(IS=%.17g)\n", li.PNP().Is)
	for j, v := range vgs {
		fmt.Fprintf(&b, "VG%d s%d 0 DC %g\nVX%d s%d d%d DC 1e-6\nMR%d d%d 0 s%d s%d PA W=1u L=1u\n", j, j, v, j, j, j, j, j, j, j)
	}
	for j, c := range drops {
		b.WriteString(c.circuit(j))
	}
	b.WriteString(".control\nset numdgt=12\nop\n")
	for j := range vgs {
		fmt.Fprintf(&b, "print i(vx%d)\n", j)
	}
	for j := range drops {
		fmt.Fprintf(&b, "print v(o%d)\n", j)
	}
	b.WriteString("quit 0\n.endc\n.end\n")
	out, err := spice.Run(b.String())
	if err != nil {
		t.Fatal(err)
	}
	vals := spice.Values(out)

	for j, v := range vgs {
		id, ok := vals[fmt.Sprintf("i(vx%d)", j)]
		if !ok || id == 0 {
			t.Fatalf("no current i(vx%d) in ngspice output", j)
		}
		want := 1e-6 / math.Abs(id)
		f27 := fet.At(27)
		got := f27.A / (v - f27.Vth) // the channel part at 27 °C
		rel := got/want - 1
		t.Logf("Rch at |Vgs| = %g V: ours %.6g Ω, ngspice %.6g Ω, rel %+.1e", v, got, want, rel)
		if math.Abs(rel) > 1e-4 {
			t.Errorf("Rch(%g V) = %.6g Ω, ngspice %.6g Ω", v, got, want)
		}
	}
	for j, c := range drops {
		vo, ok := vals[fmt.Sprintf("v(o%d)", j)]
		if !ok {
			t.Fatalf("no v(o%d) in ngspice output", j)
		}
		want := c.vin - vo
		got := c.e.Drop(c.i, c.vin, 27)
		rel := got/want - 1
		t.Logf("%-34s ours %.6f V, ngspice %.6f V, rel %+.1e", c.name, got, want, rel)
		if math.Abs(rel) > 1e-4 {
			t.Errorf("%s: drop %.6f V, ngspice %.6f V", c.name, got, want)
		}
	}
}

// A 2×AA pack near end of life (1.9 V) driving a FET with Vth = 1.2 V
// (docs/protection.md). From Rch = Ron·(Vref − Vth)/(|Vgs| − Vth) the channel sees
// (4.5 − 1.2)/(1.9 − 1.2) = 4.7× its rating even at small current, and
// more at 100 mA since the drop itself eats gate drive; we assert > 3×, a
// margin under the 4.7× worked out above. Below Vth the channel is off and Drop is the body diode's
// exactly (1e-12 V: the same expression, only rounding may differ).
func TestPMOSEndOfLife(t *testing.T) {
	m := DefaultPMOS()
	m.Vth = 1.2
	// The channel part scales by (Vref − Vth)/(|Vgs| − Vth) = 3.3/0.7;
	// the fixed part Rfix does not.
	want := (m.Rfix + (m.Ron-m.Rfix)*3.3/0.7) / m.Ron
	if r := m.Channel(1.9) / m.Ron; math.Abs(r-want) > 1e-12 || r < 3 {
		t.Errorf("Ron(1.9 V)/Ron = %.4f, want %.4f", r, want)
	}
	for _, i := range []float64{1e-3, 0.1, 0.3} {
		if r := m.Drop(i, 1.9, 25) / i / m.Ron; r < 3 {
			t.Errorf("at %g A from 1.9 V the drop is only %.2f×Ron·I", i, r)
		}
	}
	for _, vin := range []float64{0.5, 1.1, 1.2} {
		for _, i := range []float64{1e-3, 0.1, 1} {
			got, want := m.Drop(i, vin, 25), m.Body.Drop(i, 25)+i*m.Rfix
			if math.Abs(got-want) > 1e-12 {
				t.Errorf("vin %g V, %g A: drop %.9f V, body diode %.9f V", vin, i, got, want)
			}
		}
	}
	if m.Channel(1.2) != math.Inf(1) {
		t.Errorf("channel at threshold should be off")
	}
}

// The closed forms must solve the laws they claim to (exact algebra, so
// 1e-9 relative: a few roundings of sums of order 1), be continuous where
// the clamp lets go, rise with current, fall with input voltage, and never
// exceed the body diode's drop. (The limiter's two FETs: TestLimiterDropLaws.)
func TestFETDropProperties(t *testing.T) {
	pm, cl := DefaultPMOS(), DefaultPMOSClamp()
	f := pm.At(25)
	a := f.A
	for _, vin := range []float64{0.3, 0.9, 1.2, 1.9, 2.4, 3, 4.5, 5.1, 5.2, 6, 9, 13.5} {
		for _, i := range []float64{1e-6, 1e-3, 0.05, 0.3, 1, 3, 10} {
			// The die's drop (channel or body diode) is the whole drop
			// less the fixed part i·Rfix on its load side.
			rf := i * f.Rfix
			d := pm.Drop(i, vin, 25)
			diode := pm.Body.Drop(i, 25)
			if dd := d - rf; dd < diode { // the channel carries it: dd·(vin − Vth − dd/2) = i·A
				if r := dd*(vin-f.Vth-dd/2) - i*a; math.Abs(r) > 1e-9*i*a {
					t.Errorf("pmos %g V %g A: law residual %g", vin, i, r)
				}
			}
			if d > diode+rf*(1+1e-12) {
				t.Errorf("pmos %g V %g A: drop %g above body diode %g + i·Rfix", vin, i, d, diode)
			}
			dc := cl.Drop(i, vin, 25)
			if dd := dc - rf; dd < diode && vin-dc >= cl.Vz { // clamped: i·A = (Vz + i·Rfix − Vth)·dd + dd²/2
				if r := (cl.Vz+rf-f.Vth)*dd + dd*dd/2 - i*a; math.Abs(r) > 1e-9*i*a {
					t.Errorf("pmos-clamp %g V %g A: clamped law residual %g", vin, i, r)
				}
			}
			if dc > diode+rf*(1+1e-12) {
				t.Errorf("pmos-clamp %g V %g A: drop %g above body diode %g + i·Rfix", vin, i, dc, diode)
			}
			if vin < cl.Vz && dc != d {
				t.Errorf("pmos-clamp below Vz at %g V %g A: %g, pmos gives %g", vin, i, dc, d)
			}
			// Monotone: more current never less drop, more input never more.
			for _, e := range []Element{pm, cl} {
				if e.Drop(i*1.01, vin, 25) < e.Drop(i, vin, 25) {
					t.Errorf("%s %g V: drop falls as current rises past %g A", e.Kind(), vin, i)
				}
				if e.Drop(i, vin*1.01, 25) > e.Drop(i, vin, 25)+1e-15 {
					t.Errorf("%s %g A: drop rises as input rises past %g V", e.Kind(), i, vin)
				}
			}
		}
	}
	// Continuity where the clamp lets go: vin − d = Vz. Step 1 µV in vin
	// across it; the drop moves by far less than 1 mV.
	i := 1.0
	vz := cl.Vz + cl.Drop(i, cl.Vz+0.04, 25)
	if j := math.Abs(cl.Drop(i, vz+1e-6, 25) - cl.Drop(i, vz-1e-6, 25)); j > 1e-6 {
		t.Errorf("pmos-clamp jumps %g V where the clamp lets go", j)
	}
}

// With the clamp holding, the channel is a fixed resistance set by Vz, and
// the Zener with Rg draws (vin − Vz)/Rg (docs/protection.md: the standing drain).
// 9 V − 5.1 V over 100 kΩ is 39 µA; exact arithmetic, 1e-15 A.
func TestPMOSClampStandingDrain(t *testing.T) {
	cl := DefaultPMOSClamp()
	if got := cl.Quiescent(9, 25); math.Abs(got-39e-6) > 1e-15 {
		t.Errorf("standing drain at 9 V = %g A, want 39 µA", got)
	}
	if got := cl.Quiescent(4.5, 25); got != 0 {
		t.Errorf("standing drain below Vz = %g A, want 0", got)
	}
	// The drop no longer depends on the pack once clamped.
	if a, b := cl.Drop(0.5, 9, 25), cl.Drop(0.5, 13.5, 25); a != b {
		t.Errorf("clamped drop depends on vin: %g vs %g", a, b)
	}
}

func TestFETWarnings(t *testing.T) {
	pm, cl := DefaultPMOS(), DefaultPMOSClamp()
	has := func(w []string, s string) bool {
		for _, x := range w {
			if strings.Contains(x, s) {
				return true
			}
		}
		return false
	}
	// 9×AA fresh at 1.5 V is 13.5 V, above the ±12 V gate limit.
	if w := pm.Warnings(Operating{VFresh: 13.5, TempC: 25}); !has(w, "gate-source limit") {
		t.Errorf("pmos at 13.5 V: no gate warning in %q", w)
	}
	if w := pm.Warnings(Operating{VFresh: 4.5, TempC: 25}); len(w) != 0 {
		t.Errorf("pmos at 4.5 V: unexpected warnings %q", w)
	}
	if w := cl.Warnings(Operating{VFresh: 13.5, TempC: 25}); has(w, "gate-source limit") {
		t.Errorf("pmos-clamp at 13.5 V warns of the gate limit: %q", w)
	}
	cl.Vz = 15
	if w := cl.Warnings(Operating{VFresh: 13.5, TempC: 25}); !has(w, "Zener") {
		t.Errorf("pmos-clamp with a 15 V Zener: no warning in %q", w)
	}
	if w := pm.Warnings(Operating{VFresh: 0.7, TempC: 25}); !has(w, "never turns on") {
		t.Errorf("pmos below threshold: no warning in %q", w)
	}
	// SOT-23 at 250 °C/W: 0.6 W lifts the junction 150 °C above 25 °C.
	if w := pm.Warnings(Operating{VFresh: 3, PeakW: 0.6, TempC: 25}); !has(w, "junction reaches 175 °C") {
		t.Errorf("pmos at 0.6 W: no junction warning in %q", w)
	}
}
