package protect

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"headroom/internal/spice"
)

// kp is the Shichman–Hodges K = KP·W/L matching a FET's rating: in the
// linear region at small drain-source voltage Rch = 1/(K·(|Vgs| − Vth)),
// so Ron at |Vgs| = Vref fixes K = 1/(Ron·(Vref − Vth)).
func kp(f FET) float64 { return 1 / (f.Ron * (f.Vref - f.Vth)) }

// spiceFET writes a level-1 PMOS model with W = L, so that KP is K.
func spiceFET(name string, f FET) string {
	return fmt.Sprintf(".model %s PMOS(LEVEL=1 VTO=%g KP=%.17g)\n", name, -f.Vth, kp(f))
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
// max(0, Vout − Vz); for the limiter, the gate divider) — against the same
// circuit solved by ngspice. Our closed form is the level-1 law exactly,
// so the remaining differences are ngspice's convergence and the limiter
// divider's 2.7 µA, which ngspice passes through Rsh and the channel and
// Drop does not (2.5e-5 of the drop at 100 mA). Measured: at most 4e-6
// relative for the FETs, 2.6e-5 for the limiter; we allow 1e-4.
func TestPMOSAgainstNgspice(t *testing.T) {
	spice.Require(t)
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
			return fmt.Sprintf("VIN%d a%d 0 DC %g\nM%d a%d 0 o%d o%d %s W=1u L=1u\nIL%d o%d 0 DC %g\n", j, j, vin, j, j, j, j, model, j, j, i)
		}
	}
	clampCkt := func(vin, i float64) func(j int) string {
		return func(j int) string {
			return fmt.Sprintf("VIN%d a%d 0 DC %g\nM%d a%d g%d o%d o%d PA W=1u L=1u\nB%d g%d 0 V = max(0, v(o%d) - %g)\nIL%d o%d 0 DC %g\n",
				j, j, vin, j, j, j, j, j, j, j, j, cl.Vz, j, j, i)
		}
	}
	limCkt := func(vin, i float64) func(j int) string {
		return func(j int) string {
			return fmt.Sprintf("VIN%d a%d 0 DC %g\nRSH%d a%d m%d %g\nM%d m%d g%d o%d o%d PA W=1u L=1u\nR1_%d o%d g%d %g\nR2_%d g%d 0 %g\nIL%d o%d 0 DC %g\n",
				j, j, vin, j, j, j, li.Rsh, j, j, j, j, j, j, j, j, li.R1, j, j, li.R2, j, j, i)
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
	}

	var b strings.Builder
	b.WriteString("headroom P-channel MOSFET checks\n")
	b.WriteString(spiceFET("PA", fet))
	b.WriteString(spiceFET("PE", eol))
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
		got := fet.Channel(v)
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
