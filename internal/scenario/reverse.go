package scenario

import (
	"math"

	"headroom/discharge"
	"headroom/protect"
)

// ReversePack describes design d's pack for protect's Reverse: the fresh
// cell's open-circuit voltage and resistance at the ambient, and the
// lowest resistance any load phase shows at the fresh pack voltage (a
// constant current I as V/I, a constant power P as V²/P, a resistor or
// LED as its resistance).
func ReversePack(d *discharge.Design) protect.Pack {
	c := d.Cell
	p := protect.Pack{Series: d.Series, Parallel: d.Parallel, TempC: d.TempC,
		CellV: c.OpenCircuit(0, d.TempC), CellR: c.ResistanceAt(0, d.TempC), LoadR: math.Inf(1)}
	vp := p.CellV * float64(d.Series)
	for _, ph := range d.Profile {
		var r float64
		switch l := ph.Load; l.Kind {
		case discharge.ConstantCurrent:
			r = vp / l.Amps
		case discharge.ConstantPower:
			r = vp * vp / l.InputPower()
		case discharge.ConstantResistance, discharge.LED:
			r = l.Ohms
		}
		if r > 0 && r < p.LoadR {
			p.LoadR = r
		}
	}
	return p
}
