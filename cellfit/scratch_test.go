package cellfit

import (
	"os"
	"path/filepath"
	"testing"
)

func loadT(t testing.TB, name string) *Log {
	p := filepath.Join("..", "testdata", "measured", "nasa-li-ion", name)
	f, err := os.Open(p)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	l, err := ReadLog(f, name)
	if err != nil {
		t.Fatal(err)
	}
	return l
}

func TestScratch(t *testing.T) {
	a, b, sq := loadT(t, "cc-4A-B0034.csv"), loadT(t, "cc-2A-B0036.csv"), loadT(t, "square-4A-50pct-B0026.csv")
	for _, set := range [][]*Log{{a, b}, {a, b, sq}} {
		r, err := Fit(set, Options{Auto: true})
		if err != nil {
			t.Fatal(err)
		}
		m := r.Model
		t.Logf("iters %d levels %v steps %d warn %v", r.Iterations, r.Levels, r.Steps, r.Warnings)
		t.Logf("E %v", m.E)
		t.Logf("QE %v", m.QE)
		t.Logf("R0 %v", m.R0)
		t.Logf("RC %+v", m.RC)
		for _, f := range r.Fits {
			t.Logf("%s rms %.1f mV worst %.1f mV line %d charge %.1f", f.Log.Name, f.RMS*1e3, f.Worst*1e3, f.WorstLine, f.ChargeMAh)
		}
		for _, c := range []struct {
			l   *Log
			cut float64
		}{{a, 2.2}, {b, 2.7}, {sq, 2.2}} {
			_, q, ok := m.Cutoff(c.l.LogCurrent(), c.cut, 0.1)
			t.Logf("%s cutoff %.2f: %.1f mAh %v", c.l.Name, c.cut, q, ok)
		}
		_, q, ok := m.Cutoff(SquareWave(4, 10, 10, 3000), 2.2, 0.1)
		t.Logf("square synthetic: %.1f %v", q, ok)
	}
}
