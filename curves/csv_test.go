package curves

import (
	"bytes"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestReadCSVGood(t *testing.T) {
	in := "# a comment\n\n MAH , v \n0, 1.5\n# mid comment\n100,1.3V\n  250mAh , 1.0 \n"
	c, err := ReadCSV(strings.NewReader(in), "dir/my-cell.csv")
	if err != nil {
		t.Fatal(err)
	}
	// Exact: parsed decimals stored as given; 250mAh is 0.25 Ah × 1000.
	if c.ID != "my-cell" || c.Curve.Len() != 3 || c.EndPoint != 1.0 || c.RatedMAh != 250 ||
		c.Peukert != 1 || c.RefCurrent != 0 || len(c.Resistance) != 0 || len(c.Temperature) != 0 || c.SelfDischarge != 0 {
		t.Errorf("got %+v", c)
	}
	// Without an ohm column the curve is the terminal voltage at any
	// current: Terminal equals the curve at 0 A and at 2 A.
	if a, b := c.Terminal(100, 0, RefTempC), c.Terminal(100, 2, RefTempC); a != 1.3 || b != 1.3 {
		t.Errorf("terminal at 100 mAh: %g V at 0 A, %g V at 2 A; want 1.3 V both", a, b)
	}
}

func TestReadCSVExampleFile(t *testing.T) {
	c, err := Load(filepath.Join("..", "testdata", "cells", "example-cell.csv"))
	if err != nil {
		t.Fatal(err)
	}
	// The example's own numbers: last point 1800 mAh at 0.90 V; at
	// 1200 mAh rest 1.22 V and 0.18 Ω, so 0.5 A gives 1.22 − 0.09 = 1.13 V.
	// Tolerance 1e-12 for rounding in the subtraction.
	if c.ID != "example-cell" || c.RatedMAh != 1800 || c.EndPoint != 0.9 || len(c.Resistance) != 8 {
		t.Errorf("got %+v", c)
	}
	if v := c.Terminal(1200, 0.5, RefTempC); math.Abs(v-1.13) > 1e-12 {
		t.Errorf("terminal at 1200 mAh, 0.5 A = %.15g V, want 1.13 V", v)
	}
	// Between points the resistance is interpolated by depth: halfway
	// between 1500 (0.24 Ω) and 1700 mAh (0.35 Ω) is 0.295 Ω.
	if r := c.ResistanceAt(1600, RefTempC); math.Abs(r-0.295) > 1e-12 {
		t.Errorf("R at 1600 mAh = %g Ω, want 0.295 Ω", r)
	}
}

func TestReadCSVErrors(t *testing.T) {
	long := "mAh,V\n0,1.5\n" + strings.Repeat("1", 5000) + ",1.0\n"
	cases := []struct{ name, in, want string }{
		{"empty", "", "cells.csv: file is empty"},
		{"blank", " \n\n", "cells.csv: file is empty"},
		{"only comments", "# nothing\n", "cells.csv: file holds only comments"},
		{"missing header", "0,1.5\n10,1.4\n", "cells.csv line 1: missing header"},
		{"unknown header", "# hi\nmAh,Volts\n0,1.5\n", `cells.csv line 2: column 2 is "Volts", want "V"`},
		{"header columns", "mAh,V,ohm,x\n", "cells.csv line 1: header must be"},
		{"column count", "mAh,V\n0,1.5\n10,1.4,0.2\n", "cells.csv line 3: 3 columns, the header has 2"},
		{"not a number", "mAh,V\n0,1.5\n10,abc\n", `cells.csv line 3: voltage: "abc" is not a number`},
		{"wrong unit", "mAh,V\n0,1.5\n10,1.4A\n", `cells.csv line 3: voltage: "1.4A" is not a number`},
		{"empty value", "mAh,V\n0,1.5\n10,\n", "cells.csv line 3: voltage: empty value"},
		{"NaN", "mAh,V\n0,1.5\nNaN,1.4\n", `cells.csv line 3: charge: "NaN" is not a finite number`},
		{"Inf", "mAh,V\n0,1.5\n10,+Inf\n", `cells.csv line 3: voltage: "+Inf" is not a finite number`},
		{"negative capacity", "mAh,V\n-5,1.5\n10,1.4\n", "cells.csv line 2: charge -5 mAh is negative"},
		{"duplicate capacity", "mAh,V\n0,1.5\n10,1.4\n\n10,1.3\n", "cells.csv line 5: charge 10 mAh repeats"},
		{"rising voltage", "mAh,V\n0,1.5\n# c\n5,1.3\n6,1.21\n7,1.25\n", "cells.csv line 6: voltage rises from 1.21 V to 1.25 V"},
		{"one point", "mAh,V\n\n0,1.5\n", "cells.csv line 3: only one point"},
		{"no points", "mAh,V\n", "cells.csv: no points after the header"},
		{"negative ohm", "mAh,V,ohm\n0,1.5,0.1\n10,1.4,-0.1\n", "cells.csv line 3: resistance -0.1 Ω"},
		{"binary", "mAh,V\n\x00\x01\x02\n", "cells.csv line 2: not a text file"},
		{"bad utf-8", "mAh,V\n0,1.5\xff\n", "cells.csv line 2: not a text file"},
		{"long line", long, "cells.csv line 3: line is longer than 4096 bytes"},
		{"too big", "mAh,V\n" + strings.Repeat("#\n", MaxFileSize/2+1), "cells.csv: larger than the 1048576-byte limit"},
	}
	for _, k := range cases {
		_, err := ReadCSV(strings.NewReader(k.in), "cells.csv")
		if err == nil || !strings.HasPrefix(err.Error(), k.want) {
			t.Errorf("%s: got %v, want an error starting %q", k.name, err, k.want)
		}
	}
}

// TestCSVRoundTrip writes every built-in cell and reads it back: at 20 °C
// the terminal voltage agrees at every current, since V − I·R reproduces
// Vcurve − (I − Iref)·R on the union of breakpoints. Tolerance 1e-12 V:
// the rest voltage is stored as Vcurve + Iref·R and subtracted again,
// which rounds by a few ulps; 'g' formatting itself round-trips exactly.
func TestCSVRoundTrip(t *testing.T) {
	for _, c := range Library() {
		var buf bytes.Buffer
		if err := WriteCSV(&buf, c); err != nil {
			t.Fatalf("%s: %v", c.ID, err)
		}
		back, err := ReadCSV(&buf, c.ID+".csv")
		if err != nil {
			t.Fatalf("%s: %v\n%s", c.ID, err, buf.String())
		}
		end := c.Curve.End()
		for _, f := range []float64{0, 0.013, 0.25, 0.5, 0.77, 0.9, 0.97, 0.999, 1} {
			for _, amps := range []float64{0, c.RefCurrent, 0.5, 2} {
				q := f * end
				a, b := c.Terminal(q, amps, RefTempC), back.Terminal(q, amps, RefTempC)
				if math.Abs(a-b) > 1e-12 {
					t.Errorf("%s at %g mAh, %g A: %.15g V, back %.15g V", c.ID, q, amps, a, b)
				}
			}
		}
	}
	// Without resistance the curve's points come back exactly.
	c := &Cell{ID: "x", Curve: MustCurve([]float64{0, 0.1, 1e3 / 3}, []float64{1.6, 1.2, 0.8}), RatedMAh: 1, EndPoint: 0.8, Peukert: 1}
	var buf bytes.Buffer
	if err := WriteCSV(&buf, c); err != nil {
		t.Fatal(err)
	}
	back, err := ReadCSV(&buf, "x.csv")
	if err != nil {
		t.Fatal(err)
	}
	for i := 0; i < 3; i++ {
		q1, v1 := c.Curve.Point(i)
		q2, v2 := back.Curve.Point(i)
		if q1 != q2 || v1 != v2 {
			t.Errorf("point %d: %g,%g back as %g,%g", i, q1, v1, q2, v2)
		}
	}
}

func TestLoadErrors(t *testing.T) {
	dir := t.TempDir()
	big := filepath.Join(dir, "big.csv")
	if err := os.WriteFile(big, make([]byte, MaxFileSize+1), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.Mkdir(filepath.Join(dir, "d.csv"), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "cell.txt"), []byte("mAh,V\n0,1.5\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	cases := []struct{ path, want string }{
		{filepath.Join(dir, "none.csv"), "none.csv: no such file"},
		{filepath.Join(dir, "d.csv"), "d.csv: is a directory"},
		{big, "big.csv: 1048577 bytes, larger than the 1048576-byte limit"},
		{filepath.Join(dir, "cell.txt"), `cell.txt: unknown cell file type ".txt": want .csv or .toml`},
	}
	for _, k := range cases {
		_, err := Load(k.path)
		if err == nil || !strings.Contains(err.Error(), k.want) {
			t.Errorf("Load(%s): got %v, want %q", k.path, err, k.want)
		}
	}
}
