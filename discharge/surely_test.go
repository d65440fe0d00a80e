package discharge

import (
	"math"
	"math/rand/v2"
	"testing"

	"headroom/protect"
)

// The scan's lower bound (surely.go) against the node solve it stands in
// for: at random charges of random library designs behind none, a diode
// or a Schottky on constant currents, for the design and for its bare
// cells, the smallest margin a node solve gives is never below the bound
// (to 1e-12 V of rounding), and wherever the bound clears its rules the
// node works. For cells that do not heat themselves the bound is the
// node's own arithmetic (g = 1) once the polarisation is periodic: there
// it must also come within 1e-9 V of the margin wherever the margin is a
// rule the bound has (not a current limit), or the bound has drifted from
// the physics it mirrors. (In continuous use the rested start's
// polarisation builds up from below the periodic state the bound takes:
// there the bound only has to hold.)
func TestSurelyWorksIsABound(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 17))
	kinds := []string{"none", "diode", "schottky"}
	checked, sure, tight := 0, 0, 0
	for n := 0; n < 300; n++ {
		d := shortcutDesign(rng)
		el, err := protect.Parse(kinds[rng.IntN(len(kinds))])
		if err != nil {
			t.Fatal(err)
		}
		d.Protect = el
		if rng.IntN(2) == 0 { // half the cells taken at the ambient: the bound is then exact
			c := *d.Cell
			c.HeatCapacity, c.ThermalRes = 0, 0
			d.Cell = &c
		}
		for k := range d.Profile {
			if d.Profile[k].Load.Kind != ConstantCurrent {
				d.Profile[k].Load = Load{Kind: ConstantCurrent, Amps: 0.002 + rng.Float64()*0.4}
			}
		}
		_, e, err := evaluateWith(d, gaussX, gaussW, false)
		if err != nil {
			continue
		}
		nd := &e.nd
		bare := &e.runs[0] // the stranded split's run without the element
		for _, v := range []*variant{&e.real, bare} {
			if v.el == nil {
				continue
			}
			e.solveNode(0, v, nd)
			e.sure.psOK = false
			e.sureFor(v, nd, true)
			if !e.sure.ok {
				continue
			}
			for range 20 {
				qs := rng.Float64() * e.end
				b, ok := e.sureBound(v, qs)
				if !ok {
					continue
				}
				e.solveNode(qs, v, nd)
				f, _, m, _ := e.judgeRules(nd, v)
				checked++
				if b > sureMargin {
					sure++
					if f != "" {
						t.Fatalf("design %d (%s, %s): the bound says %.6g V to spare at %.6g mAh, the node fails (%s)", n, d.Cell.ID, d.Protect.Spec(), b, qs, f)
					}
				}
				if math.IsNaN(m) {
					continue
				}
				if m < b-1e-12 {
					t.Fatalf("design %d (%s, %s): bound %.12g V above the margin %.12g V at %.6g mAh", n, d.Cell.ID, d.Protect.Spec(), b, m, qs)
				}
				// Exact only where the node's polarisation is periodic (else
				// the rested start's, below the bound's), and on a voltage
				// rule (a limit's margin is in amperes and large).
				periodic := e.pol == nil || v.periodicOnly || qs*v.usePerQ >= e.sess
				if e.therm == nil && periodic && m < 1 {
					if math.Abs(m-b) > 1e-9 {
						t.Fatalf("design %d (%s, %s): cells at the ambient, the bound %.12g V is not the node's margin %.12g V at %.6g mAh", n, d.Cell.ID, d.Protect.Spec(), b, m, qs)
					}
					tight++
				}
			}
		}
	}
	// (Counts with this seed: about 2,000 charges checked.)
	if checked < 500 || sure < 200 || tight < 50 {
		t.Fatalf("only %d charges checked, %d of them bounded as working, %d compared exactly: the check hardly covers the bound", checked, sure, tight)
	}
	t.Logf("%d charges checked, %d bounded as working, %d compared exactly", checked, sure, tight)
}
