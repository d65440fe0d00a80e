package discharge

import (
	"math"
	"testing"

	"headroom/curves"
)

// ReversePack's load resistance is the heaviest phase's at the fresh pack
// voltage: Ohm's law on the demo-like profile (450 mA is the heaviest of
// 450, 120 and 15 mA; a 33 Ω phase would be heavier still).
func TestReversePackHeaviestPhase(t *testing.T) {
	lr6, _ := curves.Lookup("lr6")
	d := Design{Cell: lr6, Series: 2, Parallel: 1, TempC: 20, Profile: []Phase{
		{Load: Load{Kind: ConstantCurrent, Amps: 0.45}, Seconds: 3},
		{Load: Load{Kind: ConstantCurrent, Amps: 0.12}, Seconds: 2},
		{Load: Load{Kind: ConstantCurrent, Amps: 0.015}, Seconds: 25},
	}}
	p := ReversePack(&d)
	vp := 2 * lr6.OpenCircuit(0, 20)
	if want := vp / 0.45; math.Abs(p.LoadR-want) > 1e-12*want || p.Series != 2 || p.Parallel != 1 {
		t.Errorf("pack %+v, want LoadR %.6g Ω (fresh %.4g V ÷ 0.45 A)", p, want, vp)
	}
	d.Profile = append(d.Profile, Phase{Load: Load{Kind: ConstantResistance, Ohms: 3.3}, Seconds: 1})
	if p := ReversePack(&d); p.LoadR != 3.3 {
		t.Errorf("with a 3.3 Ω phase LoadR = %v, want 3.3", p.LoadR)
	}
	d.Profile = []Phase{{Load: Load{Kind: ConstantCurrent}, Seconds: 1}}
	if p := ReversePack(&d); !math.IsInf(p.LoadR, 1) {
		t.Errorf("a zero load: LoadR = %v, want +Inf", p.LoadR)
	}
}
