package spicenet

import (
	"fmt"

	"headroom/curves"
	"headroom/discharge"
	"headroom/protect"
)

// Check is one design compared with ngspice. All cases run continuously
// (no daily pattern, no standby), which is what the circuit models.
type Check struct {
	Name   string
	Design discharge.Design
}

// caseDef is a case written in the command line's syntax. Every design is
// invented for the comparison (library cells, which are typical values from
// memory); none is a real product. Every element sits on an ideal heat
// sink (theta=0): the circuit's element has no self-heating, so the
// comparison is of the element's electrical model alone; its thermal
// network has its own checks (protect). The cells' self-heating is in the
// circuit (node tc, spicenet.go).
type caseDef struct {
	name, cell string
	series     int
	parallel   int
	protect    string
	load       string
	floor      float64
	tempC      float64
}

var caseDefs = []caseDef{
	{"constant current, no element", "lr6", 2, 1, "none", "250mA", 2.0, 20},
	{"constant power, Schottky", "lr6", 2, 1, "schottky:theta=0", "0.8W@85%", 1.6, 27},
	{"constant resistance, PN diode", "lr6", 2, 1, "diode:theta=0", "10ohm", 1.3, 20},
	{"pulsed toy profile, PN diode", "lr6", 2, 1, "diode:theta=0", "450mA/3s,120mA/2s,15mA/25s", 1.8, 20},
	{"PMOS Vth 1.2 V at end of 2xAA", "lr6", 2, 1, "pmos:vth=1.2V,theta=0", "0.5A", 1.7, 27},
	{"limiter below its limit", "lr6", 2, 1, "limiter:theta=0", "300mA", 1.9, 27},
	{"limiter, pulse above its limit", "lr6", 2, 1, "limiter:theta=0", "50mA/9s,900mA/1s", 1.8, 27},
	{"4 cells NiMH, PMOS, constant power", "hr6", 4, 1, "pmos:theta=0", "2W@90%", 4.0, 27},
	{"Li-ion 1S2P, constant current", "li-ion-18650", 1, 2, "none", "1A", 3.0, 20},
}

// Cases returns the designs the cross-check and the speed comparison run.
func Checks() ([]Check, error) {
	out := make([]Check, 0, len(caseDefs))
	for _, c := range caseDefs {
		cell, ok := curves.Lookup(c.cell)
		if !ok {
			return nil, fmt.Errorf("spicenet: case %q: no library cell %q", c.name, c.cell)
		}
		el, err := protect.Parse(c.protect)
		if err != nil {
			return nil, fmt.Errorf("spicenet: case %q: %w", c.name, err)
		}
		ph, err := discharge.ParseProfile(c.load)
		if err != nil {
			return nil, fmt.Errorf("spicenet: case %q: %w", c.name, err)
		}
		out = append(out, Check{Name: c.name, Design: discharge.Design{
			Cell: cell, Series: c.series, Parallel: c.parallel, Protect: el,
			Profile: ph, Floor: c.floor, TempC: c.tempC,
		}})
	}
	return out, nil
}

// Period is the length of one cycle of d's profile in hours; 0 for a
// steady load.
func Period(d *discharge.Design) float64 {
	if len(d.Profile) < 2 {
		return 0
	}
	s := 0.0
	for _, p := range d.Profile {
		s += p.Seconds
	}
	return s / 3600
}
