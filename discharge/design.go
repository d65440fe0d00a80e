package discharge

import (
	"fmt"
	"math"

	"headroom/curves"
	"headroom/internal/units"
	"headroom/protect"
)

// Design is one product to evaluate: its pack, protection, load and floor.
type Design struct {
	Cell     *curves.Cell    // the cell type; read-only
	Series   int             // cells in series, 1 to MaxSeries
	Parallel int             // strings in parallel, 1 to MaxParallel
	Protect  protect.Element // input protection; nil means none
	Profile  []Phase         // the repeating load; at least one phase
	Floor    float64         // minimum voltage at the load, volts, at least 0
	TempC    float64         // ambient, °C
	// HoursPerDay is the hours of use a day, above 0 and at most 24; 0
	// means continuous use (24).
	HoursPerDay float64
	// Standby is the current the product draws from the pack when not in
	// use, amperes, at least 0.
	Standby float64
	// PackPrice is the price of one pack in dollars; 0 means the cell's
	// price times Series·Parallel.
	PackPrice float64
	// ElectricityPrice is the price of charging energy in dollars per kWh;
	// 0 means DefaultElectricityPrice.
	ElectricityPrice float64
	// PriceGiven makes PackPrice the pack's price even when it is 0 (a
	// pack that costs nothing); otherwise 0 means the cell's price.
	PriceGiven bool
	// Toy says the product is a toy: its cautions then include the
	// toy-safety standards.
	Toy bool
	// MaxInputV is the highest voltage the product's input takes, volts
	// (0: not stated); a fresh pack above it gets a warning.
	MaxInputV float64
	// MinLEDAmps is the least LED current at which the product still
	// counts as working, amperes (0: none): an LED phase whose current
	// falls below it stops the run as the floor does. Above 0 only.
	MinLEDAmps float64
	// MaxLEDAmps is the LED's maximum rated current, amperes (0: not
	// stated); an LED phase driven above it gets a warning.
	MaxLEDAmps float64
	// ChargerPrice is the price of the charger a rechargeable pack needs,
	// dollars, at least 0 (0: none to buy); paid for by one pack's life.
	ChargerPrice float64
	// TracePoints is how many points of the voltage trace to return for
	// charts; 0 for none (sweeps).
	TracePoints int
}

// DefaultElectricityPrice is a typical household tariff in dollars per kWh
// (from memory; set Design.ElectricityPrice for your own).
const DefaultElectricityPrice = 0.30

// Validate checks the design and says which value is wrong. The ranges are
// those of ranges.go, shared with every reader of a design.
func (d *Design) Validate() error {
	fin := func(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }
	type check struct {
		what string
		err  error
	}
	// A fixed array, not a growing slice: Validate runs with every
	// evaluation and should not allocate.
	checks := [...]check{
		{"series", CheckSeries(d.Series)},
		{"parallel", CheckParallel(d.Parallel)},
		{"floor", CheckFloor(d.Floor)},
		{"temperature", CheckTemp(d.TempC)},
		{"standby", CheckStandby(d.Standby)},
		{"price", CheckPrice(d.PackPrice)},
		{"electricity price", CheckPrice(d.ElectricityPrice)},
		{"charger price", CheckPrice(d.ChargerPrice)},
		{"maximum input voltage", CheckMaxInput(d.MaxInputV)},
		{"minimum LED current", CheckLEDCurrent(d.MinLEDAmps)},
		{"maximum LED current", CheckLEDCurrent(d.MaxLEDAmps)},
		{"hours per day", nil},
	}
	if d.HoursPerDay != 0 {
		checks[len(checks)-1].err = CheckHoursPerDay(d.HoursPerDay)
	}
	switch {
	case d.Cell == nil:
		return fmt.Errorf("cell: none given")
	case len(d.Profile) == 0:
		return fmt.Errorf("load: no phases")
	case len(d.Profile) > MaxPhases:
		return fmt.Errorf("load: %d phases, at most %d", len(d.Profile), MaxPhases)
	case d.TracePoints < 0 || d.TracePoints > 100000:
		return fmt.Errorf("trace points: %d must be between 0 and 100000", d.TracePoints)
	}
	for _, c := range checks {
		if c.err != nil {
			return fmt.Errorf("%s: %w", c.what, c.err)
		}
	}
	if err := d.Cell.Validate(); err != nil {
		return fmt.Errorf("cell %s: %w", d.Cell.ID, err)
	}
	for i, p := range d.Profile {
		if err := p.Load.Validate(); err != nil {
			return fmt.Errorf("load phase %d: %w", i+1, err)
		}
		if !fin(p.Seconds) || p.Seconds <= 0 {
			return fmt.Errorf("load phase %d: duration %s must be above 0", i+1, units.Eng(p.Seconds, units.Time, 3))
		}
	}
	return nil
}

// Cause is why the product stopped.
type Cause string

const (
	CauseFloor    Cause = "floor"         // the load voltage fell below the floor
	CauseCollapse Cause = "collapse"      // a constant-power load found no operating point
	CauseEndPoint Cause = "end-point"     // the cells' voltage over a cycle reached their end-point, or the curve ran out
	CauseCutoff   Cause = "pack cut-off"  // a rechargeable pack's under-voltage cut-off tripped (a dip longer than its delay)
	CauseLimit    Cause = "current limit" // the protection element clamped the load's current
	CauseFuse     Cause = "fuse"          // a fuse or polyfuse opened
)

// TracePoint is one point of the voltage trace.
type TracePoint struct {
	Hours float64 // hours of use since fresh
	MAh   float64 // charge drawn from the pack
	PackV float64 // pack terminal voltage during the heaviest phase
	LoadV float64 // load voltage during the heaviest phase (the lowest of all phases)
	IdleV float64 // load voltage during the lightest phase (the highest of all phases)
}

// Result is what Evaluate computes (docs/engine.md §What a result holds). Charges are in mAh of the
// pack, energies in Wh, times in hours of use unless named otherwise.
type Result struct {
	RuntimeH    float64 // hours of use until cut-off
	RuntimeDays float64 // calendar days at the daily pattern

	DeliveredMAh float64 // charge drawn from the pack until cut-off (load, standby, element drain, self-discharge)
	DeliveredWh  float64 // energy delivered into the load

	// ReferenceMAh is what the cells give at this load and ambient to
	// their end-point with no element and no floor; it depends on nothing
	// the designer puts between the cells and the load. StrandedMAh is
	// ReferenceMAh − DeliveredMAh, split between the element and the floor
	// by the mean of both orders of removing them (stranded.go). Not
	// clamped: an element that lowers a resistive load's current can let
	// the cells run longer, and then its share (and the total) is negative.
	ReferenceMAh            float64
	StrandedMAh             float64
	StrandedByProtectionMAh float64
	StrandedByFloorMAh      float64

	ProtectionLossWh float64 // energy burnt in the element (drop and standing drain)
	CellLossWh       float64 // energy burnt in the cells' internal resistance
	CellPeakC        float64 // the cells at their hottest over the run, °C (self-heating, curves.Cell.ThermalStage; the ambient without thermal data)
	ProtectionPeakW  float64 // highest dissipation in the element
	JunctionC        float64 // element junction at the peak of the hottest pulse, °C (its thermal network, periodic steady state)
	JunctionMeanC    float64 // element junction averaged over a profile cycle at the same point, °C
	// JunctionRunaway is set when the junction found no settled
	// temperature over part of the run (thermal runaway, or a heat that
	// jumps across it): JunctionC is then the hottest step the solve
	// reached, not a temperature the part would hold.
	JunctionRunaway bool

	StandbyMAh       float64 // charge drawn outside the hours of use
	SelfDischargeMAh float64 // charge lost inside the cells
	QuiescentA       float64 // element's standing drain with the fresh pack
	StandbyShare     float64 // (standby + self-discharge) ÷ delivered, 0 to 1

	PackPrice   float64 // dollars for one pack
	CostPerHour float64 // dollars per hour of use (cost.go); 0 when the runtime is 0

	CutoffPhase string  // label of the phase that failed first
	CutoffIndex int     // index in Design.Profile of that phase (labels can repeat)
	CutoffCause Cause   // why
	CutoffLoadV float64 // load voltage of that phase just before cut-off
	CutoffPackV float64 // pack terminal voltage of that phase just before cut-off
	CutoffAmps  float64 // that phase's current just before cut-off

	FreshV         float64 // open-circuit pack voltage when fresh
	EffectiveA     float64 // the per-cell current used for the rate effect
	CapacityFactor float64 // Ceff/Cref from rate and temperature

	Warnings []string
	Cautions []string
	Trace    []TracePoint
}
