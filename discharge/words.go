package discharge

import (
	"fmt"
	"math"

	"headroom/internal/units"
)

// CutoffText says in plain words why and where the product stopped, for
// reports and the screen alike: "resets on the 450 mA motor wag pulse at
// 1.80 V (the floor)", "does not start: the fuse opens on the 900 mA drive
// pulse (900 mA)".
func (d *Design) CutoffText(r *Result) string {
	s := d.cutoffText(r)
	if r.RuntimeH == 0 {
		return "does not start: " + s
	}
	return s
}

func (d *Design) cutoffText(r *Result) string {
	ph := d.cutoffPhase(r)
	what := "the " + r.CutoffPhase + " phase"
	if ph != nil {
		heaviest := true
		for j, q := range d.Profile {
			if j != r.CutoffIndex && q.Demand() > ph.Demand() {
				heaviest = false
			}
		}
		label := ph.Load.Label()
		switch {
		case len(d.Profile) == 1:
			what = "the steady " + label + " load"
		case ph.Name != "" && heaviest:
			what = "the " + label + " " + ph.Name + " pulse"
		case ph.Name != "":
			what = "the " + label + " " + ph.Name + " phase"
		case heaviest:
			what = "the " + label + " pulse"
		default:
			what = "the " + label + " phase"
		}
	}
	amps := units.Human(r.CutoffAmps, units.Current, 3)
	v := fmt.Sprintf("%.2f V", r.CutoffLoadV)
	at := " at " + v + " (the floor)"
	if math.Abs(r.CutoffLoadV-d.Floor) >= 0.005 {
		at = fmt.Sprintf(" at %s, below the %.2f V floor", v, d.Floor)
	}
	switch r.CutoffCause {
	case CauseFloor:
		if len(d.Profile) == 1 {
			return "stops on " + what + at
		}
		return "resets on " + what + at
	case CauseCollapse:
		if ph != nil && ph.Load.Kind == ConstantPower {
			return "the power of " + what + " cannot be supplied: the converter's input collapses"
		}
		return "the pack cannot push the current of " + what + ": its voltage collapses"
	case CauseLimit:
		return "the protection's current limit cuts " + what + " (it wants " + amps + ")"
	case CauseFuse:
		return "the fuse opens on " + what + " (" + amps + ")"
	case CauseDim:
		return "the LED dims below the " + units.Eng(d.MinLEDAmps, units.Current, 3) + " that counts as lit, on " + what
	case CauseCutoff:
		return fmt.Sprintf("the pack's under-voltage cut-off trips on %s (pack %.2f V for longer than its delay)", what, r.CutoffPackV)
	}
	if len(d.Profile) > 1 {
		// The end-point applies to the voltage averaged over a cycle
		// while current flows, not to one phase's dip.
		return fmt.Sprintf("the cells reach their end-point voltage (pack %.2f V averaged over a cycle while it draws current)", r.CutoffPackV)
	}
	return fmt.Sprintf("the cells reach their end-point voltage (pack %.2f V) on %s", r.CutoffPackV, what)
}

// cutoffPhase is the profile phase the result names, or nil. It goes by
// index: two phases can carry the same label.
func (d *Design) cutoffPhase(r *Result) *Phase {
	if i := r.CutoffIndex; i >= 0 && i < len(d.Profile) {
		return &d.Profile[i]
	}
	return nil
}

// Demand orders phases by how hard they pull: input power at 1 V for any
// load law (amperes for a constant-current load).
func (p Phase) Demand() float64 {
	switch l := p.Load; l.Kind {
	case ConstantCurrent:
		return l.Amps
	case ConstantPower:
		return l.InputPower()
	case ConstantResistance, LED:
		return 1 / l.Ohms
	}
	return 0
}

// CalendarText is how long the product lasts on the calendar at its daily
// use: "10.2 days", or "within the first day" when it stops before one
// day's use is over (49 min of use at 1 h a day is not "19.6 h" of
// calendar time: it stops 49 min into the first session). A span of one
// day or more is in days below 100 h too ("3.25 days", not "78.1 h" beside
// "26.0 h of use", which read as two runtimes).
func (d *Design) CalendarText(r *Result) string {
	if d.HoursPerDay > 0 && r.RuntimeH > 0 && r.RuntimeH < d.HoursPerDay {
		return "within the first day"
	}
	if h := 24 * r.RuntimeDays; h >= 24 && h < 100 {
		return units.Num(r.RuntimeDays, 3) + " days"
	}
	return units.Duration(24*r.RuntimeDays, 3)
}
