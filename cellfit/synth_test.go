package cellfit

import (
	"errors"
	"math"
	"testing"
)

// truth is a known cell for the synthetic checks: a linear open-circuit
// curve and R0 (which every knot grid represents exactly) and two
// polarisation branches.
type truth struct {
	e0, eSlope float64 // V, V per mAh
	r0, rSlope float64 // Ω, Ω per mAh
	r          [2]float64
	tau        [2]float64
}

var twoRC = truth{e0: 4.15, eSlope: -0.0004, r0: 0.05, rSlope: 2e-5, r: [2]float64{0.03, 0.04}, tau: [2]float64{15, 400}}

// segment is a current held for a time.
type segment struct{ amps, seconds float64 }

// synthLog samples the truth every dt seconds through the segments. The
// branch voltages come from the closed-form step response summed over
// every switching instant so far (superposition):
// vᵢ(t) = Σⱼ ΔIⱼ·Rᵢ·(1 − e^(−(t−sⱼ)/τᵢ)) — not from the fit's own
// recursion. Switching instants lie on the sample grid, and a sample at
// one shows the new current.
func synthLog(name string, tr truth, segs []segment, dt float64) *Log {
	type sw struct{ at, dI float64 }
	var sws []sw
	t, prev := 0.0, 0.0
	for _, s := range segs {
		sws = append(sws, sw{t, s.amps - prev})
		prev = s.amps
		t += s.seconds
	}
	total := t
	l := &Log{Name: name}
	q := 0.0
	n := int(math.Round(total / dt))
	for k := 0; k <= n; k++ {
		tk := float64(k) * dt
		i, v := 0.0, [2]float64{}
		for _, s := range sws {
			if s.at > tk+1e-9 {
				break
			}
			i += s.dI
			for b := range 2 {
				v[b] += s.dI * tr.r[b] * (1 - math.Exp(-(tk-s.at)/tr.tau[b]))
			}
		}
		volts := tr.e0 + tr.eSlope*q - i*(tr.r0+tr.rSlope*q) - v[0] - v[1]
		l.T, l.I, l.V, l.Line = append(l.T, tk), append(l.I, i), append(l.V, volts), append(l.Line, k+2)
		q += i * dt / 3.6
	}
	return l
}

// pulseLog: 2 A for 120 s then 240 s of rest, 22 times, sampled every
// dtSeconds; ccLog: 1 A for 5000 s then 1800 s of rest.
func pulseLog(dt float64) *Log {
	segs := []segment{{0, 20}}
	for range 22 {
		segs = append(segs, segment{2, 120}, segment{0, 240})
	}
	return synthLog("pulse.csv", twoRC, segs, dt)
}

func ccLog(dt float64) *Log {
	return synthLog("cc.csv", twoRC, []segment{{0, 20}, {1, 5000}, {0, 1800}}, dt)
}

// A cell with two RC branches (closed-form response) is fitted back from
// a pulse test and a constant-current log with its rest: every branch
// resistance and time constant within 2 % (the acceptance bound), R0 at
// every knot within 2 %, the open-circuit voltage at every knot within
// 1 mV, and the residual RMS below 1 mV on each log. With exact data the
// fit is limited only by the optimiser's stopping rule.
func TestFitSyntheticTwoRC(t *testing.T) {
	logs := []*Log{pulseLog(2), ccLog(5)}
	r, err := Fit(logs, Options{Auto: true})
	if err != nil {
		t.Fatal(err)
	}
	m := r.Model
	if len(m.RC) != 2 {
		t.Fatalf("%d branches fitted, want 2: %+v", len(m.RC), m.RC)
	}
	rel := func(got, want float64) float64 { return math.Abs(got/want - 1) }
	for b, s := range m.RC {
		if rel(s.R, twoRC.r[b]) > 0.02 || rel(s.Tau, twoRC.tau[b]) > 0.02 {
			t.Errorf("branch %d: %.5g Ω, τ %.5g s; want %g Ω, %g s (2 %%)", b+1, s.R, s.Tau, twoRC.r[b], twoRC.tau[b])
		}
	}
	for j, q := range m.QR {
		if want := twoRC.r0 + twoRC.rSlope*q; rel(m.R0[j], want) > 0.02 {
			t.Errorf("R0 at %.0f mAh: %.5g Ω, want %.5g Ω (2 %%)", q, m.R0[j], want)
		}
	}
	for j, q := range m.QE {
		if want := twoRC.e0 + twoRC.eSlope*q; math.Abs(m.E[j]-want) > 1e-3 {
			t.Errorf("open-circuit at %.0f mAh: %.5f V, want %.5f V (1 mV)", q, m.E[j], want)
		}
	}
	for _, f := range r.Fits {
		if f.RMS >= 1e-3 {
			t.Errorf("%s: residual RMS %.3f mV, want below 1 mV", f.Log.Name, f.RMS*1e3)
		}
	}
	if len(r.Warnings) != 0 {
		t.Errorf("warnings on complete data: %q", r.Warnings)
	}
}

// One constant current with no step at all (the log starts under load
// and ends there): no branch and no resistance can be told apart from the
// curve, and the fit says so rather than inventing them; the curve is the
// terminal voltage at that current, as a plain import would give.
func TestFitOneCurrentNoSteps(t *testing.T) {
	full := synthLog("flat.csv", twoRC, []segment{{1, 3000}}, 10)
	r, err := Fit([]*Log{full}, Options{Auto: true})
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Model.RC) != 0 || len(r.Model.R0) != 0 || r.TermCurrent != 1 {
		t.Errorf("fitted %d branches, %d R0 knots, terminal current %g; want none, none, 1 A", len(r.Model.RC), len(r.Model.R0), r.TermCurrent)
	}
	if len(r.Warnings) != 2 {
		t.Errorf("want the two warnings (no steps, one current), got %q", r.Warnings)
	}
	// The curve follows the log (the branches settle after a few τ2: the
	// first minutes differ from any memoryless curve); RMS within 15 mV.
	if r.Fits[0].RMS > 0.015 {
		t.Errorf("RMS %.1f mV against the log", r.Fits[0].RMS*1e3)
	}
}

// A pulse test of a cell with no polarisation at all: asked for two
// branches, the fit refuses (it does not converge on a branch the data do
// not show); left to choose, it fits none and says why.
func TestFitNoPolarisation(t *testing.T) {
	flat := twoRC
	flat.r = [2]float64{1e-12, 1e-12}
	logs := []*Log{synthLog("p.csv", flat, []segment{{0, 20}, {2, 600}, {0, 600}, {1, 600}, {0, 600}}, 5)}
	if _, err := Fit(logs, Options{Branches: 2}); err == nil || !errors.Is(err, ErrNoConvergence) {
		t.Errorf("two branches asked: got %v, want the fit to refuse", err)
	}
	r, err := Fit(logs, Options{Auto: true})
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Model.RC) != 0 || len(r.Warnings) == 0 {
		t.Errorf("auto: %d branches, warnings %q; want none and a warning", len(r.Model.RC), r.Warnings)
	}
	if r.Fits[0].RMS > 1e-4 {
		t.Errorf("RMS %.3f mV, want ~0 (no polarisation to miss)", r.Fits[0].RMS*1e3)
	}
}
