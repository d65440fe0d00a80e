package discharge

import (
	"math"
	"math/rand/v2"
	"reflect"
	"slices"
	"testing"

	"headroom/curves"
	"headroom/protect"
)

// shortcutDesign is a random library design of the kind the engine's
// shortcuts are for: mostly constant-current phases (one to three, some
// rests), every element kind, floors from none to most of the pack,
// daily use or continuous, library cells (some with their own cut-off).
func shortcutDesign(rng *rand.Rand) *Design {
	lib := curves.Library()
	c := lib[rng.IntN(len(lib))]
	kinds := protect.Kinds()
	el, err := protect.Parse(kinds[rng.IntN(len(kinds))])
	if err != nil {
		panic(err)
	}
	var phases []Phase
	for k := 1 + rng.IntN(3); k > 0; k-- {
		l := Load{Kind: ConstantCurrent, Amps: 0.002 + rng.Float64()*0.6}
		switch rng.IntN(8) {
		case 0:
			l.Amps = 0 // a rest written into the profile
		case 1:
			l = Load{Kind: ConstantResistance, Ohms: 5 + rng.Float64()*100}
		}
		phases = append(phases, Phase{Load: l, Seconds: 0.5 + rng.Float64()*30})
	}
	s := 1 + rng.IntN(4)
	floor := 0.0
	if rng.IntN(3) > 0 {
		floor = rng.Float64() * 0.9 * float64(s) * c.NominalV
	}
	return &Design{Cell: c, Series: s, Parallel: 1 + rng.IntN(2), Protect: el, Profile: phases,
		Floor: floor, TempC: -10 + rng.Float64()*50, HoursPerDay: float64(rng.IntN(25)),
		Standby: rng.Float64() * 5e-5}
}

// The shortcuts (a stranded-split run that provably ends where one
// already searched ends, or draws what the design draws, figures kept
// from solves already made, the currents of constant loads, the search
// stepping on the failing rule's own margin where a span has one root, a
// search resuming where another run's ended, breakpoints taken as
// working by the margins' lower bound) against the general path that takes none
// of them, on 400 random library designs with the same quadrature (the
// midpoint rule on linear spans is the quadrature's own, checked by
// TestQuadratureConverges): every figure of the Result agrees to 1e-9
// relative — the cut-off searches' own resolution is 1e-12 of the curve,
// and a cut-off taken from another run lies within that of the one its
// own search would find — and the words (cause, phase, warnings) are the
// same. Stranded figures are compared against the reference charge
// (a share near zero is a difference of two cut-offs). The check fails
// if the shortcuts were never taken.
func TestShortcutsMatchGeneral(t *testing.T) {
	rng := rand.New(rand.NewPCG(31, 7))
	skipped, resumed, surely, worst := 0, 0, 0, 0.0
	for n := 0; n < 400; n++ {
		d := shortcutDesign(rng)
		fast, e, err1 := evaluateWith(d, gaussX, gaussW, false)
		gen, _, err2 := evaluateWith(d, gaussX, gaussW, true)
		if (err1 == nil) != (err2 == nil) {
			t.Fatalf("design %d: errors differ: %v / %v", n, err1, err2)
		}
		if err1 != nil {
			continue
		}
		skipped += e.skipped
		resumed += e.resumed
		surely += e.surely
		ref := math.Max(gen.ReferenceMAh, gen.DeliveredMAh)
		fv, gv := reflect.ValueOf(*fast), reflect.ValueOf(*gen)
		for i := range fv.NumField() {
			name := fv.Type().Field(i).Name
			a, b := fv.Field(i), gv.Field(i)
			switch a.Kind() {
			case reflect.Float64:
				x, y := a.Float(), b.Float()
				scale := math.Abs(y)
				switch name {
				case "StrandedMAh", "StrandedByProtectionMAh", "StrandedByFloorMAh", "ReferenceMAh":
					scale = math.Max(scale, ref)
				case "ProtectionLossWh", "ProtectionPeakW":
					// No element: rounding of a near-zero figure.
					scale = math.Max(scale, 1e-9*gen.DeliveredWh)
				}
				if x == y {
					continue
				}
				rel := math.Abs(x-y) / scale
				worst = math.Max(worst, rel)
				if !(rel <= 1e-9) {
					t.Errorf("design %d (%s, %s): %s %.12g with shortcuts, %.12g without (rel %.2g)", n, d.Cell.ID, d.Protect.Spec(), name, x, y, rel)
				}
			case reflect.String:
				if a.String() != b.String() {
					t.Errorf("design %d: %s %q with shortcuts, %q without", n, name, a.String(), b.String())
				}
			case reflect.Slice:
				if name == "Warnings" && !slices.Equal(fast.Warnings, gen.Warnings) {
					t.Errorf("design %d: warnings differ:\n%q\n%q", n, fast.Warnings, gen.Warnings)
				}
			}
		}
	}
	if skipped < 100 {
		t.Errorf("the shortcuts saved %d cut-off searches and capacity scales over 400 designs: the check hardly covers them", skipped)
	}
	if resumed < 10 { // 15 with this seed: diode and Schottky designs on constant currents with a floor
		t.Errorf("%d searches resumed at another run's cut-off over 400 designs: the check hardly covers them", resumed)
	}
	if surely < 300 { // 660 with this seed
		t.Errorf("%d breakpoints taken as working by the bound over 400 designs: the check hardly covers it", surely)
	}
	t.Logf("searches and capacity scales saved: %d, resumed at another run's cut-off: %d, breakpoints by the bound: %d; worst relative difference: %.2g", skipped, resumed, surely, worst)
}
