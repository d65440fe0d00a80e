package cellfit

import "testing"

func TestScratch2(t *testing.T) {
	a, b, sq := loadT(t, "cc-4A-B0034.csv"), loadT(t, "cc-2A-B0036.csv"), loadT(t, "square-4A-50pct-B0026.csv")
	r, err := Fit([]*Log{a, b, sq}, Options{Auto: true})
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range r.Fits {
		l := f.Log
		q := 0.0
		for k := range l.T {
			if k%8 == 0 || (k > l.LastLoaded()-12 && k < l.LastLoaded()+3) {
				t.Logf("%s %4d q %7.1f I %5.2f V %.4f model %.4f res %6.1f", l.Name[:5], k, q, l.I[k], l.V[k], f.Model[k], 1e3*(l.V[k]-f.Model[k]))
			}
			if k+1 < len(l.T) {
				q += l.I[k] * (l.T[k+1] - l.T[k]) / 3.6
			}
		}
	}
}
