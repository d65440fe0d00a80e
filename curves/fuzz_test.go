package curves

import (
	"bytes"
	"math"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// FuzzReadCSV checks the CSV cell reader: a file either fails with an
// error that names the file, or gives a valid cell that WriteCSV writes
// and ReadCSV reads back to the same curve points (exactly: WriteCSV
// prints the shortest round-tripping decimals) and the same resistance at
// every point (to 1e-12 relative, since depths are stored as q/end and
// multiplied back).
func FuzzReadCSV(f *testing.F) {
	for _, s := range []string{
		"mAh,V\n0,1.5\n1000,1.2\n2000,0.9\n",
		"# a cell\nmAh,V,ohm\n0,1.5,0.1\n500,1.3,0.12\n2000,1.0,0.3\n",
		"\xef\xbb\xbfmAh,V\r\n0,1.5\r\n2400mAh,1.0V\r\n",
		"MAH , v\n0 , 1.6\n100, 1.6\n200,1.1\n",
		"mAh,V,Ω\n0,1.4,0.2\n1Ah,1.1,250mohm\n",
		"mAh,V\n0.1,3.0\n0.3,2.9999999999999996\n0.7000000000000001,1\n",
		// nasty
		"", "\n\n", "# only\n", "mAh,V\n", "mAh,V\n0,1.5\n", "0,1.5\n100,1.2\n", "mAh,V\n0,1.5\n100,1.6\n",
		"mAh,V\n0,1.5\n0,1.4\n", "mAh,V\n-5,1.5\n100,1.2\n", "mAh,V\nNaN,1.5\n100,1.2\n", "mAh,V\n0,Inf\n100,1.2\n",
		"mAh,V\n0,1.5\n100\n", "mAh,V\n0,1.5,3\n", "mAh,V,ohm\n0,1.5,-1\n9,1,1\n", "mAh,V\n0,1.5mA\n9,1\n",
		"mAh,V\n0,1e400\n9,1\n", "mAh,V\n\x00,1\n", "mAh,V\n0,\xff\n", "mAh,V\n" + strings.Repeat("9", 5000) + ",1\n",
		"mAh,V\n0,1.5\n1e-320,1.4\n", "mAh,V\n0,61\n1,1\n", "mAh,V\n0,0\n1,0\n", "mAh,V\n1,1\n2,1\n",
	} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		c, err := ReadCSV(bytes.NewReader(data), "cell.csv")
		if err != nil {
			if c != nil {
				t.Fatalf("ReadCSV returned a cell with error %v", err)
			}
			if msg := err.Error(); !strings.HasPrefix(msg, "cell.csv") || strings.Contains(msg, "\n") {
				t.Fatalf("error %q: want one line naming cell.csv", msg)
			}
			return
		}
		if err := c.Validate(); err != nil {
			t.Fatalf("ReadCSV gave an invalid cell: %v", err)
		}
		var buf bytes.Buffer
		if err := WriteCSV(&buf, c); err != nil {
			t.Fatalf("WriteCSV of a cell ReadCSV made: %v", err)
		}
		back, err := ReadCSV(bytes.NewReader(buf.Bytes()), "cell.csv")
		if err != nil {
			t.Fatalf("WriteCSV wrote\n%s\nwhich does not read back: %v", buf.Bytes(), err)
		}
		if back.Curve.Len() < c.Curve.Len() {
			t.Fatalf("curve of %d points reads back with %d", c.Curve.Len(), back.Curve.Len())
		}
		// WriteCSV may add points (resistance breakpoints); every
		// original point must come back as it was.
		at := map[float64]float64{}
		for j := 0; j < back.Curve.Len(); j++ {
			q, v := back.Curve.Point(j)
			at[q] = v
		}
		for i := 0; i < c.Curve.Len(); i++ {
			q, v := c.Curve.Point(i)
			if got, ok := at[q]; !ok || got != v {
				t.Fatalf("point %d (%v mAh, %v V) reads back as %v V (found: %v); written\n%s", i, q, v, got, ok, buf.Bytes())
			}
			if len(c.Resistance) > 0 {
				r0, r1 := c.ResistanceAt(q, RefTempC), back.ResistanceAt(q, RefTempC)
				if math.Abs(r0-r1) > 1e-12*math.Max(r0, 1e-3) {
					t.Fatalf("point %d (%v mAh): resistance %v Ω reads back as %v", i, q, r0, r1)
				}
			}
		}
		if back.Curve.End() != c.Curve.End() || back.EndPoint != c.EndPoint {
			t.Fatalf("end %v mAh at %v V reads back as %v mAh at %v V", c.Curve.End(), c.EndPoint, back.Curve.End(), back.EndPoint)
		}
	})
}

// A FIFO named as a cell file must be refused at once: opening it would
// wait for a writer forever.
func TestLoadRejectsFIFO(t *testing.T) {
	p := filepath.Join(t.TempDir(), "pipe.csv")
	if err := syscall.Mkfifo(p, 0o600); err != nil {
		t.Skipf("cannot make a FIFO here: %v", err)
	}
	done := make(chan error, 1)
	go func() { _, err := Load(p); done <- err }()
	select {
	case err := <-done:
		if err == nil || !strings.Contains(err.Error(), "not a regular file") || !strings.HasPrefix(err.Error(), p) {
			t.Fatalf("Load(FIFO) error %v: want one naming the path and saying it is not a regular file", err)
		}
	case <-time.After(5 * time.Second):
		t.Fatal("Load(FIFO) blocked")
	}
}

// FuzzReadCellTOML checks the TOML cell reader: a file either fails with
// one line naming the file, or gives a valid cell that WriteCSV can write
// (or refuses in words when its rest voltage would rise) and ReadCSV reads
// back to the same terminal voltage at the reference current and at rest
// at every curve point, to 1e-9 V: WriteCSV adds RefCurrent·R to the
// curve and the reader subtracts it again, a few roundings apart.
func FuzzReadCellTOML(f *testing.F) {
	for _, s := range []string{
		"curve = [[0, 1.5], [1000, 1.2], [2000, 0.9]]\n",
		"id = \"aa\"\nname = \"my cell\"\ncurve = [[0, 1.6], [2500, 0.8]]\nend_point = \"0.9V\"\nref_current = \"100mA\"\n" +
			"resistance = [[0, 0.15], [1, 0.6]]\ntemperature = [[-20, 0.4, 3], [20, 1, 1]]\npeukert = 1.2\nself_discharge = \"2%\"\n",
		"curve = [[0, 4.2], [3000, 3.0]]\nrechargeable = true\ncycle_life = 500\ncharge_efficiency = \"90%\"\nprice = \"$3\"\nrated_mAh = \"3Ah\"\n",
		"curve = [[0, 1.5], [100, 1.2]]\nref_current = 0.5\nresistance = [[0, 1], [1, 0.01]]\n",
		// nasty
		"", "curve = []\n", "curve = [[0, 1.5]]\n", "curve = [[0, 1.5], [0, 1.4]]\n", "curve = [[0, 1.5], [100, 1.6]]\n",
		"curve = [[0, nan], [100, 1]]\n", "curve = [[0, inf], [100, 1]]\n", "curve = [[0, 1.5, 3], [100, 1]]\n",
		"curve = [[0, 1.5], [100, 1]]\nend_point = 2\n", "curve = [[0, 1.5], [100, 1]]\npeukert = 3\n",
		"curve = [[0, 1.5], [100, 1]]\nresistance = [[0.5, 1], [0.2, 1]]\n", "curve = \"x\"\n", "voltage = 3\n",
		"curve = [[0, 1.5], [100, 1]]\ncurve_csv = \"x.csv\"\n", "curve_csv = \"/dev/null.csv\"\n", "x = \x00\n",
		"curve = [[0, 1.5], [100, 1]]\nrechargeable = true\n", "curve = [[0, 1.5], [100, 1]]\nrated_mAh = \"1e400mAh\"\n",
		// polarisation branches and the pack cut-off
		"curve = [[0, 4.2], [3000, 3.0]]\nresistance = [[0, 0.03]]\nrc = [[0.012, 15], [0.01, 400]]\ncutoff_v = 2.5\n" +
			"cutoff_delay = \"150ms\"\nrechargeable = true\ncycle_life = 500\ncharge_efficiency = 0.9\n",
		"curve = [[0, 1.6], [2500, 0.8]]\nref_current = 0.1\nrc = [[0.02, 2], [0.05, 600]]\n",
		"curve = [[0, 1.5], [100, 1]]\nrc = [[0, 10]]\n", "curve = [[0, 1.5], [100, 1]]\nrc = [[0.1, -1]]\n",
		"curve = [[0, 1.5], [100, 1]]\nrc = [[0.1]]\n", "curve = [[0, 1.5], [100, 1]]\nrc = [[1, 1], [1, 1], [1, 1], [1, 1]]\n",
		"curve = [[0, 1.5], [100, 1]]\nrc = [[nan, 1]]\n", "curve = [[0, 1.5], [100, 1]]\nrc = [[1, inf]]\n",
		"curve = [[0, 1.5], [100, 1]]\ncutoff_v = 2.5\n", "curve = [[0, 1.5], [100, 1]]\ncutoff_v = 1\ncutoff_delay = 0\n",
		"curve = [[0, 1.5], [100, 1]]\ncutoff_v = -1\ncutoff_delay = 1\n", "curve = [[0, 1.5], [100, 1]]\ncutoff_delay = \"1e9s\"\n",
		// the cell's thermal data
		"curve = [[0, 4.2], [3000, 3.0]]\nheat_capacity = 45\nthermal_resistance = 24\ntemperature = [[0, 0.9, 2], [45, 1, 0.8]]\n",
		"curve = [[0, 1.5], [100, 1]]\nthermal_resistance = 20\n", "curve = [[0, 1.5], [100, 1]]\nheat_capacity = -1\n",
		"curve = [[0, 1.5], [100, 1]]\nthermal_resistance = nan\nheat_capacity = 1\n", "curve = [[0, 1.5], [100, 1]]\nheat_capacity = \"45\"\n",
		// hostile shapes: nesting at and past the limit, long dotted keys,
		// claims past the physical ranges
		"curve = [[0, 1.5], [100, 1]]\nx = " + strings.Repeat("{a=", 16) + "1" + strings.Repeat("}", 16) + "\n",
		"curve = " + strings.Repeat("[", 17) + strings.Repeat("]", 17) + "\n",
		"curve = [[0, 1.5], [100, 1]]\n" + strings.Repeat("a.", 8) + "b = 1\n",
		"curve = [[0, 1.5], [1e307, 1]]\n", "curve = [[0, 1.5], [100, 1]]\nprice = 1e308\n",
	} {
		f.Add([]byte(s))
	}
	name := filepath.Join(f.TempDir(), "cell.toml")
	f.Fuzz(func(t *testing.T, data []byte) {
		// Whatever follows a line that opens 17 inline tables, or a key
		// of 9 parts, the file is refused on its shape, before parsing.
		for _, head := range []string{"x = " + strings.Repeat("{a=", 17), strings.Repeat("a.", 8) + "b = 1"} {
			hostile := append([]byte(head+"\n"), data...)
			if _, err := ReadCellTOML(bytes.NewReader(hostile), name); err == nil || !(strings.HasPrefix(err.Error(), name+" line 1: ") &&
				strings.Contains(err.Error(), "refuses the file before reading it") || prechecked(err)) {
				t.Fatalf("%q + data: %v, want the shape refusal on line 1 (or a binary or size refusal)", head, err)
			}
		}
		c, err := ReadCellTOML(bytes.NewReader(data), name)
		if err != nil {
			if c != nil {
				t.Fatalf("ReadCellTOML returned a cell with error %v", err)
			}
			if msg := err.Error(); !strings.HasPrefix(msg, name) || strings.Contains(msg, "\n") {
				t.Fatalf("error %q: want one line naming %s", msg, name)
			}
			return
		}
		if err := c.Validate(); err != nil {
			t.Fatalf("ReadCellTOML gave an invalid cell: %v", err)
		}
		var buf bytes.Buffer
		if err := WriteCSV(&buf, c); err != nil {
			if !strings.Contains(err.Error(), "cannot be written") {
				t.Fatalf("WriteCSV: %v", err)
			}
			return
		}
		back, err := ReadCSV(bytes.NewReader(buf.Bytes()), "cell.csv")
		if err != nil {
			t.Fatalf("WriteCSV wrote\n%s\nwhich does not read back: %v", buf.Bytes(), err)
		}
		for i := 0; i < c.Curve.Len(); i++ {
			q, _ := c.Curve.Point(i)
			for _, amps := range []float64{0, c.RefCurrent} {
				v0, v1 := c.Terminal(q, amps, RefTempC), back.Terminal(q, amps, RefTempC)
				if math.Abs(v0-v1) > 1e-9 {
					t.Fatalf("point %d (%v mAh) at %v A: %v V reads back as %v V; written\n%s", i, q, amps, v0, v1, buf.Bytes())
				}
			}
		}
	})
}

// prechecked reports the refusals that come before the shape check: binary
// data and size.
func prechecked(err error) bool {
	return strings.Contains(err.Error(), "binary data") || strings.Contains(err.Error(), "larger than")
}
