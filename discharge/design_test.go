package discharge

import (
	"math"
	"strings"
	"testing"

	"headroom/curves"
)

// Validate refuses each out-of-range value and names the field in the
// first words of its message; a good design passes, and 0 hours a day
// (continuous use) is allowed where a typed 0 is not.
func TestValidateNamesTheField(t *testing.T) {
	lr6, _ := curves.Lookup("lr6")
	good := func() Design {
		return Design{Cell: lr6, Series: 2, Parallel: 1, Floor: 1.8, TempC: 20,
			Profile: []Phase{{Load: Load{Kind: ConstantCurrent, Amps: 0.1}, Seconds: 1}}}
	}
	d := good()
	if err := d.Validate(); err != nil {
		t.Fatalf("a good design: %v", err)
	}
	nan := math.NaN()
	cases := []struct {
		field string
		set   func(d *Design)
	}{
		{"cell", func(d *Design) { d.Cell = nil }},
		{"series", func(d *Design) { d.Series = 0 }},
		{"series", func(d *Design) { d.Series = MaxSeries + 1 }},
		{"parallel", func(d *Design) { d.Parallel = MaxParallel + 1 }},
		{"load", func(d *Design) { d.Profile = nil }},
		{"load", func(d *Design) { d.Profile = make([]Phase, MaxPhases+1) }},
		{"floor", func(d *Design) { d.Floor = -0.1 }},
		{"floor", func(d *Design) { d.Floor = nan }},
		{"temperature", func(d *Design) { d.TempC = MaxTempC + 1 }},
		{"temperature", func(d *Design) { d.TempC = nan }},
		{"hours per day", func(d *Design) { d.HoursPerDay = 25 }},
		{"hours per day", func(d *Design) { d.HoursPerDay = -1 }},
		{"standby", func(d *Design) { d.Standby = math.Inf(1) }},
		{"price", func(d *Design) { d.PackPrice = MaxPrice * 2 }},
		{"electricity price", func(d *Design) { d.ElectricityPrice = -1 }},
		{"trace points", func(d *Design) { d.TracePoints = -1 }},
		{"load phase 1", func(d *Design) { d.Profile[0].Seconds = 0 }},
		{"load phase 1", func(d *Design) { d.Profile[0].Load.Amps = -1 }},
	}
	for _, c := range cases {
		d := good()
		c.set(&d)
		err := d.Validate()
		if err == nil || !strings.HasPrefix(err.Error(), c.field+":") {
			t.Errorf("%s: %v, want an error starting %q", c.field, err, c.field+":")
		}
	}
	d = good()
	d.HoursPerDay = 0
	if err := d.Validate(); err != nil {
		t.Errorf("0 hours a day (continuous use): %v", err)
	}
}
