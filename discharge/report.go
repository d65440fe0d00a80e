// Cost, heat, warnings and cautions.

package discharge

import (
	"fmt"
	"math"

	"headroom/curves"
	"headroom/protect"
)

// priceAndNotes fills cost, heat, warnings and cautions.
func (e *evaluator) priceAndNotes(el protect.Element, r *Result, nd *node) {
	d := e.d
	c := d.Cell
	r.PackPrice = d.PackPrice
	if r.PackPrice == 0 && !d.PriceGiven {
		r.PackPrice = c.Price * e.S * e.P
	}
	chargeKWh := 0.0
	if c.Rechargeable {
		// Charging energy per cycle: the charge put back at the pack's
		// nominal voltage, divided by the charge efficiency.
		nominal := c.NominalV
		if nominal == 0 {
			nominal = c.Curve.At(0.5 * e.end)
		}
		chargeKWh = r.DeliveredMAh / 1000 * nominal * e.S / c.ChargeEfficiency / 1000
	}
	r.CostPerHour = costPerHour(d, r, chargeKWh) // cost.go
	// The junction at the peak of the hottest pulse and over the cycle,
	// from the element's thermal network (heat.go); ambient with an ideal
	// heat sink.
	r.JunctionC, r.JunctionMeanC = d.TempC, d.TempC
	if s := e.heat; s != nil {
		r.JunctionC, r.JunctionMeanC = s.peakC, s.meanC
		r.JunctionRunaway = !s.ok
	}

	// The highest current of each phase over the run, for the element's
	// warnings (at the fresh pack and at cut-off; currents are monotone in
	// charge for every load law).
	// A constant current is its own at every charge (solve): nothing to
	// solve for when every phase is one.
	cur := make([]float64, len(e.loads))
	allCC := true
	for j, l := range e.loads {
		cur[j] = l.Amps
		allCC = allCC && l.Kind == ConstantCurrent
	}
	if !allCC || e.general {
		clear(cur)
		v := &variant{el: el, lim: protect.NoLimit(), floor: 0, heat: e.heat}
		for _, q := range []float64{0, math.Max(0, r.DeliveredMAh/(e.P*r.CapacityFactor)*(1-1e-9))} {
			if q >= e.end {
				continue
			}
			e.solveNode(q, v, nd)
			for j, o := range nd.worst {
				cur[j] = math.Max(cur[j], o.I)
			}
		}
	}
	r.Warnings = append(r.Warnings, el.Warnings(protect.Operating{VFresh: r.FreshV, Currents: cur, PeakW: r.ProtectionPeakW,
		TempC: d.TempC, PeakC: r.JunctionC, Runaway: r.JunctionRunaway, Seconds: e.secs})...)
	if w := heatWarning(e.heat); w != "" {
		r.Warnings = append(r.Warnings, w)
	}
	if w := curves.HotWarning(c, r.CellPeakC, d.TempC); w != "" {
		r.Warnings = append(r.Warnings, w)
	}
	for j, p := range d.Profile {
		if p.Load.Kind == LED && cur[j] == 0 {
			r.Warnings = append(r.Warnings, fmt.Sprintf("the LED of %s never lights: the voltage it gets stays below its %.2f V forward voltage (set the floor above it to count that as a stop)", p.Label(), p.Load.Vf))
		}
	}
	if e.pol != nil && e.pol.hs < e.pol.period {
		r.Warnings = append(r.Warnings, "a day's use is shorter than one cycle of the load profile: the cells' polarisation is approximate (the model takes whole cycles)")
	}
	if e.unsettledRun > 0 {
		where := "at 1 point"
		if e.unsettledRun > 1 {
			where = fmt.Sprintf("at %d points", e.unsettledRun)
		}
		r.Warnings = append(r.Warnings, where+" of the run the phases' currents and the cells' polarisation did not settle (a load near collapse or a MOSFET handing over to its body diode): the figures there are approximate")
	}
	r.Warnings = append(r.Warnings, limitWarnings(d, r, cur)...) // limits.go
	if r.StandbyShare > 0.2 {
		r.Warnings = append(r.Warnings, fmt.Sprintf("standby drain and self-discharge take %.0f %% of the charge: the pack goes flat on the shelf", r.StandbyShare*100))
	}
	if t := c.Temperature; len(t) > 0 && (d.TempC < t[0].Celsius || d.TempC > t[len(t)-1].Celsius) {
		// The table's end figures hold beyond it (curves.Cell.TempFactors):
		// −40 °C would otherwise read as running as long as −20 °C, unsaid.
		end, side := t[0].Celsius, "colder: the run is likely shorter than shown"
		if d.TempC > end {
			end, side = t[len(t)-1].Celsius, "hotter"
		}
		r.Warnings = append(r.Warnings, fmt.Sprintf("the %.0f °C ambient is outside the cell's temperature data (%.0f to %.0f °C): its figures at %.0f °C are used, as if it were no %s",
			d.TempC, t[0].Celsius, t[len(t)-1].Celsius, end, side))
	}
	if r.RuntimeH == 0 {
		r.Warnings = append(r.Warnings, "the product "+d.CutoffText(r))
	}
	r.Cautions = Cautions(c, d.Series*d.Parallel) // a slice of the Result's own
	if d.Toy {
		r.Cautions = append(r.Cautions, ToyCaution)
	}
}

// Cautions are the usual cautions for a pack of n cells of cell c
// (curves.PackCautions, their one home). A toy's result adds ToyCaution.
func Cautions(c *curves.Cell, n int) []string { return curves.PackCautions(c, n) }

// ToyCaution is the toy-safety reminder for a product that is a toy
// (Design.Toy).
const ToyCaution = "Electric toys fall under toy-safety standards (IEC 62115 and local equivalents); defer to them and to licensed practice."
