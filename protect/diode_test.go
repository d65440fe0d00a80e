package protect

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"headroom/internal/spice"
	"headroom/internal/spicetest"
)

// SI Brochure, 9th edition (2019): k and q are exact, so Vt = kT/q is
// exact too. Tolerances are half a unit in the last digit quoted.
func TestThermalVoltage(t *testing.T) {
	for _, c := range []struct {
		kelvin, wantMV, tolMV float64
	}{
		{300, 25.852, 0.001}, // SI Brochure values (docs/references.md), given to ±0.001 mV
		{298.15, 25.6926, 0.00005},
		{300.15, 25.8649, 0.00005},
	} {
		got := ThermalVoltage(c.kelvin) * 1e3
		if math.Abs(got-c.wantMV) > c.tolMV {
			t.Errorf("Vt(%g K) = %.6f mV, want %.5g ± %g mV", c.kelvin, got, c.wantMV, c.tolMV)
		}
	}
}

// Worked values from the design notes §7: Shockley (1949) with series
// resistance, and the Lambert-W closed form of Banwell and Jayakumar
// (Electronics Letters, 2000) for 3.0 V through 100 Ω into a diode. Both
// are at 300 K with Is given at that temperature, so the temperature terms
// are switched off (Eg = XTI = 0 makes Is(T) = Is). Tolerances: half a unit
// in the last quoted digit.
func TestShockleyWorkedValues(t *testing.T) {
	tc := 300 - ZeroCelsius
	s := Shockley{Is: 1e-14, N: 1, Rs: 0.5}
	if got := s.Drop(0.1, tc); math.Abs(got-0.82384) > 0.5e-5 {
		t.Errorf("Shockley worked value: Vf(0.1 A) = %.6f V, want 0.82384 V", got)
	}
	s.Rs = 0
	// 22.6455 mA is quoted to 1e-7 A; that uncertainty moves Vd by
	// Vt·ΔI/I ≈ 6e-8 V, far inside the 5e-6 V of Vd's own rounding.
	if got := s.Drop(22.6455e-3, tc); math.Abs(got-0.73545) > 0.5e-5 {
		t.Errorf("Banwell–Jayakumar: Vd(22.6455 mA) = %.6f V, want 0.73545 V", got)
	}
	// The same operating point closes the loop 3 V = I·100 Ω + Vd.
	if got := 22.6455e-3*100 + s.Drop(22.6455e-3, tc); math.Abs(got-3) > 1e-5 {
		t.Errorf("Banwell–Jayakumar loop: %.6f V, want 3 V", got)
	}
}

// diodeCases are the junctions compared with ngspice: the generic PN
// rectifier, the documented example spec (protect/doc.go) and the generic Schottky.
var diodeCases = []struct {
	name string
	s    Shockley
}{
	{"default PN", DefaultDiode().Junction}, // the example spec diode:is=10n,n=1.8,rs=0.08
	{"ideal n=1", Shockley{Is: 1e-14, N: 1, Rs: 0.5, Eg: 1.11, XTI: 3}},
	{"small-signal", Shockley{Is: 2.5e-9, N: 1.75, Rs: 0.6, Eg: 1.11, XTI: 3}},
	{"default Schottky", DefaultSchottky().Junction},
}

var spiceCurrents = []float64{1e-3, 100e-3, 1}

// diodeNetlist drives each junction of diodeCases at each current of
// spiceCurrents from an ideal current source and prints the node voltages.
func diodeNetlist(tempC float64) string {
	var b strings.Builder
	fmt.Fprintf(&b, "headroom diode drops\n")
	for j, c := range diodeCases {
		for k, i := range spiceCurrents {
			fmt.Fprintf(&b, "I%d%d 0 n%d%d DC %g\nD%d%d n%d%d 0 DX%d\n", j, k, j, k, i, j, k, j, k, j)
		}
		fmt.Fprintf(&b, ".model DX%d D(IS=%g N=%g RS=%g EG=%g XTI=%g)\n", j, c.s.Is, c.s.N, c.s.Rs, c.s.Eg, c.s.XTI)
	}
	fmt.Fprintf(&b, ".control\nset numdgt=12\nset temp=%g\nop\n", tempC)
	for j := range diodeCases {
		for k := range spiceCurrents {
			fmt.Fprintf(&b, "print v(n%d%d)\n", j, k)
		}
	}
	b.WriteString("quit 0\n.endc\n.end\n")
	return b.String()
}

// Shockley against ngspice's diode model with the same IS, N, RS, EG, XTI
// (ngspice, Debian package). At 27 °C, ngspice's nominal temperature, the
// issue asks agreement within 1 mV; the laws are the same, so the
// remaining difference is ngspice's Newton tolerance (reltol 1e-3 on
// current, which moves V by under n·Vt·1e-3 ≈ 50 µV) and its gmin of
// 1e-12 S. Measured: ours is 0.1–0.4 µV higher throughout, which is
// ngspice-39 using the CODATA 2014 Boltzmann constant (1.38064852e-23,
// 3.5e-7 below the exact SI value): 3.5e-7 × 0.5–1 V. At 85 °C the same
// 1 mV checks our saturation-current temperature law against ngspice's.
func TestDiodeAgainstNgspice(t *testing.T) {
	spicetest.Require(t)
	for _, tempC := range []float64{27, 85} {
		out, err := spice.Run(diodeNetlist(tempC))
		if err != nil {
			t.Fatal(err)
		}
		vals := spice.Values(out)
		for j, c := range diodeCases {
			for k, i := range spiceCurrents {
				want, ok := vals[fmt.Sprintf("v(n%d%d)", j, k)]
				if !ok {
					t.Fatalf("%s: no v(n%d%d) in ngspice output", c.name, j, k)
				}
				got := c.s.Drop(i, tempC)
				t.Logf("%-16s %3g °C %6g A: ours %.6f V, ngspice %.6f V, diff %+.2e V", c.name, tempC, i, got, want, got-want)
				if math.Abs(got-want) > 1e-3 {
					t.Errorf("%s at %g °C, %g A: drop %.6f V, ngspice %.6f V", c.name, tempC, i, got, want)
				}
			}
		}
	}
}

// Common practice (docs/references.md; Sedra and Smith, Microelectronic Circuits):
// a silicon diode's drop falls about 2 mV/°C. The slope depends on current
// and n — (Vj − Eg − XTI·Vt)/T in this model, Vj the junction part of the
// drop — so it shrinks at high current as Vj nears Eg (about −1.5 mV/°C
// at 100 mA for this rectifier). The rule of thumb is for small-signal
// currents: checked at 1 and 10 mA to ±0.5 mV/°C, the spread a one-figure
// rule allows.
func TestDiodeTemperatureSlope(t *testing.T) {
	d := DefaultDiode()
	for _, i := range []float64{1e-3, 10e-3} {
		slope := (d.Drop(i, 3, 35) - d.Drop(i, 3, 15)) / 20
		if math.Abs(slope-(-2e-3)) > 0.5e-3 {
			t.Errorf("slope at %g A = %.3f mV/°C, want about −2", i, slope*1e3)
		}
	}
}

// Typical values from memory (docs/protection.md): a 1 A silicon rectifier drops
// about 0.75 V at 100 mA and 0.93 V at 1 A; a Schottky about 0.3 V and
// 0.45–0.5 V. The defaults must sit near them; ±25 mV because the figures
// are remembered to two digits.
func TestDiodeDefaultsNearTypical(t *testing.T) {
	for _, c := range []struct {
		name    string
		e       Element
		i, want float64
	}{
		{"diode", DefaultDiode(), 0.1, 0.75},
		{"diode", DefaultDiode(), 1, 0.93},
		{"schottky", DefaultSchottky(), 0.1, 0.30},
		{"schottky", DefaultSchottky(), 1, 0.475},
	} {
		if got := c.e.Drop(c.i, 5, 25); math.Abs(got-c.want) > 0.025 {
			t.Errorf("%s at %g A: %.3f V, want about %.3f V", c.name, c.i, got, c.want)
		}
	}
}

// Schottky leakage (from memory, docs/protection.md): microamperes at 25 °C, rising
// towards a milliampere when hot. Checked as an order of magnitude: 0.3–3
// µA at 25 °C and at least 30× more at 85 °C.
func TestSchottkyLeakage(t *testing.T) {
	s := DefaultSchottky()
	cold, hot := s.Junction.Saturation(25), s.Junction.Saturation(85)
	if cold < 0.3e-6 || cold > 3e-6 {
		t.Errorf("leakage at 25 °C = %g A, want about 1 µA", cold)
	}
	if hot/cold < 30 {
		t.Errorf("leakage grows only %.1f× from 25 to 85 °C", hot/cold)
	}
	// Reversed, the leakage heats the junction a little: it flows at the
	// junction temperature Tj that solves Tj = 85 °C + θja·V·Is(Tj) (the
	// steady balance; residual to 1e-6 °C), a touch above the ambient's.
	r := s.Reverse(Pack{Series: 2, CellV: 1.5, CellR: 0.15, LoadR: 10, TempC: 85})
	tj := r.WholePack.JunctionC
	if res := 85 + s.Heat.ThetaJA*3*s.Junction.Saturation(tj) - tj; math.Abs(res) > 1e-6 {
		t.Errorf("hot reversal: junction %g °C does not balance its leakage's heat (residual %g °C)", tj, res)
	}
	if r.WholePack.Outcome != Blocked || r.WholePack.Current != s.Junction.Saturation(tj) || !(r.WholePack.Current > hot) {
		t.Errorf("hot reversal = %+v, want blocked with Is(Tj), above %g A", r.WholePack, hot)
	}
}
