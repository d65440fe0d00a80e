package discharge

import "testing"

func TestZZ(t *testing.T) {
	b := &testing.B{}
	for _, l := range []string{"120mA", "450mA/3s,120mA/2s,15mA/25s", "0.8W@85%"} {
		d := benchDesign(b, l)
		zzCount, zzMargin = 0, 0
		r, _ := Evaluate(d)
		t.Logf("%s: %d solves, %d margins, runtime %v %s", l, zzCount, zzMargin, r.RuntimeH, r.CutoffCause)
	}
}
