package units

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// The expected values are the SI prefix definitions (SI Brochure, 9th
// edition, 2019, table 7: n = 1e-9, µ = 1e-6, m = 1e-3, k = 1e3) and the
// usual unit conversions (1 min = 60 s, 1 h = 3600 s, 1 % = 0.01).
func TestParse(t *testing.T) {
	cases := []struct {
		in   string
		kind Kind
		bare bool
		want float64
	}{
		{"120mA", Current, false, 0.12},
		{"4.7uA", Current, false, 4.7e-6},
		{"4.7µA", Current, false, 4.7e-6}, // U+00B5 MICRO SIGN
		{"4.7μA", Current, false, 4.7e-6}, // U+03BC GREEK SMALL LETTER MU
		{"30uA", Current, false, 30e-6},
		{"2.5n", Current, true, 2.5e-9},
		{"2.5nA", Current, false, 2.5e-9},
		{"1e-3A", Current, false, 1e-3},
		{"33Ω", Resistance, false, 33},
		{"33ohm", Resistance, false, 33},
		{"33 ohm", Resistance, false, 33},
		{"4.7k", Resistance, true, 4700},
		{"4.7kohm", Resistance, false, 4700},
		{"4.7kΩ", Resistance, false, 4700},
		{"80m", Resistance, true, 0.08},
		{"0.8W", Power, false, 0.8},
		{"1.8V", Voltage, false, 1.8},
		{"1.8", Voltage, true, 1.8},
		{" 1.8V ", Voltage, false, 1.8},
		{"-10C", Temperature, false, -10},
		{"-10°C", Temperature, false, -10},
		{"-10", Temperature, true, -10},
		{"85%", Fraction, false, 0.85},
		{"90min", Time, false, 5400},
		{"1.5h", Time, false, 5400},
		{"3s", Time, false, 3},
		{"250ms", Time, false, 0.25},
		{"2400mAh", Charge, false, 2.4},
		{"2.4Ah", Charge, false, 2.4},
		{"$1.10", Money, false, 1.1},
		{"1.10", Money, true, 1.1},
	}
	for _, c := range cases {
		got, err := Parse(c.in, c.kind, c.bare)
		if err != nil {
			t.Errorf("Parse(%q, %v, %v): %v", c.in, c.kind, c.bare, err)
			continue
		}
		// Parsing is decimal; 1e-12 relative leaves room only for the last
		// bits of a prefix product, far below any figure headroom shows.
		if math.Abs(got-c.want) > 1e-12*math.Abs(c.want) {
			t.Errorf("Parse(%q, %v, %v) = %v, want %v", c.in, c.kind, c.bare, got, c.want)
		}
	}
}

// Wrong kinds, missing units, text that is not a finite number and empty
// values are errors that say what was expected.
func TestParseErrors(t *testing.T) {
	cases := []struct {
		in   string
		kind Kind
		bare bool
		want string // substring of the message
	}{
		{"3mA", Voltage, true, `"3mA" is a current (A), expected a voltage (V)`},
		{"1.8V", Current, true, `"1.8V" is a voltage (V), expected a current (A)`},
		{"33ohm", Current, true, "is a resistance (ohm), expected a current (A)"},
		{"85%", Voltage, true, "is a percentage (%), expected a voltage (V)"},
		{"3s", Current, true, "is a time"},
		{"20C", Voltage, true, "is a temperature"},
		{"1.8", Voltage, false, `"1.8" has no unit: expected a voltage (V)`},
		{"4.7k", Resistance, false, "has no unit"},
		{"4.7k", Temperature, true, "has no unit"},
		{"10mC", Temperature, false, "unknown unit"},
		{"12xyz", Voltage, false, `unknown unit "xyz"`},
		{"NaN", Voltage, true, "not a number"},
		{"nan V", Voltage, true, "not a number"},
		{"Inf", Voltage, true, "not a number"},
		{"+Inf", Voltage, true, "not a number"},
		{"-inf", Current, true, "not a number"},
		{"1e999V", Voltage, false, "not"},
		{"V", Voltage, false, "not a number"},
		{"abc", Voltage, true, "not a number"},
	}
	for _, c := range cases {
		v, err := Parse(c.in, c.kind, c.bare)
		if err == nil {
			t.Errorf("Parse(%q, %v, %v) = %v, want an error containing %q", c.in, c.kind, c.bare, v, c.want)
			continue
		}
		if !strings.Contains(err.Error(), c.want) {
			t.Errorf("Parse(%q, %v, %v): error %q, want it to contain %q", c.in, c.kind, c.bare, err, c.want)
		}
	}
	for _, in := range []string{"", "   ", "\t"} {
		if _, err := Parse(in, Voltage, true); !errors.Is(err, ErrEmpty) {
			t.Errorf("Parse(%q): error %v, want ErrEmpty", in, err)
		}
	}
}

// Format promises that Parse reads its text back to the same float64.
func TestFormatRoundTrip(t *testing.T) {
	cases := []struct {
		v    float64
		kind Kind
	}{
		{0.12, Current}, {2.5e-9, Current}, {1.8, Voltage}, {33, Resistance},
		{0.85, Fraction}, {0.1, Fraction}, {5400, Time}, {-10, Temperature},
		{1.1, Money}, {2.4, Charge}, {0.8, Power}, {1.0 / 3, Voltage},
	}
	for _, c := range cases {
		s := Format(c.v, c.kind)
		back, err := Parse(s, c.kind, false)
		// Exact: the round trip is Format's documented contract.
		if err != nil || back != c.v {
			t.Errorf("Parse(Format(%v)) = Parse(%q) = %v, %v; want %v exactly", c.v, s, back, err, c.v)
		}
	}
}

func TestHuman(t *testing.T) {
	cases := []struct {
		v    float64
		kind Kind
		want string
	}{
		{0.12, Current, "120 mA"},
		{30e-6, Current, "30.0 µA"},
		{47000, Resistance, "47.0 kΩ"},
		{1.8, Voltage, "1.80 V"},
		{0.85, Fraction, "85.0 %"},
		{math.NaN(), Voltage, "—"},
		{math.Inf(1), Current, "—"},
	}
	for _, c := range cases {
		if got := Human(c.v, c.kind, 3); got != c.want {
			t.Errorf("Human(%v, %v, 3) = %q, want %q", c.v, c.kind, got, c.want)
		}
	}
}

// A prefix that makes no sense for the kind is refused (M on a current
// once ran 0.0001MA at 100 A); the sensible ones still parse.
func TestPrefixSense(t *testing.T) {
	bad := []struct {
		s    string
		kind Kind
		bare bool
	}{
		{"0.0001MA", Current, false}, {"1kA", Current, false}, {"2GA", Current, false}, {"4.7k", Current, true},
		{"1MV", Voltage, false}, {"1GW", Power, false}, {"1MW", Power, false},
		{"1Ms", Time, false}, {"1ks", Time, false}, {"3kAh", Charge, false}, {"1MAh", Charge, false},
	}
	for _, c := range bad {
		if _, err := Parse(c.s, c.kind, c.bare); err == nil || !strings.Contains(err.Error(), "makes no sense") {
			t.Errorf("Parse(%q, %v): %v, want the prefix refused", c.s, c.kind, err)
		}
	}
	good := []struct {
		s    string
		kind Kind
		want float64
	}{
		{"10mA", Current, 0.01}, {"30uA", Current, 30e-6}, {"30µA", Current, 30e-6}, {"5pA", Current, 5e-12},
		{"4.7Mohm", Resistance, 4.7e6}, {"1Gohm", Resistance, 1e9}, {"1kV", Voltage, 1000}, {"500mW", Power, 0.5},
		{"20ms", Time, 0.02}, {"2min", Time, 120}, {"2500mAh", Charge, 2.5}, {"800uAh", Charge, 800e-6},
	}
	for _, c := range good {
		// Tolerance: one part in 1e12, float rounding of the decimal scaling.
		if v, err := Parse(c.s, c.kind, false); err != nil || math.Abs(v-c.want) > 1e-12*math.Abs(c.want) {
			t.Errorf("Parse(%q): %v %v, want %v", c.s, v, err, c.want)
		}
	}
}
