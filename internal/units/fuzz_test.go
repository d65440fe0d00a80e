package units

import (
	"math"
	"testing"
)

// allKinds lists every Kind, so the fuzzer can pick one from a byte.
var allKinds = []Kind{Voltage, Current, Power, Resistance, Time, Fraction, Temperature, Charge, Money}

// FuzzParse checks that Parse either rejects its input or returns a finite
// value that Format writes and Parse reads back to the same float64
// (Format's documented contract), for every kind, with and without bare
// numbers allowed.
func FuzzParse(f *testing.F) {
	for _, s := range []string{
		"120mA", "0.8W", "33ohm", "33Ω", "4.7k", "2.5n", "3s", "85%", "-10C", "2.4Ah", "250mAh",
		"1.5min", "2h", "$1.10", "1.10", "20°C", "20 degC", "7%", "0.07", "12.5%", "33.3%",
		"0.3mA", "1e-3V", "1E3", "-0V", "+5V", "1.5e3mA",
		// nasty
		"", " ", "NaN", "Inf", "-Inf", "nanV", "infV", "1e400V", "1e-400V", "1e308kV", "..V", "1.2.3V",
		"0x10V", "1_000V", "µ", "5µ", "5μA", "5 m A", "mV", "1e", "1e+", "V", "%", "$", "$$1", "1eV",
		"\x00", "\xff\xfe", "1\u00a0V", "1,5V", "99999999999999999999999999999999V",
	} {
		for k := range allKinds {
			f.Add(s, uint8(k), k%2 == 0)
		}
	}
	f.Fuzz(func(t *testing.T, s string, kb uint8, bare bool) {
		k := allKinds[int(kb)%len(allKinds)]
		v, err := Parse(s, k, bare)
		if err != nil {
			if v != 0 {
				t.Errorf("Parse(%q, %v) = %v with error %v; want 0 with an error", s, k, v, err)
			}
			return
		}
		if math.IsNaN(v) || math.IsInf(v, 0) {
			t.Fatalf("Parse(%q, %v) = %v: not finite", s, k, v)
		}
		out := Format(v, k)
		back, err := Parse(out, k, false)
		if err != nil {
			t.Fatalf("Parse(%q) = %v, Format gives %q which does not parse: %v", s, v, out, err)
		}
		// Exact equality: Format promises the shortest decimal that
		// round-trips, so there is no tolerance to allow.
		if back != v {
			t.Fatalf("Parse(%q, %v) = %v; Format = %q; parsed back %v", s, k, v, out, back)
		}
	})
}

// FuzzFormat checks the other direction over every finite float64: Format
// writes text that Parse reads back to exactly the same value, and Human
// never prints NaN or Inf.
func FuzzFormat(f *testing.F) {
	for _, v := range []float64{0, 1, -1, 0.07, 0.12, 1.1, 1e-300, 5e-324, math.MaxFloat64, -math.MaxFloat64,
		math.SmallestNonzeroFloat64, 0.1 + 0.2, 1.0 / 3, 123456789.123, 2.2250738585072014e-308} {
		for k := range allKinds {
			f.Add(v, uint8(k))
		}
	}
	f.Fuzz(func(t *testing.T, v float64, kb uint8) {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return // not a value headroom holds; Human's dash is checked below
		}
		k := allKinds[int(kb)%len(allKinds)]
		out := Format(v, k)
		back, err := Parse(out, k, false)
		if err != nil {
			// Percent writes v·100, which can overflow for |v| near
			// MaxFloat64; Parse must then say so rather than
			// return a wrong value.
			if k == Fraction && math.Abs(v) > math.MaxFloat64/100 {
				return
			}
			t.Fatalf("Format(%v, %v) = %q does not parse: %v", v, k, out, err)
		}
		if back != v {
			t.Fatalf("Format(%v, %v) = %q parses back to %v", v, k, out, back)
		}
		h := Human(v, k, 3)
		if h == "" || containsAny(h, "NaN", "Inf") {
			t.Fatalf("Human(%v, %v) = %q", v, k, h)
		}
	})
}

func containsAny(s string, subs ...string) bool {
	for _, x := range subs {
		for i := 0; i+len(x) <= len(s); i++ {
			if s[i:i+len(x)] == x {
				return true
			}
		}
	}
	return false
}
