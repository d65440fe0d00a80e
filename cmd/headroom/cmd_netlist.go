package main

import (
	"errors"
	"fmt"
	"math"
	"regexp"

	"headroom/discharge"
	"headroom/internal/scenario"
	"headroom/internal/spicenet"
	"headroom/protect"
)

var netlistCmd = &command{
	name:  "netlist",
	run:   runNetlist,
	args:  "[scenario.toml] [flags] -o DESIGN.cir [--force]",
	short: "write the design as an ngspice circuit, to check the runtime in a simulator",
	help: `
Writes the design as a netlist for ngspice, so that the runtime can be checked
in a circuit simulator: the pack as a behavioural source of the charge drawn
(its curve, resistance and polarisation branches as tables), the protection
element as the simulator's own diode, MOSFET and bipolar models, the load
profile as behavioural sources, a transient analysis a little past
headroom's cut-off, and a measurement of the time the load voltage first
falls to the floor. Time is scaled so that one simulated second is one hour
of use; the file's header says so and quotes headroom's own runtime.

The circuit runs the load continuously: a daily pattern and a standby drain
are left out (the note on stderr says so when the design has them). The
elements with a circuit are none, diode, schottky, pmos and limiter.

The file is written whole or not at all; an existing file is kept unless
--force is given.

flags:
` + designFlagHelp() + `  -o FILE                       the netlist to write (.cir)
  --force                       replace FILE if it exists

examples:
  headroom netlist -o demo.cir
  ngspice -b demo.cir      (prints tfloor, the hours of use to the floor)
  headroom netlist --protect pmos --load 0.5W@85% --floor 1.8 -o pmos.cir
`,
}

func runNetlist(c *cli, args []string) error {
	fs := newFlags("netlist")
	addDesignFlags(fs)
	out := fs.String("o", "", "")
	force := fs.Bool("force", false, "")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if err := wantArgs("netlist", pos, 0, 1, "a scenario file"); err != nil {
		return err
	}
	if *out == "" {
		return errors.New("netlist: -o is required: the netlist to write, e.g. -o design.cir")
	}
	s, err := designScenario(fs, pos)
	if err != nil {
		return err
	}
	net, note, err := netlistFor(s)
	if err != nil {
		return err
	}
	if err := writeOutput("-o", *out, []byte(net), *force); err != nil {
		return err
	}
	if note != "" {
		fmt.Fprintf(c.stderr, "headroom: note: %s\n", note)
	}
	_, err = fmt.Fprintf(c.stdout, "wrote %s: run it with ngspice -b %s (prints tfloor, hours to the floor)\n", *out, *out)
	return err
}

// netlistFor builds the exported netlist of the scenario's design, run
// continuously, and a note saying what was left out ("" when nothing).
func netlistFor(s *scenario.Scenario) (net, note string, err error) {
	d := s.Design
	if d.HoursPerDay != 0 && d.HoursPerDay != 24 || d.Standby != 0 {
		note = "the netlist runs the load continuously: the daily pattern and the standby drain are left out, and the runtime quoted in its header is for continuous use"
		d.HoursPerDay, d.Standby = 0, 0
	}
	d.TracePoints = 0
	r, err := discharge.Evaluate(&d)
	if err != nil {
		return "", "", fmt.Errorf("design: %w", err)
	}
	if !(r.RuntimeH > 0) {
		return "", "", fmt.Errorf("netlist: the design does not start (%s): there is no runtime to check", d.CutoffText(r))
	}
	title := s.Name
	if title == "" {
		title = "headroom design"
	}
	// The span: past the engine's cut-off by a fifth, and at least one
	// cycle of a pulsed profile past it, so the crossing falls inside.
	// The circuit's element stays at the ambient temperature; a part that
	// heat slows in headroom runs longer there, so the span covers the
	// runtime on an ideal heat sink too (else tfloor falls outside it).
	span := r.RuntimeH
	if cold, ok := onHeatSink(d); ok {
		if rc, err := discharge.Evaluate(&cold); err == nil && rc.RuntimeH > span {
			span = rc.RuntimeH
		}
	}
	stop := 1.2*span + spicenet.Period(&d)
	net, err = spicenet.Export(&d, spicenet.Options{CapacityFactor: r.CapacityFactor, StopHours: stop, Steps: steps(span, &d)}, r.RuntimeH, title)
	if err != nil {
		return "", "", fmt.Errorf("netlist: %w", err)
	}
	return net, note, nil
}

// steps is the time-step budget: at least 4000 over the span, and at least
// eight per phase of a pulsed profile, up to two million.
func steps(runtimeH float64, d *discharge.Design) int {
	n := 4000.0
	if p := spicenet.Period(d); p > 0 {
		n = math.Max(n, 8*float64(len(d.Profile))*runtimeH/p)
	}
	return int(math.Min(n, 2e6))
}

var (
	thetaRE  = regexp.MustCompile(`\btheta=[^,]*`)
	thetafRE = regexp.MustCompile(`,thetaf=[^,]*`) // left out: theta=0 takes it to 0
)

// onHeatSink returns the design with its element's theta set to 0 (an
// ideal heat sink), or false when the element has no theta.
func onHeatSink(d discharge.Design) (discharge.Design, bool) {
	if d.Protect == nil || !thetaRE.MatchString(d.Protect.Spec()) {
		return d, false
	}
	spec := thetafRE.ReplaceAllString(d.Protect.Spec(), "")
	e, err := protect.Parse(thetaRE.ReplaceAllString(spec, "theta=0"))
	if err != nil {
		return d, false
	}
	d.Protect = e
	return d, true
}
