package protect

import (
	"math"

	"headroom/internal/units"
)

// counts returns the series and parallel counts with 0 (unset) read as 1.
func counts(p Pack) (s, par float64) {
	s, par = float64(p.Series), float64(p.Parallel)
	if s < 1 {
		s = 1
	}
	if par < 1 {
		par = 1
	}
	return s, par
}

// packVolts is the open-circuit voltage of the whole pack.
func packVolts(p Pack) float64 {
	s, _ := counts(p)
	return s * p.CellV
}

// packOhms is the internal resistance of the whole pack, S·R/P.
func packOhms(p Pack) float64 {
	s, par := counts(p)
	return s * p.CellR / par
}

// loadKnown reports whether the pack's LoadR is a usable resistance.
func loadKnown(p Pack) bool { return p.LoadR > 0 && !math.IsInf(p.LoadR, 1) }

// blockedReverse is the reversal of an element that blocks a reversed
// pack, passing only leak amperes, and that cannot see a flipped cell.
func blockedReverse(e Element, p Pack, leak float64, why string) Reversal {
	v := packVolts(p)
	load := 0.0
	if loadKnown(p) {
		load = math.Min(v, leak*p.LoadR)
	}
	return Reversal{
		WholePack: Case{Outcome: Blocked, Current: leak, Volts: -load,
			Note: why + ": only " + units.Human(leak, units.Current, 2) + " of leakage flows"},
		OneCell: flipped(e, p),
	}
}

// flipped is the one-cell-flipped case for a series element, with the
// element's drop at the current that actually flows: the load current i
// solves i·LoadR + Drop(i) = (S−2)·CellV. Drop is increasing in i, so
// bisection on [0, V/LoadR] finds it; this runs once per report, not in
// the engine's loop.
func flipped(e Element, p Pack) Case {
	if p.Series < 2 || !loadKnown(p) {
		return FlippedCell(p, 0)
	}
	v := float64(p.Series-2) * p.CellV
	if !(v > 0) {
		return FlippedCell(p, 0)
	}
	lo, hi := 0.0, v/p.LoadR
	for range 100 {
		mid := 0.5 * (lo + hi)
		if mid*p.LoadR+e.Drop(mid, v, p.TempC) > v {
			hi = mid
		} else {
			lo = mid
		}
		if hi-lo <= 1e-12*hi {
			break
		}
	}
	return FlippedCell(p, e.Drop(lo, v, p.TempC))
}

// appendHeat adds a warning when the junction runs above TjMax: at
// op.PeakC, the peak of the hottest pulse from the thermal network, when
// the caller worked it out, else at the steady Tamb + θja·PeakW.
func appendHeat(w []string, t Thermal, op Operating) []string {
	if !(op.PeakW > 0) {
		return w
	}
	tj, pulse := op.PeakC, true
	if tj == 0 {
		tj, pulse = t.Junction(op.PeakW, op.TempC), false
	}
	// Worded only when warned: the evaluation calls this every time.
	where := func() string {
		if pulse {
			return "at the peak of the hottest pulse (" + units.Human(op.PeakW, units.Power, 3) + ")"
		}
		return "at the peak " + units.Human(op.PeakW, units.Power, 3)
	}
	switch {
	case tj > t.TjMax && op.Runaway:
		w = append(w, "junction runs away "+where()+": it finds no settled temperature below its "+
			units.Human(t.TjMax, units.Temperature, 3)+" limit (the solve passed "+units.Human(tj, units.Temperature, 3)+
			", far beyond what the part survives): use a bigger package or more copper, or less current")
	case tj > t.TjMax:
		w = append(w, "junction reaches "+units.Human(tj, units.Temperature, 3)+" "+where()+", above its "+
			units.Human(t.TjMax, units.Temperature, 3)+" limit: use a bigger package or more copper")
	case tj > t.TjMax-tjMargin:
		w = append(w, "junction reaches "+units.Human(tj, units.Temperature, 3)+" "+where()+", within "+
			units.Human(tjMargin, units.Temperature, 2)+" of its "+units.Human(t.TjMax, units.Temperature, 3)+
			" limit: a hot day or a weaker part takes it over; use a bigger package or more copper")
	}
	return w
}

// tjMargin is the headroom under TjMax below which a junction is warned
// about: designers keep a junction some 20 °C under its rating for hot
// ambients and part spread (common practice, from memory).
const tjMargin = 20.0
