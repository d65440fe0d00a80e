package discharge

import (
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"headroom/curves"
	"headroom/protect"
)

// fixedDrop is a test element with a constant forward drop, the "fixed
// drop" of the closed-form and measured-data checks.
type fixedDrop struct {
	protect.None
	v float64
}

func (f fixedDrop) Kind() string                       { return "fixed" }
func (f fixedDrop) Drop(i, vin, tempC float64) float64 { return f.v }

// linearCell is a cell whose curve falls linearly from v0 to v1 over mAh,
// with constant resistance ohm (rest-voltage curve when ohm > 0) and no
// rate, temperature or self-discharge terms: every runtime on it has a
// closed form.
func linearCell(v0, v1, mAh, ohm float64) *curves.Cell {
	c := &curves.Cell{
		ID: "linear", Curve: curves.MustCurve([]float64{0, mAh}, []float64{v0, v1}),
		RatedMAh: mAh, EndPoint: v1, Peukert: 1, NominalV: (v0 + v1) / 2,
	}
	if ohm > 0 {
		c.Resistance = []curves.ResistancePoint{{Depth: 0, Ohm: ohm}, {Depth: 1, Ohm: ohm}}
	}
	return c
}

func mustEval(t testing.TB, d *Design) *Result {
	t.Helper()
	r, err := Evaluate(d)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

func relErr(got, want float64) float64 { return math.Abs(got-want) / math.Abs(want) }

// Closed forms: on a linear curve every runtime is exact algebra, so the
// quadrature and the cut-off search must match to 1e-6 relative (the acceptance
// bound; the engine bisects the cut-off to 1e-12 of the curve, so the only
// error left is rounding).
func TestClosedForms(t *testing.T) {
	const v0, v1, C = 1.6, 0.8, 2000.0 // V, V, mAh: invented round numbers
	a := (v0 - v1) / C                 // V per mAh
	cases := []struct {
		name  string
		load  Load
		drop  float64
		floor float64
		want  float64 // hours
	}{
		// Constant current I with a fixed drop d: cut when v0 − a·q − d =
		// floor, so q = (v0 − d − floor)/a and t = q/(1000·I).
		{"cc no drop", Load{Kind: ConstantCurrent, Amps: 0.1}, 0, 1.0, (v0 - 1.0) / a / 100},
		{"cc 0.3 V drop", Load{Kind: ConstantCurrent, Amps: 0.1}, 0.3, 1.0, (v0 - 0.3 - 1.0) / a / 100},
		// Constant resistance R behind a fixed drop d: I = (V − d)/R, so
		// dt = R·dq/(1000·(v0 − d − a·q)) and t = R/(1000·a)·ln((v0 − d)/floor).
		{"cr no drop", Load{Kind: ConstantResistance, Ohms: 10}, 0, 1.0, 10 / (1000 * a) * math.Log(v0/1.0)},
		{"cr 0.25 V drop", Load{Kind: ConstantResistance, Ohms: 10}, 0.25, 1.0, 10 / (1000 * a) * math.Log((v0-0.25)/1.0)},
	}
	for _, c := range cases {
		d := &Design{Cell: linearCell(v0, v1, C, 0), Series: 1, Parallel: 1,
			Protect: fixedDrop{v: c.drop}, Profile: []Phase{{Load: c.load, Seconds: 1}}, Floor: c.floor, TempC: 20}
		r := mustEval(t, d)
		if e := relErr(r.RuntimeH, c.want); e > 1e-6 {
			t.Errorf("%s: runtime %.9g h, closed form %.9g h (rel err %.2g)", c.name, r.RuntimeH, c.want, e)
		}
		if r.CutoffCause != CauseFloor {
			t.Errorf("%s: cause %q, want floor", c.name, r.CutoffCause)
		}
	}
}

// Constant power into a resistive source has the closed form of docs/loads.md:
// I = (E − sqrt(E² − 4·R·P))/(2R), collapse when E² < 4·R·P. On a flat
// curve the current is constant, so runtime = capacity / I exactly.
func TestConstantPowerClosedForm(t *testing.T) {
	const E, R, P = 3.0, 1.0, 1.5 // V, Ω, W: invented; E²/(4R) = 2.25 W > P
	c := linearCell(E, E-1e-9, 1000, R)
	d := &Design{Cell: c, Series: 1, Parallel: 1, Profile: []Phase{{Load: Load{Kind: ConstantPower, Watts: P, Efficiency: 1}, Seconds: 1}}, TempC: 20}
	c.EndPoint = 0.1
	r := mustEval(t, d)
	i := (E - math.Sqrt(E*E-4*R*P)) / (2 * R)
	if e := relErr(r.RuntimeH, 1.0/i); e > 1e-6 { // 1000 mAh / (1000·I mA)
		t.Errorf("runtime %.9g h, closed form %.9g h", r.RuntimeH, 1/i)
	}
	// Above E²/(4R) there is no operating point: collapse at once.
	d.Profile[0].Load.Watts = 2.3
	r = mustEval(t, d)
	if r.RuntimeH != 0 || r.CutoffCause != CauseCollapse {
		t.Errorf("2.3 W from a 3 V, 1 Ω source: runtime %v cause %q, want 0 and collapse", r.RuntimeH, r.CutoffCause)
	}
}

// Peukert (1897): t = H·(C/(I·H))^k. Worked example (docs/references.md): 100 Ah at
// H = 20 h, k = 1.2, I = 10 A → 8.7055 h; k = 1.1 → 9.3303 h; at I = C/H the
// runtime is H for every k. Tolerance 0.5 % (the acceptance bound); the engine
// applies the law in closed form, so it is met with room to spare.
func TestPeukertWorkedExample(t *testing.T) {
	cases := []struct{ k, amps, want float64 }{
		{1.2, 10, 8.7055}, {1.1, 10, 9.3303}, {1.2, 5, 20}, {1.1, 5, 20},
	}
	for _, c := range cases {
		cell := linearCell(2.1, 1.75, 100000, 0)
		cell.RefCurrent, cell.RatedCurrent, cell.Peukert = 5, 5, c.k
		d := &Design{Cell: cell, Series: 1, Parallel: 1, Profile: []Phase{{Load: Load{Kind: ConstantCurrent, Amps: c.amps}, Seconds: 1}}, TempC: 20}
		r := mustEval(t, d)
		if e := relErr(r.RuntimeH, c.want); e > 0.005 {
			t.Errorf("k=%v I=%v A: %.4f h, Peukert %.4f h", c.k, c.amps, r.RuntimeH, c.want)
		}
	}
}

// IEC 61951-2 (NiMH): rated capacity is what the cell delivers at 0.2 It to
// 1.0 V at 20 ± 5 °C (It = rated capacity ÷ 1 h). IEC 61960-3 (Li-ion): at
// 0.2 It to the maker's end-of-discharge voltage. The built-in cells must
// deliver their rating within 3 % (the acceptance bound; self-discharge over the
// 5 h run takes well under 0.5 %).
func TestRatedCapacityIEC(t *testing.T) {
	for _, id := range []string{"hr6", "hr6-lsd", "hr03", "li-ion-18650", "li-ion-pouch", "lifepo4"} {
		c, ok := curves.Lookup(id)
		if !ok {
			t.Fatalf("library has no %s", id)
		}
		it := c.RatedMAh / 1000 // A for a 1 h discharge
		d := &Design{Cell: c, Series: 1, Parallel: 1, Profile: []Phase{{Load: Load{Kind: ConstantCurrent, Amps: 0.2 * it}, Seconds: 1}}, TempC: 20}
		if c.Chemistry == "nimh" {
			d.Floor = 1.0 // IEC 61951-2 end-point
		}
		r := mustEval(t, d)
		if e := relErr(r.DeliveredMAh, c.RatedMAh); e > 0.03 {
			t.Errorf("%s at 0.2 It: %.0f mAh, rated %.0f mAh (%.1f %%)", id, r.DeliveredMAh, c.RatedMAh, e*100)
		}
		if h := r.RuntimeH; h < 4.75 || h > 5.25 { // 0.2 It runs 5 h by definition
			t.Errorf("%s at 0.2 It runs %.2f h, want about 5 h", id, h)
		}
	}
}

// measuredData is the path of a file of the repository's measured data
// (testdata/measured at the module root, copied there with its source note).
func measuredData(name string) string {
	return filepath.Join("..", "testdata", "measured", name)
}

// Measured data: NASA Ames Prognostics Center of Excellence battery data
// set, cell B0005, first discharge at 2 A (testdata/measured/README.md gives
// the check values, by linear interpolation of the file): 3335.0 s to 2.7 V,
// 3079.5 s to 3.3 V; a 3.0 V floor behind a 0.3 V drop stops at 3.3 V cell
// voltage, 1710.8 of 1852.8 mAh: 7.7 % stranded. Tolerances are the acceptance
// bounds (0.5 %, ±0.2 points); the import's running minimum moves a crossing by
// less than one ~19 s sample.
func TestMeasuredLiIon(t *testing.T) {
	p := measuredData("li-ion-2A-discharge.csv")
	f, err := os.Open(p)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	cell, err := curves.ImportLog(f, p, 2)
	if err != nil {
		t.Fatal(err)
	}
	run := func(floor, drop float64) *Result {
		return mustEval(t, &Design{Cell: cell, Series: 1, Parallel: 1, Protect: fixedDrop{v: drop},
			Profile: []Phase{{Load: Load{Kind: ConstantCurrent, Amps: 2}, Seconds: 1}}, Floor: floor, TempC: 24})
	}
	for _, c := range []struct{ floor, seconds float64 }{{2.7, 3335.0}, {3.3, 3079.5}} {
		r := run(c.floor, 0)
		if e := relErr(r.RuntimeH*3600, c.seconds); e > 0.005 {
			t.Errorf("2 A to %.1f V: %.1f s, measured %.1f s", c.floor, r.RuntimeH*3600, c.seconds)
		}
	}
	full := run(2.7, 0).DeliveredMAh
	cut := run(3.0, 0.3)
	stranded := 1 - cut.DeliveredMAh/full
	if math.Abs(stranded-0.077) > 0.002 {
		t.Errorf("3.0 V floor behind 0.3 V: %.2f %% stranded of the 2.7 V capacity, want 7.7 ± 0.2 %%", stranded*100)
	}
}

// Hand calculation for a pulsed profile: linear rest curve 1.5 → 1.0 V over
// 2000 mAh, 0.2 Ω a cell, 2 in series, floor 2.2 V; 450 mA for 3 s then
// 15 mA for 27 s. The pulse hits the floor when 2·(V(q) − 0.45·0.2) = 2.2:
// V = 1.19 V, q = (1.5 − 1.19)·4000 = 1240 mAh. The average current
// (450·3 + 15·27)/30 = 58.5 mA alone would reach the floor only at 1553 mAh.
// Runtime = 1240/58.5 h. Tolerance 1 % (the acceptance bound); the engine is exact here.
func TestPulseSetsCutoff(t *testing.T) {
	cell := linearCell(1.5, 1.0, 2000, 0.2)
	d := &Design{Cell: cell, Series: 2, Parallel: 1, Floor: 2.2, TempC: 20, Profile: []Phase{
		{Name: "motor", Load: Load{Kind: ConstantCurrent, Amps: 0.45}, Seconds: 3},
		{Name: "idle", Load: Load{Kind: ConstantCurrent, Amps: 0.015}, Seconds: 27},
	}}
	r := mustEval(t, d)
	want := 1240 / 58.5
	if e := relErr(r.RuntimeH, want); e > 0.01 {
		t.Errorf("pulsed runtime %.4f h, hand calculation %.4f h", r.RuntimeH, want)
	}
	if r.CutoffPhase != "motor" || r.CutoffCause != CauseFloor {
		t.Errorf("cut-off on %q by %q, want motor by floor", r.CutoffPhase, r.CutoffCause)
	}
	if math.Abs(r.CutoffLoadV-2.2) > 1e-6 {
		t.Errorf("cut-off load voltage %.6f V, want the 2.2 V floor", r.CutoffLoadV)
	}
}

// randomDesign draws a well-formed design from the library.
func randomDesign(rng *rand.Rand) *Design {
	lib := curves.Library()
	c := lib[rng.IntN(len(lib))]
	var phases []Phase
	n := 1 + rng.IntN(3)
	for k := 0; k < n; k++ {
		var l Load
		switch rng.IntN(4) {
		case 0:
			l = Load{Kind: ConstantCurrent, Amps: 0.001 + rng.Float64()*0.5}
		case 1:
			l = Load{Kind: ConstantPower, Watts: 0.01 + rng.Float64()*1.5, Efficiency: 0.6 + 0.4*rng.Float64()}
		case 2:
			l = Load{Kind: ConstantResistance, Ohms: 5 + rng.Float64()*200}
		case 3:
			l = Load{Kind: LED, Vf: 1.5 + rng.Float64(), Ohms: 10 + rng.Float64()*100}
		}
		phases = append(phases, Phase{Load: l, Seconds: 0.5 + rng.Float64()*30})
	}
	s := 1 + rng.IntN(4)
	return &Design{Cell: c, Series: s, Parallel: 1 + rng.IntN(3), Protect: fixedDrop{v: rng.Float64() * 0.5},
		Profile: phases, Floor: rng.Float64() * float64(s) * c.NominalV, TempC: -10 + rng.Float64()*50,
		HoursPerDay: float64(rng.IntN(25)), Standby: rng.Float64() * 1e-4}
}

func finiteNonNeg(t *testing.T, r *Result) {
	t.Helper()
	for name, v := range map[string]float64{
		"runtime": r.RuntimeH, "days": r.RuntimeDays, "delivered": r.DeliveredMAh, "Wh": r.DeliveredWh,
		"reference": r.ReferenceMAh, "protection Wh": r.ProtectionLossWh, "cell Wh": r.CellLossWh,
		"peak W": r.ProtectionPeakW, "cost": r.CostPerHour, "standby": r.StandbyMAh, "self": r.SelfDischargeMAh,
	} {
		if math.IsNaN(v) || math.IsInf(v, 0) || v < 0 {
			t.Errorf("%s = %v: want a finite, non-negative number", name, v)
		}
	}
	// The element's share, and so the total, may be negative (an element
	// that lets a resistive load run longer); the floor's never is, but for
	// rounding in the cut-off search (1e-9 of the reference).
	for name, v := range map[string]float64{"stranded": r.StrandedMAh, "by protection": r.StrandedByProtectionMAh, "by floor": r.StrandedByFloorMAh} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			t.Errorf("%s = %v: want a finite number", name, v)
		}
	}
	if r.StrandedByFloorMAh < -1e-9*math.Max(1, r.ReferenceMAh) {
		t.Errorf("by floor = %v: removing the floor can only lengthen a run", r.StrandedByFloorMAh)
	}
}

// Properties over randomised designs (no outside source: these follow from
// the physics). Runtime never rises when the floor, the drop or the load
// rises and never falls with more cells in parallel; the reference and the
// stranded split equal what separate runs without the element, without the
// floor and without both give (checkSplitByRuns); all outputs finite, and non-negative except the
// element's share of the stranded charge and the total. The monotonicity
// checks allow 1e-9 relative for the bisection's resolution.
func TestProperties(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	const slack = 1 + 1e-9
	split := 0
	for n := 0; n < 400; n++ {
		d := randomDesign(rng)
		base := mustEval(t, d)
		finiteNonNeg(t, base)
		if checkSplitByRuns(t, n, d, base) {
			split++
		}
		higher := *d
		higher.Floor += 0.05
		if r := mustEval(t, &higher); r.RuntimeH > base.RuntimeH*slack {
			t.Fatalf("design %d: floor up, runtime %v → %v", n, base.RuntimeH, r.RuntimeH)
		}
		// A larger drop shortens the run of current and power loads. A
		// resistive or LED load draws less current behind a larger drop, so
		// when the cells (not the floor) end the run it can run longer: that
		// is physics, not a defect, and those designs are left out here.
		more := *d
		more.Protect = fixedDrop{v: d.Protect.(fixedDrop).v + 0.05}
		if r := mustEval(t, &more); !resistive(d) && r.RuntimeH > base.RuntimeH*slack {
			t.Fatalf("design %d: drop up, runtime %v → %v", n, base.RuntimeH, r.RuntimeH)
		}
		heavier := *d
		heavier.Profile = nil
		for _, p := range d.Profile {
			heavier.Profile = append(heavier.Profile, Phase{Load: p.Load.Scale(1.1), Seconds: p.Seconds})
		}
		if r := mustEval(t, &heavier); r.RuntimeH > base.RuntimeH*slack {
			t.Fatalf("design %d: load up, runtime %v → %v", n, base.RuntimeH, r.RuntimeH)
		}
		wider := *d
		wider.Parallel++
		if r := mustEval(t, &wider); r.RuntimeH*slack < base.RuntimeH {
			t.Fatalf("design %d: one more string in parallel, runtime %v → %v", n, base.RuntimeH, r.RuntimeH)
		}
	}
	if split < 200 {
		t.Errorf("the split was checked against separate runs on %d designs, want at least 200 (284 with this seed)", split)
	}
	t.Logf("split checked against separate runs on %d of 400 designs", split)
}

func resistive(d *Design) bool {
	for _, p := range d.Profile {
		if p.Load.Kind == ConstantResistance || p.Load.Kind == LED {
			return true
		}
	}
	return false
}

// A design that draws nothing from a cell that never self-discharges has
// no finite runtime: Evaluate must say so, not return +Inf or NaN.
func TestNoDrainIsAnError(t *testing.T) {
	for _, l := range []Load{
		{Kind: ConstantCurrent, Amps: 0},
		{Kind: ConstantPower, Watts: 0, Efficiency: 1},
		{Kind: LED, Vf: 5, Ohms: 10}, // Vf above the 1.6 V cell: always dark
	} {
		d := &Design{Cell: linearCell(1.6, 0.8, 2000, 0.1), Series: 1, Parallel: 1,
			Profile: []Phase{{Load: l, Seconds: 1}}, TempC: 20}
		r, err := Evaluate(d)
		if err == nil {
			t.Errorf("%s: runtime %v h, want an error saying the pack is never run down", l.Label(), r.RuntimeH)
		}
	}
}

// An LED whose forward voltage is above the fresh pack never lights; the
// run then lasts on self-discharge alone, so the result must say so.
func TestDarkLEDWarns(t *testing.T) {
	c := linearCell(1.6, 0.8, 2000, 0.1)
	c.SelfDischarge = 0.02
	d := &Design{Cell: c, Series: 2, Parallel: 1, TempC: 20,
		Profile: []Phase{{Name: "eyes", Load: Load{Kind: LED, Vf: 3.6, Ohms: 47}, Seconds: 1}}}
	r := mustEval(t, d)
	found := false
	for _, w := range r.Warnings {
		if strings.Contains(w, "eyes never lights") {
			found = true
		}
	}
	if !found {
		t.Errorf("warnings %q: want one saying the LED never lights", r.Warnings)
	}
	// A lit LED gets no such warning.
	d.Profile[0].Load.Vf = 2.0
	for _, w := range mustEval(t, d).Warnings {
		if strings.Contains(w, "never lights") {
			t.Errorf("lit LED warned: %q", w)
		}
	}
}

// checkSplitByRuns recomputes the reference and the stranded split of
// result r from separate evaluations through the public API — the design
// without its element, without its floor, and without both — by the
// definition the README states (the mean of both orders of removing the two
// causes), rather than trusting the engine's own bookkeeping. Cells with a
// pack cut-off are left out: the cut-off counts with the floor in the split
// but stays in a run whose floor is 0.
func checkSplitByRuns(t *testing.T, n int, d *Design, r *Result) bool {
	t.Helper()
	if d.Cell.CutoffV > 0 || !r.Started() {
		return false
	}
	run := func(el bool, floor bool) float64 {
		v := *d
		if !el {
			v.Protect = nil
		}
		if !floor {
			v.Floor = 0
		}
		x, err := Evaluate(&v)
		if err != nil {
			t.Fatalf("design %d: %v", n, err)
		}
		return x.DeliveredMAh
	}
	q11, q01, q10, q00 := r.DeliveredMAh, run(false, true), run(true, false), run(false, false)
	byEl := 0.5 * ((q01 - q11) + (q00 - q10))
	byFloor := 0.5 * ((q10 - q11) + (q00 - q01))
	// Each variant inside the evaluation is the run a separate evaluation
	// makes (its own capacity scale and clock), so they differ only by the
	// cut-off searches' resolution (1e-12 of the curve) and the split's
	// snapping of differences below 1e-9 of the reference to zero:
	// measured at most 2.5e-13 of the reference over these designs.
	tol := 1e-8 * math.Max(1, q00)
	if math.Abs(r.ReferenceMAh-q00) > tol || math.Abs(r.StrandedByProtectionMAh-byEl) > tol || math.Abs(r.StrandedByFloorMAh-byFloor) > tol {
		t.Errorf("design %d: reference %.9g, by element %.9g, by floor %.9g; separate runs give %.9g, %.9g, %.9g",
			n, r.ReferenceMAh, r.StrandedByProtectionMAh, r.StrandedByFloorMAh, q00, byEl, byFloor)
	}
	return true
}
