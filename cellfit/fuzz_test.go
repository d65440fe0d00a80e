package cellfit

import (
	"bytes"
	"math"
	"strings"
	"testing"

	"headroom/curves"
)

// FuzzReadLog checks the log reader: input either fails with one line
// naming the file, or gives a log whose times increase, whose values are
// finite and voltages within 0–5 V, and which discharges. Short logs are
// also fitted: the fit either fails with an error or gives finite
// residuals and a cell that is valid, written and read back.
func FuzzReadLog(f *testing.F) {
	for _, s := range []string{
		"t_s,I_A,V,T_C\n0,0,4.18,25\n10,4,3.56,25\n20,4,3.52,26\n30,0,3.9,26\n40,0,3.95,26\n",
		"time;current;voltage\n0;0;4.1\n5;1;3.9\n10;1;3.85\n15;0;4.0\n",
		"s\tA\tV\n0\t2\t3.9\n10\t2\t3.8\n20\t2\t3.7\n",
		"# comment\nTime(s),Current(A),Voltage(V)\n0,-1,4.2\n1,0,4.1\n2,1,3.9\n3,0,4.0\n4,-1,4.1\n",
		"t,I,V\n0,1,4.1\n10,-1,4.0\n20,1,3.9\n", "t,I,V\n0,1,4.1\n0,1,4.0\n", "t,I,V\n0,NaN,4\n",
		"t,I,V\n0,1,9\n", "t,V\n0,1\n", "", "\xef\xbb\xbft,I,V\r\n0,1,4\r\n1,1,3.9\r\n", "t,I,V\n0,1e308,4\n1,1e308,3\n",
		"t,I,V\n0,1,4\n1e-300,1,3.9\n2e-300,0,4\n",
	} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		l, err := ReadLog(bytes.NewReader(data), "log.csv")
		if err != nil {
			if l != nil {
				t.Fatal("a log with an error")
			}
			if msg := err.Error(); !strings.HasPrefix(msg, "log.csv") || strings.Contains(msg, "\n") {
				t.Fatalf("error %q: want one line naming log.csv", msg)
			}
			return
		}
		if l.Len() < 2 || l.Peak() <= restCurrent(l.Peak()) {
			t.Fatalf("a log of %d samples with peak %g A", l.Len(), l.Peak())
		}
		for k := range l.T {
			if k > 0 && !(l.T[k] > l.T[k-1]) {
				t.Fatalf("time %v after %v", l.T[k], l.T[k-1])
			}
			if math.IsNaN(l.I[k]) || math.IsInf(l.I[k], 0) || !(l.V[k] > 0 && l.V[k] <= MaxCellV) {
				t.Fatalf("sample %d: %v A, %v V", k, l.I[k], l.V[k])
			}
		}
		if l.Len() > 40 {
			return
		}
		r, err := Fit([]*Log{l}, Options{Auto: true})
		if err != nil {
			return
		}
		for _, fit := range r.Fits {
			if math.IsNaN(fit.RMS) || math.IsInf(fit.RMS, 0) {
				t.Fatalf("RMS %v", fit.RMS)
			}
		}
		c, err := r.Cell(CellOptions{ID: "f", TempC: 20})
		if err != nil {
			return
		}
		var b bytes.Buffer
		if err := curves.WriteCellTOML(&b, c, r.Report(c, 20).Comment()); err != nil {
			t.Fatalf("a fitted cell that does not write: %v", err)
		}
		if _, err := curves.ReadCellTOML(&b, "f.toml"); err != nil {
			t.Fatalf("a written cell that does not read back: %v", err)
		}
	})
}
