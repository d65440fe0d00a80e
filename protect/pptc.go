package protect

import (
	"math"

	"headroom/internal/units"
)

// PPTC is a polyfuse (polymeric positive-temperature-coefficient device)
// in the rail: a small resistance that, above its trip current, heats and
// jumps to a high resistance until the current is removed and it cools.
// It limits current only; it does not block a reversed pack.
//
// Hold and trip currents fall with temperature. From memory, datasheets
// show both falling roughly linearly to about half at 85 °C and rising to
// about 1.4–1.5× at −40 °C; the model is the straight line through 100 %
// at 25 °C and Derate at 85 °C, kept between 5 % and 200 %.
type PPTC struct {
	// R is the resistance in ohms when not tripped. Above 0.
	R float64
	// Hold is the current carried indefinitely at 25 °C, amperes. Above 0.
	Hold float64
	// Trip is the current that trips it at 25 °C, amperes. Above Hold.
	Trip float64
	// Derate is the fraction of Hold and Trip left at 85 °C, above 0 and
	// at most 1.
	Derate float64
	// Price is the unit cost in dollars, at least 0.
	Price float64
	// ThetaJA is the body-to-ambient thermal resistance in °C/W, above 0.
	ThetaJA float64
	// TjMax is the highest body temperature in °C; it trips near it.
	TjMax float64
}

// DefaultPPTC is a 0.3 A-hold surface-mount polyfuse (typical, from
// memory): 0.5 Ω, trips at 0.6 A, half the hold left at 85 °C, $0.10.
func DefaultPPTC() PPTC {
	return PPTC{R: 0.5, Hold: 0.3, Trip: 0.6, Derate: 0.5, Price: 0.10, ThetaJA: 150, TjMax: 125}
}

// derivePPTC sets Trip to twice Hold when a spec gives hold but not trip
// (a trip/hold ratio near 2 is typical, from memory).
func derivePPTC(s settable, given func(string) bool) {
	p := s.(*PPTC)
	if given("hold") && !given("trip") {
		p.Trip = 2 * p.Hold
	}
}

func (f PPTC) Kind() string { return "pptc" }
func (f PPTC) Spec() string { return specOf(f.Kind(), f.fields()) }

// Factor returns the fraction of the 25 °C hold and trip currents left at
// tempC.
func (f PPTC) Factor(tempC float64) float64 {
	x := 1 - (1-f.Derate)*(tempC-25)/60
	return math.Min(2, math.Max(0.05, x))
}

func (f PPTC) Drop(i, vin, tempC float64) float64 {
	if !(i > 0) {
		return 0
	}
	return i * f.R
}

func (f PPTC) Quiescent(vin, tempC float64) float64 { return 0 }

// Limit: the product stops above the derated trip current.
func (f PPTC) Limit(tempC float64) Limit {
	return Limit{Clamp: math.Inf(1), Trip: f.Trip * f.Factor(tempC)}
}

func (f PPTC) Cost() float64    { return f.Price }
func (f PPTC) Thermal() Thermal { return Thermal{ThetaJA: f.ThetaJA, TjMax: f.TjMax} }

func (f PPTC) Warnings(op Operating) []string {
	var w []string
	k := f.Factor(op.TempC)
	trip, hold := f.Trip*k, f.Hold*k
	peak := 0.0
	for _, i := range op.Currents {
		peak = math.Max(peak, i)
	}
	switch {
	case peak > trip:
		w = append(w, "a phase draws "+units.Human(peak, units.Current, 3)+", above the polyfuse's "+
			units.Human(trip, units.Current, 3)+" trip current: it trips and the product stops until it cools")
	case peak > hold:
		w = append(w, "a phase draws "+units.Human(peak, units.Current, 3)+", above the polyfuse's "+
			units.Human(hold, units.Current, 3)+" hold current: it may trip if the phase lasts seconds")
	}
	return appendHeat(w, f.Thermal(), op)
}

// Reverse: the polyfuse passes the reversed pack to the load; if the
// current that flows exceeds the trip current it trips (after a time this
// model does not estimate) and the load is left reversed but starved.
func (f PPTC) Reverse(p Pack) Reversal {
	v := packVolts(p)
	i := 0.0
	if loadKnown(p) {
		i = v / (packOhms(p) + f.R + p.LoadR)
	}
	c := Case{Outcome: LoadReversed, Current: i, Volts: -(v - i*(packOhms(p)+f.R)),
		Note: "a polyfuse limits current but does not block: the load sees the pack reversed"}
	if trip := f.Limit(p.TempC).Trip; i > trip {
		c.Outcome = FuseOpens
		c.Note = "the reversed pack drives " + units.Human(i, units.Current, 3) + " through the load, above the " +
			units.Human(trip, units.Current, 3) + " trip current: the polyfuse trips after the load has seen the reversal"
	}
	return Reversal{WholePack: c, OneCell: flipped(f, p)}
}

func (f *PPTC) fields() []field {
	fs := []field{
		{key: "r", kind: units.Resistance, p: &f.R, lo: 0, hi: 1000, loOpen: true, what: "the resistance when not tripped"},
		{key: "hold", kind: units.Current, p: &f.Hold, lo: 0, hi: 100, loOpen: true, what: "the hold current at 25 °C"},
		{key: "trip", kind: units.Current, p: &f.Trip, lo: 0, hi: 200, loOpen: true, what: "the trip current at 25 °C"},
		{key: "derate", kind: units.Fraction, p: &f.Derate, lo: 0, hi: 1, loOpen: true, what: "the fraction of hold left at 85 °C"},
		costField(&f.Price),
	}
	return append(fs, thermalFields(&f.ThetaJA, &f.TjMax)...)
}

func (f *PPTC) check() error {
	if !(f.Trip > f.Hold) {
		return specErrorf("pptc", "trip", "%s must be above the hold current %s",
			units.Format(f.Trip, units.Current), units.Format(f.Hold, units.Current))
	}
	return nil
}
func (f *PPTC) value() Element { return *f }
