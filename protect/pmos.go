package protect

import (
	"math"

	"headroom/internal/units"
)

// FET holds a P-channel MOSFET's conduction parameters, shared by PMOS,
// PMOSClamp and the Limiter's pass element.
//
// The channel follows the square law (Shichman and Hodges, 1968) in its
// linear region at small drain-source voltage: Rch(|Vgs|) = 1/(K·(|Vgs| −
// Vth)) with K = KP·W/L. Fixing K by the rated on-resistance gives
//
//	Rch(|Vgs|) = Ron·(Vref − Vth)/(|Vgs| − Vth), |Vgs| > Vth,
//
// and the channel is off at or below Vth. Ron and Vth are taken as
// independent of temperature (real parts gain roughly 0.5 %/°C of Ron and
// lose a few mV/°C of Vth, from memory); the body diode follows Shockley
// with temperature.
type FET struct {
	// Ron is the rated on-resistance in ohms at |Vgs| = Vref. Above 0.
	Ron float64
	// Vref is the |Vgs| at which Ron is rated, volts. Above Vth.
	Vref float64
	// Vth is the gate threshold |Vgs| in volts. Above 0.
	Vth float64
	// VgsMax is the gate-source limit in volts (typically 8, 12 or 20).
	VgsMax float64
	// Body is the source-drain body diode, which points from pack to load.
	Body Shockley
}

// Channel returns the channel resistance in ohms at gate drive vgs =
// |Vgs|, or +Inf when the channel is off (vgs ≤ Vth).
func (f FET) Channel(vgs float64) float64 {
	if !(vgs > f.Vth) {
		return math.Inf(1)
	}
	return f.Ron * (f.Vref - f.Vth) / (vgs - f.Vth)
}

// channelDrop returns the drop of a FET channel in parallel with its body
// diode, given the channel's law written as the quadratic
//
//	c·d² − b·d + i·A = 0, A = Ron·(Vref − Vth) = 1/K,
//
// whose smallest positive root is taken in the cancellation-free form
//
//	d = 2·i·A / (b + sqrt(b² − 4·c·i·A)).
//
// ia is i·A; satIA is the largest i·A the channel can carry before it
// pinches off (+Inf when it cannot); diode is the body diode's drop at the
// whole current.
//
// The law is the Shichman–Hodges (1968) square law in its linear region,
// taken with the pack-side terminal (at vin) as the channel's source, since
// a P channel conducts from its higher terminal and is symmetric:
// i = K·((vin − Vg − Vth)·d − d²/2) with Vg the gate voltage. For PMOS
// (gate at ground) that is d·(vin − Vth − d/2) = i·A: c = 1/2, b = vin −
// Vth, pinch-off at d = b, i·A = b²/2. Written from the load-side
// terminal the same law reads i·A = d·(|Vgs| − Vth) + d²/2 with |Vgs| =
// vin − d; the small-drop form d·(vin − d − Vth) = i·A leaves out the
// d²/2 and overstates the drop by about d/(2·(vin − Vth)), 1.9 % at 1 A
// from 3 V for the default FET; ngspice's level-1 model agrees with the
// full law.
//
// When b ≤ 0 the channel is off and when i·A > satIA it cannot carry the
// current: the body diode carries it and the drop is the diode's.
// Otherwise the combination rule is d = min(channel, diode): the body
// diode is in parallel with the channel, so the drop is never more than
// the diode's at the whole current. When both conduct the true drop is a
// little below both (they share the current); the rule errs high by at
// most what sharing would save where the two curves cross.
func channelDrop(ia, b, c, satIA, diode float64) float64 {
	if !(b > 0) || ia > satIA {
		return diode
	}
	d := 2 * ia / (b + math.Sqrt(b*b-4*c*ia))
	if d < diode {
		return d
	}
	return diode
}

// slope is A = Ron·(Vref − Vth), the channel's volts·amperes product.
func (f FET) slope() float64 { return f.Ron * (f.Vref - f.Vth) }

func fetFields(f *FET) []field {
	fs := []field{
		{key: "ron", kind: units.Resistance, p: &f.Ron, lo: 0, hi: 1000, loOpen: true, what: "the rated on-resistance"},
		{key: "vref", kind: units.Voltage, p: &f.Vref, lo: 0, hi: 100, loOpen: true, what: "the gate drive at which ron is rated"},
		{key: "vth", kind: units.Voltage, p: &f.Vth, lo: 0, hi: 20, loOpen: true, what: "the gate threshold"},
		{key: "vgsmax", kind: units.Voltage, p: &f.VgsMax, lo: 0, hi: 100, loOpen: true, what: "the gate-source limit"},
	}
	return append(fs, shockleyFields("b", &f.Body)...)
}

func (f FET) check(kind string) error {
	if !(f.Vref > f.Vth) {
		return specErrorf(kind, "vref", "%s must be above vth %s, where the channel turns on",
			units.Format(f.Vref, units.Voltage), units.Format(f.Vth, units.Voltage))
	}
	return nil
}

// defaultFET is a generic small logic-level P-channel MOSFET in SOT-23
// (typical, from memory): 45 mΩ at 4.5 V, threshold 0.8 V, ±12 V gate,
// body diode about 0.65 V at 100 mA and 0.77 V at 1 A.
func defaultFET() FET {
	return FET{Ron: 0.045, Vref: 4.5, Vth: 0.8, VgsMax: 12,
		Body: Shockley{Is: 1e-11, N: 1.1, Rs: 0.05, Eg: 1.11, XTI: 3}}
}

// PMOS is a P-channel MOSFET in the supply rail, gate to ground, source on
// the load side, body diode pointing from pack to load. At power-up the
// body diode conducts, the source rises, and the gate drive |Vgs| equals
// the load-side voltage vin − drop, so the channel resistance depends on
// the pack voltage: a sagging pack turns its own protection element less
// on. A reversed pack leaves the gate above the source: blocked.
//
// The gate draws only leakage (nanoamperes), so Quiescent is 0.
type PMOS struct {
	FET
	// Price is the unit cost in dollars, at least 0.
	Price float64
	// ThetaJA is junction-to-ambient thermal resistance in °C/W, above 0.
	ThetaJA float64
	// TjMax is the highest allowed junction temperature in °C.
	TjMax float64
}

// DefaultPMOS is the generic FET of defaultFET (from memory) in SOT-23:
// θja 250 °C/W, Tj max 150 °C, $0.08.
func DefaultPMOS() PMOS {
	return PMOS{FET: defaultFET(), Price: 0.08, ThetaJA: 250, TjMax: 150}
}

func (m PMOS) Kind() string { return "pmos" }
func (m PMOS) Spec() string { return specOf(m.Kind(), m.fields()) }

// Drop solves the channel drop in closed form with the gate at ground, so
// that |Vgs| = vin − drop at the load-side terminal (see channelDrop for
// the law and how the body diode combines with it).
func (m PMOS) Drop(i, vin, tempC float64) float64 {
	if !(i > 0) {
		return 0
	}
	b := vin - m.Vth
	return channelDrop(i*m.slope(), b, 0.5, 0.5*b*b, m.Body.Drop(i, tempC))
}

func (m PMOS) Quiescent(vin, tempC float64) float64 { return 0 }
func (m PMOS) Limit(tempC float64) Limit            { return NoLimit }
func (m PMOS) Cost() float64                        { return m.Price }
func (m PMOS) Thermal() Thermal                     { return Thermal{ThetaJA: m.ThetaJA, TjMax: m.TjMax} }

func (m PMOS) Warnings(op Operating) []string {
	var w []string
	if op.VFresh > m.VgsMax {
		w = append(w, "the fresh pack's "+units.Human(op.VFresh, units.Voltage, 3)+" exceeds the gate-source limit of ±"+
			units.Human(m.VgsMax, units.Voltage, 3)+": the gate oxide may fail; add a gate clamp (pmos-clamp)")
	}
	w = appendOff(w, m.FET, op)
	return appendHeat(w, m.Thermal(), op)
}

func (m PMOS) Reverse(p Pack) Reversal {
	return blockedReverse(m, p, m.Body.Saturation(p.TempC), "the gate sits above the source, the channel is off and the body diode is reverse-biased")
}

func (m *PMOS) fields() []field {
	fs := append(fetFields(&m.FET), costField(&m.Price))
	return append(fs, thermalFields(&m.ThetaJA, &m.TjMax)...)
}
func (m *PMOS) check() error   { return m.FET.check(m.Kind()) }
func (m *PMOS) value() Element { return *m }

// PMOSClamp is a PMOS with a Zener diode from source to gate and a gate
// resistor Rg to ground, for packs above the gate-source limit: the gate
// drive is min(vin − drop, Vz), and whenever the pack exceeds Vz the
// Zener and Rg draw a standing (vin − Vz)/Rg from the pack, counted in
// Quiescent.
type PMOSClamp struct {
	PMOS
	// Vz is the Zener voltage in volts. Above Vth.
	Vz float64
	// Rg is the gate resistor to ground in ohms. Above 0.
	Rg float64
}

// DefaultPMOSClamp is DefaultPMOS with a 5.1 V Zener and 100 kΩ (typical,
// from memory), $0.11 for the three parts.
func DefaultPMOSClamp() PMOSClamp {
	m := DefaultPMOS()
	m.Price = 0.11
	return PMOSClamp{PMOS: m, Vz: 5.1, Rg: 100e3}
}

func (m PMOSClamp) Kind() string { return "pmos-clamp" }
func (m PMOSClamp) Spec() string { return specOf(m.Kind(), m.fields()) }

// Drop: while the clamp holds (vin − d ≥ Vz) the gate sits at vin − d −
// Vz, so from the pack-side terminal the square law reads
// i·A = (Vz − Vth)·d + d²/2 (channelDrop with c = −1/2, b = Vz − Vth; it
// never pinches off). Otherwise the gate is at ground and the PMOS law
// holds; the two meet where vin − d = Vz, so the drop is continuous.
func (m PMOSClamp) Drop(i, vin, tempC float64) float64 {
	if !(i > 0) {
		return 0
	}
	ia := i * m.slope()
	diode := m.Body.Drop(i, tempC)
	if dc := channelDrop(ia, m.Vz-m.Vth, -0.5, math.Inf(1), math.Inf(1)); vin-dc >= m.Vz {
		return math.Min(dc, diode)
	}
	b := vin - m.Vth
	return channelDrop(ia, b, 0.5, 0.5*b*b, diode)
}

// Quiescent is the Zener and gate-resistor current (vin − Vz)/Rg above Vz.
func (m PMOSClamp) Quiescent(vin, tempC float64) float64 {
	if vin > m.Vz {
		return (vin - m.Vz) / m.Rg
	}
	return 0
}

func (m PMOSClamp) Warnings(op Operating) []string {
	var w []string
	if m.Vz > m.VgsMax {
		w = append(w, "the clamp's "+units.Human(m.Vz, units.Voltage, 3)+" Zener is above the gate-source limit of ±"+
			units.Human(m.VgsMax, units.Voltage, 3)+": choose a lower Zener")
	}
	if op.VFresh > m.Vz {
		w = append(w, "the gate clamp draws "+units.Human(m.Quiescent(op.VFresh, op.TempC), units.Current, 2)+
			" all the time from a fresh pack")
	}
	w = appendOff(w, m.FET, op)
	return appendHeat(w, m.Thermal(), op)
}

func (m PMOSClamp) Reverse(p Pack) Reversal {
	return blockedReverse(m, p, m.Body.Saturation(p.TempC), "the gate sits above the source, the channel is off and the body diode is reverse-biased")
}

func (m *PMOSClamp) fields() []field {
	fs := append(fetFields(&m.FET),
		field{key: "vz", kind: units.Voltage, p: &m.Vz, lo: 0, hi: 100, loOpen: true, what: "the Zener clamp voltage"},
		field{key: "rg", kind: units.Resistance, p: &m.Rg, lo: 0, hi: 1e9, loOpen: true, what: "the gate resistor"},
		costField(&m.Price))
	return append(fs, thermalFields(&m.ThetaJA, &m.TjMax)...)
}

func (m *PMOSClamp) check() error {
	if err := m.FET.check(m.Kind()); err != nil {
		return err
	}
	if !(m.Vz > m.Vth) {
		return specErrorf("pmos-clamp", "vz", "%s must be above vth %s, or the clamp holds the channel off",
			units.Format(m.Vz, units.Voltage), units.Format(m.Vth, units.Voltage))
	}
	return nil
}
func (m *PMOSClamp) value() Element { return *m }

// appendOff warns when even a fresh pack cannot turn the channel on.
func appendOff(w []string, f FET, op Operating) []string {
	if op.VFresh > 0 && op.VFresh <= f.Vth {
		w = append(w, "the fresh pack's "+units.Human(op.VFresh, units.Voltage, 3)+" is not above the gate threshold of "+
			units.Human(f.Vth, units.Voltage, 3)+": the channel never turns on and the body diode carries the current")
	}
	return w
}
