package curves

import (
	"bytes"
	"fmt"
	"math"
	"strings"
	"testing"
)

// A cell file nested 10,000 deep or with a 30,000-part dotted key (which
// took the TOML library 20 s and 4 GB) is refused on its raw text, with
// the file and line in the message (cells check, --cell).
func TestCellTOMLShapeRefused(t *testing.T) {
	deep := "id = \"x\"\nx = " + strings.Repeat("{a=", 10000) + "1" + strings.Repeat("}", 10000) + "\n"
	dotted := "id = \"x\"\n[" + strings.Repeat("a.", 30000) + "a]\n"
	for name, text := range map[string]string{"deep": deep, "dotted": dotted} {
		_, err := ReadCellTOML(strings.NewReader(text), name+".toml")
		if err == nil || !strings.HasPrefix(err.Error(), name+".toml line 2: ") || !strings.Contains(err.Error(), "refuses the file before reading it") {
			t.Errorf("%s: got %v", name, err)
		}
	}
}

// Thinning keeps the ends, at most MaxCurvePoints points, and reports
// the largest error truly left: checked here by interpolating the thinned
// curve at every dropped point (independent of how thin found it).
func TestThinBoundsPointsAndStatesError(t *testing.T) {
	for _, n := range []int{3, 150, 201, 5000, 60000} {
		q := make([]float64, n)
		v := make([]float64, n)
		for i := range q {
			x := float64(i) / float64(n-1)
			q[i] = 3000 * x
			// A falling curve with a knee and a fast tail, plus a
			// 1-in-7 wiggle of 0.5 mV that stays non-rising.
			v[i] = 1.6 - 0.4*x - 0.4*math.Pow(x, 12) - 0.0005*float64(i%7)/6 - 1e-9*float64(i)
		}
		for i := 1; i < n; i++ {
			v[i] = math.Min(v[i], v[i-1])
		}
		c := &Cell{Curve: MustCurve(q, v)}
		thinCell(c, true)
		got := c.Curve
		if got.Len() > MaxCurvePoints || got.Len() < 2 {
			t.Fatalf("n=%d: %d points", n, got.Len())
		}
		if q0, _ := got.Point(0); q0 != q[0] || got.End() != q[n-1] {
			t.Errorf("n=%d: the ends moved", n)
		}
		worst := 0.0
		for i := range q {
			worst = math.Max(worst, math.Abs(got.At(q[i])-v[i]))
		}
		stated := 0.0
		if c.Thinned != nil {
			stated = c.Thinned.ErrV
		}
		// The stated error is the true one up to rounding (1e-12 V).
		if math.Abs(worst-stated) > 1e-12 {
			t.Errorf("n=%d: stated error %g V, true %g V", n, stated, worst)
		}
		// Within 1 mV where 200 points can do it: this curve needs far fewer
		// than 200 for the smooth part; the wiggle sets the floor (≤0.5 mV).
		if worst > ThinTolerance {
			t.Errorf("n=%d: error %g V above the %g V aim", n, worst, ThinTolerance)
		}
		if _, err := NewCurve(got.Charges(), pick(got.v, seq(got.Len()))); err != nil {
			t.Errorf("n=%d: thinned curve invalid: %v", n, err)
		}
	}
	// A straight line needs its two ends only.
	c := &Cell{Curve: MustCurve([]float64{0, 1, 2, 3, 4}, []float64{1.5, 1.4, 1.3, 1.2, 1.1})}
	thinCell(c, true)
	if c.Curve.Len() != 2 || c.Thinned.ErrV > 1e-12 {
		t.Errorf("a straight line thinned to %d points, error %v", c.Curve.Len(), c.Thinned.ErrV)
	}
}

func seq(n int) []int {
	out := make([]int, n)
	for i := range out {
		out[i] = i
	}
	return out
}

// A CSV of 40,000 points loads thinned to MaxCurvePoints with an ohm
// column thinned alike; a short file is left as it is.
func TestLongCSVThinnedOnLoad(t *testing.T) {
	var b strings.Builder
	b.WriteString("mAh,V,ohm\n")
	n := 40000
	for i := 0; i < n; i++ {
		x := float64(i) / float64(n-1)
		fmt.Fprintf(&b, "%.3f,%.5f,%.4f\n", 2500*x, 1.55-0.5*x-0.3*math.Pow(x, 10), 0.1+0.2*x*x)
	}
	c, err := ReadCSV(strings.NewReader(b.String()), "long.csv")
	if err != nil {
		t.Fatal(err)
	}
	if c.Curve.Len() > MaxCurvePoints || len(c.Resistance) > MaxCurvePoints || c.Thinned == nil || c.Thinned.From != n {
		t.Fatalf("%d curve points, %d resistance points, thinning %+v", c.Curve.Len(), len(c.Resistance), c.Thinned)
	}
	short, err := ReadCSV(strings.NewReader("mAh,V\n0,1.5\n1,1.4\n2,1.3\n"), "short.csv")
	if err != nil || short.Curve.Len() != 3 || short.Thinned != nil {
		t.Fatalf("short file: %v, %+v", err, short)
	}
}

// What headroom writes, headroom reads back: a cell with long curve and
// resistance tables is thinned so that its CSV (the union of both tables'
// points) reads back unthinned, to the same voltages.
func TestThinnedCellRoundTrips(t *testing.T) {
	var b strings.Builder
	b.WriteString("curve = [")
	for i := 0; i < 190; i++ {
		x := float64(i) / 189
		fmt.Fprintf(&b, "[%.4f, %.6f],", 2000*x, 1.55-0.5*x-0.3*math.Pow(x, 9))
	}
	b.WriteString("]\nref_current = 0.1\nresistance = [")
	for i := 0; i < 190; i++ {
		x := float64(i) / 189
		fmt.Fprintf(&b, "[%.6f, %.5f],", x, 0.1+0.3*x*x)
	}
	b.WriteString("]\n")
	c, err := ReadCellTOML(strings.NewReader(b.String()), "both.toml")
	if err != nil {
		t.Fatal(err)
	}
	if c.Curve.Len()+len(c.Resistance) > MaxCurvePoints {
		t.Fatalf("%d + %d points kept", c.Curve.Len(), len(c.Resistance))
	}
	var csv bytes.Buffer
	if err := WriteCSV(&csv, c); err != nil {
		t.Fatal(err)
	}
	back, err := ReadCSV(&csv, "both.csv")
	if err != nil {
		t.Fatal(err)
	}
	if back.Thinned != nil {
		t.Fatalf("the written file was thinned again on reading: %+v", back.Thinned)
	}
	for i := 0; i < c.Curve.Len(); i++ {
		q, _ := c.Curve.Point(i)
		// 1e-9 V: WriteCSV adds RefCurrent·R and the reader subtracts it.
		if v0, v1 := c.Terminal(q, c.RefCurrent, RefTempC), back.Terminal(q, c.RefCurrent, RefTempC); math.Abs(v0-v1) > 1e-9 {
			t.Fatalf("at %v mAh: %v V reads back as %v V", q, v0, v1)
		}
	}
}
