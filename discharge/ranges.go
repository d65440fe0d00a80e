package discharge

import "fmt"

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
	MaxStandbyA    = 10.0 // standby drain, amperes, from 0
	MaxPrice       = 1e6  // any price in dollars (pack, per kWh, budget), from 0
	MaxHoursPerDay = 24.0 // hours of use a day, above 0
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
		return fmt.Errorf("floor %v V: must be 0 to %g V", v, MaxFloorV)
	}
	return nil
}

// CheckTemp checks an ambient temperature.
func CheckTemp(v float64) error {
	if !(v >= MinTempC && v <= MaxTempC) {
		return fmt.Errorf("ambient %v °C: must be %g to %g °C", v, MinTempC, MaxTempC)
	}
	return nil
}

// CheckStandby checks a standby current.
func CheckStandby(v float64) error {
	if !(v >= 0 && v <= MaxStandbyA) {
		return fmt.Errorf("standby %v A: must be 0 to %g A", v, MaxStandbyA)
	}
	return nil
}

// CheckPrice checks a price in dollars.
func CheckPrice(v float64) error {
	if !(v >= 0 && v <= MaxPrice) {
		return fmt.Errorf("price %v: must be 0 or more and at most %.0f", v, MaxPrice)
	}
	return nil
}

// CheckHoursPerDay checks hours of use a day: above 0 and at most
// MaxHoursPerDay (a Design also takes 0 for continuous use).
func CheckHoursPerDay(h float64) error {
	if !(h > 0 && h <= MaxHoursPerDay) {
		return fmt.Errorf("%v hours a day: must be above 0 and at most %g", h, MaxHoursPerDay)
	}
	return nil
}
