package discharge

import (
	"fmt"

	"headroom/internal/units"
)

// The product's own limits beside the floor: the least LED current that
// still counts as light, the LED's maximum current and the highest input
// voltage the product takes (Design.MinLEDAmps, MaxLEDAmps, MaxInputV).

// CauseDim is the cut-off when an LED's current falls below
// Design.MinLEDAmps: the light is too dim to count as working.
const CauseDim Cause = "LED too dim"

// dim reports whether LED load l at current i has fallen below the
// variant's least LED current.
func dim(l Load, i float64, v *variant) bool {
	return l.Kind == LED && v.minLED > 0 && i < v.minLED
}

// limitWarnings are the warnings for the product's stated limits, given
// each phase's highest current over the run.
func limitWarnings(d *Design, r *Result, cur []float64) []string {
	var out []string
	if d.MaxInputV > 0 && r.FreshV > d.MaxInputV {
		out = append(out, fmt.Sprintf("the fresh pack gives %s, above the product's %s maximum input voltage: use fewer cells in series or a part rated for the pack",
			units.Eng(r.FreshV, units.Voltage, 3), units.Eng(d.MaxInputV, units.Voltage, 3)))
	}
	if d.MaxLEDAmps > 0 {
		for j, p := range d.Profile {
			if p.Load.Kind == LED && j < len(cur) && cur[j] > d.MaxLEDAmps {
				out = append(out, fmt.Sprintf("the LED of %s carries up to %s, above its %s maximum current: raise its resistor",
					p.Label(), units.Eng(cur[j], units.Current, 3), units.Eng(d.MaxLEDAmps, units.Current, 3)))
			}
		}
	}
	return out
}
