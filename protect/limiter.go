package protect

import (
	"math"

	"headroom/internal/units"
)

// Limiter is a shunt current limiter behind a reverse-blocking FET, two of
// the same P-channel MOSFET in the rail (FET holds both parts' parameters):
//
//	pack ─ blocking FET ─ Rsh ─ pass FET ─ load
//
// The blocking FET is PMOS exactly: gate to ground, its load-side terminal
// as source, body diode pointing from pack to load, so a reversed pack
// leaves its gate above its source and nothing flows. The pass FET is
// turned the other way: source towards the pack, drain to the load, body
// diode pointing back towards the pack, so that turning its channel off
// really stops the forward current (a single FET cannot do both: whichever
// way it is turned, its body diode conducts one of the two ways). A divider
// R1 (pass source to gate) and R2 (gate to ground) sets its gate drive to
// |Vgs| = k·Vs, k = R1/(R1+R2), Vs being its source voltage, and draws
// about vin/(R1+R2) from the pack all the time. A PNP senses Rsh — emitter
// on the pack side, base on the load side — and once i·Rsh reaches Vbe its
// collector pulls the pass FET's gate up towards its source.
//
// Below the knee the drop is i·Rsh plus the two channels' drops, each FET
// driven by its own terminal voltages. The PNP obeys the Ebers–Moll law in
// its forward-active region (Ebers and Moll, 1954; the transport form
// SPICE's Gummel–Poon model reduces to with its defaults): with Vbe =
// i·Rsh it passes Ic = Is(T)·(e^(Vbe/Vt) − 1) into the gate node, and the
// pass FET's gate drive falls from k·Vs to k·Vs − Ic·(R1∥R2). With R1∥R2
// near 91 kΩ, some 10–30 µA of collector current already takes control,
// at Vbe ≈ 0.53–0.56 V, well below the 0.65 V of the rule of thumb: the
// limit is where the pass channel, at the gate drive the PNP leaves it,
// just saturates at the load current (ClampAt), and the drop bends up
// smoothly towards it — a soft knee, not a hard clamp. The limit falls
// about 0.3 %/°C as the PNP's Vbe does (about −2 mV/°C from Is(T); Sedra
// and Smith, Microelectronic Circuits) and grows a little with the pack
// voltage (more gate drive to pull down). Base current (Ic/β, a fraction
// of a µA) is left out.
//
// One temperature is used for the whole circuit: the pass FET's junction,
// the part that heats; the PNP beside it on the board runs cooler, so this
// errs towards a lower limit when the pass FET is hot.
//
// At the limit the pass FET takes up whatever voltage the load does not:
// in a short it holds the limit with almost the whole pack across it,
// P = Vpack·Ilim, and heats through its thermal network.
type Limiter struct {
	// FET is each of the two MOSFETs: the blocking one and the pass one.
	FET
	// Rsh is the sense resistance in ohms. Above 0.
	Rsh float64
	// Vbe is the PNP's base-emitter voltage at 1 mA of collector current
	// and 25 °C, in volts, from 0.3 to 1; it sets the PNP's saturation
	// current (PNP).
	Vbe float64
	// R1 is the gate resistor from the pass FET's source to its gate,
	// ohms. Above 0.
	R1 float64
	// R2 is the gate resistor from the pass FET's gate to ground, ohms.
	// Above 0.
	R2 float64
	// Price is the unit cost of all seven parts (two FETs, the PNP, three
	// resistors) in dollars, at least 0.
	Price float64
	// Heat is the pass FET's thermal network (it is the part that heats
	// when limiting).
	Heat Thermal

	// pnp holds the PNP's Is(T) and Vt(T) for one temperature (AtTemp);
	// not a parameter.
	pnp *junctionAt
	// terms is where pnp lives, with the PNP's nominal Is (AtTemp).
	terms *fetTerms
}

// DefaultLimiter is a 1 Ω sense resistor, a small-signal PNP with Vbe
// 0.65 V at 1 mA (Is about 1e-14 A), two of the generic SOT-23 FET of
// DefaultPMOS and a 1 MΩ/100 kΩ gate divider (typical, from memory): it
// limits near 0.55 A from a 2×AA pack at 25 °C. $0.28 for the parts:
// $0.08 a FET as DefaultPMOS, the rest for the PNP and resistors.
func DefaultLimiter() Limiter {
	return Limiter{FET: defaultFET(), Rsh: 1, Vbe: 0.65,
		R1: 1e6, R2: 100e3, Price: 0.28, Heat: sot23}
}

// pnpEg and pnpXTI are a silicon BJT's activation energy (eV) and
// saturation-current temperature exponent: SPICE's defaults for the
// bipolar model (EG 1.11, XTI 3).
const (
	pnpEg  = 1.11
	pnpXTI = 3
	pnpRef = 1e-3 // A: the collector current at which Vbe is given
)

// PNP returns the sense transistor's base-emitter junction as a Shockley
// junction with n = 1 (Ebers–Moll): its saturation current at 27 °C is
// the one that passes 1 mA at Vbe and 25 °C.
func (l Limiter) PNP() Shockley {
	unit := Shockley{Is: 1, N: 1, Eg: pnpEg, XTI: pnpXTI}
	is25 := pnpRef / math.Expm1(l.Vbe/ThermalVoltage(RefC+ZeroCelsius))
	return Shockley{Is: is25 / unit.Saturation(RefC), N: 1, Eg: pnpEg, XTI: pnpXTI}
}

// VbeAt returns the PNP's Vbe at a collector current of 1 mA and tempC.
func (l Limiter) VbeAt(tempC float64) float64 { return l.PNP().Drop(pnpRef, tempC) }

// Collector returns the PNP's collector current in amperes with the sense
// voltage vbe across its base and emitter at tempC: Is(T)·(e^(Vbe/Vt) − 1).
func (l Limiter) Collector(vbe, tempC float64) float64 {
	c, _ := l.collector(vbe, tempC)
	return c
}

// collector is Collector and its derivative by vbe, A/V: Is(T)·e^(Vbe/Vt)/Vt
// (0 past the 700·Vt cap).
func (l Limiter) collector(vbe, tempC float64) (c, dc float64) {
	p := l.pnp
	if p == nil || p.tempC != tempC {
		q := l.PNP()
		p = &junctionAt{tempC: tempC, is: q.Saturation(tempC), nvt: ThermalVoltage(tempC + ZeroCelsius)}
	}
	x := vbe / p.nvt
	c = p.is * expm1(math.Min(x, 700))
	if x < 700 {
		dc = (c + p.is) / p.nvt
	}
	return c, dc
}

// expm1 is e^x − 1: math.Expm1 where x is small and e^x − 1 would
// cancel, math.Exp(x) − 1 from x = 1 on (e^x ≥ e there: the subtraction
// loses under half a bit, the same to 2 ulps), at half Expm1's cost on
// the limiter's hot path (its drop is solved many times per charge).
func expm1(x float64) float64 {
	if x < 1 {
		return math.Expm1(x)
	}
	return math.Exp(x) - 1
}

// rp is the divider's Thevenin resistance R1∥R2, through which the PNP's
// collector current pulls the gate.
func (l Limiter) rp() float64 { return l.R1 * l.R2 / (l.R1 + l.R2) }

func (l Limiter) Kind() string { return "limiter" }
func (l Limiter) Spec() string { return specOf(l.Kind(), l.fields()) }

// drive is the gate divider's fraction R1/(R1+R2).
func (l Limiter) drive() float64 { return l.R1 / (l.R1 + l.R2) }

// Drop is the blocking FET's drop, i·Rsh and the pass FET's drop, each in
// closed form (see channelDrop for the law).
//
// The blocking FET is PMOS: c = 1/2, b1 = vin − Vth, its body diode in
// parallel. The pass FET's source sits at vs = vin − d1 − i·Rsh, on the
// pack side, and the divider holds its gate k·vs below that, so the
// Shichman–Hodges law from the source reads i·A = (k·vs − Vth)·d − d²/2:
// c = 1/2, b2 = k·vs − Vth, pinch-off at d = b2, i·A = b2²/2. Its body
// diode points back towards the pack and never helps. When the pass
// channel is off (b2 ≤ 0) or cannot carry i (it saturates: a FET at fixed
// |Vgs| passes at most K·(|Vgs| − Vth)²/2), no operating point at i exists;
// the drop is then max(vin, d1 + i·Rsh), all the voltage there is, so that
// the caller sees the load voltage collapse. The PNP is off below the
// limit. The divider's current, which passes the blocking FET and Rsh but
// not the pass FET, is left out (2.7 µA against the load's current). Drop
// does not clamp: above Limit().Clamp the caller must take the load
// voltage as collapsed.
func (l Limiter) Drop(i, vin, tempC float64) float64 {
	if !(i > 0) {
		return 0
	}
	f := l.At(tempC)
	ia := i * f.A
	b1 := vin - f.Vth
	up := channelOrBody(ia, b1, 0.5, 0.5*b1*b1, l.Body, i, tempC) + i*(f.Rfix+l.Rsh) // d1 + i·Rsh
	b2 := l.drive()*(vin-up) - l.Collector(i*l.Rsh, tempC)*l.rp() - f.Vth
	if !(b2 > 0) || ia > 0.5*b2*b2 {
		return math.Max(vin, up)
	}
	return up + channelDrop(ia, b2, 0.5, 0.5*b2*b2, math.Inf(1)) + i*f.Rfix
}

// DropSlopes is Drop (the same value, to the bit) with its partial
// derivatives by the current and by the input (Sloped): the two channels'
// square laws differentiated implicitly (channelSlopes), the body diode's
// n·Vt/(Is + i) + Rs, the PNP's collector current through the pass FET's
// gate drive; where the pass FET has saturated, the drop's own max(vin,
// up).
func (l Limiter) DropSlopes(i, vin, tempC float64) (d, di, dv float64) {
	if !(i > 0) {
		return 0, 0, 0
	}
	f := l.At(tempC)
	ia := i * f.A
	b1 := vin - f.Vth
	d1, d1i, d1b := channelSlopes(ia, b1, 0.5, 0.5*b1*b1, f.A, l.Body, i, tempC)
	up := d1 + i*(f.Rfix+l.Rsh) // d1 + i·Rsh
	upi, upv := d1i+f.Rfix+l.Rsh, d1b
	c, dc := l.collector(i*l.Rsh, tempC)
	k, rp := l.drive(), l.rp()
	b2 := k*(vin-up) - c*rp - f.Vth
	if !(b2 > 0) || ia > 0.5*b2*b2 {
		if vin >= up {
			return math.Max(vin, up), 0, 1
		}
		return math.Max(vin, up), upi, upv
	}
	d2 := channelDrop(ia, b2, 0.5, 0.5*b2*b2, math.Inf(1))
	b2i, b2v := -k*upi-dc*l.Rsh*rp, k*(1-upv)
	den := b2 - d2
	return up + d2 + i*f.Rfix, upi + (f.A-d2*b2i)/den + f.Rfix, upv - d2*b2v/den
}

// ClampAt returns the current the limiter holds the load to with vin at
// its input and the circuit at tempC: the largest current at which the
// pass channel, at the gate drive k·Vs − Ic·(R1∥R2) the PNP leaves it,
// still carries the load, i·A ≤ b2²/2 (the Shichman–Hodges saturation
// current K·(|Vgs| − Vth)²/2: in a short the pass FET sits there). Found
// by bisection (b2 − sqrt(2·i·A) falls as i rises); 0 when the pass FET
// cannot turn on at all.
func (l Limiter) ClampAt(vin, tempC float64) float64 {
	f := l.At(tempC)
	k, rp := l.drive(), l.rp()
	excess := func(i float64) float64 {
		ia := i * f.A
		b1 := vin - f.Vth
		up := channelOrBody(ia, b1, 0.5, 0.5*b1*b1, l.Body, i, tempC) + i*(f.Rfix+l.Rsh)
		return k*(vin-up) - l.Collector(i*l.Rsh, tempC)*rp - f.Vth - math.Sqrt(2*ia)
	}
	if !(excess(0) > 0) {
		return 0
	}
	lo, hi := 0.0, 1.2/l.Rsh // 1.2 V of sense: the PNP passes amperes
	for excess(hi) > 0 {
		hi *= 2
		if hi > 1e6 {
			return hi
		}
	}
	for range 200 {
		m := 0.5 * (lo + hi)
		if excess(m) > 0 {
			lo = m
		} else {
			hi = m
		}
		if hi-lo <= 1e-12*hi {
			break
		}
	}
	return lo
}

// Quiescent is the gate divider's current vin/(R1+R2). The divider hangs
// from the pass FET's source, which with no load current sits at vin;
// under load it sits d1 + i·Rsh lower, so the true drain is smaller by
// that drop's share of vin (0.3 µA of 2.7 µA at 0.3 A from 3 V), a
// negligible overstatement beside the load.
func (l Limiter) Quiescent(vin, tempC float64) float64 {
	if vin > 0 {
		return vin / (l.R1 + l.R2)
	}
	return 0
}

// Limit gives, as Clamp, the highest current the limiter passes from any
// pack its gates can take: ClampAt at the input where the divider drives
// the pass gate to its limit VgsMax. The clamp at a given pack voltage is
// ClampAt, at most this (Clamper).
func (l Limiter) Limit(tempC float64) Limit {
	return Limit{Clamp: l.ClampAt(l.VgsMax/l.drive(), tempC), Trip: math.Inf(1)}
}

func (l Limiter) Cost() float64    { return l.Price }
func (l Limiter) Thermal() Thermal { return l.Heat }
func (l *Limiter) heat() *Thermal  { return &l.Heat }

// ShortCircuit returns the pass FET's dissipation (W) and junction
// temperature (°C) with the output shorted: the FET holds the limit current
// with the pack voltage vpack across it.
func (l Limiter) ShortCircuit(vpack, tempC float64) (watts, tjC float64) {
	watts = vpack * l.ClampAt(vpack, tempC)
	return watts, l.Thermal().Junction(watts, tempC)
}

func (l Limiter) Warnings(op Operating) []string {
	var w []string
	lim := l.ClampAt(op.VFresh, op.TempC)
	if p, tj := l.ShortCircuit(op.VFresh, op.TempC); tj > l.Heat.TjMax {
		w = append(w, "in a short the pass FET holds "+units.Human(lim, units.Current, 3)+" with "+
			units.Human(op.VFresh, units.Voltage, 3)+" across it: "+units.Human(p, units.Power, 3)+
			", junction "+units.Human(tj, units.Temperature, 3)+" when settled, above its "+units.Human(l.Heat.TjMax, units.Temperature, 3)+
			" limit"+l.Heat.reachText(p, op.TempC)+": it overheats unless heat-sunk")
	}
	if g := l.drive() * op.VFresh; g > l.VgsMax {
		w = append(w, "the gate divider gives "+units.Human(g, units.Voltage, 3)+" of gate drive from a fresh pack, above the ±"+
			units.Human(l.VgsMax, units.Voltage, 3)+" limit: raise R2")
	}
	for _, i := range op.Currents {
		if i > lim {
			w = append(w, "a phase draws "+units.Human(i, units.Current, 3)+", above the "+units.Human(lim, units.Current, 3)+
				" limit: the load voltage collapses during it")
			break
		}
	}
	if op.VFresh > l.VgsMax {
		w = append(w, "the fresh pack's "+units.Human(op.VFresh, units.Voltage, 3)+" exceeds the blocking FET's gate-source limit of ±"+
			units.Human(l.VgsMax, units.Voltage, 3)+": the gate oxide may fail")
	}
	if g := l.drive() * op.VFresh; op.VFresh > 0 && g <= l.Vth {
		w = append(w, "the gate divider gives only "+units.Human(g, units.Voltage, 3)+" of gate drive from a fresh pack, not above the "+
			units.Human(l.Vth, units.Voltage, 3)+" threshold: the pass FET never turns on and nothing reaches the load")
	}
	return appendHeat(w, l.Thermal(), op)
}

func (l Limiter) Reverse(p Pack) Reversal {
	return blockedReverse(l, p, l.Body.Saturation(p.TempC), "the blocking FET's gate sits above its source, its channel is off and its body diode is reverse-biased")
}

func (l *Limiter) fields() []field {
	fs := []field{
		{key: "rsh", kind: units.Resistance, p: &l.Rsh, lo: 0, hi: 1e4, loOpen: true, what: "the sense resistance"},
		{key: "vbe", kind: units.Voltage, p: &l.Vbe, lo: 0.3, hi: 1, what: "the PNP's Vbe at 1 mA and 25 °C"},
		{key: "r1", kind: units.Resistance, p: &l.R1, lo: 0, hi: 1e9, loOpen: true, what: "the source-to-gate resistor"},
		{key: "r2", kind: units.Resistance, p: &l.R2, lo: 0, hi: 1e9, loOpen: true, what: "the gate-to-ground resistor"},
	}
	fs = append(fs, fetFields(&l.FET)...)
	fs = append(fs, costField(&l.Price))
	return append(fs, thermalFields(&l.Heat)...)
}

func (l *Limiter) check() error {
	if err := l.FET.check(l.Kind()); err != nil {
		return err
	}
	return l.Heat.check(l.Kind())
}
func (l *Limiter) value() Element { return *l }
