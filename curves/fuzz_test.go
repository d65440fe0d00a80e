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
		for i := 0; i < c.Curve.Len(); i++ {
			q, v := c.Curve.Point(i)
			if got := back.Curve.At(q); got != v {
				t.Fatalf("point %d (%v mAh, %v V) reads back as %v V; written\n%s", i, q, v, got, buf.Bytes())
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
