package discharge

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"headroom/internal/units"
)

// LoadKind is the law a load follows.
type LoadKind int

const (
	// ConstantCurrent draws Amps whatever the voltage (a linear regulator:
	// input current = output + ground current).
	ConstantCurrent LoadKind = iota
	// ConstantPower draws Watts/Efficiency from its input (a switching
	// converter): the current rises as the cells sag.
	ConstantPower
	// ConstantResistance is Ohms across the input (a heater, a stalled motor).
	ConstantResistance
	// LED is a light-emitting diode of forward voltage Vf behind Ohms.
	LED
)

// Load is one load law and its values.
type Load struct {
	Kind       LoadKind
	Amps       float64 // ConstantCurrent: amperes, at least 0
	Watts      float64 // ConstantPower: output power in watts, at least 0
	Efficiency float64 // ConstantPower: converter efficiency, above 0, at most 1
	Ohms       float64 // ConstantResistance, LED: ohms, above 0
	Vf         float64 // LED: forward voltage in volts, at least 0
}

// InputPower is the power a constant-power load draws from its input, watts.
func (l Load) InputPower() float64 { return l.Watts / l.Efficiency }

// Scale returns the load with its demand multiplied by f (> 0): current and
// power times f, resistance divided by f.
func (l Load) Scale(f float64) Load {
	switch l.Kind {
	case ConstantCurrent:
		l.Amps *= f
	case ConstantPower:
		l.Watts *= f
	case ConstantResistance, LED:
		l.Ohms /= f
	}
	return l
}

// String is the load in the command-line syntax; ParseLoad reads it back.
func (l Load) String() string {
	g := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	switch l.Kind {
	case ConstantCurrent:
		return units.Format(l.Amps, units.Current)
	case ConstantPower:
		if l.Efficiency == 1 {
			return units.Format(l.Watts, units.Power)
		}
		return units.Format(l.Watts, units.Power) + "@" + units.Format(l.Efficiency, units.Fraction) // exact, unlike g(e·100)
	case ConstantResistance:
		return units.Format(l.Ohms, units.Resistance)
	case LED:
		return "led:vf=" + g(l.Vf) + ",r=" + g(l.Ohms)
	}
	return "?"
}

// Label is the load for people: "450 mA", "0.8 W at 85 %", "33 Ω", "LED 2 V + 47 Ω".
func (l Load) Label() string {
	switch l.Kind {
	case ConstantCurrent:
		return units.Human(l.Amps, units.Current, 3)
	case ConstantPower:
		s := units.Human(l.Watts, units.Power, 3)
		if l.Efficiency != 1 {
			s += " at " + units.Human(l.Efficiency, units.Fraction, 3)
		}
		return s
	case ConstantResistance:
		return units.Human(l.Ohms, units.Resistance, 3)
	case LED:
		return "LED " + units.Human(l.Vf, units.Voltage, 3) + " + " + units.Human(l.Ohms, units.Resistance, 3)
	}
	return "?"
}

// Validate checks the load's values.
func (l Load) Validate() error {
	fin := func(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }
	switch l.Kind {
	case ConstantCurrent:
		if !fin(l.Amps) || l.Amps < 0 || l.Amps > 100 {
			return fmt.Errorf("current %s must be between 0 and 100 A", units.Eng(l.Amps, units.Current, 3))
		}
	case ConstantPower:
		if !fin(l.Watts) || l.Watts < 0 || l.Watts > 1000 {
			return fmt.Errorf("power %s must be between 0 and 1 kW", units.Eng(l.Watts, units.Power, 3))
		}
		if !fin(l.Efficiency) || l.Efficiency <= 0 || l.Efficiency > 1 {
			return fmt.Errorf("efficiency %s must be above 0 and at most 100 %%", units.Eng(l.Efficiency, units.Fraction, 3))
		}
	case ConstantResistance:
		if !fin(l.Ohms) || l.Ohms <= 0 {
			return fmt.Errorf("resistance %s must be above 0", units.Eng(l.Ohms, units.Resistance, 3))
		}
	case LED:
		if !fin(l.Ohms) || l.Ohms <= 0 {
			return fmt.Errorf("LED resistor %s must be above 0", units.Eng(l.Ohms, units.Resistance, 3))
		}
		if !fin(l.Vf) || l.Vf < 0 || l.Vf > 50 {
			return fmt.Errorf("LED forward voltage %s must be between 0 and 50 V", units.Eng(l.Vf, units.Voltage, 3))
		}
	default:
		return fmt.Errorf("unknown load kind %d", l.Kind)
	}
	return nil
}

// ParseLoad reads one load: "120mA", "0.8W", "0.8W@85%", "33ohm", "33Ω",
// "led:vf=2.0,r=47".
func ParseLoad(s string) (Load, error) {
	t := strings.TrimSpace(s)
	if t == "" {
		return Load{}, fmt.Errorf("empty load: expected a current (120mA), a power (0.8W, 0.8W@85%%), a resistance (33ohm) or led:vf=2.0,r=47")
	}
	var l Load
	if x, err := strconv.ParseFloat(t, 64); err == nil && x == 0 {
		// A bare zero is a rest (nothing drawn), whatever its unit would
		// be: "2A/10s,0/50s" means what it says. (A zero resistance would
		// be a short, and is no load at all.)
		return Load{Kind: ConstantCurrent}, nil
	}
	if rest, ok := strings.CutPrefix(t, "led:"); ok {
		l = Load{Kind: LED, Vf: math.NaN(), Ohms: math.NaN()}
		for _, kv := range strings.Split(rest, ",") {
			k, v, ok := strings.Cut(strings.TrimSpace(kv), "=")
			if !ok {
				return Load{}, fmt.Errorf("led load %q: %q is not key=value (keys vf, r)", t, kv)
			}
			switch strings.TrimSpace(k) {
			case "vf":
				x, err := units.Parse(v, units.Voltage, true)
				if err != nil {
					return Load{}, fmt.Errorf("led load key vf: %w", err)
				}
				l.Vf = x
			case "r":
				x, err := units.Parse(v, units.Resistance, true)
				if err != nil {
					return Load{}, fmt.Errorf("led load key r: %w", err)
				}
				l.Ohms = x
			default:
				return Load{}, fmt.Errorf("led load: unknown key %q (keys vf, r)", k)
			}
		}
		if math.IsNaN(l.Vf) || math.IsNaN(l.Ohms) {
			return Load{}, fmt.Errorf("led load %q needs both vf and r, e.g. led:vf=2.0,r=47", t)
		}
	} else {
		head, eff, hasEff := strings.Cut(t, "@")
		head = strings.TrimSpace(head)
		switch {
		case strings.HasSuffix(head, "W"):
			w, err := units.Parse(head, units.Power, false)
			if err != nil {
				return Load{}, fmt.Errorf("load: %w", err)
			}
			l = Load{Kind: ConstantPower, Watts: w, Efficiency: 1}
			if hasEff {
				e, err := units.Parse(eff, units.Fraction, false)
				if err != nil {
					return Load{}, fmt.Errorf("load efficiency: %w", err)
				}
				l.Efficiency = e
			}
		case strings.HasSuffix(head, "A"):
			a, err := units.Parse(head, units.Current, false)
			if err != nil {
				return Load{}, fmt.Errorf("load: %w", err)
			}
			l = Load{Kind: ConstantCurrent, Amps: a}
		default:
			r, err := units.Parse(head, units.Resistance, false)
			if err != nil {
				return Load{}, fmt.Errorf("load %q: expected a current (120mA), a power (0.8W@85%%), a resistance (33ohm) or led:vf=2.0,r=47", t)
			}
			l = Load{Kind: ConstantResistance, Ohms: r}
		}
		if hasEff && l.Kind != ConstantPower {
			return Load{}, fmt.Errorf("load %q: an efficiency (@85%%) applies only to a power load such as 0.8W@85%%", t)
		}
	}
	if err := l.Validate(); err != nil {
		return Load{}, fmt.Errorf("load %q: %w", t, err)
	}
	return l, nil
}

// Phase is one part of a repeating load profile.
type Phase struct {
	Name    string  // what the load is doing, e.g. "motor"; may be empty
	Load    Load    //
	Seconds float64 // duration in seconds, above 0
}

// Label names the phase for people: its name, or its load.
func (p Phase) Label() string {
	if p.Name != "" {
		return p.Name
	}
	return p.Load.Label()
}

// ProfileWords lists a profile for people, in the words every command and
// the screen use: "motor wag 450 mA for 3 s, bark 120 mA for 2 s"; a profile
// of one phase is its load alone ("120 mA", or "drive 120 mA" when named).
func ProfileWords(prof []Phase) string {
	parts := make([]string, 0, len(prof))
	for _, p := range prof {
		s := units.TrimZeros(p.Load.Label()) // the name is the user's, untouched
		if p.Name != "" {
			s = p.Name + " " + s
		}
		if len(prof) > 1 {
			s += " for " + units.TrimZeros(units.Human(p.Seconds, units.Time, 3))
		}
		parts = append(parts, s)
	}
	return strings.Join(parts, ", ")
}

// ParseProfile reads one load ("120mA") or a repeating profile of phases
// "LOAD/DURATION,..." such as "450mA/3s,120mA/2s,15mA/25s". A single load
// with no duration is a one-phase profile.
func ParseProfile(s string) ([]Phase, error) {
	t := strings.TrimSpace(s)
	if t == "" {
		return nil, fmt.Errorf("empty load: expected e.g. 120mA or 450mA/3s,15mA/27s")
	}
	// Split on commas, then glue "key=value" pieces back onto the led: spec
	// they belong to ("led:vf=2,r=47/2s" splits into two pieces).
	var parts []string
	for _, p := range strings.Split(t, ",") {
		p = strings.TrimSpace(p)
		if n := len(parts); n > 0 && strings.Contains(p, "=") && !strings.Contains(p, ":") &&
			strings.HasPrefix(parts[n-1], "led:") && !strings.Contains(parts[n-1], "/") {
			parts[n-1] += "," + p
			continue
		}
		parts = append(parts, p)
	}
	if len(parts) == 1 && !strings.Contains(parts[0], "/") {
		l, err := ParseLoad(parts[0])
		if err != nil {
			return nil, err
		}
		return []Phase{{Load: l, Seconds: 1}}, nil
	}
	phases := make([]Phase, 0, len(parts))
	for i, p := range parts {
		ls, ds, ok := strings.Cut(p, "/")
		if !ok {
			return nil, fmt.Errorf("profile phase %d %q: expected LOAD/DURATION such as 450mA/3s", i+1, p)
		}
		l, err := ParseLoad(ls)
		if err != nil {
			return nil, fmt.Errorf("profile phase %d: %w", i+1, err)
		}
		d, err := units.Parse(ds, units.Time, false)
		if err != nil {
			return nil, fmt.Errorf("profile phase %d duration: %w", i+1, err)
		}
		if !(d > 0) {
			return nil, fmt.Errorf("profile phase %d: duration %q must be above 0 s", i+1, ds)
		}
		phases = append(phases, Phase{Load: l, Seconds: d})
	}
	return phases, nil
}

// FormatProfile writes phases in the syntax ParseProfile reads. A lone
// phase of 1 s, what ParseProfile makes of a bare load, is written as the
// bare load.
func FormatProfile(phases []Phase) string {
	if len(phases) == 1 && phases[0].Seconds == 1 {
		return phases[0].Load.String()
	}
	var b strings.Builder
	for i, p := range phases {
		if i > 0 {
			b.WriteByte(',')
		}
		b.WriteString(p.Load.String())
		b.WriteByte('/')
		b.WriteString(strconv.FormatFloat(p.Seconds, 'g', -1, 64))
		b.WriteByte('s')
	}
	return b.String()
}
