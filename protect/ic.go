package protect

import (
	"math"

	"headroom/internal/units"
)

// IC is an integrated input protector: a switch with on-resistance Ron,
// reverse blocking, a current limit and an over-voltage cut-off, at the
// cost of a supply current and a price several times a discrete FET's.
//
// While the pack at its input is above Vovp the switch is open and the
// load gets nothing (Drop is then the whole input). The input it judges is
// the loaded pack voltage the caller passes, so a pack that sags below
// Vovp under load is taken as let through: real parts turn on only below
// the threshold less a hysteresis, judged with the load off — so a pack
// whose open-circuit voltage is above Vovp may never start at all.
type IC struct {
	// Ron is the switch's on-resistance in ohms at 25 °C. Above 0.
	Ron float64
	// TcR is Ron's temperature coefficient per °C, from 0 to 0.01 (a
	// MOSFET switch inside: about 0.5 %/°C, from memory).
	TcR float64
	// Iq is the supply (quiescent) current in amperes, at least 0.
	Iq float64
	// Ilim is the current limit in amperes. Above 0.
	Ilim float64
	// Spread is the current limit's tolerance as a fraction of Ilim, from
	// 0 to 0.5 (±20 % is typical of small parts, from memory): the limit
	// of a given part lies within Ilim·(1 ± Spread).
	Spread float64
	// Vovp is the over-voltage threshold in volts: above it the switch
	// opens. Above 0.
	Vovp float64
	// Irev is the reverse leakage with the pack reversed, amperes, ≥ 0.
	Irev float64
	// Price is the unit cost in dollars, at least 0.
	Price float64
	// Heat is the thermal network from junction to ambient.
	Heat Thermal
}

// DefaultIC is a generic small protector (typical, from memory): 100 mΩ,
// 20 µA, 0.5 A limit, 5.8 V over-voltage threshold, 1 µA reverse leakage,
// SOT-23-5, $0.45.
func DefaultIC() IC {
	return IC{Ron: 0.1, TcR: 0.005, Iq: 20e-6, Ilim: 0.5, Spread: 0.2, Vovp: 5.8, Irev: 1e-6, Price: 0.45, Heat: sot23IC}
}

func (c IC) Kind() string { return "ic" }
func (c IC) Spec() string { return specOf(c.Kind(), c.fields()) }

// Drop is i·Ron(T) with Ron(T) = Ron·(1 + TcR·(T − 25 °C)), or the whole
// input vin while it is above Vovp (the switch is open).
func (c IC) Drop(i, vin, tempC float64) float64 {
	if !(i > 0) {
		return 0
	}
	if vin > c.Vovp {
		return vin
	}
	return i * c.Ron * math.Max(0.1, 1+c.TcR*(tempC-RefC))
}

// Quiescent is Iq whenever the pack is connected the right way round.
func (c IC) Quiescent(vin, tempC float64) float64 {
	if vin > 0 {
		return c.Iq
	}
	return 0
}

func (c IC) Limit(tempC float64) Limit {
	return Limit{Clamp: c.Ilim, Trip: math.Inf(1)}
}

func (c IC) Cost() float64    { return c.Price }
func (c IC) Thermal() Thermal { return c.Heat }
func (c *IC) heat() *Thermal  { return &c.Heat }

func (c IC) Warnings(op Operating) []string {
	var w []string
	if op.VFresh > c.Vovp {
		w = append(w, "the fresh pack's "+units.Human(op.VFresh, units.Voltage, 3)+" is above the over-voltage threshold of "+
			units.Human(c.Vovp, units.Voltage, 3)+": the protector cuts the load while the pack is above it, and may never let a fresh pack start")
	}
	for _, i := range op.Currents {
		if i > c.Ilim {
			w = append(w, "a phase draws "+units.Human(i, units.Current, 3)+", above the "+units.Human(c.Ilim, units.Current, 3)+
				" current limit: the load voltage collapses during it")
			break
		}
	}
	return appendHeat(w, c.Thermal(), op)
}

func (c IC) Reverse(p Pack) Reversal {
	return blockedReverse(c, p, c.Irev, "the protector blocks reverse polarity")
}

func (c *IC) fields() []field {
	fs := []field{
		{key: "ron", kind: units.Resistance, p: &c.Ron, lo: 0, hi: 1000, loOpen: true, what: "the on-resistance"},
		{key: "iq", kind: units.Current, p: &c.Iq, lo: 0, hi: 1, what: "the quiescent current"},
		{key: "tcr", kind: plain, p: &c.TcR, lo: 0, hi: 0.01, what: "ron's temperature coefficient per °C"},
		{key: "ilim", kind: units.Current, p: &c.Ilim, lo: 0, hi: 100, loOpen: true, what: "the current limit"},
		{key: "spread", kind: units.Fraction, p: &c.Spread, lo: 0, hi: 0.5, what: "the current limit's tolerance"},
		{key: "vovp", kind: units.Voltage, p: &c.Vovp, lo: 0, hi: 100, loOpen: true, what: "the over-voltage threshold"},
		{key: "irev", kind: units.Current, p: &c.Irev, lo: 0, hi: 1, what: "the reverse leakage"},
		costField(&c.Price),
	}
	return append(fs, thermalFields(&c.Heat)...)
}
func (c *IC) check() error   { return c.Heat.check(c.Kind()) }
func (c *IC) value() Element { return *c }
