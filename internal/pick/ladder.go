package pick

import (
	"fmt"

	"headroom/protect"
)

// Ladders are the part values tried for each element kind, written as
// the specs run --protect takes. Every ladder is typical, from memory,
// not any maker's data: the stock values a designer would reach for first.
var ladders = map[string][]string{
	"none": {"none"},
	// A general-purpose 1 A silicon rectifier (the kind's default), and a
	// small-signal switching diode: less leakage, more drop at a few
	// hundred mA (Is about 2.5 nA, n about 1.9, 0.6 Ω bulk; from memory).
	"diode": {"diode", "diode:is=2.5n,n=1.9,rs=0.6,cost=0.02"},
	// The default Schottky, and a 3 A part: lower drop, more leakage,
	// dearer (from memory).
	"schottky": {"schottky", "schottky:is=10u,rs=0.05,cost=0.09"},
	// MOSFET grades: threshold, on-resistance at 4.5 V, price (from
	// memory, SOT-23 logic-level P-channel parts).
	"pmos": {
		"pmos",
		"pmos:vth=0.5,ron=60m,cost=0.12",
		"pmos:vth=1.2,ron=30m,cost=0.06",
		"pmos:vth=0.4,ron=25m,cost=0.20",
	},
	// Zener gate clamps from the E24 Zener range.
	"pmos-clamp": {"pmos-clamp:vz=3.9", "pmos-clamp", "pmos-clamp:vz=8.2"},
	// Sense resistors from the E12 series: the clamp current is about
	// Vbe/Rsh, 3 A down to 0.2 A.
	"limiter": {
		"limiter:rsh=0.22", "limiter:rsh=0.33", "limiter:rsh=0.47", "limiter:rsh=0.68",
		"limiter", "limiter:rsh=1.5", "limiter:rsh=2.2", "limiter:rsh=3.3",
	},
	// Common polyfuse hold ratings; trip is twice the hold.
	"pptc": {"pptc:hold=0.1", "pptc:hold=0.2", "pptc", "pptc:hold=0.5", "pptc:hold=0.75", "pptc:hold=1.1"},
	// Fuse ratings behind a crowbar diode.
	"crowbar": {"crowbar:fuse=0.25", "crowbar", "crowbar:fuse=1", "crowbar:fuse=2"},
	// Protector current-limit settings.
	"ic": {"ic:ilim=0.25", "ic", "ic:ilim=1", "ic:ilim=2"},
}

// Ladder returns the parts tried for kind: its ladder, or the kind's
// default part when it has none (a kind added later).
func Ladder(kind string) ([]protect.Element, error) {
	specs, ok := ladders[kind]
	if !ok {
		specs = []string{kind}
	}
	out := make([]protect.Element, 0, len(specs))
	for _, s := range specs {
		e, err := protect.Parse(s)
		if err != nil {
			return nil, fmt.Errorf("pick: ladder for %s: %w", kind, err)
		}
		out = append(out, e)
	}
	return out, nil
}
