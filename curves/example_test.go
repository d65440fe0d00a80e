package curves_test

import (
	"fmt"

	"headroom/curves"
)

// Look up a built-in cell and read its terminal voltage halfway through
// its rated charge, at its rating current and under a heavier load.
func ExampleLookup() {
	c, ok := curves.Lookup("lr6")
	if !ok {
		panic("no lr6")
	}
	half := c.RatedMAh / 2
	fmt.Printf("%s (%s): %g mAh to %g V at %g A\n", c.Name, c.Designation, c.RatedMAh, c.EndPoint, c.RatedCurrent)
	for _, amps := range []float64{c.RatedCurrent, 0.5} {
		qs := half / c.CapacityFactor(amps, curves.RefTempC)
		fmt.Printf("at %.0f mAh, %.1f A: %.3f V\n", half, amps, c.Terminal(qs, amps, curves.RefTempC))
	}
	// By hand: at 0.1 A the curve at 1200 mAh is 1.273 V. At 0.5 A
	// Peukert (k = 1.25) leaves (0.1/0.5)^0.25 = 0.669 of the charge; the
	// sag to 0.9 V already ends the run at EndCharge(0.5 A), so the
	// charge axis is stretched by what is left (curves.Cell.RateFactor).

	// Output:
	// alkaline AA (LR6): 2400 mAh to 0.9 V at 0.1 A
	// at 1200 mAh, 0.1 A: 1.273 V
	// at 1200 mAh, 0.5 A: 1.116 V
}

// Every built-in cell id, in library order.
func ExampleIDs() {
	fmt.Println(curves.IDs())
	// Output:
	// [lr6 lr03 lr14 lr20 6lr61 r6 fr6 cr2032 hr6 hr6-lsd hr03 li-ion-18650 li-ion-pouch lifepo4]
}
