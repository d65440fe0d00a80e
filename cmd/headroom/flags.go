package main

import (
	"flag"
	"fmt"
	"path/filepath"
	"strings"

	"headroom/curves"
	"headroom/discharge"
	"headroom/internal/scenario"
	"headroom/internal/units"
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
	{"price", "DOLLARS", "price of one pack ($1.10 or 1.10; 0 for a free pack); default: the cell's price × cells", func(s *scenario.Scenario, v string) error {
		x, err := scenario.ParsePrice(v)
		if err != nil {
			return err
		}
		s.Design.PackPrice, s.Design.PriceGiven = x, true
		return nil
	}},
	{"charger", "DOLLARS", "price of the charger a rechargeable pack needs (spread over one pack's life)", floatSetter(scenario.ParsePrice, func(d *discharge.Design) *float64 { return &d.ChargerPrice })},
	{"max-input", "VOLTS", "highest voltage the product's input takes; a fresh pack above it is warned of", floatSetter(func(v string) (float64, error) {
		return parseCheckedFlag(v, units.Voltage, true, scenario.CheckMaxInput)
	}, func(d *discharge.Design) *float64 { return &d.MaxInputV })},
	{"led-min", "CURRENT", "least LED current that counts as lit (2mA); the run ends below it", floatSetter(func(v string) (float64, error) {
		return parseCheckedFlag(v, units.Current, false, scenario.CheckLEDCurrent)
	}, func(d *discharge.Design) *float64 { return &d.MinLEDAmps })},
	{"led-max", "CURRENT", "the LED's maximum current (20mA); a phase above it is warned of", floatSetter(func(v string) (float64, error) {
		return parseCheckedFlag(v, units.Current, false, scenario.CheckLEDCurrent)
	}, func(d *discharge.Design) *float64 { return &d.MaxLEDAmps })},
	{"toy", "yes|no", "whether the product is a toy (the toy-safety cautions)", func(s *scenario.Scenario, v string) error {
		switch strings.ToLower(strings.TrimSpace(v)) {
		case "yes", "true", "1":
			s.Design.Toy = true
		case "no", "false", "0":
			s.Design.Toy = false
		default:
			return fmt.Errorf("%q: expected yes or no", v)
		}
		return nil
	}},
}

// parseCheckedFlag reads a quantity of kind k (a bare number in the base
// unit when bare) and checks it.
func parseCheckedFlag(v string, k units.Kind, bare bool, chk func(float64) error) (float64, error) {
	x, err := units.Parse(v, k, bare)
	if err != nil {
		return 0, err
	}
	return x, chk(x)
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
					return
				}
				pin(s, df.name)
			}
		}
	})
	return err
}

// pin narrows the scenario's option list for a design flag to the flag's
// value, so that table, compare and plot use it as run does.
func pin(s *scenario.Scenario, name string) {
	d := &s.Design
	switch name {
	case "cell":
		s.Cells = []*curves.Cell{d.Cell}
	case "series":
		s.Series = []int{d.Series}
	case "parallel":
		s.Parallel = []int{d.Parallel}
	case "protect":
		s.Protects, s.ProtectSpecs = []protect.Element{d.Protect}, []string{s.ProtectSpec}
	case "load":
		s.Loads, s.LoadSpecs = [][]discharge.Phase{d.Profile}, []string{s.LoadSpec}
	case "floor":
		s.Floors = []float64{d.Floor}
	case "temp":
		s.Temps = []float64{d.TempC}
	}
}

// flagsDesignName is the title of a design given by flags alone.
const flagsDesignName = "Design from the command line (other values from the built-in demo)"

// fromFlags renames a design built from flags over the built-in demo
// (no scenario file) once --load gives it a load of its own: it is then
// the user's product, not the demo toy with a part changed, and it is not
// taken to be a toy unless --toy says so.
func fromFlags(fs *flag.FlagSet, s *scenario.Scenario, pos []string) {
	if len(pos) > 0 {
		return
	}
	own, toy := false, false
	fs.Visit(func(fl *flag.Flag) {
		own = own || fl.Name == "load"
		toy = toy || fl.Name == "toy"
	})
	if !own {
		return
	}
	s.Name = flagsDesignName
	if !toy {
		s.Design.Toy = false
	}
}

// designFlagHelp lists the design flags for a command's help.
func designFlagHelp() string {
	var b strings.Builder
	for _, f := range designFlags {
		fmt.Fprintf(&b, "  --%-27s %s\n", f.name+" "+f.arg, f.usage)
	}
	return b.String()
}
