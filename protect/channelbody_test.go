package protect

import (
	"math"
	"math/rand/v2"
	"testing"
)

// channelOrBody skips the body diode's logarithm where the channel's drop
// is below the diode's least possible drop (Shockley.dropFloor): its
// result must be channelDrop's with the diode worked out, to the bit, and
// the floor must never exceed the drop Drop computes. Random junctions
// over the fields' ranges, currents from nanoamperes to amperes, and
// channels drawn so that their drop lands near the diode's (the place
// where the comparison decides) as often as far below it. Exact equality
// is the requirement: the skip is an exact rewrite, not an approximation.
func TestChannelOrBodyIsChannelDrop(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 11))
	skipped := 0
	for n := 0; n < 200000; n++ {
		body := Shockley{Is: math.Pow(10, -14+rng.Float64()*13), N: 0.5 + 3.5*rng.Float64(), Rs: rng.Float64() * 2,
			Eg: 0.1 + 2.9*rng.Float64(), XTI: 10 * rng.Float64()}
		tc := -40 + 200*rng.Float64()
		fixed := body.At(tc)
		i := math.Pow(10, -9+rng.Float64()*10)
		diode := fixed.Drop(i, tc)
		if f := fixed.dropFloor(i, tc); !(f <= diode) || f < 0 {
			t.Fatalf("floor %v above the drop %v (%+v at %v A, %v °C)", f, diode, body, i, tc)
		}
		// A channel whose drop d = 2·ia/(b + sqrt(b² − 4c·ia)) is about
		// target: ia = target·(b − c·target).
		b := 0.1 + 10*rng.Float64()
		c := 0.5
		if rng.IntN(3) == 0 {
			c = -0.5
		}
		target := diode * []float64{1e-3, 0.5, 0.999999, 1, 1.000001, 2}[rng.IntN(6)]
		ia := math.Max(target*(b-c*target), 0)
		sat := 0.5 * b * b
		if rng.IntN(4) == 0 {
			sat = math.Inf(1)
		}
		for _, bb := range []float64{b, -b} {
			got := channelOrBody(ia, bb, c, sat, fixed, i, tc)
			want := channelDrop(ia, bb, c, sat, diode)
			if math.Float64bits(got) != math.Float64bits(want) {
				t.Fatalf("channelOrBody %v, channelDrop %v (ia %v, b %v, c %v, diode %v)", got, want, ia, bb, c, diode)
			}
			if bb > 0 && got < diode {
				skipped++
			}
		}
		// Unfixed, or at another temperature: no floor, the diode is
		// always worked out.
		if body.dropFloor(i, tc) != 0 || fixed.dropFloor(i, tc+1) != 0 {
			t.Fatal("a floor from terms not worked out at this temperature")
		}
	}
	if skipped < 10000 {
		t.Errorf("the channel was below the diode in only %d draws: the check hardly covers the skip", skipped)
	}
}

// A FET fixed at a temperature (AtTemp) gives At's parameters there to
// the bit, and elsewhere works them out afresh.
func TestFETAtCached(t *testing.T) {
	f := defaultFET()
	for _, tc := range []float64{-30, 20, 25, 85} {
		g, _ := f.atTemp(tc)
		for _, at := range []float64{tc, tc + 3} {
			if g.At(at) != f.At(at) {
				t.Errorf("fixed at %v °C, At(%v) %+v, want %+v", tc, at, g.At(at), f.At(at))
			}
		}
	}
}

// An element fixed again at another temperature (the engine fixes the
// element it was given at the ambient, then at each junction temperature
// it meets) gives the drops, and a limiter the clamp, of one fixed there
// directly, to the bit: the terms it keeps from the first fixing (a
// limiter's PNP) are the ones the second would work out.
func TestRefixedIsFixed(t *testing.T) {
	for _, spec := range append(Kinds(), "limiter:vbe=0.6", "pmos:vth=1.2") {
		e, err := Parse(spec)
		if err != nil {
			t.Fatal(err)
		}
		for _, a := range []float64{-10, 20} {
			for _, b := range []float64{20, 47.3, 120} {
				twice, once := Fixed(Fixed(e, a), b), Fixed(e, b)
				for _, i := range []float64{1e-4, 0.05, 0.3, 0.6, 2} {
					for _, vin := range []float64{1.1, 2.4, 3.2, 9} {
						if x, y := twice.Drop(i, vin, b), once.Drop(i, vin, b); math.Float64bits(x) != math.Float64bits(y) {
							t.Errorf("%s fixed at %v then %v °C: drop %v, fixed at %v once: %v", spec, a, b, x, b, y)
						}
					}
				}
				if c, ok := twice.(Clamper); ok {
					if x, y := c.ClampAt(2.9, b), once.(Clamper).ClampAt(2.9, b); x != y {
						t.Errorf("%s: clamp %v refixed, %v fixed once", spec, x, y)
					}
				}
			}
		}
	}
}
