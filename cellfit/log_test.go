package cellfit

import (
	"fmt"
	"io"
	"strings"
	"testing"
)

func TestReadLogColumns(t *testing.T) {
	in := "# bench log\nTime(s);Voltage(V);Current(A);Temp\n0;4.1;0;25\n10;3.9;2;25.5\n\n20;3.85;2.01;26\n30;4.0;0.003;26\n"
	l, err := ReadLog(strings.NewReader(in), "b.csv")
	if err != nil {
		t.Fatal(err)
	}
	if l.Len() != 4 || l.I[2] != 2.01 || l.V[1] != 3.9 || l.TempC[3] != 26 || l.Line[2] != 6 {
		t.Errorf("read %+v", l)
	}
	// Header names the command accepts, any order, extra columns ignored.
	in = "step,t_s,I_A,V,T_C\n1,0,0,4.1,20\n2,5,1,3.9,20\n"
	if l, err = ReadLog(strings.NewReader(in), "c.csv"); err != nil || l.I[1] != 1 || l.TempC == nil {
		t.Errorf("t_s,I_A,V,T_C: %v %+v", err, l)
	}
	in = "s\tA\tvoltage\n0\t0\t4.1\n5\t1\t3.9\n"
	if l, err = ReadLog(strings.NewReader(in), "d.csv"); err != nil || l.TempC != nil {
		t.Errorf("s, A, voltage (tabs): %v %+v", err, l)
	}
}

// Charge current before the first and after the last discharge is left
// out and said; between discharges it is refused with its line.
func TestReadLogChargeRows(t *testing.T) {
	in := "t,I,V\n0,-1,3.9\n10,-1,4.1\n20,0,4.15\n30,2,3.9\n40,0,3.95\n50,-0.5,4.0\n"
	l, err := ReadLog(strings.NewReader(in), "c.csv")
	if err != nil {
		t.Fatal(err)
	}
	if l.Len() != 3 || l.T[0] != 20 || len(l.Skipped) != 2 ||
		l.Skipped[0] != "lines 2–3: charge before the discharge, left out" || l.Skipped[1] != "lines 7–7: charge after the discharge, left out" {
		t.Errorf("kept %v, skipped %q", l.T, l.Skipped)
	}
}

// rowsReader produces a header and n rows without holding them in memory.
type rowsReader struct {
	n, i int
	buf  []byte
}

func (r *rowsReader) Read(p []byte) (int, error) {
	for len(r.buf) == 0 {
		if r.i > r.n {
			return 0, io.EOF
		}
		if r.i == 0 {
			r.buf = []byte("t,I,V\n")
		} else {
			r.buf = fmt.Appendf(nil, "%d,1,3.5\n", r.i)
		}
		r.i++
	}
	k := copy(p, r.buf)
	r.buf = r.buf[k:]
	return k, nil
}

// Each kind of bad input a bench log can hold gets one line naming the file and
// the line (or the reason).
func TestReadLogBadInput(t *testing.T) {
	cases := []struct{ name, in, want string }{
		{"no discharge", "t,I,V\n0,0,4.1\n10,0.004,4.1\n", "log.csv: no discharge"},
		{"time repeats", "t,I,V\n0,0,4.1\n10,1,3.9\n10,1,3.8\n", "log.csv line 4: time 10 s does not increase"},
		{"time backwards", "t,I,V\n0,0,4.1\n10,1,3.9\n5,1,3.8\n", "log.csv line 4: time 5 s does not increase"},
		{"charge in the middle", "t,I,V\n0,1,4.1\n10,-1,4.0\n20,1,3.9\n", "log.csv line 3: charge current -1 A between discharges"},
		{"NaN", "t,I,V\n0,1,4.1\n10,NaN,3.9\n", `log.csv line 3: current "NaN" is not a finite number`},
		{"text", "t,I,V\n0,1,4.1\n10,1,three\n", `log.csv line 3: voltage "three" is not a finite number`},
		{"empty field", "t,I,V\n0,1,4.1\n,1,3.9\n", `log.csv line 3: time "" is not a finite number`},
		{"missing current", "t,V\n0,4.1\n", "log.csv line 1: no current column in the header"},
		{"missing voltage", "time,current,temp\n0,1,20\n", "log.csv line 1: no voltage column in the header"},
		{"no header names", "0,1,4.1\n10,1,3.9\n", "log.csv line 1: no time column in the header"},
		{"voltage too high", "t,I,V\n0,1,4.1\n10,1,8.2\n", "log.csv line 3: voltage 8.2 V is outside 0–5 V for one cell"},
		{"voltage zero", "t,I,V\n0,1,4.1\n10,1,0\n", "log.csv line 3: voltage 0 V is outside 0–5 V"},
		{"short row", "t,I,V\n0,1,4.1\n10,1\n", "log.csv line 3: 2 fields, the header has 3"},
		{"binary", "t,I,V\n0,1,\x00\n", "log.csv line 2: not a text file"},
		{"empty", "", "log.csv: empty"},
		{"header only", "t,I,V\n", "log.csv: no discharge"},
		{"bad temperature", "t,I,V,T_C\n0,1,4.1,warm\n", `log.csv line 2: temperature "warm"`},
		{"two time columns", "t,time,I,V\n", "log.csv line 1: two time columns"},
		{"long line", "t,I,V\n" + strings.Repeat("1", 5000) + "\n", "log.csv line 2: line is longer than"},
	}
	for _, c := range cases {
		l, err := ReadLog(strings.NewReader(c.in), "log.csv")
		if err == nil || l != nil || !strings.HasPrefix(err.Error(), c.want) || strings.Contains(err.Error(), "\n") {
			t.Errorf("%s: got %v, want one line starting %q", c.name, err, c.want)
		}
	}
	_, err := ReadLog(&rowsReader{n: MaxRows + 1}, "big.csv")
	if want := fmt.Sprintf("big.csv line %d: more than 1000000 rows", MaxRows+2); err == nil || !strings.HasPrefix(err.Error(), want) {
		t.Errorf("too many rows: got %v, want %q", err, want)
	}
}
