package cellfit

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"
	"unicode/utf8"
)

// MaxRows is the most samples one log may hold.
const MaxRows = 1_000_000

// maxLineLen is the longest line a log may have, in bytes.
const maxLineLen = 4096

// Log is one bench record of a cell: samples of time, current and
// terminal voltage, and optionally the cell's temperature.
type Log struct {
	Name  string    // the file, as given; every message names it
	T     []float64 // seconds, strictly increasing
	I     []float64 // amperes, positive discharging the cell
	V     []float64 // terminal volts, above 0 and at most MaxCellV
	TempC []float64 // °C, nil when the log has no temperature column
	Line  []int     // the file line of each sample

	// Skipped says which rows were left out (charge current before the
	// first or after the last discharge), for the report; empty when none.
	Skipped []string
}

// MaxCellV is the highest voltage a log of one cell may show.
const MaxCellV = 5.0

// Len is the number of samples.
func (l *Log) Len() int { return len(l.T) }

// column names a log's header may use for each quantity, compared after
// lower-casing and dropping a unit in brackets ("Time(s)" is "time").
var columnNames = map[string]string{
	"t_s": "time", "time": "time", "s": "time", "t": "time", "time_s": "time", "seconds": "time",
	"i_a": "current", "current": "current", "a": "current", "i": "current", "current_a": "current", "amps": "current",
	"v": "voltage", "voltage": "voltage", "v_v": "voltage", "voltage_v": "voltage", "volts": "voltage",
	"t_c": "temp", "temp": "temp", "temperature": "temp", "temp_c": "temp", "temperature_c": "temp",
}

func headerName(f string) string {
	f = strings.ToLower(strings.TrimSpace(f))
	if i := strings.IndexAny(f, "(["); i > 0 && (strings.HasSuffix(f, ")") || strings.HasSuffix(f, "]")) {
		f = strings.TrimSpace(f[:i])
	}
	return columnNames[f]
}

// logSeparator is the separator a header line uses: a comma, else a
// semicolon, else a tab.
func logSeparator(header string) string {
	for _, sep := range []string{",", ";", "\t"} {
		if strings.Contains(header, sep) {
			return sep
		}
	}
	return ","
}

// splitLog splits a log line on sep and trims the fields; empty fields
// stay (and are then reported as not numbers).
func splitLog(s, sep string) []string {
	f := strings.Split(s, sep)
	for i := range f {
		f[i] = strings.TrimSpace(f[i])
	}
	return f
}

// restCurrent is the largest |current| of a sample counted as a rest, for
// a log whose largest discharge current is peak: bench loads leave a few
// milliamperes of sensor noise when off.
func restCurrent(peak float64) float64 { return math.Max(0.01, 0.02*peak) }

// ReadLog reads a bench log: a header line naming the columns, then one
// sample a line, fields separated by commas, semicolons or tabs (whichever
// the header uses). Blank
// lines and lines starting with '#' are skipped. Required columns: time
// (t_s, time or s; seconds), current (I_A, current or A; amperes, positive
// discharging the cell) and voltage (V or voltage; volts, one cell);
// optional: temperature (T_C or temp; °C). Other columns are ignored.
//
// Time must increase from sample to sample, every value must be a finite
// number, voltages lie above 0 and at most MaxCellV, and the log must
// discharge the cell. Charge current (negative) before the first or after
// the last discharge sample is left out and said in Skipped; between
// discharge samples it is an error naming the line. name is used in every
// message: "log.csv line 7: ...".
func ReadLog(r io.Reader, name string) (*Log, error) {
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 0, 4096), maxLineLen+2)
	l := &Log{Name: name}
	col := map[string]int{}
	nfields := 0
	n := 0
	header := false
	sep := ","
	rows := 0
	for sc.Scan() {
		n++
		raw := sc.Bytes()
		if n == 1 {
			raw = bytes.TrimPrefix(raw, []byte("\xef\xbb\xbf")) // a spreadsheet's byte-order mark
		}
		if bytes.IndexByte(raw, 0) >= 0 || !utf8.Valid(raw) {
			return nil, fmt.Errorf("%s line %d: not a text file (binary data)", name, n)
		}
		text := strings.TrimSpace(string(raw))
		if text == "" || strings.HasPrefix(text, "#") {
			continue
		}
		if !header {
			sep = logSeparator(text)
		}
		f := splitLog(text, sep)
		if !header {
			header = true
			nfields = len(f)
			for i, h := range f {
				if k := headerName(h); k != "" {
					if _, dup := col[k]; dup {
						return nil, fmt.Errorf("%s line %d: two %s columns in the header", name, n, k)
					}
					col[k] = i
				}
			}
			for _, k := range []struct{ key, want string }{
				{"time", "t_s, time or s"}, {"current", "I_A, current or A"}, {"voltage", "V or voltage"},
			} {
				if _, ok := col[k.key]; !ok {
					return nil, fmt.Errorf("%s line %d: no %s column in the header (want %s; header %q)", name, n, k.key, k.want, oneLine(text, 80))
				}
			}
			continue
		}
		rows++
		if rows > MaxRows {
			return nil, fmt.Errorf("%s line %d: more than %d rows; split the log or thin it", name, n, MaxRows)
		}
		if len(f) != nfields {
			return nil, fmt.Errorf("%s line %d: %d fields, the header has %d", name, n, len(f), nfields)
		}
		get := func(key, unit string) (float64, error) {
			s := f[col[key]]
			x, err := strconv.ParseFloat(s, 64)
			if err != nil || math.IsNaN(x) || math.IsInf(x, 0) {
				return 0, fmt.Errorf("%s line %d: %s %q is not a finite number of %s", name, n, key, oneLine(s, 40), unit)
			}
			return x, nil
		}
		t, err := get("time", "seconds")
		if err != nil {
			return nil, err
		}
		i, err := get("current", "amperes")
		if err != nil {
			return nil, err
		}
		v, err := get("voltage", "volts")
		if err != nil {
			return nil, err
		}
		if v <= 0 || v > MaxCellV {
			return nil, fmt.Errorf("%s line %d: voltage %g V is outside 0–%g V for one cell", name, n, v, MaxCellV)
		}
		if k := len(l.T); k > 0 && t <= l.T[k-1] {
			return nil, fmt.Errorf("%s line %d: time %g s does not increase (the row before has %g s)", name, n, t, l.T[k-1])
		}
		if c, ok := col["temp"]; ok {
			x, err := strconv.ParseFloat(f[c], 64)
			if err != nil || math.IsNaN(x) || math.IsInf(x, 0) || x < -60 || x > 150 {
				return nil, fmt.Errorf("%s line %d: temperature %q is not a number of °C between -60 and 150", name, n, oneLine(f[c], 40))
			}
			l.TempC = append(l.TempC, x)
		}
		l.T, l.I, l.V, l.Line = append(l.T, t), append(l.I, i), append(l.V, v), append(l.Line, n)
	}
	if err := sc.Err(); err != nil {
		if errors.Is(err, bufio.ErrTooLong) {
			return nil, fmt.Errorf("%s line %d: line is longer than %d bytes", name, n+1, maxLineLen)
		}
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	if !header {
		return nil, fmt.Errorf("%s: empty: a log needs a header line and samples", name)
	}
	if err := l.trimCharge(); err != nil {
		return nil, err
	}
	return l, nil
}

// trimCharge checks that the log discharges the cell and leaves out
// charge current before the first and after the last discharge sample.
func (l *Log) trimCharge() error {
	peak := 0.0
	for _, i := range l.I {
		peak = math.Max(peak, i)
	}
	rest := restCurrent(peak)
	if len(l.T) < 2 || peak <= rest {
		return fmt.Errorf("%s: no discharge: the current never rises above %g A in %d samples (positive current discharges the cell)", l.Name, rest, len(l.T))
	}
	first, last := -1, -1
	for k, i := range l.I {
		if i > rest {
			if first < 0 {
				first = k
			}
			last = k
		}
	}
	lo, hi := 0, len(l.T)
	for k := first - 1; k >= 0; k-- {
		if l.I[k] < -rest {
			lo = k + 1
			break
		}
	}
	for k := last + 1; k < len(l.T); k++ {
		if l.I[k] < -rest {
			hi = k
			break
		}
	}
	for k := first; k <= last; k++ {
		if l.I[k] < -rest {
			return fmt.Errorf("%s line %d: charge current %g A between discharges; cells fit takes discharges and rests only: cut the charge out or split the log there", l.Name, l.Line[k], l.I[k])
		}
	}
	if lo > 0 {
		l.Skipped = append(l.Skipped, fmt.Sprintf("lines %d–%d: charge before the discharge, left out", l.Line[0], l.Line[lo-1]))
	}
	if hi < len(l.T) {
		l.Skipped = append(l.Skipped, fmt.Sprintf("lines %d–%d: charge after the discharge, left out", l.Line[hi], l.Line[len(l.T)-1]))
	}
	cut := func(x []float64) []float64 {
		if x == nil {
			return nil
		}
		return x[lo:hi:hi]
	}
	l.T, l.I, l.V, l.TempC = cut(l.T), cut(l.I), cut(l.V), cut(l.TempC)
	l.Line = l.Line[lo:hi:hi]
	if len(l.T) < 2 {
		return fmt.Errorf("%s: %d sample(s) left after leaving out the charge; a fit needs more", l.Name, len(l.T))
	}
	return nil
}

// oneLine shortens s to at most n runes on one line, for quoting input in
// a message.
func oneLine(s string, n int) string {
	s = strings.Join(strings.Fields(s), " ")
	if utf8.RuneCountInString(s) > n {
		s = string([]rune(s)[:n]) + "…"
	}
	return s
}

// Peak is the largest discharge current in the log, amperes.
func (l *Log) Peak() float64 {
	p := 0.0
	for _, i := range l.I {
		p = math.Max(p, i)
	}
	return p
}

// LastLoaded is the index of the last sample under load.
func (l *Log) LastLoaded() int {
	rest := restCurrent(l.Peak())
	for k := len(l.I) - 1; k >= 0; k-- {
		if l.I[k] > rest {
			return k
		}
	}
	return 0
}

// Charge is the charge in mAh delivered from the first sample to sample k,
// each sample's current held until the next sample (the same rule as the
// fit's model).
func (l *Log) Charge(k int) float64 {
	q := 0.0
	for j := 0; j < k; j++ {
		q += l.I[j] * (l.T[j+1] - l.T[j]) / 3.6
	}
	return q
}

// ChargeTrapezoid is the charge in mAh delivered from the first sample to
// sample k by the trapezoid rule on the sampled current (the rule the
// measured data sets' own notes use).
func (l *Log) ChargeTrapezoid(k int) float64 {
	q := 0.0
	for j := 0; j < k; j++ {
		q += (l.I[j] + l.I[j+1]) / 2 * (l.T[j+1] - l.T[j]) / 3.6
	}
	return q
}

// Level is the log's load current: the median of its loaded samples,
// amperes.
func (l *Log) Level() float64 {
	rest := restCurrent(l.Peak())
	var in []float64
	for _, i := range l.I {
		if i > rest {
			in = append(in, i)
		}
	}
	slices.Sort(in)
	return in[len(in)/2]
}

// CrossingTrapezoid is the charge in mAh, by the trapezoid rule, at the
// first moment the measured voltage under load falls to volts, found by
// linear interpolation between the sample above and the loaded sample at
// or below; ok is false when the log never falls that far under load.
func (l *Log) CrossingTrapezoid(volts float64) (mAh float64, ok bool) {
	rest := restCurrent(l.Peak())
	prev := -1 // the loaded sample before
	for k := 0; k < l.Len(); k++ {
		if l.I[k] <= rest {
			continue
		}
		if l.V[k] <= volts {
			if prev < 0 {
				return l.ChargeTrapezoid(k), true
			}
			f := (l.V[prev] - volts) / (l.V[prev] - l.V[k])
			q0, q1 := l.ChargeTrapezoid(prev), l.ChargeTrapezoid(k)
			return q0 + f*(q1-q0), true
		}
		prev = k
	}
	return 0, false
}
