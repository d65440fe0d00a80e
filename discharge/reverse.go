package discharge

import (
	"math"

	"headroom/protect"
)

// ReversePack describes design d's fresh pack for an element's Reverse:
// cells, their open-circuit voltage and resistance at the ambient, and the
// lowest resistance the load presents at the fresh pack voltage (the
// heaviest phase; +Inf when no phase draws anything). The screen, the
// report and the search all judge a wrong insertion with it.
func ReversePack(d *Design) protect.Pack {
	c := d.Cell
	p := protect.Pack{Series: d.Series, Parallel: max(d.Parallel, 1), TempC: d.TempC,
		CellV: c.OpenCircuit(0, d.TempC), CellR: c.ResistanceAt(0, d.TempC), LoadR: math.Inf(1), Chemistry: c.Chemistry}
	vp := p.CellV * float64(d.Series)
	for _, ph := range d.Profile {
		var r float64
		switch l := ph.Load; l.Kind {
		case ConstantCurrent:
			if l.Amps > 0 {
				r = vp / l.Amps
			}
		case ConstantPower:
			if l.InputPower() > 0 {
				r = vp * vp / l.InputPower()
			}
		case ConstantResistance, LED:
			r = l.Ohms
		}
		if r > 0 && r < p.LoadR {
			p.LoadR = r
		}
	}
	return p
}
