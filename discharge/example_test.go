package discharge_test

import (
	"fmt"

	"headroom/curves"
	"headroom/discharge"
	"headroom/protect"
)

// A made-up cell whose voltage falls in a straight line from 1.5 V to
// 1.0 V over 1000 mAh, with no resistance, rate or temperature effects, so
// the answers can be worked by hand. Two in series at 100 mA into a load
// that needs 2.2 V: the pack reaches 2.2 V at 1.1 V a cell, 800 mAh in,
// after 8 h. The reference run to the 1.0 V end-point takes all 1000 mAh,
// so 200 mAh are stranded, all by the floor (there is no element). Behind
// a protector switch of 2 Ω (no supply current, and a resistance that
// does not change as it warms: tcr=0) the load loses
// 0.1 A × 2 Ω = 0.2 V, so the pack must stay above 2.4 V: 1.2 V a cell,
// reached at 600 mAh, after 6 h: 400 mAh are stranded in all.
func ExampleEvaluate() {
	cell := &curves.Cell{
		ID: "example", Name: "a made-up linear cell", Chemistry: "example",
		Curve:    curves.MustCurve([]float64{0, 1000}, []float64{1.5, 1.0}),
		NominalV: 1.25, RatedMAh: 1000, RatedCurrent: 0.1, EndPoint: 1.0, Peukert: 1,
	}
	d := discharge.Design{
		Cell: cell, Series: 2, Parallel: 1,
		Profile: []discharge.Phase{{Load: discharge.Load{Kind: discharge.ConstantCurrent, Amps: 0.1}, Seconds: 1}},
		Floor:   2.2, TempC: 25, // 25 °C: where parts' data are stated
	}
	r, err := discharge.Evaluate(&d)
	if err != nil {
		panic(err)
	}
	fmt.Printf("runtime %.2f h, stops on %s, delivered %.0f of %.0f mAh, stranded by the floor %.0f mAh\n",
		r.RuntimeH, r.CutoffCause, r.DeliveredMAh, r.ReferenceMAh, r.StrandedByFloorMAh)

	if d.Protect, err = protect.Parse("ic:ron=2,iq=0,tcr=0"); err != nil {
		panic(err)
	}
	r, err = discharge.Evaluate(&d)
	if err != nil {
		panic(err)
	}
	fmt.Printf("behind 2 Ω: runtime %.2f h, delivered %.0f mAh, stranded %.0f mAh\n", r.RuntimeH, r.DeliveredMAh, r.StrandedMAh)
	// Output:
	// runtime 8.00 h, stops on floor, delivered 800 of 1000 mAh, stranded by the floor 200 mAh
	// behind 2 Ω: runtime 6.00 h, delivered 600 mAh, stranded 400 mAh
}
