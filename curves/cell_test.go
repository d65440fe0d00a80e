package curves

import (
	"math"
	"strings"
	"testing"
)

// testCell is a small invented cell for the formula checks.
func testCell() *Cell {
	return &Cell{
		ID: "t", Curve: MustCurve([]float64{0, 1000}, []float64{1.5, 1.0}),
		RefCurrent: 0.1, RatedMAh: 1000, RatedCurrent: 0.1, EndPoint: 1.0, NominalV: 1.25,
		Resistance:  []ResistancePoint{{0, 0.1}, {0.5, 0.2}, {1, 0.6}},
		Peukert:     1.2,
		Temperature: []TempPoint{{-20, 0.4, 4}, {20, 1, 1}, {40, 1.1, 0.8}},
	}
}

// TestCapacityFactorPeukert checks the worked example of Peukert's law
// (Peukert 1897, t = H·(C/(I·H))^k; docs/references.md): 100 Ah rated at H = 20 h,
// that is at 5 A. At 10 A it runs 8.7055 h with k = 1.2 and 9.3303 h with
// k = 1.1; at the rating current it runs H for every k. Tolerance 1e-4
// relative: the reference values are given to five significant digits.
func TestCapacityFactorPeukert(t *testing.T) {
	cases := []struct{ k, amps, hours float64 }{
		{1.2, 10, 8.7055},
		{1.1, 10, 9.3303},
		{1.2, 5, 20},
		{1.1, 5, 20},
	}
	for _, c := range cases {
		cell := &Cell{Curve: MustCurve([]float64{0, 100000}, []float64{2, 1.8}), RefCurrent: 5, RatedCurrent: 5, Peukert: c.k}
		hours := 100 * cell.CapacityFactor(c.amps, RefTempC) / c.amps
		if math.Abs(hours/c.hours-1) > 1e-4 {
			t.Errorf("k=%g I=%g A: %.5f h, want %.4f h", c.k, c.amps, hours, c.hours)
		}
	}
}

func TestCellFactors(t *testing.T) {
	c := testCell()
	// Hand-computed from testCell's tables; tolerance 1e-12 for a few ulps
	// of rounding in one or two interpolations.
	cases := []struct {
		name      string
		got, want float64
	}{
		{"capacity at 0 °C", first(c.TempFactors(0)), 0.7},    // halfway −20…20
		{"resistance at 0 °C", second(c.TempFactors(0)), 2.5}, // halfway 4…1
		{"capacity held below −20 °C", first(c.TempFactors(-40)), 0.4},
		{"resistance held above 40 °C", second(c.TempFactors(60)), 0.8},
		// A tenth of Iref gains what half of it gains (LightLoadSpan):
		// (0.1/0.05)^0.2. The sag alone moves no crossing here: the
		// curve ends on the end-point, so EndCharge is the curve's end at
		// both currents.
		{"light load gains one halving's worth", c.CapacityFactor(0.01, RefTempC), math.Pow(2, 0.2)},
		{"R at 25 % depth", c.ResistanceAt(250, RefTempC), 0.15},
		{"R at 75 % depth", c.ResistanceAt(750, RefTempC), 0.4},
		{"R at 75 % depth, 0 °C", c.ResistanceAt(750, 0), 1.0},
		// V = Vcurve(500) − (0.6 − 0.1)·R(500) = 1.25 − 0.5·0.2
		{"terminal at 0.6 A", c.Terminal(500, 0.6, RefTempC), 1.15},
		// At rest the voltage is above the curve by Iref·R: 1.25 + 0.1·0.2
		{"open circuit", c.OpenCircuit(500, RefTempC), 1.27},
		{"terminal at RefCurrent is the curve", c.Terminal(300, 0.1, RefTempC), c.Curve.At(300)},
		// In the cold the rest voltage stays and the sag grows: at 0 °C
		// R is 2.5× (0.16 Ω at 300 mAh → 0.4 Ω), so at Iref the
		// terminal is the curve less 0.1·(0.4 − 0.16).
		{"cold rest voltage unchanged", c.OpenCircuit(300, -20), c.OpenCircuit(300, RefTempC)},
		{"cold sag at RefCurrent", c.Terminal(300, 0.1, 0), c.Curve.At(300) - 0.1*(0.4-0.16)},
	}
	for _, k := range cases {
		if math.Abs(k.got-k.want) > 1e-12 {
			t.Errorf("%s: got %.15g, want %g", k.name, k.got, k.want)
		}
	}
}

func first(a, _ float64) float64  { return a }
func second(_, b float64) float64 { return b }

func TestCellValidateRejects(t *testing.T) {
	cases := []struct {
		name   string
		break_ func(*Cell)
		msg    string
	}{
		{"no curve", func(c *Cell) { c.Curve = nil }, "curve: missing"},
		{"negative ref current", func(c *Cell) { c.RefCurrent = -1 }, "ref_current"},
		{"zero rated", func(c *Cell) { c.RatedMAh = 0 }, "rated_mAh"},
		{"NaN end-point", func(c *Cell) { c.EndPoint = math.NaN() }, "end_point"},
		{"Peukert below 1", func(c *Cell) { c.Peukert = 0.9 }, "peukert"},
		{"self-discharge over 1", func(c *Cell) { c.SelfDischarge = 2 }, "self_discharge"},
		{"negative price", func(c *Cell) { c.Price = -1 }, "price"},
		{"rechargeable without cycles", func(c *Cell) { c.Rechargeable, c.ChargeEfficiency = true, 0.8 }, "cycle_life"},
		{"rechargeable without efficiency", func(c *Cell) { c.Rechargeable, c.CycleLife = true, 100 }, "charge_efficiency"},
		{"resistance depth order", func(c *Cell) { c.Resistance[2].Depth = 0.5 }, "resistance: point 3"},
		{"temperature order", func(c *Cell) { c.Temperature[1].Celsius = -30 }, "temperature: point 2"},
	}
	for _, k := range cases {
		c := testCell()
		if err := c.Validate(); err != nil {
			t.Fatalf("testCell invalid: %v", err)
		}
		k.break_(c)
		err := c.Validate()
		if err == nil || !strings.Contains(err.Error(), k.msg) {
			t.Errorf("%s: got %v, want an error containing %q", k.name, err, k.msg)
		}
	}
}
