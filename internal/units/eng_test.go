package units

import (
	"math"
	"testing"
)

// The formatter's awkward values. Expected strings are written by hand
// from the rules in eng.go (SI prefixes from the SI brochure, BIPM 2019,
// §3; rounding half away from zero on the decimal value as written).
func TestEngAwkwardValues(t *testing.T) {
	negZero := math.Copysign(0, -1)
	cases := []struct {
		v    float64
		k    Kind
		sig  int
		want string
	}{
		{1e-15, Current, 3, "1.00 fA"},
		{2.9e-14, Current, 3, "29.0 fA"},
		{2.8e-10, Current, 2, "280 pA"},
		{1e-18, Current, 3, "0 A"}, // below the smallest prefix
		{1e-12, Current, 3, "1.00 pA"},
		{1e-9, Current, 3, "1.00 nA"},
		{30e-6, Current, 3, "30.0 µA"},
		{-5e-6, Current, 3, "-5.00 µA"},
		{0.12, Current, 3, "120 mA"},
		{0.99995, Current, 4, "1.000 A"},    // rounds up into the next prefix
		{0.9999499, Current, 4, "999.9 mA"}, // and just below, does not
		{999.95, Voltage, 4, "1.000 kV"},
		{999.95e-3, Voltage, 3, "1.00 V"},
		{47000, Resistance, 3, "47.0 kΩ"},
		{1e9, Power, 3, "1.00 GW"},
		{3.2e12, Power, 3, "3200 GW"}, // beyond the largest prefix: whole digits
		{0, Voltage, 3, "0 V"},
		{negZero, Voltage, 3, "0 V"},
		{-1e-20, Voltage, 3, "0 V"}, // no "-0"
		{0.85, Fraction, 3, "85.0 %"},
		{1e-15, Fraction, 3, "0 %"},
		{negZero, Temperature, 3, "0 °C"},
		{-10, Temperature, 3, "-10.0 °C"},
		{58.92, Temperature, 3, "58.9 °C"},
		{math.NaN(), Voltage, 3, "—"},
		{math.Inf(-1), Current, 3, "—"},
		{90, Time, 2, "1.5 min"},
		{0.5, Time, 2, "500 ms"},
	}
	for _, c := range cases {
		if got := Eng(c.v, c.k, c.sig); got != c.want {
			t.Errorf("Eng(%g, %v, %d) = %q, want %q", c.v, c.k, c.sig, got, c.want)
		}
	}
}

func TestNumMAhDollarsDuration(t *testing.T) {
	negZero := math.Copysign(0, -1)
	for _, c := range []struct{ got, want string }{
		{Num(1848.42, 3), "1848"},
		{Num(60565.4, 3), "60565"},
		{Num(6.2009, 3), "6.20"},
		{Num(0.99996, 3), "1.00"},
		{Num(999.95, 4), "1000"}, // whole digits kept, rounded half up
		{Num(1e-15, 3), "0"},
		{Num(negZero, 3), "0"},
		{Num(-1e-12, 3), "0"},
		{Num(1e9, 3), "1000000000"},
		{Num(2.5e-5, 2), "0.000025"},
		{MAh(1848.42, 3), "1848 mAh"},
		{MAh(55.04, 3), "55.0 mAh"},
		{MAh(1e-12, 3), "1.00 fAh"}, // 1e-15 Ah
		{MAh(1e-20, 3), "0 Ah"},
		{MAh(13000, 3), "13000 mAh"},
		{MAh(130000, 3), "130 Ah"},
		{MAh(negZero, 3), "0 mAh"},
		{MAh(-300, 3), "-300 mAh"},
		{Dollars(0.161266), "$0.16"},
		{Dollars(0.0698), "$0.070"},
		{Dollars(0.00014), "$0.00014"},
		{Dollars(1e-9), "< $0.000001"},
		{Dollars(negZero), "$0"},
		{Dollars(-1), "-$1.00"},
		{Dollars(-0.05), "-$0.050"},
		{Dollars(1e9), "$1000000000.00"},
		{Duration(6.2009, 3), "6.20 h"},
		// A 5 ms radio burst was written "0.00500 s"; under a second
		// takes an SI prefix (BIPM 2019 §3), at one second plain seconds.
		{Duration(0.005/3600, 3), "5.00 ms"},
		{Duration(0.995/3600, 3), "995 ms"},
		{Duration(1.0/3600, 3), "1.00 s"},
		{Duration(0.75, 2), "45 min"},
		{Duration(2768, 3), "115 days"},
		{Duration(60565, 3), "6.91 years"},
		{Duration(24*500, 2), "16 months"},
		{Duration(1e-6, 2), "3.6 ms"},
		{Duration(negZero, 3), "0 h"},
		{Short(1.8, 4), "1.8"},
		{Short(20, 4), "20"},
		{Short(-0.5, 4), "-0.5"},
		{Short(2.5e-5, 4), "0.000025"},
		{Short(negZero, 4), "0"},
	} {
		if c.got != c.want {
			t.Errorf("got %q, want %q", c.got, c.want)
		}
	}
}

// Just under the smallest prefix, at every precision (this once recursed).
func TestEngBelowFemto(t *testing.T) {
	for sig := 1; sig <= 4; sig++ {
		if got := Eng(6e-16, Current, sig); got == "" || got == "0 A" {
			t.Errorf("Eng(6e-16, A, %d) = %q: want a fraction of a fA", sig, got)
		}
	}
	if got := Eng(6e-16, Current, 3); got != "0.600 fA" {
		t.Errorf("Eng(6e-16, A, 3) = %q, want 0.600 fA", got)
	}
}

// TrimZeros drops only zeros after a decimal point; expected strings
// written by hand.
func TestTrimZeros(t *testing.T) {
	for in, want := range map[string]string{
		"1.20 W at 85.0 %": "1.2 W at 85 %",
		"3.00 s":           "3 s",
		"100 mA":           "100 mA",
		"10.2 h":           "10.2 h",
		"2.50 V, 40.0 Ω":   "2.5 V, 40 Ω",
		"0.00 V":           "0 V",
	} {
		if got := TrimZeros(in); got != want {
			t.Errorf("TrimZeros(%q) = %q, want %q", in, got, want)
		}
	}
}
