package curves

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"unicode/utf8"

	"headroom/internal/guard"
	"headroom/internal/limited"
	"headroom/internal/units"
)

// MaxFileSize is the largest cell file (CSV, TOML or log) the readers
// accept, in bytes. A digitised curve needs a few kilobytes; a long log a
// few hundred.
const MaxFileSize = 1 << 20

// maxLineLen is the longest line the text readers accept, in bytes.
const maxLineLen = 4096

// textLine is one non-blank, non-comment line of a text file.
type textLine struct {
	n    int    // 1-based line number
	text string // trimmed
}

// readLines reads a small text file, rejecting oversized, binary and
// over-long input, and returns its non-blank lines that do not start with
// '#'.
func readLines(r io.Reader, name string) ([]textLine, error) {
	data, err := limited.ReadAll(r, name, MaxFileSize, "a cell file or log")
	if err != nil {
		return nil, err
	}
	if len(bytes.TrimSpace(data)) == 0 {
		return nil, fmt.Errorf("%s: file is empty", name)
	}
	data = bytes.TrimPrefix(data, []byte("\xef\xbb\xbf")) // a UTF-8 byte-order mark from spreadsheets
	// Line ends: LF, CR LF, or CR alone (old spreadsheet exports) all end
	// a line.
	if bytes.IndexByte(data, '\r') >= 0 {
		data = bytes.ReplaceAll(bytes.ReplaceAll(data, []byte("\r\n"), []byte("\n")), []byte("\r"), []byte("\n"))
	}
	var out []textLine
	sc := bufio.NewScanner(bytes.NewReader(data))
	sc.Buffer(make([]byte, 0, 512), maxLineLen+2)
	n := 0
	for sc.Scan() {
		n++
		raw := sc.Bytes()
		if bytes.IndexByte(raw, 0) >= 0 || !utf8.Valid(raw) {
			return nil, fmt.Errorf("%s line %d: not a text file (binary data)", name, n)
		}
		t := strings.TrimSpace(string(raw))
		if t == "" || strings.HasPrefix(t, "#") {
			continue
		}
		out = append(out, textLine{n, t})
	}
	if err := sc.Err(); err != nil {
		if errors.Is(err, bufio.ErrTooLong) {
			return nil, fmt.Errorf("%s line %d: line is longer than %d bytes", name, n+1, maxLineLen)
		}
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	if len(out) == 0 {
		return nil, fmt.Errorf("%s: file holds only comments and blank lines", name)
	}
	return out, nil
}

// splitFields splits a CSV line on commas and trims each field.
func splitFields(s string) []string {
	f := strings.Split(s, ",")
	for i := range f {
		f[i] = strings.TrimSpace(f[i])
	}
	return f
}

// csvColumn is what one header name means.
type csvColumn struct {
	kind  units.Kind
	scale float64 // from the base unit units.Parse returns to the column's unit
}

var csvColumns = map[string]csvColumn{
	"mah": {units.Charge, 1000},
	"v":   {units.Voltage, 1},
	"ohm": {units.Resistance, 1},
}

// parseNumber reads a CSV value: a plain number in the column's unit, or a
// number followed by a unit of the column's kind ("1.2V", "250mAh").
func parseNumber(s string, col csvColumn) (float64, error) {
	if s == "" {
		return 0, fmt.Errorf("empty value")
	}
	x, err := strconv.ParseFloat(s, 64)
	if err != nil {
		v, uerr := units.Parse(s, col.kind, false)
		if uerr != nil {
			return 0, fmt.Errorf("%q is not a number", s)
		}
		x = v * col.scale
	}
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return 0, fmt.Errorf("%q is not a finite number", s)
	}
	return x, nil
}

// cellName is the id a file gives its cell: the base name without the
// extension, fit to print on a terminal.
func cellName(name string) string {
	b := filepath.Base(name)
	return guard.Clean(strings.TrimSuffix(b, filepath.Ext(b)))
}

// ReadCSV reads a user cell from CSV points. name is used for the cell id
// (its base name without extension) and in every error message.
//
// The first line that is not blank and not a '#' comment is the header:
// "mAh,V" or "mAh,V,ohm" (names case-insensitive). Each further line is one
// point: delivered charge in mAh and volts, and with the ohm column the
// cell's internal resistance there. Values are plain numbers in the
// header's unit, or carry that unit ("1.2V"). With an ohm column V is the
// rest voltage and the terminal voltage is V − I·R; without it V is used as
// the terminal voltage at any current. A CSV cell has no rate effect
// (Peukert 1), no temperature table and no self-discharge; its end-point
// is its last point. NominalV is taken as the curve's voltage at half its
// charge, a stand-in since a CSV states none.
func ReadCSV(r io.Reader, name string) (*Cell, error) {
	lines, err := readLines(r, name)
	if err != nil {
		return nil, err
	}
	head := splitFields(lines[0].text)
	if len(head) != 2 && len(head) != 3 {
		return nil, fmt.Errorf("%s line %d: header must be \"mAh,V\" or \"mAh,V,ohm\", got %d columns", name, lines[0].n, len(head))
	}
	want := []string{"mah", "v", "ohm"}
	cols := make([]csvColumn, len(head))
	for i, h := range head {
		hl := strings.ToLower(h)
		if hl == "ω" {
			hl = "ohm"
		}
		if hl != want[i] {
			if _, err := strconv.ParseFloat(h, 64); err == nil {
				return nil, fmt.Errorf("%s line %d: missing header: the first line must be \"mAh,V\" or \"mAh,V,ohm\"", name, lines[0].n)
			}
			return nil, fmt.Errorf("%s line %d: column %d is %q, want %q (header \"mAh,V\" or \"mAh,V,ohm\")", name, lines[0].n, i+1, h, []string{"mAh", "V", "ohm"}[i])
		}
		cols[i] = csvColumns[hl]
	}
	withOhm := len(head) == 3
	pts := lines[1:]
	q := make([]float64, len(pts))
	v := make([]float64, len(pts))
	var ohm []float64
	if withOhm {
		ohm = make([]float64, len(pts))
	}
	names := []string{"charge", "voltage", "resistance"}
	for i, ln := range pts {
		f := splitFields(ln.text)
		if len(f) != len(head) {
			return nil, fmt.Errorf("%s line %d: %d columns, the header has %d", name, ln.n, len(f), len(head))
		}
		vals := make([]float64, len(f))
		for j := range f {
			x, err := parseNumber(f[j], cols[j])
			if err != nil {
				return nil, fmt.Errorf("%s line %d: %s: %w", name, ln.n, names[j], err)
			}
			vals[j] = x
		}
		q[i], v[i] = vals[0], vals[1]
		if withOhm {
			if vals[2] < 0 || vals[2] > 1e4 {
				return nil, fmt.Errorf("%s line %d: resistance %g Ω must be between 0 and 10 kΩ", name, ln.n, vals[2])
			}
			ohm[i] = vals[2]
		}
	}
	curve, err := NewCurve(q, v)
	if err != nil {
		return nil, curveErrorAt(name, err, pts)
	}
	c := &Cell{
		ID:        cellName(name),
		Name:      cellName(name),
		Chemistry: "custom",
		Curve:     curve,
		NominalV:  curve.At(curve.End() / 2),
		RatedMAh:  curve.End(),
		EndPoint:  v[len(v)-1],
		Peukert:   1,
		Source:    "points from " + guard.Clean(filepath.Base(name)),
	}
	if withOhm {
		end := curve.End()
		c.Resistance = make([]ResistancePoint, len(q))
		for i := range q {
			c.Resistance[i] = ResistancePoint{Depth: q[i] / end, Ohm: ohm[i]}
		}
		c.Resistance[len(q)-1].Depth = 1 // exact, whatever the rounding of q/end
	}
	if err := c.Validate(); err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	thinCell(c, false)
	return c, nil
}

// curveErrorAt maps a NewCurve error back to the file line of the point.
func curveErrorAt(name string, err error, pts []textLine) error {
	var ce *CurveError
	if errors.As(err, &ce) {
		if len(pts) < 2 {
			if len(pts) == 0 {
				return fmt.Errorf("%s: no points after the header: %w", name, err)
			}
			return fmt.Errorf("%s line %d: only one point: %w", name, pts[0].n, err)
		}
		if ce.Index >= 0 && ce.Index < len(pts) {
			return fmt.Errorf("%s line %d: %w", name, pts[ce.Index].n, err)
		}
	}
	return fmt.Errorf("%s: %w", name, err)
}

// WriteCSV writes c in the format ReadCSV reads, with a comment naming the
// cell. A cell with a resistance table gets the ohm column: V is then the
// rest voltage Vcurve + RefCurrent·R at every breakpoint of the curve and
// of the resistance table, so V − I·R reproduces Terminal at 20 °C exactly
// at every current. Peukert, temperature and self-discharge terms are not
// part of the format and are left out.
func WriteCSV(w io.Writer, c *Cell) error {
	if c == nil || c.Curve == nil {
		panic("curves: WriteCSV: cell without a curve")
	}
	bw := bufio.NewWriter(w)
	fmt.Fprintf(bw, "# %s", oneLine(c.ID))
	if c.Name != "" && c.Name != c.ID {
		fmt.Fprintf(bw, ": %s", oneLine(c.Name))
	}
	fmt.Fprintln(bw)
	if c.Source != "" {
		fmt.Fprintf(bw, "# source: %s\n", oneLine(c.Source))
	}
	g := func(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }
	if len(c.Resistance) == 0 && len(c.RC) == 0 {
		if c.RefCurrent > 0 {
			fmt.Fprintf(bw, "# terminal voltage at %s A\n", g(c.RefCurrent))
		}
		fmt.Fprintln(bw, "mAh,V")
		for i := 0; i < c.Curve.Len(); i++ {
			q, v := c.Curve.Point(i)
			fmt.Fprintf(bw, "%s,%s\n", g(q), g(v))
		}
		return bw.Flush()
	}
	qs := c.Curve.Charges()
	end := c.Curve.End()
	for _, r := range c.Resistance {
		qs = append(qs, r.Depth*end)
	}
	qs = sortedUnique(qs)
	fmt.Fprintln(bw, "mAh,V,ohm")
	prev := math.Inf(1)
	for _, q := range qs {
		// The polarisation branches fold into the steady resistance: the
		// format has no time, so it keeps what a steady current meets.
		r := c.SteadyResistance(q, RefTempC)
		v := c.OpenCircuit(q, RefTempC)
		if v > prev {
			return fmt.Errorf("cell %s: rest voltage rises at %g mAh (%g V after %g V); it cannot be written as mAh,V,ohm points", c.ID, q, v, prev)
		}
		prev = v
		fmt.Fprintf(bw, "%s,%s,%s\n", g(q), g(v), g(r))
	}
	return bw.Flush()
}

func oneLine(s string) string { return strings.Join(strings.Fields(s), " ") }

// sortedUnique returns xs sorted with repeats dropped.
func sortedUnique(xs []float64) []float64 {
	s := slices.Clone(xs)
	slices.Sort(s)
	return slices.Compact(s)
}
