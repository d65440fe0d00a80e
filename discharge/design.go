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
	Series   int             // cells in series, 1 to 48
	Parallel int             // strings in parallel, 1 to 16
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

// Validate checks the design and says which value is wrong.
func (d *Design) Validate() error {
	fin := func(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }
	switch {
	case d.Cell == nil:
		return fmt.Errorf("cell: none given")
	case d.Series < 1 || d.Series > 48:
		return fmt.Errorf("series: %d cells must be between 1 and 48", d.Series)
	case d.Parallel < 1 || d.Parallel > 16:
		return fmt.Errorf("parallel: %d strings must be between 1 and 16", d.Parallel)
	case len(d.Profile) == 0:
		return fmt.Errorf("load: no phases")
	case len(d.Profile) > 64:
		return fmt.Errorf("load: %d phases, at most 64", len(d.Profile))
	case !fin(d.Floor) || d.Floor < 0 || d.Floor > 1000:
		return fmt.Errorf("floor: %s must be between 0 and 1000 V", units.Eng(d.Floor, units.Voltage, 3))
	case !fin(d.TempC) || d.TempC < -40 || d.TempC > 85:
		return fmt.Errorf("temperature: %s must be between -40 and 85 °C", units.Eng(d.TempC, units.Temperature, 3))
	case !fin(d.HoursPerDay) || d.HoursPerDay < 0 || d.HoursPerDay > 24:
		return fmt.Errorf("hours per day: %v must be between 0 (continuous use) and 24", d.HoursPerDay)
	case !fin(d.Standby) || d.Standby < 0 || d.Standby > 10:
		return fmt.Errorf("standby: %s must be between 0 and 10 A", units.Eng(d.Standby, units.Current, 3))
	case !fin(d.PackPrice) || d.PackPrice < 0:
		return fmt.Errorf("price: %s must be 0 or more", units.Dollars(d.PackPrice))
	case !fin(d.ElectricityPrice) || d.ElectricityPrice < 0:
		return fmt.Errorf("electricity price: %s per kWh must be 0 or more", units.Dollars(d.ElectricityPrice))
	case !fin(d.MaxInputV) || d.MaxInputV < 0 || d.MaxInputV > 1000:
		return fmt.Errorf("maximum input voltage: %s must be between 0 (not stated) and 1000 V", units.Eng(d.MaxInputV, units.Voltage, 3))
	case !fin(d.MinLEDAmps) || d.MinLEDAmps < 0 || d.MinLEDAmps > 100:
		return fmt.Errorf("minimum LED current: %s must be between 0 (none) and 100 A", units.Eng(d.MinLEDAmps, units.Current, 3))
	case !fin(d.MaxLEDAmps) || d.MaxLEDAmps < 0 || d.MaxLEDAmps > 100:
		return fmt.Errorf("maximum LED current: %s must be between 0 (not stated) and 100 A", units.Eng(d.MaxLEDAmps, units.Current, 3))
	case !fin(d.ChargerPrice) || d.ChargerPrice < 0:
		return fmt.Errorf("charger price: %s must be 0 or more", units.Dollars(d.ChargerPrice))
	case d.TracePoints < 0 || d.TracePoints > 100000:
		return fmt.Errorf("trace points: %d must be between 0 and 100000", d.TracePoints)
	}
	if err := d.Cell.Validate(); err != nil {
		return fmt.Errorf("cell %s: %w", d.Cell.ID, err)
	}
	for i, p := range d.Profile {
		if err := p.Load.Validate(); err != nil {
			return fmt.Errorf("load phase %d: %w", i+1, err)
		}
		if !fin(p.Seconds) || p.Seconds <= 0 {
			return fmt.Errorf("load phase %d: duration %v s must be above 0", i+1, p.Seconds)
		}
	}
	return nil
}

// Cause is why the product stopped.
type Cause string

const (
	CauseFloor    Cause = "floor"         // the load voltage fell below the floor
	CauseCollapse Cause = "collapse"      // a constant-power load found no operating point
	CauseEndPoint Cause = "end-point"     // a cell reached its end-point voltage or the end of its curve
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

// Result is what Evaluate computes (DESIGN §6). Charges are in mAh of the
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
	ProtectionPeakW  float64 // highest dissipation in the element
	JunctionC        float64 // element junction temperature at ProtectionPeakW

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

	FreshV      float64 // open-circuit pack voltage when fresh
	EffectiveA  float64 // the per-cell current used for the rate effect
	CapacityFac float64 // Ceff/Cref from rate and temperature

	Warnings []string
	Cautions []string
	Trace    []TracePoint
}
