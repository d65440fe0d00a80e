package protect

import (
	"fmt"
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

// channelDrop solves the drop of a FET whose gate drive is k·(v − d) at
// channel drop d: d·(k·(v − d) − Vth) = i·A with A = Ron·(Vref − Vth), i.e.
// k·d² − b·d + i·A = 0 with b = k·v − Vth. The smaller root
//
//	d = (b − sqrt(b² − 4·k·i·A))/(2k) = 2·i·A/(b + sqrt(b² − 4·k·i·A))
//
// (the second form avoids cancellation at small currents) keeps the gate
// above threshold, since d ≤ b/(2k). When b ≤ 0 the channel is off; when
// the discriminant is negative the channel cannot carry i at any drop. In
// both cases the body diode carries the current and the drop is diode.
//
// Combination rule: the body diode is in parallel with the channel, so the
// drop is never more than the body diode's drop at the whole current:
// d = min(channel, diode). When both conduct the true drop is a little
// below both (they share the current); the rule errs high by at most where
// the two curves cross, where each alone would carry the whole current.
func channelDrop(i, a, b, k, diode float64) float64 {
	if !(b > 0) {
		return diode
	}
	disc := b*b - 4*k*i*a
	if disc < 0 {
		return diode
	}
	d := 2 * i * a / (b + math.Sqrt(disc))
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
		return fmt.Errorf("protect: %s: key \"vref\": %s must be above vth %s, where the channel turns on",
			kind, units.Format(f.Vref, units.Voltage), units.Format(f.Vth, units.Voltage))
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

// Drop solves the channel drop in closed form with |Vgs| = vin − drop (see
// channelDrop for the formula and how the body diode combines with it).
func (m PMOS) Drop(i, vin, tempC float64) float64 {
	if !(i > 0) {
		return 0
	}
	return channelDrop(i, m.slope(), vin-m.Vth, 1, m.Body.Drop(i, tempC))
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

// Drop: with the drive clamped at Vz the channel is a fixed resistance,
// d = i·A/(Vz − Vth), valid while vin − d ≥ Vz. Otherwise the gate follows
// the source, as for PMOS, on the part of the curve where vin − d < Vz;
// when no such root exists (vin > 2·Vz − Vth and the current too high)
// the body diode carries the current.
func (m PMOSClamp) Drop(i, vin, tempC float64) float64 {
	if !(i > 0) {
		return 0
	}
	a := m.slope()
	diode := m.Body.Drop(i, tempC)
	if dc := i * a / (m.Vz - m.Vth); vin-dc >= m.Vz {
		return math.Min(dc, diode)
	}
	b := vin - m.Vth
	if vin-m.Vz > b/2 {
		return diode
	}
	return channelDrop(i, a, b, 1, diode)
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
		return fmt.Errorf("protect: pmos-clamp: key \"vz\": %s must be above vth %s, or the clamp holds the channel off",
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
