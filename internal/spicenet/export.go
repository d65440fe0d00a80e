package spicenet

import (
	"fmt"
	"strings"

	"headroom/discharge"
)

// Export is the netlist of design d for a person to read, run and change
// in their own ngspice: Build's circuit, simulated over the whole span (no
// early stop), with a header saying what the circuit is and how time is
// scaled, a comment before each part, and a .measure of the time the load
// voltage first falls to the floor. runtimeH is the engine's runtime, which
// the header quotes for comparison; o.StopHours should be somewhat above it
// so that the crossing falls inside the simulated span.
//
// The measurement prints as "tfloor = …" in simulated seconds, which are
// hours of use.
func Export(d *discharge.Design, o Options, runtimeH float64, title string) (string, error) {
	o.NoStop = true
	net, err := Build(d, o)
	if err != nil {
		return "", err
	}
	var b strings.Builder
	// The first line of a netlist is its title, whatever it says.
	fmt.Fprintf(&b, "%s\n", oneLine(title))
	for _, line := range []string{
		"Written by headroom: the design as a circuit, to check the runtime in a simulator of your own.",
		"",
		"Time is scaled: one simulated second is one hour of use, so the measured time is in hours.",
		"The charge counter Cq then reads mAh along one cell's curve; every duration below is hours.",
		fmt.Sprintf("headroom's runtime for this design: %.6g h of continuous use to the floor of %.6g V.", runtimeH, d.Floor),
		"Run it with:   ngspice -b THIS_FILE.cir    (prints tfloor, the hours to the floor)",
		"",
		"What the circuit takes from headroom rather than computing itself: the capacity",
		fmt.Sprintf("factor %.6g (rate and temperature scale the curve's charge axis; Cq's value", o.CapacityFactor),
		"carries it) and the span to simulate. Everything else is the simulator's own:",
		"the pack as a behavioural source of the charge drawn, the protection element as",
		"ngspice's diode, MOSFET and bipolar models, and the load as a behavioural source.",
	} {
		b.WriteString(strings.TrimRight("* "+line, " ") + "\n")
	}
	if e := d.Protect; e != nil && e.Thermal().ThetaJA > 0 {
		// The circuit has no self-heating; the engine's element does.
		for _, line := range []string{
			"",
			"Heat: here the element runs at the ambient temperature throughout. headroom also",
			"heats it through its thermal network and takes each phase's drop at the junction",
			"temperature that heat sets, so its runtime differs; give the element theta=0 (an",
			"ideal heat sink) in headroom to compare like with like.",
		} {
			b.WriteString(strings.TrimRight("* "+line, " ") + "\n")
		}
	}
	lines := strings.Split(net, "\n")
	for _, line := range lines[1:] { // Build's own title line is replaced by ours
		if c := partComment(line); c != "" {
			b.WriteString("*\n* " + c + "\n")
		}
		b.WriteString(line + "\n")
	}
	return strings.TrimRight(b.String(), "\n") + "\n", nil
}

// partComment says what a line of Build's netlist is, for the reader; ""
// for lines that need no introduction.
func partComment(line string) string {
	f := strings.Fields(line)
	if len(f) == 0 {
		return ""
	}
	name := strings.ToLower(f[0])
	switch {
	case name == "fq":
		return "Charge counter: Fq copies the pack current into Cq, so v(qs) is the charge drawn (mAh per cell, scaled by the capacity factor); Iself adds the cells' self-discharge."
	case name == "bpack":
		return "The pack: open-circuit voltage and internal resistance as tables (pwl) of the charge drawn, series cells times one cell, parallel strings sharing the current."
	case strings.HasPrefix(name, "brc") || strings.HasPrefix(name, "rrc") || strings.HasPrefix(name, "crc"):
		return "" // polarisation branches, introduced by the pack's comment
	case name == "bheat":
		return "The cells' self-heating: Bheat drives one cell's dissipation (W) into Rth (its thermal resistance to the ambient, K/W) and Cth (its heat capacity, J/K, per hour), so v(tc) is the cell's rise above the ambient (K); the pack's resistances follow it through the cell's temperature table."
	case name == "vsense":
		return "Pack current meter (0 V source)."
	case name == "dser" || name == "mser" || name == "vnone" || name == "mblk":
		return "The protection element between the pack terminal (a) and the load (ld); change its model card to try another part."
	case name == "vil":
		return "Load current meter (0 V source)."
	case name == "vstart":
		return "The load switches on over the first millionth of the span, so the simulation starts from the unloaded pack."
	case strings.HasPrefix(name, "vsel0"):
		return "Phase selectors: each is 1 during its phase of the repeating profile and 0 otherwise."
	case name == "bload":
		return "The load law (constant current, power, resistance or LED) of each phase, in terms of the load voltage."
	case name == ".temp":
		return "Ambient temperature for the device models, °C."
	case name == ".options":
		return "Tight tolerances: the charge integrated over hours must be right to parts per million."
	case name == ".control":
		return "Simulate the span, then measure when the load voltage first falls to the floor (tfloor, hours)."
	}
	return ""
}

func oneLine(s string) string { return strings.Join(strings.Fields(s), " ") }
