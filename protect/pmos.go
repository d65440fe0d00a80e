package protect

import (
	"math"

	"headroom/internal/units"
)

// FET holds a P-channel MOSFET's conduction parameters, shared by PMOS,
// PMOSClamp and the Limiter's pass element.
//
// The on-resistance is a channel part and a fixed part. The channel
// follows the square law (Shichman and Hodges, 1968) in its linear region
// at small drain-source voltage, Rch(|Vgs|) = 1/(K·(|Vgs| − Vth)); the
// fixed part Rfix (package leads, bond wires, metallisation) does not
// depend on the gate drive. Fixing K by the rated on-resistance gives
//
//	Rch(|Vgs|) = (Ron − Rfix)·(Vref − Vth)/(|Vgs| − Vth), |Vgs| > Vth,
//
// and the channel is off at or below Vth. Rfix is taken on the load side
// of the channel, so it does not eat gate drive (half of it in the source
// lead would take i·Rfix/2, millivolts, off volts of drive).
//
// Temperature (typical, from memory; datasheets plot both): the rated
// on-resistance rises linearly, Ron(T) = Ron·(1 + TcR·(T − 25 °C)) —
// about 1.5× from 25 to 125 °C, mobility falling in the channel and
// resistivity rising in the metal alike — and the threshold falls,
// Vth(T) = Vth + TcVth·(T − 25 °C), a few mV/°C. K(T) is set so that the
// rated on-resistance at Vref follows Ron(T) exactly; at low gate drive the
// falling threshold offsets part of the rise. The body diode follows
// Shockley with temperature.
type FET struct {
	// Ron is the rated on-resistance in ohms at |Vgs| = Vref and 25 °C,
	// channel and fixed part together. Above 0.
	Ron float64
	// Vref is the |Vgs| at which Ron is rated, volts. Above Vth.
	Vref float64
	// Vth is the gate threshold |Vgs| in volts at 25 °C. Above 0.
	Vth float64
	// VgsMax is the gate-source limit in volts (typically 8, 12 or 20).
	VgsMax float64
	// Rfix is the part of Ron that does not depend on gate drive, ohms,
	// at least 0 and below Ron.
	Rfix float64
	// TcR is the on-resistance's temperature coefficient per °C, from 0
	// to 0.01.
	TcR float64
	// TcVth is the threshold's temperature coefficient in V/°C, from
	// −0.01 to 0.
	TcVth float64
	// Body is the source-drain body diode, which points from pack to load.
	Body Shockley

	// at holds At worked out once for one temperature (AtTemp); not a
	// parameter.
	at *fetAtTemp
}

// fetAtTemp is a FET's conduction parameters worked out at tempC.
type fetAtTemp struct {
	tempC float64
	v     FETAt
}

// RefC is the temperature at which FET ratings are given, °C.
const RefC = 25

// FETAt is a FET's conduction parameters at one junction temperature: the
// Shichman–Hodges A = 1/K in V·A (V²/A·… the channel's volts·amperes
// product), the threshold and the fixed resistance.
type FETAt struct {
	A, Vth, Rfix float64
}

// K is the square-law factor K = KP·W/L in A/V² (SPICE's KP with W = L).
func (a FETAt) K() float64 { return 1 / a.A }

// At returns the FET's parameters at junction temperature tempC. The
// resistance factor is kept at 0.1 or more (a coefficient of 0.01/°C at
// −65 °C would otherwise reach zero).
func (f FET) At(tempC float64) FETAt {
	if a := f.at; a != nil && a.tempC == tempC {
		return a.v
	}
	dt := tempC - RefC
	r := math.Max(0.1, 1+f.TcR*dt)
	vth := math.Max(1e-3, f.Vth+f.TcVth*dt)
	return FETAt{A: (f.Ron - f.Rfix) * r * (f.Vref - vth), Vth: vth, Rfix: f.Rfix * r}
}

// Channel returns the on-resistance in ohms at gate drive vgs = |Vgs| and
// 25 °C at small current, channel and fixed part, or +Inf when the channel
// is off (vgs ≤ Vth).
func (f FET) Channel(vgs float64) float64 {
	if !(vgs > f.Vth) {
		return math.Inf(1)
	}
	return f.Rfix + (f.Ron-f.Rfix)*(f.Vref-f.Vth)/(vgs-f.Vth)
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

// channelOrBody is channelDrop with the body diode's drop body.Drop(i,
// tempC) worked out only where it can be the smaller: a channel carrying
// the current with a drop below the diode's least possible drop
// (Shockley.dropFloor) gives its own drop, the same value channelDrop
// returns, for no logarithm. A conducting channel drops millivolts where
// the diode drops over half a volt, so that is nearly every call.
func channelOrBody(ia, b, c, satIA float64, body Shockley, i, tempC float64) float64 {
	if b > 0 && ia <= satIA {
		if d := 2 * ia / (b + math.Sqrt(b*b-4*c*ia)); d < body.dropFloor(i, tempC) {
			return d
		}
	}
	return channelDrop(ia, b, c, satIA, body.Drop(i, tempC))
}

// channelSlopes is channelOrBody with its partial derivatives: by the
// current i (through ia = i·a, and the body diode's own slope n·Vt/(Is +
// i) + Rs where it carries the current) and by b. The channel's root of
// c·d² − b·d + ia = 0 moves by 1/(b − 2c·d) per unit of ia and by
// −d/(b − 2c·d) per unit of b (implicit differentiation). d is
// channelOrBody's value to the bit (the same expressions).
func channelSlopes(ia, b, c, satIA, a float64, body Shockley, i, tempC float64) (d, di, db float64) {
	if b > 0 && ia <= satIA {
		dc := 2 * ia / (b + math.Sqrt(b*b-4*c*ia))
		if !(dc < body.dropFloor(i, tempC)) {
			if diode := body.Drop(i, tempC); !(dc < diode) {
				return diode, body.ForwardAt(tempC).Slope(i), 0
			}
		}
		den := b - 2*c*dc
		return dc, a / den, -dc / den
	}
	return body.Drop(i, tempC), body.ForwardAt(tempC).Slope(i), 0
}

// DropSlopes is Drop (the same value, to the bit) with its partial
// derivatives by the current and by the input (Sloped).
func (m PMOS) DropSlopes(i, vin, tempC float64) (d, di, dv float64) {
	if !(i > 0) {
		return 0, 0, 0
	}
	f := m.At(tempC)
	b := vin - f.Vth
	d, di, dv = channelSlopes(i*f.A, b, 0.5, 0.5*b*b, f.A, m.Body, i, tempC)
	return d + i*f.Rfix, di + f.Rfix, dv
}

func fetFields(f *FET) []field {
	fs := []field{
		{key: "ron", kind: units.Resistance, p: &f.Ron, lo: 0, hi: 1000, loOpen: true, what: "the rated on-resistance"},
		{key: "vref", kind: units.Voltage, p: &f.Vref, lo: 0, hi: 100, loOpen: true, what: "the gate drive at which ron is rated"},
		{key: "vth", kind: units.Voltage, p: &f.Vth, lo: 0, hi: 20, loOpen: true, what: "the gate threshold"},
		{key: "vgsmax", kind: units.Voltage, p: &f.VgsMax, lo: 0, hi: 100, loOpen: true, what: "the gate-source limit"},
		{key: "rfix", kind: units.Resistance, p: &f.Rfix, lo: 0, hi: 1000, what: "the part of ron that gate drive does not change"},
		{key: "tcr", kind: plain, p: &f.TcR, lo: 0, hi: 0.01, what: "ron's temperature coefficient per °C"},
		{key: "tcvth", kind: plain, p: &f.TcVth, lo: -0.01, hi: 0, what: "vth's temperature coefficient in V/°C"},
	}
	return append(fs, shockleyFields("b", &f.Body)...)
}

func (f FET) check(kind string) error {
	if !(f.Vref > f.Vth) {
		return specErrorf(kind, "vref", "%s must be above vth %s, where the channel turns on",
			units.Format(f.Vref, units.Voltage), units.Format(f.Vth, units.Voltage))
	}
	if !(f.Rfix < f.Ron) {
		return specErrorf(kind, "rfix", "%s must be below ron %s, which includes it",
			units.Format(f.Rfix, units.Resistance), units.Format(f.Ron, units.Resistance))
	}
	return nil
}

// defaultFET is a generic small logic-level P-channel MOSFET in SOT-23
// (typical, from memory): 45 mΩ at 4.5 V of which 8 mΩ leads and bond
// wires, threshold 0.8 V, ±12 V gate, Ron +0.5 %/°C (1.5× at 125 °C),
// Vth −3 mV/°C, body diode about 0.65 V at 100 mA and 0.77 V at 1 A.
func defaultFET() FET {
	return FET{Ron: 0.045, Vref: 4.5, Vth: 0.8, VgsMax: 12, Rfix: 0.008, TcR: 0.005, TcVth: -0.003,
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
	// Heat is the thermal network from junction to ambient.
	Heat Thermal
}

// DefaultPMOS is the generic FET of defaultFET (from memory) in SOT-23:
// θja 250 °C/W, Tj max 150 °C, $0.08.
func DefaultPMOS() PMOS {
	return PMOS{FET: defaultFET(), Price: 0.08, Heat: sot23}
}

func (m PMOS) Kind() string { return "pmos" }
func (m PMOS) Spec() string { return specOf(m.Kind(), m.fields()) }

// Drop solves the channel drop in closed form with the gate at ground, so
// that |Vgs| = vin − drop at the load-side terminal (see channelDrop for
// the law and how the body diode combines with it), at junction
// temperature tempC, and adds the fixed part i·Rfix.
func (m PMOS) Drop(i, vin, tempC float64) float64 {
	if !(i > 0) {
		return 0
	}
	f := m.At(tempC)
	b := vin - f.Vth
	return channelOrBody(i*f.A, b, 0.5, 0.5*b*b, m.Body, i, tempC) + i*f.Rfix
}

func (m PMOS) Quiescent(vin, tempC float64) float64 { return 0 }
func (m PMOS) Limit(tempC float64) Limit            { return NoLimit() }
func (m PMOS) Cost() float64                        { return m.Price }
func (m PMOS) Thermal() Thermal                     { return m.Heat }
func (m *PMOS) heat() *Thermal                      { return &m.Heat }

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
	return append(fs, thermalFields(&m.Heat)...)
}
func (m *PMOS) check() error {
	if err := m.FET.check(m.Kind()); err != nil {
		return err
	}
	return m.Heat.check(m.Kind())
}
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

// Drop: while the clamp holds (vin − d ≥ Vz, d the whole drop) the gate
// sits at vin − d − Vz, so from the pack-side terminal the square law for
// the channel's part dc = d − i·Rfix reads i·A = (Vz + i·Rfix − Vth)·dc +
// dc²/2 (channelDrop with c = −1/2; it never pinches off). Otherwise the
// gate is at ground and the PMOS law holds; the two meet where vin − d =
// Vz, so the drop is continuous.
func (m PMOSClamp) Drop(i, vin, tempC float64) float64 {
	if !(i > 0) {
		return 0
	}
	f := m.At(tempC)
	ia, rf := i*f.A, i*f.Rfix
	if dc := channelDrop(ia, m.Vz+rf-f.Vth, -0.5, math.Inf(1), math.Inf(1)); vin-dc-rf >= m.Vz {
		if dc < m.Body.dropFloor(i, tempC) {
			return dc + rf // min(dc, diode) without the diode's logarithm (channelOrBody)
		}
		return math.Min(dc, m.Body.Drop(i, tempC)) + rf
	}
	b := vin - f.Vth
	return channelOrBody(ia, b, 0.5, 0.5*b*b, m.Body, i, tempC) + rf
}

// DropSlopes is Drop (the same value, to the bit) with its partial
// derivatives by the current and by the input (Sloped). While the clamp
// holds, the channel's root of −d²/2 − b·d + i·A = 0, b = Vz + i·Rfix −
// Vth, does not depend on the input. (PMOSClamp must not take PMOS's.)
func (m PMOSClamp) DropSlopes(i, vin, tempC float64) (d, di, dv float64) {
	if !(i > 0) {
		return 0, 0, 0
	}
	f := m.At(tempC)
	ia, rf := i*f.A, i*f.Rfix
	bc := m.Vz + rf - f.Vth
	if dc := channelDrop(ia, bc, -0.5, math.Inf(1), math.Inf(1)); vin-dc-rf >= m.Vz {
		dci := (f.A - dc*f.Rfix) / (bc + dc)
		if dc < m.Body.dropFloor(i, tempC) {
			return dc + rf, dci + f.Rfix, 0
		}
		diode := m.Body.Drop(i, tempC)
		d := math.Min(dc, diode)
		if d == dc {
			return d + rf, dci + f.Rfix, 0
		}
		return d + rf, m.Body.ForwardAt(tempC).Slope(i) + f.Rfix, 0
	}
	b := vin - f.Vth
	d, di, dv = channelSlopes(ia, b, 0.5, 0.5*b*b, f.A, m.Body, i, tempC)
	return d + rf, di + f.Rfix, dv
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
	return append(fs, thermalFields(&m.Heat)...)
}

func (m *PMOSClamp) check() error {
	if err := m.FET.check(m.Kind()); err != nil {
		return err
	}
	if !(m.Vz > m.Vth) {
		return specErrorf("pmos-clamp", "vz", "%s must be above vth %s, or the clamp holds the channel off",
			units.Format(m.Vz, units.Voltage), units.Format(m.Vth, units.Voltage))
	}
	return m.Heat.check(m.Kind())
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
