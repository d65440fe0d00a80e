package main

import (
	"flag"
	"fmt"
	"path/filepath"
	"strings"

	"headroom/discharge"
	"headroom/internal/scenario"
	"headroom/protect"
)

// designFlag is one flag that overrides a value of the scenario's design.
// Each goes through the same parse and check functions as a scenario file
// and the interactive screen's fields.
type designFlag struct {
	name, arg, usage string
	set              func(s *scenario.Scenario, v string) error
}

var designFlags = []designFlag{
	{"cell", "ID|FILE.csv|FILE.toml", "cell: a library id (headroom cells) or a cell file", setCell},
	{"series", "N", fmt.Sprintf("cells in series, 1 to %d", discharge.MaxSeries), func(s *scenario.Scenario, v string) error {
		n, err := scenario.ParseCount(v, scenario.CheckSeries)
		s.Design.Series = n
		return err
	}},
	{"parallel", "N", fmt.Sprintf("strings in parallel, 1 to %d", discharge.MaxParallel), func(s *scenario.Scenario, v string) error {
		n, err := scenario.ParseCount(v, scenario.CheckParallel)
		s.Design.Parallel = n
		return err
	}},
	{"protect", "SPEC", "protection element: " + strings.Join(protect.Kinds(), ", ") + ", with optional :key=value,...", func(s *scenario.Scenario, v string) error {
		el, err := protect.Parse(v)
		if err != nil {
			return protect.Unprefixed(err)
		}
		s.Design.Protect, s.ProtectSpec = el, strings.TrimSpace(v)
		return nil
	}},
	{"load", "SPEC", "one load (120mA, 0.8W@85%, 33ohm, led:vf=2.0,r=47) or phases LOAD/TIME,... (450mA/3s,15mA/27s)", func(s *scenario.Scenario, v string) error {
		p, err := scenario.ParseProfile(v)
		if err != nil {
			return err
		}
		s.Design.Profile, s.LoadSpec = p, strings.TrimSpace(v)
		return nil
	}},
	{"floor", "VOLTS", "minimum voltage at the load, after the element (1.8V or 1.8)", floatSetter(scenario.ParseFloor, func(d *discharge.Design) *float64 { return &d.Floor })},
	{"temp", "CELSIUS", "ambient temperature (-10C or -10)", floatSetter(scenario.ParseTemp, func(d *discharge.Design) *float64 { return &d.TempC })},
	{"hours-per-day", "H", "hours of use a day (1, 1.5h, 90min); the rest is standby", floatSetter(scenario.ParseHoursPerDay, func(d *discharge.Design) *float64 { return &d.HoursPerDay })},
	{"standby", "CURRENT", "drain when not in use (30uA)", floatSetter(scenario.ParseStandby, func(d *discharge.Design) *float64 { return &d.Standby })},
	{"price", "DOLLARS", "price of one pack ($1.10 or 1.10); default: the cell's price × cells", floatSetter(scenario.ParsePrice, func(d *discharge.Design) *float64 { return &d.PackPrice })},
}

func floatSetter(parse func(string) (float64, error), dst func(*discharge.Design) *float64) func(*scenario.Scenario, string) error {
	return func(s *scenario.Scenario, v string) error {
		x, err := parse(v)
		if err != nil {
			return err
		}
		*dst(&s.Design) = x
		return nil
	}
}

// setCell resolves --cell: a cell defined in the scenario, a library id,
// or a .csv or .toml cell file relative to the working folder (not to the
// scenario's folder: a flag is typed where the user stands).
func setCell(s *scenario.Scenario, v string) error {
	ref := strings.TrimSpace(v)
	if ext := strings.ToLower(filepath.Ext(ref)); (ext == ".csv" || ext == ".toml") && !filepath.IsAbs(ref) {
		if abs, err := filepath.Abs(ref); err == nil {
			ref = abs
		}
	}
	c, err := s.ResolveCell(ref)
	if err != nil {
		return err
	}
	s.Design.Cell, s.CellRef = c, strings.TrimSpace(v)
	return nil
}

// addDesignFlags defines the design flags on fs as strings; they are
// parsed by applyDesignFlags so that errors name the flag our way.
func addDesignFlags(fs *flag.FlagSet) {
	for _, f := range designFlags {
		fs.String(f.name, "", f.usage)
	}
}

// applyDesignFlags sets the design values of the flags given on the
// command line over the scenario's.
func applyDesignFlags(fs *flag.FlagSet, s *scenario.Scenario) error {
	var err error
	fs.Visit(func(fl *flag.Flag) {
		if err != nil {
			return
		}
		for _, df := range designFlags {
			if df.name == fl.Name {
				if e := df.set(s, fl.Value.String()); e != nil {
					err = fmt.Errorf("--%s: %w", df.name, e)
				}
			}
		}
	})
	return err
}

// designFlagHelp lists the design flags for a command's help.
func designFlagHelp() string {
	var b strings.Builder
	for _, f := range designFlags {
		fmt.Fprintf(&b, "  --%-27s %s\n", f.name+" "+f.arg, f.usage)
	}
	return b.String()
}
