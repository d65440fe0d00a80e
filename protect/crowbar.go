package protect

import (
	"math"

	"headroom/internal/units"
)

// Crowbar is a fuse in the rail followed by a diode across the input,
// reverse-biased in normal use. Forward, only the fuse's resistance drops
// voltage, and the diode's reverse leakage is a standby drain. A reversed
// pack forward-biases the diode, which shorts the pack through the fuse
// until the fuse opens.
//
// Fuse model (ours, from the usual shape of fast-acting fuse curves): the
// fuse carries its rating indefinitely; it does not open below a minimum
// fusing current of twice its rating; above that it opens after
//
//	t = I2t / (I² − (2·Rating)²)
//
// which tends to the melting integral I2t/I² at high current and grows
// without bound towards the minimum fusing current. Limit().Trip is the
// rating itself: a fuse run above its rating ages and may open after
// minutes, so a product that needs more is not designed right.
type Crowbar struct {
	// Fuse is the fuse rating in amperes. Above 0.
	Fuse float64
	// RFuse is the fuse's cold resistance in ohms, at least 0.
	RFuse float64
	// I2t is the fuse's melting integral in A²s. Above 0.
	I2t float64
	// Diode is the crowbar diode across the input.
	Diode Shockley
	// Price is the unit cost of fuse and diode in dollars, at least 0.
	Price float64
	// Heat is the crowbar diode's thermal network (it is the part that
	// heats, in a reversed-pack short).
	Heat Thermal
}

// Typical fast-acting miniature fuse, from memory: cold resistance about
// 0.1 Ω·A divided by the rating, melting I²t about 0.5 s times the rating
// squared.
const (
	fuseOhmAmps  = 0.1
	fuseI2tRatio = 0.5
)

// DefaultCrowbar is a 0.5 A fast fuse (0.2 Ω, 0.125 A²s) with the generic
// 1 A rectifier of DefaultDiode across the input (typical, from memory),
// $0.12 for both.
func DefaultCrowbar() Crowbar {
	d := DefaultDiode()
	return Crowbar{Fuse: 0.5, RFuse: fuseOhmAmps / 0.5, I2t: fuseI2tRatio * 0.5 * 0.5,
		Diode: d.Junction, Price: 0.12, Heat: d.Heat}
}

// deriveCrowbar scales the fuse resistance and I²t with the rating when a
// spec gives the rating but not them.
func deriveCrowbar(s settable, given func(string) bool) {
	c := s.(*Crowbar)
	if !given("fuse") {
		return
	}
	if !given("rfuse") {
		// Three digits, as a datasheet states it: the spec that writes it
		// back then reads rfuse=14.3mohm, not 0.014285714285714287ohm.
		c.RFuse = units.RoundSig(fuseOhmAmps/c.Fuse, 3)
	}
	if !given("i2t") {
		c.I2t = fuseI2tRatio * c.Fuse * c.Fuse
	}
}

func (c Crowbar) Kind() string { return "crowbar" }
func (c Crowbar) Spec() string { return specOf(c.Kind(), c.fields()) }

// Drop is the fuse's i·RFuse.
func (c Crowbar) Drop(i, vin, tempC float64) float64 {
	if !(i > 0) {
		return 0
	}
	return i * c.RFuse
}

// Quiescent is the crowbar diode's reverse leakage Is(T): it sits
// reverse-biased across the pack all the time.
func (c Crowbar) Quiescent(vin, tempC float64) float64 {
	if vin > 0 {
		return c.Diode.Saturation(tempC)
	}
	return 0
}

func (c Crowbar) Limit(tempC float64) Limit {
	return Limit{Clamp: math.Inf(1), Trip: c.Fuse}
}

func (c Crowbar) Cost() float64    { return c.Price }
func (c Crowbar) Thermal() Thermal { return c.Heat }
func (c *Crowbar) heat() *Thermal  { return &c.Heat }

// OpenTime returns the seconds the fuse takes to open at current i, or
// +Inf when i is at or below the minimum fusing current (twice the rating).
func (c Crowbar) OpenTime(i float64) float64 {
	min := 2 * c.Fuse
	if !(i > min) {
		return math.Inf(1)
	}
	return c.I2t / (i*i - min*min)
}

func (c Crowbar) Warnings(op Operating) []string {
	var w []string
	peak := 0.0
	for _, i := range op.Currents {
		peak = math.Max(peak, i)
	}
	switch {
	case peak > 2*c.Fuse:
		w = append(w, "a phase draws "+units.Human(peak, units.Current, 3)+", which opens the "+
			units.Human(c.Fuse, units.Current, 3)+" fuse in about "+units.Human(c.OpenTime(peak), units.Time, 2))
	case peak > c.Fuse:
		w = append(w, "a phase draws "+units.Human(peak, units.Current, 3)+", above the fuse's "+
			units.Human(c.Fuse, units.Current, 3)+" rating: it ages and may open")
	}
	return appendHeat(w, c.Thermal(), op)
}

// ShortCurrent returns the current a reversed pack of open-circuit voltage
// v and internal resistance r drives through fuse and diode, and the
// diode's drop at it: i·(r + RFuse) + Vd(i) = v, solved by bisection (Vd
// grows with i, so the root is unique; this runs once per report).
func (c Crowbar) ShortCurrent(v, r, tempC float64) (i, vd float64) {
	if !(v > 0) {
		return 0, 0
	}
	rt := r + c.RFuse + c.Diode.Rs
	var hi float64
	if rt > 0 {
		hi = v / rt
	} else {
		// No resistance at all: the ideal junction alone sets the current.
		nvt := c.Diode.N * ThermalVoltage(tempC+ZeroCelsius)
		hi = c.Diode.Saturation(tempC) * math.Expm1(math.Min(v/nvt, 700))
	}
	lo := 0.0
	for range 200 {
		mid := 0.5 * (lo + hi)
		if mid*(r+c.RFuse)+c.Diode.Drop(mid, tempC) > v {
			hi = mid
		} else {
			lo = mid
		}
		if hi-lo <= 1e-12*hi {
			break
		}
	}
	return lo, c.Diode.Drop(lo, tempC)
}

// Reverse: the reversed pack shorts through fuse and diode; the fuse opens
// if the current passes the minimum fusing current, otherwise the cells
// discharge through the diode. The load sees only the diode's drop,
// reversed. A flipped cell is not seen.
func (c Crowbar) Reverse(p Pack) Reversal {
	i, vd := c.ShortCurrent(packVolts(p), packOhms(p), p.TempC)
	ca := Case{Outcome: FuseOpens, Current: i, Volts: -vd}
	// The diode heats through its network while the short lasts: to the
	// single pulse's Zth(t)·P by the time the fuse opens, or to the
	// steady θja·P when it never does.
	if t := c.OpenTime(i); !math.IsInf(t, 1) {
		ca.Seconds = t
		ca.JunctionC = c.Heat.Pulse(i*vd, t, p.TempC)
		ca.Note = "the crowbar diode shorts the reversed pack: " + units.Human(i, units.Current, 3) +
			" opens the fuse in about " + units.Human(t, units.Time, 2) + "; replace the fuse"
		if ca.JunctionC > c.Heat.TjMax {
			ca.Note += "; the diode reaches " + units.Human(ca.JunctionC, units.Temperature, 3) + " first, above its " +
				units.Human(c.Heat.TjMax, units.Temperature, 3) + " limit: use a bigger diode or a faster fuse"
		}
	} else {
		ca.Outcome = ShortsCells
		ca.JunctionC = c.Heat.Junction(i*vd, p.TempC)
		ca.Note = "the crowbar diode shorts the reversed pack at " + units.Human(i, units.Current, 3) +
			", too little to open the fuse: the cells discharge until flat or the diode fails"
		if ca.JunctionC > c.Heat.TjMax {
			ca.Note += " (it passes its " + units.Human(c.Heat.TjMax, units.Temperature, 3) + " limit" + c.Heat.reachText(i*vd, p.TempC) + ")"
		}
	}
	return Reversal{WholePack: ca, OneCell: flipped(c, p)}
}

func (c *Crowbar) fields() []field {
	fs := []field{
		{key: "fuse", kind: units.Current, p: &c.Fuse, lo: 0, hi: 100, loOpen: true, what: "the fuse rating"},
		{key: "rfuse", kind: units.Resistance, p: &c.RFuse, lo: 0, hi: 1000, what: "the fuse's cold resistance"},
		{key: "i2t", kind: plain, p: &c.I2t, lo: 0, hi: 1e6, loOpen: true, what: "the fuse's melting I²t in A²s"},
	}
	fs = append(fs, shockleyFields("d", &c.Diode)...)
	fs = append(fs, costField(&c.Price))
	return append(fs, thermalFields(&c.Heat)...)
}
func (c *Crowbar) check() error   { return c.Heat.check(c.Kind()) }
func (c *Crowbar) value() Element { return *c }
