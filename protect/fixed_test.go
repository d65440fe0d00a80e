package protect

import (
	"math"
	"testing"
)

// Fixed must not change any result, only the cost of Drop. Every kind is
// covered (Kinds, so a new kind is too). An element with no temperature
// terms to cache (no AtTemp) must come back as it was; for the others the
// cached terms are the same formulas, so the drops agree to rounding
// (1e-15 relative) at the fixed temperature, and at another temperature
// the cache must not be used — which only proves something where the drop
// does move with temperature, so that is checked first.
func TestFixedChangesNothing(t *testing.T) {
	specs := append(Kinds(), "pmos:vth=1.2") // a FET whose channel runs out of gate drive
	for _, spec := range specs {
		e, err := Parse(spec)
		if err != nil {
			t.Fatal(err)
		}
		_, caches := e.(AtTemp)
		for _, tc := range []float64{-20, 20, 27, 60} {
			f := Fixed(e, tc)
			if !caches {
				if f != e {
					t.Errorf("%s: Fixed changed an element with nothing to cache", spec)
				}
				continue
			}
			if f.Spec() != e.Spec() {
				t.Fatalf("%s: Fixed changed the spec to %s", spec, f.Spec())
			}
			moves := false
			for _, other := range []float64{tc, tc + 5} {
				for _, i := range []float64{1e-6, 1e-3, 0.1, 0.45, 2} {
					for _, vin := range []float64{1.2, 1.9, 3.1, 6} {
						a, b := e.Drop(i, vin, other), f.Drop(i, vin, other)
						if math.Abs(a-b) > 1e-15*math.Max(1, math.Abs(a)) {
							t.Errorf("%s fixed at %v °C, drop at %v °C, %v A, %v V: %v vs %v", spec, tc, other, i, vin, b, a)
						}
						if other != tc && math.Abs(a-e.Drop(i, vin, tc)) > 1e-9 {
							moves = true
						}
					}
				}
			}
			if !moves {
				t.Errorf("%s: the drop does not move over 5 °C anywhere, so the check at another temperature proves nothing", spec)
			}
		}
	}
}
