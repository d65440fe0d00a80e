package protect

import (
	"math"

	"headroom/internal/units"
)

// Element is an input-protection element in series between the pack and
// the load. Currents are in amperes, positive from the pack into the load;
// voltages in volts; temperatures in °C (ambient unless named junction).
//
// Every method is a pure function of its arguments and the element's
// parameters, safe to call from many goroutines at once.
type Element interface {
	// Kind is the element's short kind name, as in a spec: "diode", "pmos".
	Kind() string
	// Spec is the full parameter string; Parse(Spec()) gives the element back.
	Spec() string
	// Drop is the forward voltage across the element when it carries
	// current i (≥ 0) with vin at its input (the pack's terminal voltage)
	// at ambient tempC (junctions are taken at ambient). It is at least 0,
	// finite, 0 for i ≤ 0, and does not fall as i rises. It may exceed vin:
	// a diode needs its drop whatever the pack can give, and the caller
	// then has no operating point at that current. Above Limit().Clamp it
	// is the unclamped law; the caller must apply the clamp.
	Drop(i, vin, tempC float64) float64
	// Quiescent is the current the element draws from the pack at all
	// times, to ground, with vin at its input: a gate divider, a clamp
	// resistor, an IC's supply current, reverse leakage. At least 0.
	Quiescent(vin, tempC float64) float64
	// Limit gives the currents at which the element stops passing the
	// load's demand.
	Limit(tempC float64) Limit
	// Cost is the element's unit cost in dollars, parts only.
	Cost() float64
	// Thermal gives the element's thermal network (steady θja and its
	// Foster ladder) and the maximum junction temperature.
	Thermal() Thermal
	// Warnings lists what goes wrong in normal use at the operating
	// conditions given, in plain words; nil when nothing does.
	Warnings(op Operating) []string
	// Reverse tells what happens when the user puts the cells in wrong.
	Reverse(p Pack) Reversal
}

// Limit holds an element's current limits in amperes; +Inf where there is
// none. Clamp is the current a limiter holds the load to (the load voltage
// collapses above it); Trip is the current above which a fuse or polyfuse
// opens and the product stops.
type Limit struct {
	Clamp float64
	Trip  float64
}

// NoLimit is a Limit with neither a clamp nor a trip: a function, not a
// variable, so that no caller can change it for every other.
func NoLimit() Limit { return Limit{Clamp: math.Inf(1), Trip: math.Inf(1)} }

// Operating describes normal use for Warnings.
type Operating struct {
	VFresh   float64   // open-circuit pack voltage when fresh, volts
	Currents []float64 // the highest current of each load phase, amperes
	PeakW    float64   // highest dissipation in the element, watts
	TempC    float64   // ambient, °C
	// PeakC is the junction's highest temperature over the profile from
	// its thermal network (Heating), °C; 0 means not worked out, and
	// the steady Tamb + θja·PeakW is used instead.
	PeakC float64
	// Runaway is set when the junction found no settled temperature:
	// PeakC is then where the solve stopped, and is worded so.
	Runaway bool
	// Seconds is each phase's duration in seconds, beside Currents; nil
	// when unknown (a polyfuse then judges each current as if held).
	Seconds []float64
}

// Pack describes the pack for Reverse.
type Pack struct {
	Series   int     // cells in series, at least 1
	CellV    float64 // open-circuit voltage of one fresh cell, volts
	CellR    float64 // internal resistance of one cell, ohms
	Parallel int     // strings in parallel, at least 1
	LoadR    float64 // the load's resistance seen at its input, ohms (+Inf if unknown)
	TempC    float64 // ambient, °C
	// Chemistry is the cells' chemistry as the cell library names it
	// ("alkaline", "nimh", …); it only picks the words for what a cell
	// driven backwards does. "" for unknown.
	Chemistry string
}

// backwardHarm says what a cell of chemistry chem does when the rest of a
// series pack drives it backwards (common practice; makers' safety notes).
func backwardHarm(chem string) string {
	switch chem {
	case "alkaline", "zinc-carbon":
		return "alkaline and zinc-carbon cells may leak"
	case "nimh":
		return "a NiMH cell driven backwards heats and can vent gas"
	case "li-ion", "lifepo4":
		return "a lithium-ion cell driven backwards can be damaged for good; its pack protection should stop it"
	case "lithium-mno2", "lithium-fes2":
		return "a lithium primary cell driven backwards can heat and vent"
	}
	return "the flipped cell may leak or heat"
}

// Outcome is the class of what happens on a wrong insertion.
type Outcome int

const (
	// Blocked: almost no current flows; nothing is harmed.
	Blocked Outcome = iota
	// LoadReversed: the reversed voltage reaches the load.
	LoadReversed
	// FuseOpens: a fuse or polyfuse opens and must be replaced or cool down.
	FuseOpens
	// ShortsCells: the cells discharge at a high rate through the element.
	ShortsCells
	// Unseen: the element cannot tell; the product runs on a low voltage
	// and the flipped cell is driven backwards.
	Unseen
)

func (o Outcome) String() string {
	switch o {
	case Blocked:
		return "blocked"
	case LoadReversed:
		return "reaches the load"
	case FuseOpens:
		return "fuse opens"
	case ShortsCells:
		return "shorts the cells"
	case Unseen:
		return "not seen"
	}
	return "unknown"
}

// Case is what one wrong insertion does.
type Case struct {
	Outcome Outcome
	Current float64 // current that flows, amperes (≥ 0)
	Volts   float64 // voltage at the load, volts (negative when reversed)
	Seconds float64 // time until a fuse opens, seconds; 0 when not applicable
	Note    string  // one sentence for people
	// JunctionC is the hottest the element's junction gets in this case,
	// °C, from its thermal network: by the time a fuse opens, or settled
	// when nothing opens; 0 when it does not heat worth the name.
	JunctionC float64
}

// Words is the case in a few words, its current and, for a fuse, the time
// it takes to open: "blocked, 5.4 nA", "fuse opens, 5.1 A for 4.9 ms",
// "not seen" (no current). Two digits, as the Note's figures; the screen's
// reversed-cells view and the report both write it.
func (c Case) Words() string {
	s := c.Outcome.String()
	if c.Current > 0 {
		s += ", " + units.Eng(c.Current, units.Current, 2)
	}
	if c.Seconds > 0 {
		if c.Seconds < 1 {
			s += " for " + units.Prefixed(c.Seconds, 2, "s") // ms, not a fraction of a second
		} else {
			s += " for " + units.Eng(c.Seconds, units.Time, 2)
		}
	}
	return s
}

// Reversal holds the two wrong insertions: the whole pack reversed, and one
// cell of a series pack flipped.
type Reversal struct {
	WholePack Case
	OneCell   Case
}

// None is no protection element: a wire.
type None struct{}

func (None) Kind() string                         { return "none" }
func (None) Spec() string                         { return "none" }
func (None) Drop(i, vin, tempC float64) float64   { return 0 }
func (None) Quiescent(vin, tempC float64) float64 { return 0 }
func (None) Limit(tempC float64) Limit            { return NoLimit() }
func (None) Cost() float64                        { return 0 }
func (None) Thermal() Thermal                     { return Thermal{TjMax: math.Inf(1), TauFast: 1, Tau: 1} }
func (None) Warnings(op Operating) []string       { return nil }
func (None) Reverse(p Pack) Reversal {
	v := float64(p.Series) * p.CellV
	i := 0.0
	if p.LoadR > 0 && !math.IsInf(p.LoadR, 1) {
		i = v / p.LoadR
	}
	return Reversal{
		WholePack: Case{Outcome: LoadReversed, Current: i, Volts: -v,
			Note: "the load sees the full pack voltage reversed; most ICs and electrolytic capacitors are damaged"},
		OneCell: FlippedCell(p, 0),
	}
}

// FlippedCell is the one-cell-flipped case, which no series element can
// see: the pack gives (S−2) cell voltages, and the load current is forced
// backwards through the flipped cell. drop is the element's forward drop at
// that current (0 for none).
func FlippedCell(p Pack, drop float64) Case {
	if p.Series < 2 {
		return Case{Outcome: Blocked, Note: "a single-cell pack has no cell to flip against another"}
	}
	v := float64(p.Series-2)*p.CellV - drop
	if v < 0 {
		v = 0
	}
	i := 0.0
	if p.LoadR > 0 && !math.IsInf(p.LoadR, 1) {
		i = v / p.LoadR
	}
	return Case{Outcome: Unseen, Current: i, Volts: v,
		Note: "no input element sees it: the pack gives two cell voltages less and the flipped cell is charged backwards (" + backwardHarm(p.Chemistry) + ")"}
}

// Overloader is an element that opens after a time set by the current
// profile as a whole, not at once above a current (a polyfuse). Overload
// returns the peak over one cycle of its normalised heating in the
// periodic steady state of the profile repeating currents[k] for secs[k]
// seconds at ambient tempC, and the phase where it peaks: at 1 or more it
// opens. Its Limit().Trip is then the current it opens at if held.
type Overloader interface {
	Overload(currents, secs []float64, tempC float64) (peak float64, phase int)
}

// Clamper is an element whose current limit depends on the voltage at its
// input (the limiter: more pack, more gate drive for the PNP to pull
// down). ClampAt is the current it holds the load to with vin at its
// input at tempC; Limit().Clamp is an upper bound of it over the inputs
// the element takes. Its Drop is the whole input above the clamp.
type Clamper interface {
	ClampAt(vin, tempC float64) float64
}

// Sloped is an element whose drop's partial derivatives are known in
// closed form: DropSlopes returns Drop(i, vin, tempC), to the bit, and
// its derivatives by i (vin held) and by vin (i held). The engine's
// constant-power Newton steps take them in place of a second solve of
// the law. Where the law has a corner (a channel handing over to its body
// diode, a pass FET saturating) the side the drop is taken from gives
// them.
type Sloped interface {
	DropSlopes(i, vin, tempC float64) (d, di, dv float64)
}

// LoadVoltageFalls reports whether the voltage e leaves the load,
// vin − e.Drop(i, vin, T), never rises as the current i rises along a
// source line vin = E − R·i (R ≥ 0) at one temperature: each drop law
// here rises with the current and falls with the input (a channel's drop
// rises as its gate drive, the input, falls), and where it jumps, it
// jumps up (a channel running out of drive handing over to its body
// diode, the limiter's pass FET saturating and taking the whole input).
// Not so for the protector IC: above its over-voltage threshold it takes
// the whole input, and a current that pulls the input under it gives the
// load voltage back. TestLoadVoltageFalls checks every kind it names.
func LoadVoltageFalls(e Element) bool {
	switch e.(type) {
	case None, Diode, Schottky, PMOS, PMOSClamp, Limiter, PPTC, Crowbar:
		return true
	}
	return false
}
