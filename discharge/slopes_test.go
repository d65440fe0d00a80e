package discharge

import (
	"math"
	"math/rand/v2"
	"reflect"
	"strings"
	"testing"

	"headroom/curves"
	"headroom/protect"
)

// slopeDesign is a random library design with constant-power phases, the
// loads whose Newton steps take the element law's own slopes and whose
// scan skips the currents that cannot reach the load's power: one or two
// converters (0.05 to 1.2 W, 80 to 95 %), sometimes with a constant
// current or a rest beside them, behind every element kind, floors from
// none to most of the pack, daily use or continuous.
func slopeDesign(rng *rand.Rand) *Design {
	lib := curves.Library()
	c := lib[rng.IntN(len(lib))]
	kinds := protect.Kinds()
	el, err := protect.Parse(kinds[rng.IntN(len(kinds))])
	if err != nil {
		panic(err)
	}
	var phases []Phase
	for k := 1 + rng.IntN(2); k > 0; k-- {
		l := Load{Kind: ConstantPower, Watts: 0.05 + rng.Float64()*1.15, Efficiency: 0.8 + rng.Float64()*0.15}
		if rng.IntN(4) == 0 {
			l = Load{Kind: ConstantCurrent, Amps: rng.Float64() * 0.3}
		}
		phases = append(phases, Phase{Load: l, Seconds: 0.5 + rng.Float64()*20})
	}
	s := 1 + rng.IntN(3)
	floor := 0.0
	if rng.IntN(3) > 0 {
		floor = rng.Float64() * 0.8 * float64(s) * c.NominalV
	}
	return &Design{Cell: c, Series: s, Parallel: 1 + rng.IntN(2), Protect: el, Profile: phases,
		Floor: floor, TempC: -10 + rng.Float64()*50, HoursPerDay: float64(rng.IntN(25)),
		Standby: rng.Float64() * 5e-5}
}

// The constant-power solves' shortcuts (Newton's slope from the element
// law, protect.Forward and protect.Sloped; the scan skipping currents
// that cannot reach the load's power, protect.LoadVoltageFalls) against
// the general path, which takes the finite difference and the whole grid,
// on 150 random designs with converters (slopeDesign): every figure to
// 1e-9 relative (stranded figures against the reference) and the same
// words. The two Newton slopes find the same currents to about 1e-13
// (TestNewtonSlopeMatchesDifference), and the scan's answer is the whole
// grid's to the bit; 1e-9 is the cut-off search's own resolution with
// room. Left out, and counted: a design whose junction does not settle
// somewhere (its runaway warning) or whose phases do not (the
// did-not-settle warning), whose figures rest on the solvers' rounding
// (any change of it moves them, README "Speed at a glance"), and, of a
// design that never starts, the current where the solver gave up and
// what follows from it (CutoffAmps, CutoffPackV, EffectiveA,
// CapacityFactor, ProtectionPeakW). The stranded split's two halves are
// held to 1e-2 of the reference only, their sum to 1e-9: the split's run
// without the floor goes on to the load's collapse, where a junction can
// stop settling without the design's own run (and its warning) ever
// meeting it, and its cut-off there rests on rounding as the runaway's
// figures do (a 1e-7 change of Newton's difference step alone moves the
// sweep's splits by up to 4e-3). The check fails if more than a third
// were left out.
func TestSlopesMatchGeneral(t *testing.T) {
	rng := rand.New(rand.NewPCG(17, 3))
	worst, compared, left, splits := 0.0, 0, 0, 0
	for n := 0; n < 150; n++ {
		d := slopeDesign(rng)
		fast, _, err1 := evaluateWith(d, gaussX, gaussW, false)
		gen, _, err2 := evaluateWith(d, gaussX, gaussW, true)
		if (err1 == nil) != (err2 == nil) {
			t.Fatalf("design %d: errors differ: %v / %v", n, err1, err2)
		}
		if err1 != nil {
			continue
		}
		unsettled := func(r *Result) bool {
			w := strings.Join(r.Warnings, "\n")
			return strings.Contains(w, "does not settle") || strings.Contains(w, "did not settle")
		}
		if unsettled(fast) || unsettled(gen) {
			left++
			continue
		}
		compared++
		ref := math.Max(gen.ReferenceMAh, gen.DeliveredMAh)
		fv, gv := reflect.ValueOf(*fast), reflect.ValueOf(*gen)
		for i := range fv.NumField() {
			name := fv.Type().Field(i).Name
			a, b := fv.Field(i), gv.Field(i)
			switch a.Kind() {
			case reflect.Float64:
				x, y := a.Float(), b.Float()
				if x == y {
					continue
				}
				switch name {
				case "CutoffAmps", "CutoffPackV", "CutoffLoadV", "EffectiveA", "CapacityFactor", "ProtectionPeakW":
					if gen.RuntimeH == 0 {
						continue // where the solver gave up
					}
				}
				scale, tol := math.Abs(y), 1e-9
				switch name {
				case "StrandedByProtectionMAh", "StrandedByFloorMAh":
					scale, tol = math.Max(scale, ref), 1e-2
					if rel := math.Abs(x-y) / scale; rel > 1e-9 {
						splits++
					}
				case "StrandedMAh", "ReferenceMAh":
					scale = math.Max(scale, ref)
				case "ProtectionLossWh", "ProtectionPeakW":
					scale = math.Max(scale, 1e-9*gen.DeliveredWh)
				}
				rel := math.Abs(x-y) / scale
				if tol == 1e-9 {
					worst = math.Max(worst, rel)
				}
				if !(rel <= tol) {
					t.Errorf("design %d (%s, %s, %v): %s %.12g with the shortcuts, %.12g without (rel %.2g)",
						n, d.Cell.ID, d.Protect.Spec(), d.Profile, name, x, y, rel)
				}
			case reflect.String:
				if a.String() != b.String() {
					t.Errorf("design %d: %s %q with the shortcuts, %q without", n, name, a.String(), b.String())
				}
			}
		}
	}
	if left > 50 {
		t.Errorf("%d of 150 designs left out as not settling: the check covers too little", left)
	}
	t.Logf("%d designs compared, %d left out as not settling; worst relative difference %.2g (the split's halves beyond 1e-9 in %d)", compared, left, worst, splits/2)
}
