package discharge

import (
	"math"
	"strings"
	"testing"

	"headroom/curves"
	"headroom/protect"
)

// The split of stranded charge against a hand calculation (the definition
// in stranded.go, Shapley's mean of both orders; the arithmetic is ours).
//
// Linear rest curve V(q) = 1.5 − 0.5·q/1000 V from 0 to 1200 mAh (0.9 V,
// the end-point), no resistance, no rate or temperature terms; a 100 mA
// constant-current load behind a fixed 0.3 V drop; floor 1.0 V.
//
//	qEF (element, floor):   V − 0.3 ≥ 1.0 → V ≥ 1.3 → q ≤  400 mAh
//	q0F (floor only):       V ≥ 1.0               → q ≤ 1000 mAh
//	qE0 (element only):     V − 0.3 ≥ 0 always; the end-point → 1200 mAh
//	q00 (neither):          the end-point          → 1200 mAh
//
// Element first: 600 to the element, 200 to the floor. Floor first: 800 to
// the floor, 0 to the element. The mean: element ½·(600 + 0) = 300 mAh,
// floor ½·(200 + 800) = 500 mAh, adding to 1200 − 400 = 800 mAh stranded.
// The engine narrows cut-offs to 1e-12 of the curve on an exact linear
// law, so 1e-6 mAh is rounding headroom only.
func TestStrandedSplitHandCalculation(t *testing.T) {
	d := &Design{Cell: linearCell(1.5, 0.9, 1200, 0), Series: 1, Parallel: 1,
		Protect: fixedDrop{v: 0.3}, Floor: 1.0, TempC: 20,
		Profile: []Phase{{Load: Load{Kind: ConstantCurrent, Amps: 0.1}, Seconds: 1}}}
	r := mustEval(t, d)
	const tol = 1e-6 // mAh, see above
	for _, c := range []struct {
		name      string
		got, want float64
	}{
		{"delivered", r.DeliveredMAh, 400},
		{"reference", r.ReferenceMAh, 1200},
		{"stranded", r.StrandedMAh, 800},
		{"by protection", r.StrandedByProtectionMAh, 300},
		{"by the floor", r.StrandedByFloorMAh, 500},
	} {
		if math.Abs(c.got-c.want) > tol {
			t.Errorf("%s: %.9g mAh, hand calculation %g mAh", c.name, c.got, c.want)
		}
	}
}

// An element can lengthen a run, and then its share is negative, not
// clamped to zero. Hand calculation: linear rest curve V(q) = 2.0 − q/1000 V
// from 0 to 1100 mAh (0.9 V, the end-point on the cell's terminal voltage),
// 1 Ω in the cell, a 1 Ω resistive load, no floor.
//
//	no element:  Vt = V·1/(1+1) = V/2 ≥ 0.9           → V ≥ 1.8 → q ≤ 200 mAh
//	0.3 V drop:  I = (V − 0.3)/2, Vt = V − I = (V + 0.3)/2 ≥ 0.9
//	                                                   → V ≥ 1.5 → q ≤ 500 mAh
//
// With no floor both orders agree: the element's share is 200 − 500 =
// −300 mAh, the floor's 0, the stranded total −300 mAh (the element lets
// the cells give 300 mAh more than the reference). Tolerance as above.
func TestStrandedElementCanRecoverCharge(t *testing.T) {
	d := &Design{Cell: linearCell(2.0, 0.9, 1100, 1.0), Series: 1, Parallel: 1,
		Protect: fixedDrop{v: 0.3}, Floor: 0, TempC: 20,
		Profile: []Phase{{Load: Load{Kind: ConstantResistance, Ohms: 1}, Seconds: 1}}}
	r := mustEval(t, d)
	const tol = 1e-6
	for _, c := range []struct {
		name      string
		got, want float64
	}{
		{"delivered", r.DeliveredMAh, 500},
		{"reference", r.ReferenceMAh, 200},
		{"stranded", r.StrandedMAh, -300},
		{"by protection", r.StrandedByProtectionMAh, -300},
		{"by the floor", r.StrandedByFloorMAh, 0},
	} {
		if math.Abs(c.got-c.want) > tol {
			t.Errorf("%s: %.9g mAh, hand calculation %g mAh", c.name, c.got, c.want)
		}
	}
}

// The reference is the cells and the load alone: with a constant-power
// load (whose current, and so the rate effect, rises behind a larger drop)
// it must not move with the element chosen. Same physics, so 1e-9
// relative (the cut-off search's resolution).
func TestReferenceIgnoresElement(t *testing.T) {
	cell, ok := curves.Lookup("lr6")
	if !ok {
		t.Fatal("no lr6 in the library")
	}
	load, err := ParseLoad("0.5W@85%")
	if err != nil {
		t.Fatal(err)
	}
	var ref float64
	for i, spec := range []string{"none", "pmos", "schottky", "diode"} {
		el, err := protect.Parse(spec)
		if err != nil {
			t.Fatal(err)
		}
		d := &Design{Cell: cell, Series: 2, Parallel: 1, Protect: el, Floor: 1.8, TempC: 20,
			Profile: []Phase{{Load: load, Seconds: 1}}}
		r := mustEval(t, d)
		if i == 0 {
			ref = r.ReferenceMAh
			continue
		}
		if relErr(r.ReferenceMAh, ref) > 1e-9 {
			t.Errorf("%s: reference %.6g mAh, with no element %.6g mAh", spec, r.ReferenceMAh, ref)
		}
		if e := math.Abs(r.DeliveredMAh + r.StrandedMAh - r.ReferenceMAh); e > 1e-9*ref {
			t.Errorf("%s: delivered + stranded ≠ reference by %g mAh", spec, e)
		}
	}
}

// Two phases with the same name: the cut-off sentence must name the one
// that failed (the 900 mA one, which sags below the floor first), found by
// index, not by its label.
func TestCutoffPhaseByIndex(t *testing.T) {
	d := &Design{Cell: linearCell(1.5, 1.0, 2000, 0.2), Series: 2, Parallel: 1, Floor: 2.2, TempC: 20,
		Profile: []Phase{
			{Name: "pulse", Load: Load{Kind: ConstantCurrent, Amps: 0.02}, Seconds: 10},
			{Name: "pulse", Load: Load{Kind: ConstantCurrent, Amps: 0.9}, Seconds: 1},
		}}
	r := mustEval(t, d)
	if r.CutoffIndex != 1 {
		t.Errorf("cut-off phase index %d, want 1 (the 900 mA phase)", r.CutoffIndex)
	}
	if s := d.CutoffText(r); !strings.Contains(s, "900 mA") || strings.Contains(s, "20.0 mA") {
		t.Errorf("cut-off text %q: want the 900 mA phase named", s)
	}
}

// A design that fails on the fresh pack has no stranded share to show.
func TestNeverStartsHasNoShare(t *testing.T) {
	d := &Design{Cell: linearCell(1.5, 1.0, 2000, 0), Series: 1, Parallel: 1, Floor: 1.6, TempC: 20,
		Profile: []Phase{{Load: Load{Kind: ConstantCurrent, Amps: 0.1}, Seconds: 1}}}
	r := mustEval(t, d)
	if r.Started() {
		t.Fatalf("a 1.5 V cell under a 1.6 V floor started: runtime %g h", r.RuntimeH)
	}
	if _, ok := r.StrandedShare(); ok {
		t.Error("a design that never starts reports a stranded share")
	}
	if s := d.CutoffText(r); !strings.HasPrefix(s, "does not start") {
		t.Errorf("cut-off text %q: want it to say it does not start", s)
	}
}

// A negative share is said in words, not as a bare "-300 mAh by the drop".
func TestProtectionShareWords(t *testing.T) {
	r := &Result{StrandedByProtectionMAh: -300}
	if s := r.ProtectionShareText(); !strings.Contains(s, "-300 mAh") || !strings.Contains(s, "run longer") {
		t.Errorf("%q", s)
	}
	r.StrandedByProtectionMAh = 924
	if s := r.ProtectionShareText(); s != "924 mAh by the protection drop" {
		t.Errorf("%q", s)
	}
}
