package protect

import (
	"math"
	"testing"
)

// Fixed must not change any result, only the cost of Drop: the cached
// temperature terms are the same formulas, so the drops agree to rounding
// (1e-15 relative), and at another temperature the cache is not used.
func TestFixedChangesNothing(t *testing.T) {
	for _, spec := range []string{"diode", "schottky", "pmos:vth=1.2", "pmos-clamp", "limiter", "none", "ic"} {
		e, err := Parse(spec)
		if err != nil {
			t.Fatal(err)
		}
		for _, tc := range []float64{-20, 20, 27, 60} {
			f := Fixed(e, tc)
			if f.Spec() != e.Spec() {
				t.Fatalf("%s: Fixed changed the spec to %s", spec, f.Spec())
			}
			for _, other := range []float64{tc, tc + 5} {
				for _, i := range []float64{1e-6, 1e-3, 0.1, 0.45, 2} {
					for _, vin := range []float64{1.2, 1.9, 3.1, 6} {
						a, b := e.Drop(i, vin, other), f.Drop(i, vin, other)
						if math.Abs(a-b) > 1e-15*math.Max(1, math.Abs(a)) {
							t.Errorf("%s fixed at %v °C, drop at %v °C, %v A, %v V: %v vs %v", spec, tc, other, i, vin, b, a)
						}
					}
				}
			}
		}
	}
}
