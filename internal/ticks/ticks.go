// Package ticks labels the axes of headroom's charts (plot, pick --plot,
// cells fit --plot) as people write numbers.
package ticks

import (
	"strconv"
	"strings"

	"gonum.org/v1/plot"

	"headroom/internal/units"
)

// Plain is gonum's default ticks with the labels written with the fewest
// decimals that every label of the axis needs: "0, 2500", not "0.00,
// 2500.00" (the default's decimals came out two on a 500 mAh step), and
// still "1.8, 2.4, 3.0".
type Plain struct{}

// Ticks returns the axis's ticks between lo and hi.
func (Plain) Ticks(lo, hi float64) []plot.Tick {
	ts := plot.DefaultTicks{}.Ticks(lo, hi)
	dec := 0
	for _, t := range ts {
		if t.Label == "" {
			continue
		}
		s := units.Short(t.Value, 6)
		if i := strings.IndexByte(s, '.'); i >= 0 {
			dec = max(dec, len(s)-i-1)
		}
	}
	for i := range ts {
		if ts[i].Label != "" {
			ts[i].Label = strconv.FormatFloat(ts[i].Value, 'f', dec, 64)
		}
	}
	return ts
}
