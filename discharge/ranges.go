package discharge

import (
	"fmt"
	"strings"

	"headroom/internal/guard"
	"headroom/internal/units"
)

// The ranges a design's values must lie in. This is their one home: the
// scenario reader, the command line's flags and the screen's knobs all
// check through the functions below, and Design.Validate uses them too.
const (
	MaxSeries   = 48 // cells in series, from 1
	MaxParallel = 16 // strings in parallel, from 1
	MaxPhases   = 64 // phases in a load profile, from 1

	MaxFloorV      = 1000.0 // floor at the load, volts, from 0
	MinTempC       = -40.0  // ambient, °C
	MaxTempC       = 85.0
	MaxStandbyA    = 10.0           // standby drain, amperes, from 0
	MaxPrice       = guard.MaxPrice // any price in dollars (pack, per kWh, budget, a cell's), from 0
	MaxHoursPerDay = 24.0           // hours of use a day, above 0

	// Below these a value above 0 is noise that prints as a row of zeros
	// (a standby of 1e-300 A did): 1 pA is far below any cell's
	// self-discharge, a ten-thousandth of a cent below any price, 1 s a
	// day below any use. MaxLoadOhms is the largest load resistance.
	MinStandbyA    = 1e-12
	MinPrice       = guard.MinPrice
	MinHoursPerDay = 1.0 / 3600
	MinLoadA       = 1e-12 // a constant-current phase, from 0
	MinLoadW       = 1e-12 // a constant-power phase, from 0
	MaxLoadOhms    = 1e12
)

// CheckSeries checks a series count.
func CheckSeries(n int) error {
	if n < 1 || n > MaxSeries {
		return fmt.Errorf("%d cells in series: must be 1 to %d", n, MaxSeries)
	}
	return nil
}

// CheckParallel checks a parallel count.
func CheckParallel(n int) error {
	if n < 1 || n > MaxParallel {
		return fmt.Errorf("%d strings in parallel: must be 1 to %d", n, MaxParallel)
	}
	return nil
}

// CheckFloor checks a floor voltage.
func CheckFloor(v float64) error {
	if !(v >= 0 && v <= MaxFloorV) {
		return fmt.Errorf("floor %s: must be 0 to %g V", units.Eng(v, units.Voltage, 3), MaxFloorV)
	}
	return nil
}

// CheckTemp checks an ambient temperature.
func CheckTemp(v float64) error {
	if !(v >= MinTempC && v <= MaxTempC) {
		return fmt.Errorf("ambient %s: must be %g to %g °C", units.Eng(v, units.Temperature, 3), MinTempC, MaxTempC)
	}
	return nil
}

// CheckStandby checks a standby current.
func CheckStandby(v float64) error {
	if !(v == 0 || v >= MinStandbyA && v <= MaxStandbyA) {
		return fmt.Errorf("standby %s: must be 0 to %g A (above 0, at least 1 pA)", units.Said(v, units.Current), MaxStandbyA)
	}
	return nil
}

// CheckPrice checks a price in dollars.
func CheckPrice(v float64) error {
	if !guard.PriceOK(v) {
		return fmt.Errorf("price %s: must be 0 or more and at most %.0f (above 0, at least %.6f)", strings.TrimSuffix(units.Said(v, units.Money), " $"), MaxPrice, MinPrice)
	}
	return nil
}

// CheckHoursPerDay checks hours of use a day: above 0 and at most
// MaxHoursPerDay (a Design also takes 0 for continuous use).
func CheckHoursPerDay(h float64) error {
	if !(h >= MinHoursPerDay && h <= MaxHoursPerDay) {
		return fmt.Errorf("%s hours a day: must be above 0 and at most %g (at least 1 s)", units.Num(h, 3), MaxHoursPerDay)
	}
	return nil
}

// MaxInputLimitV is the highest maximum input voltage a product may state.
const MaxInputLimitV = 1000.0

// MaxLEDLimitA is the highest LED current limit a design may state.
const MaxLEDLimitA = 100.0

// CheckMaxInput checks a product's maximum input voltage: 0 (not stated)
// to MaxInputLimitV.
func CheckMaxInput(v float64) error {
	if !(v >= 0 && v <= MaxInputLimitV) {
		return fmt.Errorf("maximum input %s: must be 0 (not stated) to %g V", units.Eng(v, units.Voltage, 3), MaxInputLimitV)
	}
	return nil
}

// CheckLEDCurrent checks an LED current limit: 0 (none) to MaxLEDLimitA.
func CheckLEDCurrent(v float64) error {
	if !(v >= 0 && v <= MaxLEDLimitA) {
		return fmt.Errorf("LED current %s: must be 0 (none) to %g A", units.Eng(v, units.Current, 3), MaxLEDLimitA)
	}
	return nil
}

// CheckDemand checks a load's demand against MinLoadA, MinLoadW and
// MaxLoadOhms; Load.Validate bounds it from the other side.
func CheckDemand(l Load) error {
	switch l.Kind {
	case ConstantCurrent:
		if l.Amps > 0 && l.Amps < MinLoadA {
			return fmt.Errorf("current %s: must be 0 or at least 1 pA", units.Said(l.Amps, units.Current))
		}
	case ConstantPower:
		if l.Watts > 0 && l.Watts < MinLoadW {
			return fmt.Errorf("power %s: must be 0 or at least 1 pW", units.Said(l.Watts, units.Power))
		}
	case ConstantResistance, LED:
		if l.Ohms > MaxLoadOhms {
			return fmt.Errorf("resistance %s: must be at most 1 TΩ", units.Num(l.Ohms/1e12, 3)+" TΩ")
		}
	}
	return nil
}
