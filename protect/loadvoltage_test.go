package protect

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
)

// randomSpec is a kind with some of its parameters drawn over wide
// ranges: the limiter's sense resistor, PNP and divider, a FET's
// threshold, on-resistance and coefficients, the clamp's Zener.
func randomSpec(rng *rand.Rand, kind string) string {
	fet := fmt.Sprintf("vth=%.3g,ron=%.3g,rfix=%.3g,tcr=%.3g,tcvth=%.3g",
		0.3+1.5*rng.Float64(), 0.02+0.5*rng.Float64(), 0.001+0.01*rng.Float64(), 0.01*rng.Float64(), -0.005*rng.Float64())
	switch kind {
	case "pmos":
		return "pmos:" + fet
	case "pmos-clamp":
		return fmt.Sprintf("pmos-clamp:%s,vz=%.3g", fet, 2+6*rng.Float64())
	case "limiter":
		return fmt.Sprintf("limiter:%s,rsh=%.3g,vbe=%.3g,r1=%.3g,r2=%.3g", fet,
			0.1+3*rng.Float64(), 0.5+0.25*rng.Float64(), 1e5+2e6*rng.Float64(), 2e4+5e5*rng.Float64())
	}
	return kind
}

// The elements LoadVoltageFalls names must leave the load a voltage
// that never rises with the current along a source line: checked on a
// grid of 4000 currents from nothing to past where it runs out, for
// random parameters, sources (1 to 12 V behind 0 to 3 Ω) and
// temperatures (−30 to 150 °C), each element fixed there and not.
// Rounding is allowed 1e-12 of the source's voltage a step (the
// engine's use of the property, scanPower, is safe for far more). The
// IC, which it leaves out, is shown to break it, so that the check is
// seen to be able to fail.
func TestLoadVoltageFalls(t *testing.T) {
	rng := rand.New(rand.NewPCG(8, 21))
	for _, kind := range Kinds() {
		e0, err := Parse(kind)
		if err != nil {
			t.Fatal(err)
		}
		claims := LoadVoltageFalls(e0)
		rises := false
		for n := 0; n < 60; n++ {
			e, err := Parse(randomSpec(rng, kind))
			if err != nil {
				t.Fatal(err)
			}
			if kind == "ic" {
				e, _ = Parse(fmt.Sprintf("ic:vovp=%.3g", 2+4*rng.Float64()))
			}
			tc := -30 + 180*rng.Float64()
			if rng.IntN(2) == 0 {
				e = Fixed(e, tc)
			}
			E, R := 1+11*rng.Float64(), 3*rng.Float64()
			top := 2 * E / math.Max(R, 0.5)
			prev := math.Inf(1)
			for j := 0; j <= 4000; j++ {
				i := top * float64(j) / 4000
				vin := E - i*R
				v := vin - e.Drop(i, vin, tc)
				if v > prev+1e-12*E {
					rises = true
					if claims {
						t.Fatalf("%s at %.4g °C on %.4g V behind %.4g Ω: the load voltage rises from %v to %v at %v A",
							e.Spec(), tc, E, R, prev, v, i)
					}
					break
				}
				prev = v
			}
		}
		if !claims && !rises {
			t.Errorf("%s: LoadVoltageFalls leaves it out, but its load voltage never rose here", kind)
		}
	}
}
