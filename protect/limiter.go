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
// Below the limit the drop is i·Rsh plus the two channels' drops, each FET
// driven by its own terminal voltages; the PNP is off. The limit current
// is Vbe(T)/Rsh with Vbe(T) = Vbe + TcVbe·(T − 25 °C) (common practice;
// BJT Vbe falls about 2 mV/°C, Sedra and Smith, Microelectronic Circuits).
// At the limit the pass FET takes up whatever voltage the load does not:
// in a short it holds Ilim with almost the whole pack across it,
// P = Vpack·Ilim, and heats to Tamb + θja·P.
type Limiter struct {
	// FET is each of the two MOSFETs: the blocking one and the pass one.
	FET
	// Rsh is the sense resistance in ohms. Above 0.
	Rsh float64
	// Vbe is the PNP's base-emitter turn-on voltage at 25 °C in volts,
	// from 0.3 to 1.
	Vbe float64
	// TcVbe is Vbe's temperature coefficient in V/°C, from −0.005 to 0.
	TcVbe float64
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
}

// DefaultLimiter is a 1 Ω sense resistor (0.65 A limit), a small-signal
// PNP at 0.65 V, two of the generic SOT-23 FET of DefaultPMOS and a
// 1 MΩ/100 kΩ gate divider (typical, from memory), $0.28 for the parts:
// $0.08 a FET as DefaultPMOS, the rest for the PNP and resistors.
func DefaultLimiter() Limiter {
	return Limiter{FET: defaultFET(), Rsh: 1, Vbe: 0.65, TcVbe: -0.002,
		R1: 1e6, R2: 100e3, Price: 0.28, Heat: sot23}
}

func (l Limiter) Kind() string { return "limiter" }
func (l Limiter) Spec() string { return specOf(l.Kind(), l.fields()) }

// VbeAt returns the PNP's Vbe at tempC, never below 0.
func (l Limiter) VbeAt(tempC float64) float64 {
	return math.Max(0, l.Vbe+l.TcVbe*(tempC-25))
}

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
	ia := i * l.slope()
	b1 := vin - l.Vth
	up := channelDrop(ia, b1, 0.5, 0.5*b1*b1, l.Body.Drop(i, tempC)) + i*l.Rsh // d1 + i·Rsh
	b2 := l.drive()*(vin-up) - l.Vth
	if !(b2 > 0) || ia > 0.5*b2*b2 {
		return math.Max(vin, up)
	}
	return up + channelDrop(ia, b2, 0.5, 0.5*b2*b2, math.Inf(1))
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

// Limit clamps the load current at Vbe(T)/Rsh.
func (l Limiter) Limit(tempC float64) Limit {
	return Limit{Clamp: l.VbeAt(tempC) / l.Rsh, Trip: math.Inf(1)}
}

func (l Limiter) Cost() float64    { return l.Price }
func (l Limiter) Thermal() Thermal { return l.Heat }
func (l *Limiter) heat() *Thermal  { return &l.Heat }

// ShortCircuit returns the pass FET's dissipation (W) and junction
// temperature (°C) with the output shorted: the FET holds the limit current
// with the pack voltage vpack across it.
func (l Limiter) ShortCircuit(vpack, tempC float64) (watts, tjC float64) {
	watts = vpack * l.Limit(tempC).Clamp
	return watts, l.Thermal().Junction(watts, tempC)
}

func (l Limiter) Warnings(op Operating) []string {
	var w []string
	lim := l.Limit(op.TempC).Clamp
	if p, tj := l.ShortCircuit(op.VFresh, op.TempC); tj > l.Heat.TjMax {
		w = append(w, "in a short the pass FET holds "+units.Human(lim, units.Current, 3)+" with "+
			units.Human(op.VFresh, units.Voltage, 3)+" across it: "+units.Human(p, units.Power, 3)+
			", junction "+units.Human(tj, units.Temperature, 3)+", above its "+units.Human(l.Heat.TjMax, units.Temperature, 3)+
			" limit: it overheats unless heat-sunk")
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
		{key: "vbe", kind: units.Voltage, p: &l.Vbe, lo: 0.3, hi: 1, what: "the PNP's Vbe at 25 °C"},
		{key: "tc", kind: plain, p: &l.TcVbe, lo: -0.005, hi: 0, what: "Vbe's temperature coefficient in V/°C"},
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
