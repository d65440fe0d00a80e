package spice_test

import (
	"math"
	"testing"

	"headroom/internal/spice"
	"headroom/internal/spicetest"
)

func TestValues(t *testing.T) {
	out := "Doing analysis at TEMP = 27.000000 and TNOM = 27.000000\n" +
		"v(1) = 5.360860207548e-01\n" +
		"vd                  =  7.50000e-01 at=  1.00000e-03\n" +
		"note = not-a-number\n" +
		"v(1) = 4.088465675430e-01\n"
	got := spice.Values(out)
	// Exact: the parser must return the printed decimal unchanged.
	want := map[string]float64{"v(1)": 4.088465675430e-01, "vd": 0.75}
	for k, w := range want {
		if got[k] != w {
			t.Errorf("%s = %v, want %v", k, got[k], w)
		}
	}
	if _, ok := got["note"]; ok {
		t.Errorf("a non-numeric value was read")
	}
	if _, ok := got["doing analysis at temp"]; ok {
		t.Errorf("a sentence was read as a name")
	}
	if _, err := spice.Value(out, "v(9)"); err == nil {
		t.Errorf("missing name gave no error")
	}
}

// A resistor divider, solved exactly by hand: 3 V across 1k + 2k gives 2 V
// at the middle node.
func TestRunDivider(t *testing.T) {
	spicetest.Require(t)
	out, err := spice.Run("divider\nV1 1 0 DC 3\nR1 1 2 1k\nR2 2 0 2k\n.control\nset numdgt=12\nop\nprint v(2)\nquit 0\n.endc\n.end\n")
	if err != nil {
		t.Fatal(err)
	}
	v, err := spice.Value(out, "v(2)")
	if err != nil {
		t.Fatal(err)
	}
	// Tolerance 1e-9 V: a linear circuit converges in one Newton step, so
	// only print rounding (12 digits) remains.
	if math.Abs(v-2) > 1e-9 {
		t.Errorf("v(2) = %.12g, want 2", v)
	}
}

func TestRunBadNetlist(t *testing.T) {
	spicetest.Require(t)
	if _, err := spice.Run("bad\nQ1 1 2\n.control\nop\nquit 0\n.endc\n.end\n"); err == nil {
		t.Errorf("a broken netlist gave no error")
	}
}

// An RC charge from 0 V: v = 1 − exp(−t/RC) crosses 0.5 V at RC·ln 2 =
// 0.6931 ms for 1 kΩ and 1 µF (exact). The .meas result is read back with
// Value; 0.5 % allows for ngspice's time-step truncation error at a
// 10 µs maximum step.
func TestRunMeas(t *testing.T) {
	spicetest.Require(t)
	out, err := spice.Run("rc\nV1 1 0 DC 1\nR1 1 2 1k\nC1 2 0 1u IC=0\n.tran 1u 2m 0 10u uic\n.meas tran tcross WHEN v(2)=0.5\n.end\n")
	if err != nil {
		t.Fatal(err)
	}
	got, err := spice.Value(out, "tcross")
	if err != nil {
		t.Fatal(err)
	}
	if want := 1e-3 * math.Ln2; math.Abs(got/want-1) > 0.005 {
		t.Errorf("tcross = %g s, want %g s", got, want)
	}
}
