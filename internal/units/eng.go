package units

import (
	"math"
	"regexp"
	"strconv"
	"strings"
)

// headroom's one number formatter for people: the screen, the text and
// Markdown reports and error messages all write quantities through the
// functions in this file. The rules are the ones an engineer writes by:
//
//   - about sig significant digits, never an exponent ("2.8e+02"), never a
//     negative zero, "—" for a number that is not finite;
//   - an SI prefix from f to G chosen after rounding, so the number reads
//     from 1 to 999 (999.95 mA at three digits is "1.00 A", not "1000 mA");
//   - a value too small to show at the smallest prefix reads "0";
//   - charge in mAh as battery people write it, durations in the unit that
//     suits them (s, min, h, days, months, years).

// engPrefixes are the SI prefixes from 1e-15 to 1e9, by exponent/3 + 5.
var engPrefixes = [...]string{"f", "p", "n", "µ", "m", "", "k", "M", "G"}

// humanSymbol is each kind's symbol for people.
var humanSymbol = [...]string{"V", "A", "W", "Ω", "s", "%", "°C", "Ah", "$"}

// Eng writes v (in the base unit of k) for people with about sig
// significant digits: 0.12 A → "120 mA", 47000 Ω → "47.0 kΩ", 2.9e-14 A →
// "29.0 fA". Fractions read as percent, temperatures in °C, money in
// dollars, times as a duration (see Duration).
func Eng(v float64, k Kind, sig int) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "—"
	}
	sig = max(sig, 1)
	switch k {
	case Fraction:
		return Num(v*100, sig) + " %"
	case Temperature:
		return Num(v, sig) + " °C"
	case Money:
		return Dollars(v)
	case Time:
		return Duration(v/3600, sig)
	}
	return Prefixed(v, sig, humanSymbol[k])
}

// Prefixed writes v with an SI prefix in front of the symbol sym (which
// may be empty); see Eng.
func Prefixed(v float64, sig int, sym string) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "—"
	}
	sig = max(sig, 1)
	if math.Abs(v) < 0.5e-15 { // nothing to show at the smallest prefix
		return "0 " + sym
	}
	neg, digs, exp := decRound(v, sig)
	e3 := int(math.Floor(float64(exp)/3)) * 3
	e3 = min(max(e3, -15), 9)
	if exp < -15 { // half to one f-unit
		return Num(v*1e15, sig) + " f" + sym
	}
	return place(neg, digs, exp-e3) + " " + engPrefixes[e3/3+5] + sym
}

// Said is Eng for error messages: a value too small to show at the
// smallest prefix is written as it is ("1e-300 A"), not as "0 A", so that
// a refusal says what was given.
func Said(v float64, k Kind) string {
	s := Eng(v, k, 3)
	if v != 0 && !math.IsNaN(v) && !math.IsInf(v, 0) && (strings.HasPrefix(s, "0 ") || strings.HasPrefix(s, "< ")) {
		return strconv.FormatFloat(v, 'g', -1, 64) + " " + humanSymbol[k]
	}
	return s
}

// Num writes a plain number with about sig significant digits, every
// whole digit kept (2768, not 2.77e+03), at most 6 decimals; "0" for what
// rounds to nothing (never "-0" or "0.000000"), "—" when not finite.
func Num(v float64, sig int) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "—"
	}
	sig = max(sig, 1)
	if v == 0 {
		return "0"
	}
	_, _, exp := decRound(v, sig)
	sig = max(sig, exp+1)              // whole digits are all kept
	if dec := sig - 1 - exp; dec > 6 { // at most 6 decimals
		sig -= dec - 6
	}
	if sig < 1 {
		if math.Abs(v) >= 0.5e-6 { // rounds up to the last place shown
			return place(v < 0, "1", -6)
		}
		return "0"
	}
	neg, digs, exp := decRound(v, sig)
	return place(neg, digs, exp)
}

// Fixed writes v with exactly d decimals, "0.00" rather than "-0.00", "—"
// when not finite.
func Fixed(v float64, d int) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "—"
	}
	if math.Abs(v) < 0.5*math.Pow10(-d) {
		v = 0
	}
	return strconv.FormatFloat(v, 'f', d, 64)
}

// MAh writes mAh as battery people do: "1848 mAh", "55.0 mAh",
// "120 µAh", "130 Ah" from 100 Ah up.
func MAh(mAh float64, sig int) string {
	if math.IsNaN(mAh) || math.IsInf(mAh, 0) {
		return "—"
	}
	a := math.Abs(mAh)
	switch {
	case a == 0:
		return "0 mAh"
	case a < 1 || a >= 1e5:
		return Prefixed(mAh/1000, sig, "Ah")
	}
	return Num(mAh, sig) + " mAh"
}

// Dollars writes dollars: cents from 10 cents up ("$1.00", "$12.50"), two
// significant digits below ("$0.079", "$0.00014"), "< $0.000001" below
// that and "$0" for nothing.
func Dollars(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "—"
	}
	a := math.Abs(v)
	sign := ""
	if v < 0 && a >= 5e-7 {
		sign = "-"
	}
	switch {
	case a == 0:
		return "$0"
	case a < 5e-7:
		return "< $0.000001"
	case a < 0.1:
		return sign + "$" + Num(a, 2)
	}
	return sign + "$" + Fixed(a, 2)
}

// Mean calendar lengths in hours (365.25-day year).
const (
	hoursPerDay   = 24.0
	hoursPerMonth = 365.25 * 24 / 12
	hoursPerYear  = 365.25 * 24
)

// Duration writes a span of hours in the unit that suits it, with about
// sig significant digits: "5.00 ms", "12.0 s", "45.0 min", "6.20 h", "115 days",
// "14.0 months", "6.91 years". Hours are kept below 100 h, days below a
// year and months below two years.
func Duration(hours float64, sig int) string {
	if math.IsNaN(hours) || math.IsInf(hours, 0) {
		return "—"
	}
	a := math.Abs(hours)
	switch {
	case a == 0:
		return "0 h"
	case a < 1.0/3600: // under a second: "5.00 ms", not "0.00500 s"
		return Prefixed(hours*3600, sig, "s")
	case a < 1.0/60:
		return Num(hours*3600, sig) + " s"
	case a < 1:
		return Num(hours*60, sig) + " min"
	case a < 100:
		return Num(hours, sig) + " h"
	case a < 365*hoursPerDay:
		return Num(hours/hoursPerDay, sig) + " days"
	case a < 2*hoursPerYear:
		return Num(hours/hoursPerMonth, sig) + " months"
	}
	return Num(hours/hoursPerYear, sig) + " years"
}

// decRound rounds |x| (not 0, finite) to sig significant digits in
// decimal, half away from zero on the shortest decimal that reads back as
// x (so 0.99995 at four digits is 1.000, as written, though the binary
// value falls just below): x ≈ ±d.ddd × 10^exp with digs the sig digits.
func decRound(x float64, sig int) (neg bool, digs string, exp int) {
	neg = x < 0
	mant, e, _ := strings.Cut(strconv.FormatFloat(math.Abs(x), 'e', -1, 64), "e")
	exp, _ = strconv.Atoi(e)
	d := []byte(strings.Replace(mant, ".", "", 1))
	if len(d) > sig {
		up := d[sig] >= '5'
		d = d[:sig]
		for i := sig - 1; up && i >= 0; i-- {
			if d[i] == '9' {
				d[i] = '0'
				continue
			}
			d[i]++
			up = false
		}
		if up { // 9.99… carried to 10.0…
			d = append([]byte{'1'}, d[:sig-1]...)
			exp++
		}
	}
	for len(d) < sig {
		d = append(d, '0')
	}
	return neg, string(d), exp
}

// place writes the digits digs of a number d.ddd × 10^shift in fixed
// notation; "0" when every digit is zero.
func place(neg bool, digs string, shift int) string {
	if strings.Trim(digs, "0") == "" {
		return "0"
	}
	p := shift + 1 // digits before the point
	var s string
	switch {
	case p <= 0:
		s = "0." + strings.Repeat("0", -p) + digs
	case p >= len(digs):
		s = digs + strings.Repeat("0", p-len(digs))
	default:
		s = digs[:p] + "." + digs[p:]
	}
	if neg {
		s = "-" + s
	}
	return s
}

// Short is Num without trailing zeros after the point, for values people
// typed: 1.8 → "1.8", 20 → "20", 0.000025 → "0.000025".
func Short(v float64, sig int) string {
	s := Num(v, sig)
	if strings.Contains(s, ".") {
		s = strings.TrimRight(strings.TrimRight(s, "0"), ".")
	}
	return s
}

var trailingZeros = regexp.MustCompile(`(\d+\.\d*?[1-9])0+\b|(\d+)\.0+\b`)

// TrimZeros drops the trailing zeros after the decimal point of every
// number in s, for words that name values people typed: "1.20 W at
// 85.0 %" → "1.2 W at 85 %", "3.00 s" → "3 s".
func TrimZeros(s string) string { return trailingZeros.ReplaceAllString(s, "$1$2") }
