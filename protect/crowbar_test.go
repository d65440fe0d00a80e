package protect

import (
	"math"
	"strings"
	"testing"
)

// The reversed pack shorts through fuse and crowbar diode. The current
// must solve i·(S·R/P + Rfuse) + Vd(i) = S·V (residual below 1 µV: the
// bisection stops at 1e-12 relative in current) and the class must follow
// the minimum fusing current of twice the rating.
func TestCrowbarReverse(t *testing.T) {
	c := DefaultCrowbar()
	for _, tc := range []struct {
		name string
		p    Pack
		want Outcome
	}{
		// 2×AA alkaline, 0.15 Ω per cell (typical, from memory): amperes.
		{"2xAA", Pack{Series: 2, CellV: 1.5, CellR: 0.15, Parallel: 1, LoadR: 10, TempC: 25}, FuseOpens},
		// A 3 V lithium coin of about 15 Ω (from memory) cannot push the
		// 1 A needed to open a 0.5 A fuse: it drains through the diode.
		{"CR2032", Pack{Series: 1, CellV: 3, CellR: 15, Parallel: 1, LoadR: 100, TempC: 25}, ShortsCells},
	} {
		r := c.Reverse(tc.p)
		w := r.WholePack
		if w.Outcome != tc.want {
			t.Errorf("%s: %v, want %v (%s)", tc.name, w.Outcome, tc.want, w.Note)
		}
		v, rp := packVolts(tc.p), packOhms(tc.p)
		if res := w.Current*(rp+c.RFuse) + c.Diode.Drop(w.Current, tc.p.TempC) - v; math.Abs(res) > 1e-6 {
			t.Errorf("%s: current %g A leaves a residual of %g V", tc.name, w.Current, res)
		}
		if w.Volts != -c.Diode.Drop(w.Current, tc.p.TempC) {
			t.Errorf("%s: load sees %g V, want minus the diode drop", tc.name, w.Volts)
		}
		if tc.want == FuseOpens {
			// t = I2t/(I² − (2·rating)²), the model in Crowbar's doc.
			want := c.I2t / (w.Current*w.Current - 4*c.Fuse*c.Fuse)
			if math.Abs(w.Seconds/want-1) > 1e-12 || !(w.Seconds > 0) {
				t.Errorf("%s: opens after %g s, want %g s", tc.name, w.Seconds, want)
			}
		}
	}
}

// A fast fuse opens at about twice its rating (from memory): not at 1.9×,
// after a finite time at 2.1×, and at high current its time tends to the
// melting integral I2t/I² (within 1 % at 20× the rating, where the
// (2·rating)² term is 1 % of I²).
func TestCrowbarFuseTime(t *testing.T) {
	c := DefaultCrowbar()
	if !math.IsInf(c.OpenTime(1.9*c.Fuse), 1) {
		t.Errorf("fuse opens at 1.9× rating")
	}
	if s := c.OpenTime(2.1 * c.Fuse); math.IsInf(s, 1) || !(s > 0) {
		t.Errorf("fuse does not open at 2.1× rating")
	}
	i := 20 * c.Fuse
	if s := c.OpenTime(i); math.Abs(s/(c.I2t/(i*i))-1) > 0.011 {
		t.Errorf("at 20× the fuse opens after %g s, melting integral gives %g s", s, c.I2t/(i*i))
	}
	// Forward: only the fuse's resistance, and the reverse-biased diode's
	// leakage as standby (Is(T), the Shockley reverse current).
	if d := c.Drop(0.3, 3, 25); math.Abs(d-0.3*c.RFuse) > 1e-15 {
		t.Errorf("forward drop %g V, want I·Rfuse", d)
	}
	if q := c.Quiescent(3, 25); q != c.Diode.Saturation(25) {
		t.Errorf("standby %g A, want the diode's leakage %g A", q, c.Diode.Saturation(25))
	}
	w := strings.Join(c.Warnings(Operating{VFresh: 3, Currents: []float64{1.5}, TempC: 25}), "|")
	if !strings.Contains(w, "opens the") {
		t.Errorf("1.5 A phase on a 0.5 A fuse: warnings %q", w)
	}
	w = strings.Join(c.Warnings(Operating{VFresh: 3, Currents: []float64{0.7}, TempC: 25}), "|")
	if !strings.Contains(w, "above the fuse's") {
		t.Errorf("0.7 A phase on a 0.5 A fuse: warnings %q", w)
	}
}
