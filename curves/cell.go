package curves

import (
	"fmt"
	"math"
	"slices"
	"sync"

	"headroom/internal/guard"
	"headroom/internal/rc"
)

// RefTempC is the temperature, in °C, at which curves, resistances and
// capacities are stated (IEC 61951-2 and IEC 61960-3 rate cells at 20 ± 5 °C).
const RefTempC = 20.0

// ResistancePoint is the internal resistance of one cell at a depth of
// discharge. Depth is the fraction of the curve's end charge, 0 to 1; Ohm is
// the resistance in ohms at RefTempC, at least 0.
type ResistancePoint struct {
	Depth float64
	Ohm   float64
}

// TempPoint scales a cell at an ambient temperature. Celsius is the
// ambient in °C; Capacity multiplies the charge the curve delivers (1 at
// RefTempC, above 0); Resistance multiplies the internal resistance (1 at
// RefTempC, above 0).
type TempPoint struct {
	Celsius    float64
	Capacity   float64
	Resistance float64
}

// Cell is one electrochemical cell: its discharge curve and the terms that
// move it with current, temperature and time. Currents are in amperes
// flowing out of the cell, charges in mAh, voltages in volts.
type Cell struct {
	ID          string // short id, e.g. "lr6", "hr6-lsd"
	Name        string // one line for people
	Chemistry   string // e.g. "alkaline", "nimh", "li-ion"
	Designation string // IEC designation where one exists, e.g. "LR6"

	// Curve is the voltage against delivered charge at RefCurrent and
	// RefTempC. With RefCurrent > 0 it is the terminal voltage under that
	// current; with RefCurrent == 0 it is the rest (open-circuit) voltage.
	Curve *Curve
	// RefCurrent is the current in amperes at which Curve was taken; 0
	// means a rest-voltage curve. Must be at least 0.
	RefCurrent float64

	NominalV     float64 // nominal voltage, volts
	RatedMAh     float64 // rated capacity, mAh
	RatedCurrent float64 // current at which RatedMAh is rated, amperes
	EndPoint     float64 // end-point (end-of-discharge) voltage, volts

	// Resistance is the internal resistance against depth of discharge,
	// interpolated linearly and held at the ends; empty means 0 Ω.
	Resistance []ResistancePoint
	// Peukert is the rate exponent k, 1 (no rate effect) to 2.
	Peukert float64
	// Temperature is the table of capacity and resistance factors against
	// ambient, sorted by Celsius; empty means no temperature effect.
	Temperature []TempPoint
	// SelfDischarge is the fraction of rated capacity lost per month at
	// RefTempC, 0 to 1.
	SelfDischarge float64

	// RC are the cell's polarisation branches (Thevenin equivalent:
	// terminal = E − I·R0 − Σ vᵢ, each vᵢ the voltage of one parallel RC
	// stage): R in ohms at RefTempC (scaled by the temperature table's
	// resistance factor like R0), above 0; Tau in seconds, above 0. At
	// most MaxRC; empty means no memory (the sag is I·R0 at once).
	// Resistance (R0) is the instant part of the cell's resistance; a
	// constant current for much longer than every Tau sags by
	// I·(R0 + Σ Rᵢ).
	RC []rc.Stage
	// CutoffV is the under-voltage cut-off of the pack's own protection,
	// volts per cell (rechargeables; 0: none). A dip below it shorter
	// than CutoffDelay seconds does not trip it. CutoffV 0 or above 0 and
	// below 10; CutoffDelay above 0 when CutoffV is set.
	CutoffV     float64
	CutoffDelay float64

	// HeatCapacity is the cell's lumped heat capacity, J/K (its mass
	// times a specific heat of about 1 J/(g·K)); ThermalRes its thermal
	// resistance to the ambient, K/W. Together a first-order stage
	// (ThermalStage): the cell warms by ThermalRes times the power it
	// burns, with time constant HeatCapacity·ThermalRes, and its
	// resistances (R0 and RC) follow its own temperature through the
	// Temperature table's resistance factor. ThermalRes 0 means the cell
	// stays at the ambient. ThermalRes 0 to MaxThermalRes; HeatCapacity
	// 0 to MaxHeatCapacity, above 0 when ThermalRes is.
	HeatCapacity float64
	ThermalRes   float64

	Rechargeable     bool
	CycleLife        int     // full cycles to end of life, rechargeables only
	ChargeEfficiency float64 // charge out ÷ charge in, 0 to 1, rechargeables only

	Price  float64 // typical price of one cell in dollars, at least 0
	Source string  // where the numbers come from

	// Thinned is set when the readers thinned a long curve (see
	// MaxCurvePoints); nil otherwise.
	Thinned *Thinning
}

// MaxCellCurrent is the most current, in amperes, a cell's curve or
// rating may be taken at: the most a load may draw.
const MaxCellCurrent = 100.0

// MaxTempPoints is the most points a cell's temperature table may have.
const MaxTempPoints = 64

// MaxRC is the most polarisation branches a cell may have.
const MaxRC = 3

// MaxThermalRes (K/W) and MaxHeatCapacity (J/K) bound a cell's thermal
// data: a coin cell in still air is about 100 K/W, a D cell about 140 J/K
// (from memory); the bounds leave room for a cell in an enclosure or a
// big block and refuse typing slips.
const (
	MaxThermalRes   = 1000.0
	MaxHeatCapacity = 1e5
)

// ThermalStage is the cell's thermal stage to the ambient: R the thermal
// resistance (K/W), Tau = HeatCapacity·ThermalRes (s). Zero when the
// cell stays at the ambient.
func (c *Cell) ThermalStage() rc.Stage {
	if !c.SelfHeats() {
		return rc.Stage{}
	}
	return rc.Stage{R: c.ThermalRes, Tau: c.HeatCapacity * c.ThermalRes}
}

// SelfHeats reports whether the cell has thermal data (ThermalRes above
// 0): its temperature then follows the power it burns.
func (c *Cell) SelfHeats() bool { return c.ThermalRes > 0 && c.HeatCapacity > 0 }

// Validate checks the cell's fields and says which is wrong.
func (c *Cell) Validate() error {
	bad := func(field string, format string, a ...any) error {
		return fmt.Errorf("%s: %s", field, fmt.Sprintf(format, a...))
	}
	fin := func(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }
	switch {
	case c.Curve == nil:
		return bad("curve", "missing")
	case !fin(c.RefCurrent) || c.RefCurrent < 0 || c.RefCurrent > MaxCellCurrent:
		return bad("ref_current", "%v A must be 0 to %g A", c.RefCurrent, MaxCellCurrent)
	case !fin(c.RatedMAh) || c.RatedMAh <= 0 || c.RatedMAh > MaxCapacityMAh:
		return bad("rated_mAh", "%v must be above 0 and at most %.0f mAh (1000 Ah)", c.RatedMAh, MaxCapacityMAh)
	case !fin(c.RatedCurrent) || c.RatedCurrent < 0 || c.RatedCurrent > MaxCellCurrent:
		return bad("rated_current", "%v A must be 0 to %g A", c.RatedCurrent, MaxCellCurrent)
	case !fin(c.EndPoint) || c.EndPoint <= 0:
		return bad("end_point", "%v V must be above 0", c.EndPoint)
	case !fin(c.Peukert) || c.Peukert < 1 || c.Peukert > 2:
		return bad("peukert", "%v must be between 1 and 2", c.Peukert)
	case !fin(c.SelfDischarge) || c.SelfDischarge < 0 || c.SelfDischarge > 1:
		return bad("self_discharge", "%v per month must be between 0 and 1", c.SelfDischarge)
	case !guard.PriceOK(c.Price):
		return bad("price", "%v must be 0 to %.0f dollars (above 0, at least %.6f)", c.Price, guard.MaxPrice, guard.MinPrice)
	case !fin(c.NominalV) || c.NominalV < 0 || c.NominalV > 60:
		return bad("nominal", "%v V must be 0 to 60 V", c.NominalV)
	}
	if c.Rechargeable {
		if c.CycleLife < 1 || c.CycleLife > 1e6 {
			return bad("cycle_life", "%d must be at least 1 and at most 1000000 for a rechargeable cell", c.CycleLife)
		}
		if !fin(c.ChargeEfficiency) || c.ChargeEfficiency <= 0 || c.ChargeEfficiency > 1 {
			return bad("charge_efficiency", "%v must be above 0 and at most 1", c.ChargeEfficiency)
		}
	}
	if len(c.RC) > MaxRC {
		return bad("rc", "%d branches, at most %d", len(c.RC), MaxRC)
	}
	for i, b := range c.RC {
		if !fin(b.R) || b.R <= 0 || b.R > 1e4 {
			return bad("rc", "point %d: %v Ω must be above 0 and at most 10 kΩ", i+1, b.R)
		}
		if !fin(b.Tau) || b.Tau <= 0 || b.Tau > 1e7 {
			return bad("rc", "point %d: time constant %v s must be above 0 and at most 1e7 s", i+1, b.Tau)
		}
	}
	if !fin(c.CutoffV) || c.CutoffV < 0 || c.CutoffV >= 10 {
		return bad("cutoff_v", "%v V must be 0 (none) or above 0 and below 10 V", c.CutoffV)
	}
	if !fin(c.CutoffDelay) || c.CutoffDelay < 0 || c.CutoffDelay > 60 || c.CutoffV > 0 && c.CutoffDelay == 0 {
		return bad("cutoff_delay", "%v s must be above 0 and at most 60 s when cutoff_v is set", c.CutoffDelay)
	}
	if !fin(c.ThermalRes) || c.ThermalRes < 0 || c.ThermalRes > MaxThermalRes {
		return bad("thermal_resistance", "%v K/W must be 0 (the cell stays at the ambient) to %g K/W", c.ThermalRes, MaxThermalRes)
	}
	if !fin(c.HeatCapacity) || c.HeatCapacity < 0 || c.HeatCapacity > MaxHeatCapacity || c.ThermalRes > 0 && c.HeatCapacity == 0 {
		return bad("heat_capacity", "%v J/K must be above 0 and at most %g J/K when thermal_resistance is set", c.HeatCapacity, MaxHeatCapacity)
	}
	for i, r := range c.Resistance {
		if !fin(r.Depth) || r.Depth < 0 || r.Depth > 1 {
			return bad("resistance", "point %d: depth %v must be between 0 and 1", i+1, r.Depth)
		}
		if !fin(r.Ohm) || r.Ohm < 0 || r.Ohm > 1e4 {
			return bad("resistance", "point %d: %v Ω must be between 0 and 10 kΩ", i+1, r.Ohm)
		}
		if i > 0 && r.Depth <= c.Resistance[i-1].Depth {
			return bad("resistance", "point %d: depth %v must be above the previous %v", i+1, r.Depth, c.Resistance[i-1].Depth)
		}
	}
	if len(c.Temperature) > MaxTempPoints {
		return bad("temperature", "%d points, at most %d", len(c.Temperature), MaxTempPoints)
	}
	for i, t := range c.Temperature {
		if !fin(t.Celsius) || t.Celsius < -60 || t.Celsius > 100 {
			return bad("temperature", "point %d: %v °C must be between -60 and 100", i+1, t.Celsius)
		}
		if !fin(t.Capacity) || t.Capacity <= 0 || t.Capacity > 2 {
			return bad("temperature", "point %d: capacity factor %v must be above 0 and at most 2", i+1, t.Capacity)
		}
		if !fin(t.Resistance) || t.Resistance <= 0 || t.Resistance > 100 {
			return bad("temperature", "point %d: resistance factor %v must be above 0 and at most 100", i+1, t.Resistance)
		}
		if i > 0 && t.Celsius <= c.Temperature[i-1].Celsius {
			return bad("temperature", "point %d: %v °C must be above the previous %v °C", i+1, t.Celsius, c.Temperature[i-1].Celsius)
		}
	}
	return nil
}

// TempFactors returns the capacity and resistance factors at ambient tempC,
// interpolated linearly in the table and held at its ends.
func (c *Cell) TempFactors(tempC float64) (capacity, resistance float64) {
	t := c.Temperature
	if len(t) == 0 {
		return 1, 1
	}
	if tempC <= t[0].Celsius {
		return t[0].Capacity, t[0].Resistance
	}
	for i := 1; i < len(t); i++ {
		if tempC <= t[i].Celsius {
			f := (tempC - t[i-1].Celsius) / (t[i].Celsius - t[i-1].Celsius)
			return t[i-1].Capacity + f*(t[i].Capacity-t[i-1].Capacity),
				t[i-1].Resistance + f*(t[i].Resistance-t[i-1].Resistance)
		}
	}
	last := t[len(t)-1]
	return last.Capacity, last.Resistance
}

// CapacityFactor is how much of the curve's charge the cell delivers at an
// effective current ieff (A, per cell) and ambient tempC, relative to the
// curve: RateFactor(ieff) · ColdFactor(ieff, tempC). The engine stretches
// the curve's charge axis by it; the voltage sag comes from the resistances
// on top, so the two together make one rate law (see RateFactor).
func (c *Cell) CapacityFactor(ieff, tempC float64) float64 {
	return c.RateFactor(ieff) * c.ColdFactor(ieff, tempC)
}

// rateRef is the current the rate law is stated against: RefCurrent, or
// RatedCurrent for a rest-voltage curve; 0 when neither is known.
func (c *Cell) rateRef() float64 {
	if c.RefCurrent > 0 {
		return c.RefCurrent
	}
	return c.RatedCurrent
}

// LightLoadSpan is how far below its reference current Peukert's law is
// followed for a capacity gain: a cell at a quarter of its reference
// current gains what it gains at half of it. Peukert's law over-predicts
// the gain at light loads (typical alkaline AA cells give about
// 2700–3000 mAh at 25 mA against about 2400 mAh at 100 mA, from memory);
// a lighter load still gains a little from its smaller sag.
const LightLoadSpan = 2

// RateFactor is the one rate law (Peukert 1897): the constant-current
// capacity to the end-point at current i is Cref·(Iref/i)^(k−1), Cref the
// capacity at Iref. Part of that the sag already gives: at a higher
// current the steady terminal voltage E − i·(R0 + ΣRᵢ) reaches the
// end-point sooner, at EndCharge(i). RateFactor stretches the charge axis
// by the rest, Cref·(Iref/i)^(k−1) / EndCharge(i), held between 1 and
// (Iref/i)^(k−1) — a stated k is what two constant-current runs measure
// while the sag is less than Peukert asks, k = 1 means the sag alone, and
// the sag is never undone. Below Iref/LightLoadSpan the factor stops
// growing, and it never rises with the current (the running minimum on a
// grid of half-doublings). At RefTempC: cold is ColdFactor's.
func (c *Cell) RateFactor(i float64) float64 {
	iref := c.rateRef()
	if c.Peukert <= 1 || iref <= 0 || !(i > 0) {
		return 1
	}
	// Where the sag grows faster than Peukert asks, raw rises again
	// towards 1 (no extra loss). The factor is the running minimum of raw
	// on a grid of half-doublings from the light-load span, interpolated
	// in log current between grid points: exact on the grid (Iref and
	// 2·Iref among them), never rising with the current. The grid's raw
	// values are the cell's alone: worked out once (rateGrids).
	g := rateGrids.of(c)
	g.mu.Lock()
	defer g.mu.Unlock()
	lo := iref / LightLoadSpan
	if i <= lo {
		return g.at(c, 0)
	}
	const step = math.Sqrt2
	run := g.at(c, 0)
	x := lo
	for k := 0; ; k++ {
		next := math.Min(run, g.at(c, k+1))
		if i <= x*step {
			w := math.Log(i/x) / math.Log(step)
			return run + w*(next-run)
		}
		run = next
		x *= step
	}
}

// rawRate is RateFactor's factor at current j before the running
// minimum: Peukert's capacity over the sag's own, cref the capacity at
// the reference current iref, held between 1 and (iref/j)^(k−1).
func (c *Cell) rawRate(j, iref, cref float64) float64 {
	p := math.Pow(iref/j, c.Peukert-1)
	q := c.EndCharge(j, RefTempC)
	if !(q > 0) || !(cref > 0) {
		return p
	}
	return math.Min(math.Max(p*cref/q, math.Min(1, p)), math.Max(1, p))
}

// rateGrid is RateFactor's grid for one cell: rawRate at lo·√2ᵏ (lo the
// light-load span's current), grown as higher currents ask for more,
// with the inputs it was worked out from.
type rateGrid struct {
	mu   sync.Mutex
	in   rateInputs
	cref float64
	x    float64   // the next grid current
	raw  []float64 // rawRate at the grid's currents so far
}

// rateInputs are the cell's fields RateFactor reads (the curve's points
// are never changed once made: its pointer stands for them).
type rateInputs struct {
	curve                                 *Curve
	refCurrent, ratedCurrent, peukert, ep float64
	res                                   []ResistancePoint
	rc                                    []rc.Stage
	temp                                  []TempPoint
}

func inputsOf(c *Cell) rateInputs {
	return rateInputs{c.Curve, c.RefCurrent, c.RatedCurrent, c.Peukert, c.EndPoint, c.Resistance, c.RC, c.Temperature}
}

// same reports whether c still has the fields the grid was made from.
func (in *rateInputs) same(c *Cell) bool {
	return in.curve == c.Curve && in.refCurrent == c.RefCurrent && in.ratedCurrent == c.RatedCurrent &&
		in.peukert == c.Peukert && in.ep == c.EndPoint && slices.Equal(in.res, c.Resistance) &&
		slices.Equal(in.rc, c.RC) && slices.Equal(in.temp, c.Temperature)
}

// at is the grid's k-th value, working out those missing (g.mu held).
func (g *rateGrid) at(c *Cell, k int) float64 {
	for len(g.raw) <= k {
		g.raw = append(g.raw, c.rawRate(g.x, c.rateRef(), g.cref))
		g.x *= math.Sqrt2
	}
	return g.raw[k]
}

// rateGridCache holds the grids of the cells RateFactor has seen, at
// most rateGridMax of them (then it starts afresh). A grid is used only
// while the cell's fields equal the ones it was made from, so a cell
// changed in place gets a new one.
type rateGridCache struct {
	mu sync.Mutex
	m  map[*Cell]*rateGrid
}

const rateGridMax = 256

var rateGrids = &rateGridCache{m: map[*Cell]*rateGrid{}}

func (gc *rateGridCache) of(c *Cell) *rateGrid {
	gc.mu.Lock()
	defer gc.mu.Unlock()
	if g, ok := gc.m[c]; ok && g.in.same(c) {
		return g
	}
	if len(gc.m) >= rateGridMax {
		clear(gc.m)
	}
	iref := c.rateRef()
	in := inputsOf(c)
	in.res, in.rc, in.temp = slices.Clone(in.res), slices.Clone(in.rc), slices.Clone(in.temp)
	g := &rateGrid{in: in, cref: c.EndCharge(iref, RefTempC), x: iref / LightLoadSpan}
	gc.m[c] = g
	return g
}

// ColdFactor is the share of the charge the cold leaves at current i (A)
// and ambient tempC. The temperature table's capacity factor f is taken as
// the share at the reference current; the loss grows with the current,
// f^√(i/Iref), so a light load keeps more in the cold than a heavy one
// (common practice: cold mostly takes rate capability; the square root is
// our choice, not a published law). Above 1 (warm) f applies as it is.
func (c *Cell) ColdFactor(i, tempC float64) float64 {
	f, _ := c.TempFactors(tempC)
	iref := c.rateRef()
	if f >= 1 || iref <= 0 {
		return f
	}
	return math.Pow(f, math.Sqrt(math.Max(i, 0)/iref))
}

// resistanceTable is R0 at RefTempC at scaled charge qs, interpolated in
// the Resistance table and held at its ends.
func (c *Cell) resistanceTable(qs float64) float64 {
	r := c.Resistance
	if len(r) == 0 {
		return 0
	}
	d := qs / c.Curve.End()
	if d <= r[0].Depth {
		return r[0].Ohm
	}
	for i := 1; i < len(r); i++ {
		if d <= r[i].Depth {
			f := (d - r[i-1].Depth) / (r[i].Depth - r[i-1].Depth)
			return r[i-1].Ohm + f*(r[i].Ohm-r[i-1].Ohm)
		}
	}
	return r[len(r)-1].Ohm
}

// ResistanceAt is the instant series resistance R0 in ohms at scaled charge
// qs (mAh along the curve, delivered charge divided by CapacityFactor) and
// ambient tempC.
func (c *Cell) ResistanceAt(qs, tempC float64) float64 {
	_, fr := c.TempFactors(tempC)
	return c.resistanceTable(qs) * fr
}

// PolarisationOhms is ΣRᵢ of the RC branches at RefTempC.
func (c *Cell) PolarisationOhms() float64 {
	s := 0.0
	for _, b := range c.RC {
		s += b.R
	}
	return s
}

// SteadyResistance is what a constant current meets once every RC branch
// has settled: R0 + ΣRᵢ at scaled charge qs and ambient tempC.
func (c *Cell) SteadyResistance(qs, tempC float64) float64 {
	_, fr := c.TempFactors(tempC)
	return (c.resistanceTable(qs) + c.PolarisationOhms()) * fr
}

// OpenCircuit is the cell's open-circuit voltage E at scaled charge qs.
// The curve was taken under RefCurrent at RefTempC, settled, so E adds
// that current's steady sag back at RefTempC:
//
//	E = Vcurve(qs) + Iref·(R0(qs) + ΣRᵢ)   (resistances at RefTempC)
//
// E does not move with the ambient (tempC is unused): the reversible
// temperature coefficient of the chemistries here is well under 1 mV/K
// (from memory), which headroom leaves out; the cold acts through the
// resistances and ColdFactor.
func (c *Cell) OpenCircuit(qs, tempC float64) float64 {
	return c.Curve.At(qs) + c.RefCurrent*(c.resistanceTable(qs)+c.PolarisationOhms())
}

// Terminal is the cell's steady terminal voltage at scaled charge qs,
// constant current i (A, out of the cell) and ambient tempC, every RC
// branch settled (Thevenin: E − i·R0 − Σ i·Rᵢ):
//
//	V = E(qs) − i·(R0(qs, T) + ΣRᵢ(T))
//
// At RefCurrent and RefTempC it is the curve. It may be negative at
// absurd currents; callers cut off first.
func (c *Cell) Terminal(qs, i, tempC float64) float64 {
	return c.OpenCircuit(qs, tempC) - i*c.SteadyResistance(qs, tempC)
}

// EndCharge is the scaled charge at which the steady terminal voltage at
// constant current i and ambient tempC first reaches EndPoint: the sag's
// own rate effect. 0 when it starts below, the curve's end when it never
// gets there. Between the breakpoints of the curve and the resistance
// table the terminal voltage is linear in charge, so the crossing is
// found exactly.
func (c *Cell) EndCharge(i, tempC float64) float64 {
	end := c.Curve.End()
	g := func(q float64) float64 { return c.Terminal(q, i, tempC) - c.EndPoint }
	lo, glo := 0.0, g(0)
	if glo <= 0 {
		return 0
	}
	// Walk the curve's points and the resistance table's depths in
	// order of charge (both are sorted: a merge), stopping at the first
	// at or below the end-point; the crossing lies on the straight piece
	// before it.
	n, r := c.Curve.Len(), c.Resistance
	ci, ri := 0, 0
	for ci < n || ri < len(r) {
		var x float64
		cq := math.Inf(1)
		if ci < n {
			cq, _ = c.Curve.Point(ci)
		}
		if ri < len(r) && r[ri].Depth*end < cq {
			x = r[ri].Depth * end
			ri++
		} else {
			x = cq
			ci++
		}
		if x <= lo || x > end {
			continue
		}
		gx := g(x)
		if gx <= 0 {
			return lo + (x-lo)*glo/(glo-gx)
		}
		lo, glo = x, gx
	}
	return end
}

// IsPrimary reports whether the cell is single-use.
func (c *Cell) IsPrimary() bool { return !c.Rechargeable }
