package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"unicode/utf8"

	"headroom/internal/units"
)

// format is one of the four output formats.
type format int

const (
	formatText format = iota // for people
	formatJSON               // one object (run) or an array of objects (tables)
	formatCSV                // a header line and one line per row
	formatMD                 // a Markdown table
)

var formatNames = []string{"text", "json", "csv", "md"}

func parseFormat(s string) (format, error) {
	for i, n := range formatNames {
		if strings.EqualFold(strings.TrimSpace(s), n) {
			return format(i), nil
		}
	}
	return 0, fmt.Errorf("--format: %q is not an output format: expected text, json, csv or md", s)
}

// finite reports whether x can be printed: never NaN or Inf in output.
func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// machineNum writes x for JSON and CSV: six significant digits, enough for
// any figure headroom computes and stable across platforms; "" when x is
// not finite (the JSON writer turns that into null).
func machineNum(x float64) string {
	if !finite(x) {
		return ""
	}
	if x == 0 {
		return "0" // also turns −0 into 0
	}
	return strconv.FormatFloat(x, 'g', 6, 64)
}

// fixed, sig and money are the one formatter's (internal/units, eng.go)
// plain-number forms: "—" when not finite, never "-0" or an exponent.
func fixed(x float64, d int) string { return units.Fixed(x, d) }

func sig(x float64, n int) string { return units.Num(x, n) }

func money(x float64) string { return units.Dollars(x) }

// field is one named value of a record: a float64, int, string, bool or
// []string.
type field struct {
	key   string // machine name: JSON key and CSV header
	label string // for people (Markdown), with the unit
	val   any
}

// rawJSON is a value already written as JSON (a nested list).
type rawJSON []byte

// writeJSONValue writes v as JSON; floats that are not finite become null.
func writeJSONValue(b *bytes.Buffer, v any) {
	switch x := v.(type) {
	case float64:
		if s := machineNum(x); s != "" {
			b.WriteString(s)
		} else {
			b.WriteString("null")
		}
	case int:
		b.WriteString(strconv.Itoa(x))
	case bool:
		b.WriteString(strconv.FormatBool(x))
	case string:
		b.Write(jsonString(x))
	case []string:
		b.WriteByte('[')
		for i, s := range x {
			if i > 0 {
				b.WriteString(", ")
			}
			b.Write(jsonString(s))
		}
		b.WriteByte(']')
	case nil:
		b.WriteString("null")
	case rawJSON:
		b.Write(x)
	default:
		panic(fmt.Sprintf("headroom: writeJSONValue: unexpected %T", v))
	}
}

func jsonString(s string) []byte {
	var b bytes.Buffer
	enc := json.NewEncoder(&b)
	enc.SetEscapeHTML(false)
	if err := enc.Encode(s); err != nil {
		panic("headroom: jsonString: " + err.Error())
	}
	return bytes.TrimRight(b.Bytes(), "\n")
}

// plainValue writes v as one CSV cell or Markdown cell: lists are joined
// with "; ".
func plainValue(v any) string {
	switch x := v.(type) {
	case float64:
		return machineNum(x)
	case int:
		return strconv.Itoa(x)
	case bool:
		return strconv.FormatBool(x)
	case string:
		return x
	case []string:
		return strings.Join(x, "; ")
	case nil:
		return ""
	case rawJSON:
		return string(x)
	}
	panic(fmt.Sprintf("headroom: plainValue: unexpected %T", v))
}

// writeRecord writes one record as a JSON object (indented), CSV (header
// and one row) or a Markdown table of label and value.
func writeRecord(w io.Writer, f format, rec []field) error {
	var b bytes.Buffer
	switch f {
	case formatJSON:
		b.WriteString("{\n")
		for i, fl := range rec {
			b.WriteString("  ")
			b.Write(jsonString(fl.key))
			b.WriteString(": ")
			writeJSONValue(&b, fl.val)
			if i < len(rec)-1 {
				b.WriteByte(',')
			}
			b.WriteByte('\n')
		}
		b.WriteString("}\n")
	case formatCSV:
		cw := csv.NewWriter(&b)
		var head, row []string
		for _, fl := range rec {
			head = append(head, fl.key)
			row = append(row, plainValue(fl.val))
		}
		cw.Write(head)
		cw.Write(row)
		cw.Flush()
	case formatMD:
		b.WriteString("| quantity | value |\n|---|---:|\n")
		for _, fl := range rec {
			v := fl.val
			if x, ok := v.(float64); ok {
				v = sig(x, 4)
			}
			fmt.Fprintf(&b, "| %s | %s |\n", mdEscape(fl.label), mdEscape(plainValue(v)))
		}
	default:
		panic("headroom: writeRecord: text has its own layout")
	}
	_, err := w.Write(b.Bytes())
	return err
}

func mdEscape(s string) string { return strings.ReplaceAll(s, "|", `\|`) }

// column is one column of a table of rows of type T.
type column[T any] struct {
	key     string // JSON key and CSV header
	head    string // header for people (text and Markdown)
	right   bool   // right-aligned in text and Markdown (numbers)
	human   bool   // shown in text and Markdown
	machine bool   // shown in JSON and CSV
	width   int    // text width hint, for streaming before the rows are known
	text    func(T) string
	val     func(T) any
}

// tableWriter writes rows one at a time in any format, so a long sweep
// streams instead of being held in memory.
type tableWriter[T any] struct {
	w      io.Writer
	f      format
	cols   []column[T]
	widths []int
	n      int
	err    error
	cw     *csv.Writer
}

func newTable[T any](w io.Writer, f format, cols []column[T]) *tableWriter[T] {
	t := &tableWriter[T]{w: w, f: f}
	for _, c := range cols {
		if f == formatText || f == formatMD {
			if c.human {
				t.cols = append(t.cols, c)
			}
		} else if c.machine {
			t.cols = append(t.cols, c)
		}
	}
	for _, c := range t.cols {
		t.widths = append(t.widths, max(c.width, utf8.RuneCountInString(c.head)))
	}
	return t
}

// fit widens the text columns to hold rows (when they are all known).
func (t *tableWriter[T]) fit(rows []T) {
	if t.f != formatText {
		return
	}
	for _, r := range rows {
		for i, c := range t.cols {
			t.widths[i] = max(t.widths[i], utf8.RuneCountInString(c.text(r)))
		}
	}
}

func (t *tableWriter[T]) write(s string) {
	if t.err == nil {
		_, t.err = io.WriteString(t.w, s)
	}
}

func pad(s string, w int, right bool) string {
	n := w - utf8.RuneCountInString(s)
	if n <= 0 {
		return s
	}
	if right {
		return strings.Repeat(" ", n) + s
	}
	return s + strings.Repeat(" ", n)
}

func (t *tableWriter[T]) header() {
	switch t.f {
	case formatText:
		var h, rule []string
		for i, c := range t.cols {
			h = append(h, pad(c.head, t.widths[i], c.right))
			rule = append(rule, strings.Repeat("-", t.widths[i]))
		}
		t.write(strings.TrimRight(strings.Join(h, "  "), " ") + "\n")
		t.write(strings.Join(rule, "  ") + "\n")
	case formatMD:
		var h, rule []string
		for _, c := range t.cols {
			h = append(h, mdEscape(c.head))
			if c.right {
				rule = append(rule, "---:")
			} else {
				rule = append(rule, "---")
			}
		}
		t.write("| " + strings.Join(h, " | ") + " |\n|" + strings.Join(rule, "|") + "|\n")
	case formatCSV:
		var b bytes.Buffer
		t.cw = csv.NewWriter(&b)
		var h []string
		for _, c := range t.cols {
			h = append(h, c.key)
		}
		t.cw.Write(h)
		t.cw.Flush()
		t.write(b.String())
	case formatJSON:
		t.write("[")
	}
}

func (t *tableWriter[T]) row(r T) {
	switch t.f {
	case formatText:
		var cells []string
		for i, c := range t.cols {
			cells = append(cells, pad(c.text(r), t.widths[i], c.right))
		}
		t.write(strings.TrimRight(strings.Join(cells, "  "), " ") + "\n")
	case formatMD:
		var cells []string
		for _, c := range t.cols {
			cells = append(cells, mdEscape(strings.TrimSpace(c.text(r)))) // text's alignment padding means nothing here
		}
		t.write("| " + strings.Join(cells, " | ") + " |\n")
	case formatCSV:
		var b bytes.Buffer
		cw := csv.NewWriter(&b)
		var cells []string
		for _, c := range t.cols {
			cells = append(cells, plainValue(c.val(r)))
		}
		cw.Write(cells)
		cw.Flush()
		t.write(b.String())
	case formatJSON:
		var b bytes.Buffer
		if t.n > 0 {
			b.WriteByte(',')
		}
		b.WriteString("\n  {")
		for i, c := range t.cols {
			if i > 0 {
				b.WriteString(", ")
			}
			b.Write(jsonString(c.key))
			b.WriteString(": ")
			writeJSONValue(&b, c.val(r))
		}
		b.WriteByte('}')
		t.write(b.String())
	}
	t.n++
}

// end closes the table and returns the first write error.
func (t *tableWriter[T]) end() error {
	if t.f == formatJSON {
		if t.n > 0 {
			t.write("\n")
		}
		t.write("]\n")
	}
	return t.err
}

// trimZeros drops trailing zeros after the decimal point of the number
// that starts s: "15.0 mA" → "15 mA", "3.50 s" → "3.5 s".
func trimZeros(s string) string {
	end := strings.IndexFunc(s, func(r rune) bool { return !(r >= '0' && r <= '9' || r == '.' || r == '-') })
	if end < 0 {
		end = len(s)
	}
	num := s[:end]
	if !strings.Contains(num, ".") {
		return s
	}
	num = strings.TrimRight(strings.TrimRight(num, "0"), ".")
	return num + s[end:]
}

// short writes x with at most three significant digits and no trailing
// zeros, for parameters people typed: "3", "1.5", "0.03".
func short(x float64) string { return trimZeros(sig(x, 3)) }

// human is units.Human with three digits and no trailing zeros.
func human(v float64, k units.Kind) string { return trimZeros(units.Human(v, k, 3)) }

// trimAllZeros is trimZeros for every number in s: "1.20 W at 85.0 %" →
// "1.2 W at 85 %".
func trimAllZeros(s string) string { return units.TrimZeros(s) }
