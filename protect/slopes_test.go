package protect

import (
	"math"
	"math/rand/v2"
	"testing"
)

// DropSlopes against Drop: the same drop to the bit (the engine takes it
// in place of Drop), and partial derivatives that match central
// differences of Drop (steps of 1e-6 of the current and of the input;
// truncation and rounding well under the 1e-5 relative allowed, plus
// 1e-7 Ω absolute for a slope near zero). Random limiters, MOSFETs and
// clamped MOSFETs (randomSpec) at random temperatures, fixed or not, currents from 1 mA
// to 2 A and inputs from 1 to 12 V. A point whose difference straddles a
// corner of the law (a channel handing over to its body diode, the pass
// FET saturating) has no derivative: it shows as two differences of
// different steps disagreeing, and is skipped (counted: the check fails
// if more than a tenth were).
func TestDropSlopesMatchDifferences(t *testing.T) {
	rng := rand.New(rand.NewPCG(6, 28))
	checked, corners, sat, body := 0, 0, 0, 0
	for n := 0; n < 30000; n++ {
		kind := []string{"limiter", "pmos", "pmos-clamp"}[rng.IntN(3)]
		e, err := Parse(randomSpec(rng, kind))
		if err != nil {
			t.Fatal(err)
		}
		tc := -30 + 180*rng.Float64()
		if rng.IntN(2) == 0 {
			e = Fixed(e, tc)
		}
		s := e.(Sloped)
		i, vin := math.Pow(10, -3+rng.Float64()*2.3), 1+11*rng.Float64()
		d, di, dv := s.DropSlopes(i, vin, tc)
		if want := e.Drop(i, vin, tc); math.Float64bits(d) != math.Float64bits(want) {
			t.Fatalf("%s at %v A, %v V, %v °C: DropSlopes %v, Drop %v", e.Spec(), i, vin, tc, d, want)
		}
		diff := func(h, dh float64, f func(x float64) float64) float64 { return (f(h+dh) - f(h-dh)) / (2 * dh) }
		ni := diff(i, 1e-6*i, func(x float64) float64 { return e.Drop(x, vin, tc) })
		nv := diff(vin, 1e-6*vin, func(x float64) float64 { return e.Drop(i, x, tc) })
		ni2 := diff(i, 1e-5*i, func(x float64) float64 { return e.Drop(x, vin, tc) })
		nv2 := diff(vin, 1e-5*vin, func(x float64) float64 { return e.Drop(i, x, tc) })
		if math.Abs(ni-ni2) > 1e-3*math.Abs(ni)+1e-6 || math.Abs(nv-nv2) > 1e-3*math.Abs(nv)+1e-6 {
			corners++
			continue
		}
		checked++
		switch {
		case d >= vin:
			sat++
		case dv == 0:
			body++
		}
		if math.Abs(di-ni) > 1e-5*math.Abs(ni)+1e-7 || math.Abs(dv-nv) > 1e-5*math.Abs(nv)+1e-7 {
			t.Fatalf("%s at %v A, %v V, %v °C: slopes %v, %v; differences %v, %v", e.Spec(), i, vin, tc, di, dv, ni, nv)
		}
	}
	if sat < 500 || body < 300 {
		t.Errorf("%d points where the pass FET had saturated and %d with no slope by the input (the body diode, or the clamp holding): the check hardly covers them", sat, body)
	}
	if corners > 3000 {
		t.Errorf("%d of 30000 points skipped at corners: the check covers too little", corners)
	}
	t.Logf("%d points checked (%d saturated, %d with no slope by the input), %d at corners skipped", checked, sat, body, corners)
}
