package protect

import (
	"math"
	"strconv"

	"headroom/internal/rc"
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
//
// Resistance scales with size: a part that holds more current is bigger and
// has less resistance. From memory of makers' surface-mount tables, R falls
// a little faster than 1/hold; the default is R = 0.5 Ω·(0.3 A/hold)^1.2
// (0.5 Ω at 0.3 A, 1.9 Ω at 0.1 A, 40 mΩ at 2.5 A). After a trip the part
// does not return to its first resistance: it settles about 1.5–2× higher
// (from memory; makers quote a "one hour after trip" maximum), After.
//
// Time to trip (ours, the adiabatic rule of a body heated by I²R against
// the loss that holds it just below trip at the trip current): a first-
// order body of time constant τ reaches its trip temperature under a
// constant current I above the trip current It after
//
//	t = τ·ln(1 / (1 − (It/I)²))
//
// which tends to I²t = τ·It² at heavy overload (the adiabatic limit) and
// grows without bound towards It. τ is set by TTrip, the time to trip at
// five times the hold current. A repeating profile trips it when the
// periodic steady state of the normalised heating (I/It)² through that
// body reaches 1 (Overload): a short start pulse above the trip current
// does not trip it at once.
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
	// After is the resistance after a trip as a multiple of R, from 1 to
	// 5.
	After float64
	// TTrip is the time to trip at five times the hold current at 25 °C,
	// seconds, above 0.
	TTrip float64
	// Price is the unit cost in dollars, at least 0.
	Price float64
	// Heat is the body's thermal network to ambient; TjMax is the highest
	// body temperature, near which it trips.
	Heat Thermal
}

// DefaultPPTC is a 0.3 A-hold surface-mount polyfuse in 1206 (typical,
// from memory): 0.5 Ω, trips at 0.6 A, half the hold left at 85 °C, 1.7×
// its resistance after a trip, 2 s to trip at 1.5 A, $0.10.
func DefaultPPTC() PPTC {
	return PPTC{R: pptcOhms(0.3), Hold: 0.3, Trip: 0.6, Derate: 0.5, After: 1.7, TTrip: 2, Price: 0.10, Heat: body1206}
}

// pptcOhms is the default resistance of a polyfuse holding hold amperes:
// 0.5 Ω·(0.3 A/hold)^1.2 (from memory; see PPTC).
func pptcOhms(hold float64) float64 { return 0.5 * math.Pow(0.3/hold, 1.2) }

// derivePPTC sets Trip to twice Hold (a trip/hold ratio near 2 is typical,
// from memory) and R to the scaled default when a spec gives hold but not
// them.
func derivePPTC(s settable, given func(string) bool) {
	p := s.(*PPTC)
	if given("hold") && !given("trip") {
		p.Trip = 2 * p.Hold
	}
	if given("hold") && !given("r") {
		p.R = pptcOhms(p.Hold)
	}
}

// RAfterTrip is the resistance once the part has tripped and cooled, ohms.
func (f PPTC) RAfterTrip() float64 { return f.R * f.After }

// tau is the body's trip time constant, seconds, from TTrip at five times
// the hold current.
func (f PPTC) tau() float64 {
	r := f.Trip / (5 * f.Hold)
	if r >= 1 { // trip at or above 5× hold: TTrip is then taken at 2× trip
		r = 0.5
	}
	return f.TTrip / -math.Log1p(-r*r)
}

// TripTime returns the seconds a constant current i (A) takes to trip the
// part from cold at ambient tempC, or +Inf at or below the trip current.
func (f PPTC) TripTime(i, tempC float64) float64 {
	it := f.Limit(tempC).Trip
	if !(i > it) {
		return math.Inf(1)
	}
	r := it / i
	return f.tau() * -math.Log1p(-r*r)
}

// Overload returns the peak, over one cycle, of the body's normalised
// heating (I/It)² in the periodic steady state of a profile repeating
// currents[k] for secs[k] seconds at ambient tempC, and the phase where it
// peaks: at 1 or more the part trips. See PPTC for the rule.
func (f PPTC) Overload(currents, secs []float64, tempC float64) (peak float64, phase int) {
	it := f.Limit(tempC).Trip
	n := len(currents)
	var xb, eb [16]float64
	x, end := xb[:0], eb[:0]
	if n > len(xb) {
		x, end = make([]float64, 0, n), make([]float64, 0, n)
	}
	for _, i := range currents {
		r := i / it
		x = append(x, r*r)
	}
	end = end[:n]
	rc.Stage{R: 1, Tau: f.tau()}.Periodic(x, secs, end)
	peak = math.Inf(-1)
	for k, v := range end {
		if v > peak {
			peak, phase = v, k
		}
	}
	return peak, phase
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
func (f PPTC) Thermal() Thermal { return f.Heat }
func (f *PPTC) heat() *Thermal  { return &f.Heat }

func (f PPTC) Warnings(op Operating) []string {
	var w []string
	k := f.Factor(op.TempC)
	trip, hold := f.Trip*k, f.Hold*k
	peak := 0.0
	for _, i := range op.Currents {
		peak = math.Max(peak, i)
	}
	tripped := peak > trip
	// At an ambient other than 25 °C the ratings quoted are derated from
	// the ones given: say so, or "hold=2.5A" reads back as 2.60 A.
	at := func(v, rated float64, what string) string {
		s := units.Human(v, units.Current, 3) + " " + what
		if k != 1 {
			s += " at " + strconv.FormatFloat(op.TempC, 'g', 3, 64) + " °C (" + units.Human(rated, units.Current, 3) + " at 25 °C)"
		}
		return s
	}
	if tripped && len(op.Seconds) == len(op.Currents) {
		if load, _ := f.Overload(op.Currents, op.Seconds, op.TempC); load < 1 {
			w = append(w, "a phase draws "+units.Human(peak, units.Current, 3)+", above the polyfuse's "+
				at(trip, f.Trip, "trip current")+", but too briefly to trip it: held, it would trip after "+
				units.Human(f.TripTime(peak, op.TempC), units.Time, 2)+" (heating "+strconv.FormatFloat(100*load, 'f', 0, 64)+" % of the way to trip)")
			tripped = false
			peak = 0 // the hold warning below says nothing more
		}
	}
	switch {
	case tripped:
		w = append(w, "a phase draws "+units.Human(peak, units.Current, 3)+", above the polyfuse's "+
			at(trip, f.Trip, "trip current")+": it trips after about "+units.Human(f.TripTime(peak, op.TempC), units.Time, 2)+
			" and the product stops until it cools; afterwards its resistance is about "+units.Human(f.RAfterTrip(), units.Resistance, 2))
	case peak > hold:
		w = append(w, "a phase draws "+units.Human(peak, units.Current, 3)+", above the polyfuse's "+
			at(hold, f.Hold, "hold current")+": it may trip if the phase lasts seconds")
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
		{key: "after", kind: plain, p: &f.After, lo: 1, hi: 5, what: "the resistance after a trip as a multiple of r"},
		{key: "ttrip", kind: units.Time, p: &f.TTrip, lo: 0, hi: 1e4, loOpen: true, what: "the time to trip at five times the hold current"},
		costField(&f.Price),
	}
	return append(fs, thermalFields(&f.Heat)...)
}

func (f *PPTC) check() error {
	if !(f.Trip > f.Hold) {
		return specErrorf("pptc", "trip", "%s must be above the hold current %s",
			units.Format(f.Trip, units.Current), units.Format(f.Hold, units.Current))
	}
	return f.Heat.check(f.Kind())
}
func (f *PPTC) value() Element { return *f }
