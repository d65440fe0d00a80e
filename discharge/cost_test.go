package discharge

import (
	"math"
	"testing"
)

// Cost per hour of a rechargeable pack against a hand calculation (the
// model in cost.go; arithmetic ours). Linear rest curve 1.5 → 1.0 V over
// 1000 mAh rated, 100 cycles, charge efficiency 0.5, nominal 1.25 V; one
// cell, 100 mA constant current, floor 1.45 V: the run stops at
// (1.5 − 1.45)/0.5·1000 = 100 mAh, after 1 h.
//
//	life throughput = 100 cycles × 1000 mAh × (1 + 0.8)/2 = 90 000 mAh
//	hours over life = 90 000 mAh × 1 h / 100 mAh         = 900 h
//	pack + charger  = ($10 + $5) / 900 h                 = $0.016667/h
//	energy a charge = 0.1 Ah × 1.25 V / 0.5 = 0.25 Wh at $1/kWh = $0.00025, per 1 h
//	cost per hour   = $0.0169167
//
// (Counting a whole cycle per charge with no fade or charger gave
// $10/100 + $0.00025 = $0.10025.) The run is exact on a linear law, so
// 1e-9 relative is rounding headroom.
func TestRechargeableCostHandCalculation(t *testing.T) {
	c := linearCell(1.5, 1.0, 1000, 0)
	c.Rechargeable, c.CycleLife, c.ChargeEfficiency, c.NominalV = true, 100, 0.5, 1.25
	d := &Design{Cell: c, Series: 1, Parallel: 1, Floor: 1.45, TempC: 20,
		PackPrice: 10, ChargerPrice: 5, ElectricityPrice: 1,
		Profile: []Phase{{Load: Load{Kind: ConstantCurrent, Amps: 0.1}, Seconds: 1}}}
	r := mustEval(t, d)
	if relErr(r.RuntimeH, 1) > 1e-9 {
		t.Fatalf("runtime %.9g h, hand calculation 1 h", r.RuntimeH)
	}
	want := 15.0/900 + 0.00025
	if e := relErr(r.CostPerHour, want); e > 1e-9 {
		t.Errorf("cost per hour $%.9g, hand calculation $%.9g", r.CostPerHour, want)
	}
	// A charge half as deep wears the pack half as much: the pack's share
	// per hour stays the same, it does not double.
	d.Floor = 1.475 // 50 mAh, 0.5 h
	r2 := mustEval(t, d)
	if e := math.Abs(r2.CostPerHour - want); e > 1e-9 {
		t.Errorf("half-depth cost per hour $%.9g, want the same $%.9g", r2.CostPerHour, want)
	}
}
