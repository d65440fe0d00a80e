package tolerance

import (
	"math"
	"math/rand/v2"
	"reflect"
	"strings"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"headroom/curves"
	"headroom/discharge"
	"headroom/protect"
)

// demo is the built-in demo's design (internal/scenario/demo.toml: 2×LR6,
// 450 mA / 120 mA / 15 mA phases, 1.8 V floor, 1 h a day, 30 µA standby)
// with the element given.
func demo(t testing.TB, spec string) *discharge.Design {
	t.Helper()
	c, ok := curves.Lookup("lr6")
	if !ok {
		t.Fatal("no lr6 in the library")
	}
	el, err := protect.Parse(spec)
	if err != nil {
		t.Fatal(err)
	}
	return &discharge.Design{Cell: c, Series: 2, Parallel: 1, Protect: el,
		Profile: []discharge.Phase{
			{Name: "motor wag", Load: discharge.Load{Kind: discharge.ConstantCurrent, Amps: 0.45}, Seconds: 3},
			{Name: "bark", Load: discharge.Load{Kind: discharge.ConstantCurrent, Amps: 0.12}, Seconds: 2},
			{Name: "idle", Load: discharge.Load{Kind: discharge.ConstantCurrent, Amps: 0.015}, Seconds: 25},
		},
		Floor: 1.8, TempC: 20, HoursPerDay: 1, Standby: 30e-6}
}

// linearCell is a cell whose voltage falls linearly from 1.5 V to 1.0 V
// over 1000 mAh, with no resistance, rate, temperature or self-discharge
// effect: at a constant current it runs exactly capacity ÷ current.
func linearCell() *curves.Cell {
	return &curves.Cell{ID: "linear", Name: "linear test cell", Chemistry: "test",
		Curve:    curves.MustCurve([]float64{0, 1000}, []float64{1.5, 1.0}),
		NominalV: 1.25, RatedMAh: 1000, RatedCurrent: 0.1, EndPoint: 1.0, Peukert: 1}
}

// Closed form (source: gonum distuv.Normal quantiles). Constant current on
// a linear curve: runtime = capacity ÷ current, so with capacity normal
// (mean 1000 mAh, σ 10 %: limits ±30 % at ±3σ) the runtime quantiles are
// 10 h × the normal's. The cut-off at ±3σ moves p10 by 0.03 % of the
// mean; Latin-hypercube sampling at 20,000 samples puts the empirical
// quantile within 1/20000 in probability (≪ 0.1 %); the 1 % bound is the
// acceptance bound.
func TestSpreadClosedFormNormalCapacity(t *testing.T) {
	d := &discharge.Design{Cell: linearCell(), Series: 1, Parallel: 1,
		Profile: []discharge.Phase{{Load: discharge.Load{Kind: discharge.ConstantCurrent, Amps: 0.1}, Seconds: 1}},
		TempC:   20}
	r, err := discharge.Evaluate(d)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(r.RuntimeH-10) > 1e-6 {
		t.Fatalf("nominal runtime %v h, want 10 h (1000 mAh ÷ 100 mA)", r.RuntimeH)
	}
	tols := []Tol{{Name: "lot_capacity", Form: Percent, Pct: 0.3, Dist: Normal}}
	st, err := Spread(d, tols, 20000, 7)
	if err != nil {
		t.Fatal(err)
	}
	ref := distuv.Normal{Mu: 10, Sigma: 1}
	for _, c := range []struct {
		p   float64
		got float64
	}{{0.1, st.P10H}, {0.5, st.P50H}, {0.9, st.P90H}} {
		want := ref.Quantile(c.p)
		if math.Abs(c.got-want) > 0.01*want {
			t.Errorf("p%.0f = %.4f h, want %.4f h (gonum distuv.Normal) within 1 %%", c.p*100, c.got, want)
		}
	}
	// Delivered charge follows the capacity itself: p50 is 1000 mAh.
	if math.Abs(st.P50MAh-1000) > 10 {
		t.Errorf("p50 delivered %.1f mAh, want 1000 mAh within 1 %%", st.P50MAh)
	}
}

// Property: on designs whose runtime is monotone in every tolerance, no
// sample runs shorter than the worst corner or longer than the best
// (the corners sit at the limits of a box the samples stay inside).
// Designs: random library cells, series counts, constant-current loads,
// floors and elements; the tolerances are those that move runtime one way
// only at a constant current (capacity up: longer; resistance, load,
// floor, forward drop, shelf time up: shorter).
func TestWorstBoundsSamples(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	lib := curves.Library()
	tols := []Tol{
		{Name: "capacity", Form: Percent, Pct: 0.05, Dist: Normal},
		{Name: "lot_capacity", Form: Percent, Pct: 0.08, Dist: Uniform},
		{Name: "resistance", Form: Percent, Pct: 0.15, Dist: Normal},
		{Name: "lot_resistance", Form: Percent, Pct: 0.2, Dist: Uniform},
		{Name: "load", Form: Percent, Pct: 0.1, Dist: Normal},
		{Name: "floor", Form: Percent, Pct: 0.05, Dist: Uniform},
		{Name: "vf", Form: Offset, Delta: 0.05, Dist: Normal},
		{Name: "shelf", Form: Offset, Delta: 6, Dist: Uniform},
	}
	elements := []string{"none", "diode", "schottky"}
	checked := 0
	for trial := 0; trial < 12; trial++ {
		c := lib[rng.IntN(len(lib))]
		series := 1 + rng.IntN(3)
		d := &discharge.Design{Cell: c, Series: series, Parallel: 1 + rng.IntN(2),
			Profile: []discharge.Phase{{Load: discharge.Load{Kind: discharge.ConstantCurrent, Amps: 0.01 + 0.3*rng.Float64()}, Seconds: 1}},
			TempC:   20}
		d.Protect, _ = protect.Parse(elements[rng.IntN(len(elements))])
		d.Floor = float64(series) * c.NominalV * (0.5 + 0.3*rng.Float64())
		r, err := discharge.Evaluate(d)
		if err != nil || r.RuntimeH <= 0 {
			continue
		}
		c0, err := Worst(d, tols)
		if err != nil {
			t.Fatal(err)
		}
		st, err := Spread(d, tols, 300, uint64(trial))
		if err != nil {
			t.Fatal(err)
		}
		// 1e-6 relative: the engine's own quadrature noise between two
		// nearby designs (measured ≪ 1e-6 on these).
		if st.MinH < c0.WorstH()*(1-1e-6) {
			t.Errorf("%s %dS %s: a sample ran %.6g h, below the worst corner %.6g h", c.ID, series, d.Protect.Kind(), st.MinH, c0.WorstH())
		}
		if st.MaxH > c0.BestH()*(1+1e-6) {
			t.Errorf("%s %dS %s: a sample ran %.6g h, above the best corner %.6g h", c.ID, series, d.Protect.Kind(), st.MaxH, c0.BestH())
		}
		checked++
	}
	if checked < 6 {
		t.Fatalf("only %d random designs ran; the property was hardly checked", checked)
	}
}

// Same seed → the same numbers; another seed → p50 within 1 % at 5,000
// samples (Latin hypercube on the demo; the acceptance bound).
func TestSpreadSeed(t *testing.T) {
	d := demo(t, "diode")
	a, err := Spread(d, Defaults(), 5000, 11)
	if err != nil {
		t.Fatal(err)
	}
	b, err := Spread(d, Defaults(), 5000, 11)
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(a, b) {
		t.Error("the same seed gave different spreads")
	}
	c, err := Spread(d, Defaults(), 5000, 12)
	if err != nil {
		t.Fatal(err)
	}
	if reflect.DeepEqual(a.Hours, c.Hours) {
		t.Error("seeds 11 and 12 gave the same samples")
	}
	if math.Abs(a.P50H-c.P50H) > 0.01*a.P50H {
		t.Errorf("p50 %.4f h (seed 11) and %.4f h (seed 12) differ by more than 1 %%", a.P50H, c.P50H)
	}
}

// A tolerance of zero width moves nothing: its low and high runtimes are
// the nominal's exactly.
func TestZeroWidthNoSensitivity(t *testing.T) {
	d := demo(t, "diode")
	tols := With(Defaults(), Tol{Name: "floor", Form: Percent, Pct: 0, Dist: Normal})
	sides, err := Sensitivity(d, tols)
	if err != nil {
		t.Fatal(err)
	}
	r, _ := discharge.Evaluate(d)
	for _, s := range sides {
		if s.Name == "floor" {
			if s.LowH != r.RuntimeH || s.HighH != r.RuntimeH || s.LostH != 0 {
				t.Errorf("zero-width floor: low %v h, high %v h, lost %v h; want %v h twice and 0", s.LowH, s.HighH, s.LostH, r.RuntimeH)
			}
			return
		}
	}
	t.Error("no floor in the sensitivities")
}

// The floor's sensitivity on the diode demo equals a direct pair of runs
// at the floor's limits (1.8 V ± 3 %: 1.746 V and 1.854 V). Both go
// through discharge.Evaluate, so they agree to rounding (1e-9 relative).
func TestFloorSensitivityMatchesDirectRuns(t *testing.T) {
	d := demo(t, "diode")
	sides, err := Sensitivity(d, Defaults())
	if err != nil {
		t.Fatal(err)
	}
	var s Side
	for _, x := range sides {
		if x.Name == "floor" {
			s = x
		}
	}
	for _, c := range []struct {
		floor, got float64
	}{{1.8 * 0.97, s.LowH}, {1.8 * 1.03, s.HighH}} {
		dd := *d
		dd.Floor = c.floor
		r, err := discharge.Evaluate(&dd)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(r.RuntimeH-c.got) > 1e-9*r.RuntimeH {
			t.Errorf("floor %.3f V: sensitivity %v h, direct run %v h", c.floor, c.got, r.RuntimeH)
		}
	}
	if !s.WorstLow == (s.LowH < s.HighH) {
		t.Errorf("the floor's shortening side: worst low %v but low %v h, high %v h", s.WorstLow, s.LowH, s.HighH)
	}
	if !(s.HighH < s.LowH) {
		t.Errorf("a higher floor should stop the diode demo sooner: low %v h, high %v h", s.LowH, s.HighH)
	}
}

// The demo behind the integrated protector: its 0.5 A limit at −25 % is
// 375 mA, under the 450 mA motor pulse: the spread warns.
func TestProtectorLimitWarning(t *testing.T) {
	d := demo(t, "ic")
	ws, err := Warnings(d, Defaults())
	if err != nil {
		t.Fatal(err)
	}
	found := false
	for _, w := range ws {
		if strings.HasPrefix(w, "ilim at its low limit (375 mA)") && strings.Contains(w, "motor wag") {
			found = true
		}
	}
	if !found {
		t.Errorf("no current-limit warning for ilim ±25 %% under the 450 mA pulse; got %q", ws)
	}
	// ±5 % keeps the limit above the pulse (475 mA): no such warning.
	ws, err = Warnings(d, With(Defaults(), Tol{Name: "ilim", Form: Percent, Pct: 0.05}))
	if err != nil {
		t.Fatal(err)
	}
	for _, w := range ws {
		if strings.HasPrefix(w, "ilim") {
			t.Errorf("ilim ±5 %% warned: %q", w)
		}
	}
}

// A one-cell design on a P-MOSFET whose threshold may reach 1.1 V: at
// the end of the run the gate drive (about 1 V) no longer turns the
// channel on, and the body diode carries the load.
func TestBodyDiodeWarning(t *testing.T) {
	c, _ := curves.Lookup("lr6")
	el, _ := protect.Parse("pmos")
	d := &discharge.Design{Cell: c, Series: 1, Parallel: 1, Protect: el,
		Profile: []discharge.Phase{{Load: discharge.Load{Kind: discharge.ConstantCurrent, Amps: 0.05}, Seconds: 1}},
		Floor:   0.5, TempC: 20}
	ws, err := Warnings(d, Defaults())
	if err != nil {
		t.Fatal(err)
	}
	found := false
	for _, w := range ws {
		if strings.HasPrefix(w, "vth at its high limit") && strings.Contains(w, "body diode") {
			found = true
		}
	}
	if !found {
		t.Errorf("no body-diode warning on a one-cell P-MOSFET with vth 0.8 ± 0.3 V; got %q", ws)
	}
}

func TestBadTolerances(t *testing.T) {
	for _, c := range []struct {
		t    Tol
		want string
	}{
		{Tol{Name: "capacity", Form: Percent, Pct: -0.1}, "negative"},
		{Tol{Name: "capacity", Form: Percent, Pct: 1}, "under 100 %"},
		{Tol{Name: "ambient", Form: Percent, Pct: 0.1}, "means nothing"},
		{Tol{Name: "floor", Form: Range, Min: 2, Max: 1.7}, "above max"},
		{Tol{Name: "floor", Form: Offset, Delta: -0.05}, "negative"},
		{Tol{Name: "shelf", Form: Offset, Delta: 200}, "200 months is more than 120 months"},
		{Tol{Name: "vt", Form: Percent, Pct: 0.1}, "expected one of capacity, lot_capacity"},
	} {
		err := c.t.Check()
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%+v: got %v, want an error with %q", c.t, err, c.want)
		}
	}
	d := demo(t, "diode")
	for _, n := range []int{0, -1, MaxSamples + 1} {
		if _, err := Spread(d, Defaults(), n, 1); err == nil || !strings.Contains(err.Error(), "samples") {
			t.Errorf("samples %d: got %v", n, err)
		}
	}
	// An ambient offset that leaves the engine's range is refused up front.
	if _, err := Worst(d, With(Defaults(), Tol{Name: "ambient", Form: Offset, Delta: 70})); err == nil || !strings.Contains(err.Error(), "ambient") {
		t.Errorf("ambient ±70 °C at 20 °C: got %v", err)
	}
}

// The worst corner of the diode demo is below nominal and the best above,
// and the floor, the diode's drop and the capacity rank above the
// parameters that do not apply (none from a MOSFET: left out).
func TestDemoCorners(t *testing.T) {
	d := demo(t, "diode")
	c, err := Worst(d, Defaults())
	if err != nil {
		t.Fatal(err)
	}
	if !(c.WorstH() < c.NominalH() && c.NominalH() < c.BestH()) {
		t.Errorf("worst %v, nominal %v, best %v h: not in order", c.WorstH(), c.NominalH(), c.BestH())
	}
	for _, s := range c.Sides {
		if s.Name == "vth" || s.Name == "ilim" || s.Name == "ron" {
			t.Errorf("%s listed for a diode design", s.Name)
		}
	}
}

// Shelf time removes self-discharge's share from the top of the curve:
// a year at 2 %/month is 24 % of the curve gone.
func TestShelfCutsTop(t *testing.T) {
	c := linearCell()
	c.SelfDischarge = 0.02
	n := cellWith(c, 1, 1, 12)
	if math.Abs(n.Curve.End()-760) > 1e-9 {
		t.Errorf("curve end %v mAh after 12 months at 2 %%/month, want 760", n.Curve.End())
	}
	if v := n.Curve.At(0); math.Abs(v-(1.5-0.5*0.24)) > 1e-12 {
		t.Errorf("starts at %v V, want %v V (24 %% down a linear curve)", v, 1.5-0.5*0.24)
	}
}

// A default tolerance that would leave its parameter's range is cut at the
// range (the demo at −35 °C: ambient −40 to −25 °C), not refused.
func TestDefaultsClampedToRange(t *testing.T) {
	d := demo(t, "pmos:vth=0.2")
	d.TempC = -35
	m, err := newModel(d, Defaults())
	if err != nil {
		t.Fatal(err)
	}
	for _, a := range m.act {
		switch a.p.name {
		case "ambient":
			if a.lo != -40 || a.hi != -25 {
				t.Errorf("ambient %v to %v °C, want -40 to -25", a.lo, a.hi)
			}
		case "vth":
			if a.lo != 0.01 || math.Abs(a.hi-0.5) > 1e-12 {
				t.Errorf("vth %v to %v V, want 0.01 to 0.5", a.lo, a.hi)
			}
		}
	}
	if _, err := Worst(d, Defaults()); err != nil {
		t.Errorf("worst corner at -35 °C with a 0.2 V threshold: %v", err)
	}
}
