// Package units parses and formats engineering quantities with SI prefixes:
// "120mA", "0.8W", "33ohm", "33Ω", "4.7k", "2.5n", "3s", "85%", "-10C".
//
// A value is returned in its base unit (volts, amperes, watts, ohms, seconds,
// a fraction for percent, degrees Celsius, ampere-hours for charge). A bare
// number with no unit is accepted only when the caller says it is
// unambiguous (see Parse's bare argument); a unit of the wrong kind is an
// error that names what was expected.
package units

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
	"unicode/utf8"
)

// Kind is the physical kind of a quantity.
type Kind int

const (
	Voltage Kind = iota
	Current
	Power
	Resistance
	Time
	Fraction
	Temperature
	Charge
	Money
)

var kindNames = [...]string{"a voltage (V)", "a current (A)", "a power (W)", "a resistance (ohm)", "a time (s, min, h)", "a percentage (%)", "a temperature (C)", "a charge (mAh, Ah)", "a price ($)"}

func (k Kind) String() string {
	if int(k) < 0 || int(k) >= len(kindNames) {
		return "a quantity"
	}
	return kindNames[k]
}

// symbols maps each unit spelling to its kind and the factor to the base unit.
var symbols = []struct {
	sym    string
	kind   Kind
	factor float64
}{
	// Longest spellings first so "mAh" is not read as "m" + "Ah" wrongly and
	// "min" is not read as milli-"in".
	{"ohms", Resistance, 1}, {"ohm", Resistance, 1}, {"Ω", Resistance, 1}, {"Ohm", Resistance, 1}, {"R", Resistance, 1},
	{"mAh", Charge, 1e-3}, {"Ah", Charge, 1},
	{"min", Time, 60}, {"h", Time, 3600}, {"s", Time, 1},
	{"°C", Temperature, 1}, {"degC", Temperature, 1}, {"C", Temperature, 1},
	{"V", Voltage, 1}, {"A", Current, 1}, {"W", Power, 1},
	{"%", Fraction, 0.01},
	{"$", Money, 1},
}

var prefixes = map[string]float64{
	"p": 1e-12, "n": 1e-9, "u": 1e-6, "µ": 1e-6, "μ": 1e-6, "m": 1e-3,
	"k": 1e3, "M": 1e6, "G": 1e9,
}

// sensible lists the SI prefixes each kind takes. A prefix outside its
// list is a typo ("0.0001MA" for 100 µA ran at 100 A): headroom's cells
// and loads run from picoamps to amperes, millivolts to kilovolts,
// microwatts to a kilowatt and microamp-hours to ampere-hours; resistance
// takes them all.
var sensible = map[Kind][]string{
	Voltage:    {"n", "u", "m", "k"},
	Current:    {"p", "n", "u", "m"},
	Power:      {"p", "n", "u", "m", "k"},
	Resistance: {"p", "n", "u", "m", "k", "M", "G"},
	Time:       {"p", "n", "u", "m"},
	Charge:     {"u", "m"},
}

// prefixSense reports the SI prefix that starts tail (a unit with its
// prefix, or a prefix alone) and whether kind takes it. A tail that is a
// whole unit symbol ("mAh", "min") has no prefix.
func prefixSense(tail string, kind Kind) (string, bool) {
	for _, u := range symbols {
		if tail == u.sym {
			return "", true
		}
	}
	r, _ := utf8.DecodeRuneInString(tail)
	pre := string(r)
	if _, ok := prefixes[pre]; !ok {
		return "", true
	}
	if pre == "µ" || pre == "μ" {
		pre = "u"
	}
	for _, p := range sensible[kind] {
		if p == pre {
			return pre, true
		}
	}
	return string(r), false
}

// ErrEmpty is returned for an empty or blank value.
var ErrEmpty = errors.New("empty value")

// Parse reads s as a quantity of kind want and returns it in the base unit.
// When bare is true a number without a unit symbol (but perhaps with an SI
// prefix, as in "4.7k" or "10n") is taken in the base unit; otherwise the
// unit symbol is required. Temperatures and money take no SI prefix.
func Parse(s string, want Kind, bare bool) (float64, error) {
	t := strings.TrimSpace(s)
	if t == "" {
		return 0, ErrEmpty
	}
	dollar := false
	if want == Money {
		t, dollar = strings.CutPrefix(t, "$")
	}
	// Split the numeric head from the unit tail.
	end := numberEnd(t)
	if end == 0 {
		return 0, fmt.Errorf("%q is not a number", s)
	}
	num, tail := t[:end], strings.TrimSpace(t[end:])
	v, err := strconv.ParseFloat(num, 64)
	if err != nil && !(errors.Is(err, strconv.ErrRange) && math.IsInf(v, 0)) {
		return 0, fmt.Errorf("%q is not a number", s)
	}
	// An overflowing number may still fit once scaled ("2e308%" is
	// 2e306, which Format writes that way); scaled decides below.
	if tail == "" {
		if !bare && !dollar {
			return 0, fmt.Errorf("%q has no unit: expected %s", s, want)
		}
		if math.IsInf(v, 0) {
			return 0, fmt.Errorf("%q is not a finite number", s)
		}
		return v, nil
	}
	scale, kind, ok := splitUnit(tail)
	if !ok || dollar {
		return 0, fmt.Errorf("%q: unknown unit %q, expected %s", s, tail, want)
	}
	if kind == -1 { // a prefix alone, e.g. "4.7k"
		if !bare || want == Temperature || want == Money || want == Fraction {
			return 0, fmt.Errorf("%q has no unit: expected %s", s, want)
		}
		kind = want
	}
	if kind != want {
		return 0, fmt.Errorf("%q is %s, expected %s", s, kind, want)
	}
	if pre, ok := prefixSense(tail, kind); !ok {
		return 0, fmt.Errorf("%q: the prefix %s (×%g) makes no sense for %s: use %s or none", s, pre, prefixes[pre], kind, strings.Join(sensible[kind], ", "))
	}
	r := scaled(num, v, scale)
	if math.IsInf(r, 0) {
		return 0, fmt.Errorf("%q is not a finite number", s)
	}
	return r, nil
}

// scaled returns v·scale. When scale is a power of ten the product is
// computed in decimal, by moving the exponent of the text num, so that
// "85%" is exactly 0.85 and "120mA" exactly 0.12, the float64 nearest the
// decimal value; v·0.01 would round twice.
func scaled(num string, v, scale float64) float64 {
	for k := -15; k <= 15; k++ {
		if scale != math.Pow10(k) {
			continue
		}
		mant, exp := num, 0
		if i := strings.IndexAny(num, "eE"); i >= 0 {
			e, err := strconv.Atoi(num[i+1:])
			if err != nil {
				break
			}
			mant, exp = num[:i], e
		}
		r, err := strconv.ParseFloat(mant+"e"+strconv.Itoa(exp+k), 64)
		if err != nil && !math.IsInf(r, 0) {
			break
		}
		return r
	}
	return v * scale
}

// numberEnd returns the length of the leading decimal number in s.
func numberEnd(s string) int {
	i := 0
	if i < len(s) && (s[i] == '+' || s[i] == '-') {
		i++
	}
	digits := 0
	for i < len(s) && (s[i] >= '0' && s[i] <= '9' || s[i] == '.') {
		if s[i] != '.' {
			digits++
		}
		i++
	}
	if digits == 0 {
		return 0
	}
	// Exponent: e or E followed by an optional sign and at least one digit.
	if i < len(s) && (s[i] == 'e' || s[i] == 'E') {
		j := i + 1
		if j < len(s) && (s[j] == '+' || s[j] == '-') {
			j++
		}
		k := j
		for k < len(s) && s[k] >= '0' && s[k] <= '9' {
			k++
		}
		if k > j {
			i = k
		}
	}
	return i
}

// splitUnit reads an optional SI prefix and a unit symbol. kind is -1 for a
// prefix with no symbol.
func splitUnit(tail string) (scale float64, kind Kind, ok bool) {
	for _, u := range symbols {
		if tail == u.sym {
			return u.factor, u.kind, true
		}
	}
	r, size := utf8.DecodeRuneInString(tail)
	p, isPrefix := prefixes[string(r)]
	if !isPrefix {
		return 0, 0, false
	}
	rest := tail[size:]
	if rest == "" {
		return p, -1, true
	}
	for _, u := range symbols {
		if rest == u.sym && u.kind != Temperature && u.kind != Money && u.kind != Fraction && u.kind != Time {
			return p * u.factor, u.kind, true
		}
		if rest == u.sym && u.kind == Time && u.sym == "s" {
			return p * u.factor, u.kind, true // ms, µs
		}
	}
	return 0, 0, false
}

var baseSymbol = [...]string{"V", "A", "W", "ohm", "s", "%", "C", "Ah", "$"}

// Format writes v (in the base unit of k) so that Parse(Format(v,k), k, false)
// returns v exactly: the shortest decimal that round-trips, with an SI
// prefix for volts, amperes, watts, ohms and ampere-hours so that it reads
// as an engineer writes it ("30uA", not "3e-05A"; Parse moves the decimal
// exponent, so the prefix loses nothing).
func Format(v float64, k Kind) string {
	switch k {
	case Voltage, Current, Power, Resistance, Charge:
		if v == 0 {
			return "0" + baseSymbol[k] // also −0
		}
		if !math.IsNaN(v) && !math.IsInf(v, 0) {
			neg := v < 0
			mant, e, _ := strings.Cut(strconv.FormatFloat(math.Abs(v), 'e', -1, 64), "e")
			exp, _ := strconv.Atoi(e)
			// Only the prefixes the kind takes (sensible), so that Parse
			// reads the text back.
			lo, hi := 0, 0
			for _, p := range sensible[k] {
				e := int(math.Round(math.Log10(prefixes[p])))
				lo, hi = min(lo, e), max(hi, e)
			}
			e3 := min(max(int(math.Floor(float64(exp)/3))*3, lo), hi)
			pre := map[int]string{-12: "p", -9: "n", -6: "u", -3: "m", 0: "", 3: "k", 6: "M", 9: "G"}[e3]
			return place(neg, strings.Replace(mant, ".", "", 1), exp-e3) + pre + baseSymbol[k]
		}
	}
	switch k {
	case Fraction:
		// v·100 rounds; when its shortest text does not read back as v
		// (or overflows), write v's own digits with the exponent moved
		// by two, which Parse reads exactly.
		s := strconv.FormatFloat(v*100, 'g', -1, 64) + "%"
		if back, err := Parse(s, Fraction, false); err == nil && back == v {
			return s
		}
		mant, exp, _ := strings.Cut(strconv.FormatFloat(v, 'e', -1, 64), "e")
		e, _ := strconv.Atoi(exp)
		return mant + "e" + strconv.Itoa(e+2) + "%"
	case Money:
		return "$" + strconv.FormatFloat(v, 'g', -1, 64)
	}
	return strconv.FormatFloat(v, 'g', -1, 64) + baseSymbol[k]
}

// Human writes v with an engineering prefix and about sig significant
// digits, for people: 0.12 A → "120 mA", 47000 ohm → "47.0 kΩ". It is Eng,
// the one formatter (eng.go).
func Human(v float64, k Kind, sig int) string { return Eng(v, k, sig) }

// Raw is a quantity read from a file before its kind is known: either a
// number or a string with units. It decodes from TOML numbers and strings.
type Raw struct {
	num   float64
	text  string
	isNum bool
	set   bool
}

// UnmarshalTOML lets BurntSushi/toml decode a number or a string into Raw.
func (r *Raw) UnmarshalTOML(v any) error {
	switch x := v.(type) {
	case int64:
		*r = Raw{num: float64(x), isNum: true, set: true}
	case float64:
		*r = Raw{num: x, isNum: true, set: true}
	case string:
		*r = Raw{text: x, set: true}
	default:
		return fmt.Errorf("expected a number or a quoted value with units, got %T", v)
	}
	return nil
}

// RawNumber and RawText build a Raw in code.
func RawNumber(v float64) Raw { return Raw{num: v, isNum: true, set: true} }
func RawText(s string) Raw    { return Raw{text: s, set: true} }

// Set reports whether the value was given.
func (r Raw) Set() bool { return r.set }

// Get returns the value in the base unit of kind. A plain number is taken in
// the base unit (the key names it); a string is parsed with Parse.
func (r Raw) Get(kind Kind, bare bool) (float64, error) {
	if r.isNum {
		if math.IsNaN(r.num) || math.IsInf(r.num, 0) {
			return 0, fmt.Errorf("%v is not a finite number", r.num)
		}
		return r.num, nil
	}
	return Parse(r.text, kind, bare)
}

// String gives the value as written.
func (r Raw) String() string {
	if r.isNum {
		return strconv.FormatFloat(r.num, 'g', -1, 64)
	}
	return r.text
}

// RoundSig rounds x to sig significant digits (x itself when sig ≤ 0 or x
// is 0), so that steps such as 1.6 + 3·0.1 read as 1.9.
func RoundSig(x float64, sig int) float64 {
	if x == 0 || sig <= 0 {
		return x
	}
	p := math.Pow(10, float64(sig)-math.Ceil(math.Log10(math.Abs(x))))
	return math.Round(x*p) / p
}

// IsUnit reports whether s is a unit symbol alone, with or without a
// prefix ("V", "mA", "%"): what a value's unit looks like when a shell
// split it from its number.
func IsUnit(s string) bool {
	_, kind, ok := splitUnit(strings.TrimSpace(s))
	return ok && kind != -1
}
