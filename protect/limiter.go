package protect

import (
	"math"

	"headroom/internal/units"
)

// Limiter is a shunt current limiter: a sense resistor Rsh in the rail, a
// PNP whose base-emitter junction sees the sense voltage, and a pass
// P-channel MOSFET (oriented like PMOS, so it also blocks reversed cells)
// whose gate the PNP pulls towards its source once i·Rsh reaches Vbe. A
// divider R1 (source to gate) and R2 (gate to ground) sets the gate drive
// to |Vgs| = Vs·R1/(R1+R2), Vs being the FET's source (load-side) voltage,
// and draws Vs/(R1+R2) from the pack all the time.
//
// Below the limit the drop is i·(Rsh + Rch): the PNP is off. The limit
// current is Vbe(T)/Rsh with Vbe(T) = Vbe + TcVbe·(T − 25 °C) (common
// practice; BJT Vbe falls about 2 mV/°C, Sedra and Smith, Microelectronic
// Circuits). At the limit the pass FET takes up whatever voltage the load
// does not: in a short it holds Ilim with almost the whole pack across it,
// P = Vpack·Ilim, and heats to Tamb + θja·P.
type Limiter struct {
	FET
	// Rsh is the sense resistance in ohms. Above 0.
	Rsh float64
	// Vbe is the PNP's base-emitter turn-on voltage at 25 °C in volts,
	// from 0.3 to 1.
	Vbe float64
	// TcVbe is Vbe's temperature coefficient in V/°C, from −0.005 to 0.
	TcVbe float64
	// R1 is the gate resistor from the FET's source to its gate, ohms.
	// Above 0.
	R1 float64
	// R2 is the gate resistor from the gate to ground, ohms. Above 0.
	R2 float64
	// Price is the unit cost of all five parts in dollars, at least 0.
	Price float64
	// ThetaJA is the pass FET's junction-to-ambient thermal resistance in
	// °C/W, above 0.
	ThetaJA float64
	// TjMax is the pass FET's highest junction temperature in °C.
	TjMax float64
}

// DefaultLimiter is a 1 Ω sense resistor (0.65 A limit), a small-signal
// PNP at 0.65 V, the generic SOT-23 FET of DefaultPMOS and a 1 MΩ/100 kΩ
// gate divider (typical, from memory), $0.20 for the parts.
func DefaultLimiter() Limiter {
	return Limiter{FET: defaultFET(), Rsh: 1, Vbe: 0.65, TcVbe: -0.002,
		R1: 1e6, R2: 100e3, Price: 0.20, ThetaJA: 250, TjMax: 150}
}

func (l Limiter) Kind() string { return "limiter" }
func (l Limiter) Spec() string { return specOf(l.Kind(), l.fields()) }

// VbeAt returns the PNP's Vbe at tempC, never below 0.
func (l Limiter) VbeAt(tempC float64) float64 {
	return math.Max(0, l.Vbe+l.TcVbe*(tempC-25))
}

// drive is the gate divider's fraction R1/(R1+R2).
func (l Limiter) drive() float64 { return l.R1 / (l.R1 + l.R2) }

// Drop is i·Rsh plus the pass FET's drop, solved in closed form. With
// v' = vin − i·Rsh at the FET's pack-side terminal and the gate at
// (1 − k)·(v' − d), k = R1/(R1+R2), the square law (see channelDrop)
// gives i·A = (k·v' − Vth)·d + (1/2 − k)·d²: c = k − 1/2, b = k·v' − Vth,
// and the channel pinches off at d = b/k, i·A = b²/(2k²). The PNP is off
// below the limit. Drop does not clamp: above Limit().Clamp the caller
// must take the load voltage as collapsed.
func (l Limiter) Drop(i, vin, tempC float64) float64 {
	if !(i > 0) {
		return 0
	}
	k := l.drive()
	vs := i * l.Rsh
	b := k*(vin-vs) - l.Vth
	return vs + channelDrop(i*l.slope(), b, k-0.5, b*b/(2*k*k), l.Body.Drop(i, tempC))
}

// Quiescent is the gate divider's current vin/(R1+R2).
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
func (l Limiter) Thermal() Thermal { return Thermal{ThetaJA: l.ThetaJA, TjMax: l.TjMax} }

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
	if p, tj := l.ShortCircuit(op.VFresh, op.TempC); tj > l.TjMax {
		w = append(w, "in a short the pass FET holds "+units.Human(lim, units.Current, 3)+" with "+
			units.Human(op.VFresh, units.Voltage, 3)+" across it: "+units.Human(p, units.Power, 3)+
			", junction "+units.Human(tj, units.Temperature, 3)+", above its "+units.Human(l.TjMax, units.Temperature, 3)+
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
	w = appendOff(w, l.FET, op)
	return appendHeat(w, l.Thermal(), op)
}

func (l Limiter) Reverse(p Pack) Reversal {
	return blockedReverse(l, p, l.Body.Saturation(p.TempC), "the pass FET's gate sits above its source, its channel is off and its body diode is reverse-biased")
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
	return append(fs, thermalFields(&l.ThetaJA, &l.TjMax)...)
}

func (l *Limiter) check() error {
	return l.FET.check(l.Kind())
}
func (l *Limiter) value() Element { return *l }
