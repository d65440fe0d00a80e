package tolerance

import (
	"fmt"
	"strings"

	"headroom/discharge"
	"headroom/internal/units"
	"headroom/protect"
)

// Warnings returns the cliff warnings of d under tols (see Analyse).
func Warnings(d *discharge.Design, tols []Tol) ([]string, error) {
	m, err := newModel(d, tols)
	if err != nil {
		return nil, err
	}
	c, err := m.worst()
	if err != nil {
		return nil, err
	}
	return m.cliffs(c), nil
}

// cliffs says where one tolerance, alone at a limit, crosses a cliff:
// the product stops on a different cause from nominal's current limit or
// fuse (a limit whose low side falls under a load pulse), or a MOSFET's
// channel is off at the end of the run and its body diode carries the
// load.
func (m *model) cliffs(c Corner) []string {
	var out []string
	nom := c.Nominal
	for _, s := range c.Sides {
		for _, end := range []struct {
			r    *discharge.Result
			side string
			text string
		}{{s.low, "low", s.LowText}, {s.high, "high", s.HighText}} {
			r := end.r
			if r == nil {
				continue
			}
			if (r.CutoffCause == discharge.CauseLimit || r.CutoffCause == discharge.CauseFuse) && r.CutoffCause != nom.CutoffCause {
				what := "the protection's current limit clamps"
				if r.CutoffCause == discharge.CauseFuse {
					what = "the fuse opens on"
				}
				out = append(out, fmt.Sprintf("%s at its %s limit (%s): %s the %s %s phase, and the product stops after %s h instead of %s h: parts at that end reset it on every pulse",
					s.Name, end.side, end.text, what, units.Human(r.CutoffAmps, units.Current, 3), quoted(r.CutoffPhase),
					Hours(r.RuntimeH), Hours(nom.RuntimeH)))
			}
		}
		if s.Name == "vth" {
			if w := m.bodyDiode(s); w != "" {
				out = append(out, w)
			}
		}
	}
	return out
}

// Hours writes hours to three significant digits: "6.2", "0.485", "0".
func Hours(h float64) string { return trimNum(h) }

func quoted(phase string) string {
	if strings.TrimSpace(phase) == "" {
		return "load"
	}
	return "“" + phase + "”"
}

// bodyDiode reports when the threshold's high side leaves a MOSFET's
// channel off at the end of the run, so its body diode carries the load:
// the element's drop there is within 2 % of the body diode's own drop
// (the body diode built from the element's b* spec keys).
func (m *model) bodyDiode(s Side) string {
	r := s.high
	if r == nil || !(r.CutoffAmps > 0) {
		return ""
	}
	e := m.d.Protect
	var vals [5]float64
	for i, k := range []string{"bis", "bn", "brs", "beg", "bxti"} {
		v, ok := protect.Param(e, k)
		if !ok {
			return ""
		}
		vals[i] = v
	}
	body, err := protect.Parse(fmt.Sprintf("diode:is=%g,n=%g,rs=%g,eg=%g,xti=%g", vals[0], vals[1], vals[2], vals[3], vals[4]))
	if err != nil {
		return ""
	}
	hi, err := protect.WithParam(e, "vth", s.High)
	if err != nil {
		return ""
	}
	i, vin, t := r.CutoffAmps, r.CutoffPackV, m.d.TempC
	dBody := body.Drop(i, vin, t)
	dFET := hi.Drop(i, vin, t)
	if dFET < 0.98*dBody {
		return ""
	}
	return fmt.Sprintf("vth at its high limit (%s): at the end of the run the MOSFET's channel is off and its body diode carries the %s load (%s drop instead of milliohms)",
		s.HighText, units.Human(i, units.Current, 3), units.Human(dFET, units.Voltage, 3))
}
