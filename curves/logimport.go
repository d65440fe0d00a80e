package curves

import (
	"fmt"
	"io"
	"math"
	"path/filepath"
	"strconv"
	"strings"

	"headroom/internal/guard"
	"headroom/internal/units"
)

// ImportLog converts a time–voltage log, recorded while the cell was
// discharged at a constant current (A), into a cell. name is used for the
// id and in every error message.
//
// The log has two columns, time in seconds and volts, separated by a comma,
// semicolon, tab or spaces; blank lines and '#' comments are skipped, and
// so is a first line that does not start with a number (a header such as
// "Time(s),Voltage(V)"). Charge is counted from the first sample:
// mAh = current × (t − t₀) / 3.6.
//
// The load ends at the first sample where the voltage reaches its lowest
// value; later samples are the rest recovery after the load was removed and
// are dropped. Measured voltages wiggle by a few millivolts, and a curve
// must not rise, so each voltage is replaced by the running minimum of the
// voltages so far: the result never lies above any earlier measurement (it
// is conservative), and where the log is already falling it is the log
// itself. Samples at a time already seen are dropped.
//
// The cell's curve is the terminal voltage at that current (RefCurrent =
// RatedCurrent = current), with no resistance table, Peukert 1, no
// temperature or self-discharge terms, EndPoint the last voltage and
// RatedMAh the last charge.
func ImportLog(r io.Reader, name string, current float64) (*Cell, error) {
	if math.IsNaN(current) || math.IsInf(current, 0) || current <= 0 {
		return nil, fmt.Errorf("%s: the discharge current must be above 0 A, got %s", name, units.Eng(current, units.Current, 3))
	}
	lines, err := readLines(r, name)
	if err != nil {
		return nil, err
	}
	if f := logFields(lines[0].text); len(f) == 0 || !startsNumeric(f[0]) {
		lines = lines[1:] // a header
	}
	type sample struct {
		t, v float64
		line int
	}
	var s []sample
	for _, ln := range lines {
		f := logFields(ln.text)
		if len(f) != 2 {
			return nil, fmt.Errorf("%s line %d: %d columns, want 2 (time in s, volts)", name, ln.n, len(f))
		}
		t, err := strconv.ParseFloat(f[0], 64)
		if err != nil || math.IsNaN(t) || math.IsInf(t, 0) {
			return nil, fmt.Errorf("%s line %d: time %q is not a finite number of seconds", name, ln.n, f[0])
		}
		v, err := strconv.ParseFloat(f[1], 64)
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("%s line %d: voltage %q is not a finite number of volts", name, ln.n, f[1])
		}
		if v <= 0 {
			return nil, fmt.Errorf("%s line %d: voltage %g V must be above 0 V", name, ln.n, v)
		}
		if len(s) > 0 && t < s[len(s)-1].t {
			return nil, fmt.Errorf("%s line %d: time goes backwards from %g s to %g s", name, ln.n, s[len(s)-1].t, t)
		}
		s = append(s, sample{t, v, ln.n})
	}
	if len(s) < 2 {
		return nil, fmt.Errorf("%s: a log needs at least 2 samples, got %d", name, len(s))
	}
	low := 0 // first sample at the lowest voltage: the end of the load
	for i := range s {
		if s[i].v < s[low].v {
			low = i
		}
	}
	t0 := s[0].t
	var q, v []float64
	var from []int // file line of each kept point
	run := math.Inf(1)
	for _, p := range s[:low+1] {
		run = math.Min(run, p.v)
		mAh := current * (p.t - t0) / 3.6
		if len(q) > 0 && mAh <= q[len(q)-1] {
			continue
		}
		q, v, from = append(q, mAh), append(v, run), append(from, p.line)
	}
	if len(q) < 2 {
		return nil, fmt.Errorf("%s line %d: the voltage is lowest here, leaving %d point(s) of load; a curve needs at least 2", name, s[low].line, len(q))
	}
	curve, err := NewCurve(q, v)
	if err != nil {
		pts := make([]textLine, len(from))
		for i, n := range from {
			pts[i] = textLine{n: n}
		}
		return nil, curveErrorAt(name, err, pts)
	}
	c := &Cell{
		ID:           cellName(name),
		Name:         cellName(name),
		Chemistry:    "custom",
		Curve:        curve,
		RefCurrent:   current,
		NominalV:     curve.At(curve.End() / 2),
		RatedMAh:     curve.End(),
		RatedCurrent: current,
		EndPoint:     v[len(v)-1],
		Peukert:      1,
		Source:       fmt.Sprintf("log %s at %g A", guard.Clean(filepath.Base(name)), current),
	}
	if err := c.Validate(); err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	// A log holds thousands of samples; the engine needs a few dozen
	// points, and the file written must stay within what the readers take.
	thinCell(c, true)
	return c, nil
}

// logFields splits a log line on commas, semicolons, tabs or spaces.
func logFields(s string) []string {
	return strings.FieldsFunc(s, func(r rune) bool {
		return r == ',' || r == ';' || r == '\t' || r == ' '
	})
}

func startsNumeric(s string) bool {
	_, err := strconv.ParseFloat(s, 64)
	return err == nil
}
