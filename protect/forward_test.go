package protect

import (
	"math"
	"math/rand/v2"
	"testing"
)

// A junction's forward law worked out once (ForwardAt) gives Drop's
// value to the bit, whether the junction has its terms worked out at that
// temperature (At) or not: the engine's solves take it in place of Drop,
// and an exact rewrite must not move a result. Its Slope is the law's
// derivative n·Vt/(Is + i) + Rs, checked against a central difference of
// Drop (step 1e-6 of the current: truncation and rounding both well
// under the 1e-6 relative allowed).
func TestForwardIsDrop(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 17))
	for n := 0; n < 20000; n++ {
		s := Shockley{Is: math.Pow(10, -14+rng.Float64()*13), N: 0.5 + 3.5*rng.Float64(), Rs: rng.Float64() * 2,
			Eg: 0.1 + 2.9*rng.Float64(), XTI: 10 * rng.Float64()}
		tc := -40 + 200*rng.Float64()
		i := math.Pow(10, -9+rng.Float64()*10)
		for _, j := range []Shockley{s, s.At(tc), s.At(tc + 1)} {
			f := j.ForwardAt(tc)
			if got, want := f.Drop(i), j.Drop(i, tc); math.Float64bits(got) != math.Float64bits(want) {
				t.Fatalf("%+v at %v °C, %v A: Forward.Drop %v, Drop %v", s, tc, i, got, want)
			}
			if f.Drop(0) != 0 || f.Drop(-1) != 0 {
				t.Fatal("a drop at no current")
			}
		}
		h := 1e-6 * i
		f := s.ForwardAt(tc)
		num := (f.Drop(i+h) - f.Drop(i-h)) / (2 * h)
		if got := f.Slope(i); math.Abs(got-num) > 1e-6*got {
			t.Fatalf("%+v at %v °C, %v A: Slope %v, central difference %v", s, tc, i, got, num)
		}
	}
	d := DefaultDiode()
	if d.ForwardAt(20).Drop(0.1) != d.Drop(0.1, 3, 20) {
		t.Error("Diode.ForwardAt is not the diode's drop")
	}
}
