package protect

import (
	"math"
	"slices"

	"headroom/internal/memo"
	"headroom/internal/rc"
	"headroom/internal/units"
)

// Thermal is an element's thermal network from junction to ambient: a
// two-stage Foster ladder whose resistances add up to the steady θja. The
// package stage (Fast, TauFast: die, lead frame and leads) heats within a
// second or so; the board stage (ThetaJA − Fast, Tau: copper and board to
// air) takes tens of seconds. A junction carrying power P(t) runs at
//
//	Tj(t) = Tamb + Σ stage values, each stage dv/dt = (Rᵢ·P − v)/τᵢ
//
// (docs/references.md; JEDEC JESD51-14 describes parts by the same network). A pulse
// much shorter than the board stage's τ heats the junction by a fraction
// of θja·P — Zth(t)·P — not by θja·P.
type Thermal struct {
	// ThetaJA is the steady junction-to-ambient thermal resistance in
	// °C/W, at least 0; 0 is an ideal heat sink (the junction stays at
	// ambient).
	ThetaJA float64
	// TjMax is the highest allowed junction temperature in °C.
	TjMax float64
	// Fast is the package stage's share of ThetaJA in °C/W, from 0 to
	// ThetaJA.
	Fast float64
	// TauFast is the package stage's time constant in seconds, above 0.
	TauFast float64
	// Tau is the board stage's time constant in seconds, above 0.
	Tau float64
}

// Typical thermal networks of the small packages headroom's elements come
// in, on a small two-layer board with modest copper (from memory: the
// shape of the single-pulse transient-impedance curves makers print —
// about 0.1·θja at 0.1 s, 0.4·θja at 1 s, 0.7·θja at 10 s and θja after a
// few minutes for SOT-23; a little slower for the larger SMA and 1206
// bodies). Not any maker's data.
var (
	// sot23 is a SOT-23 (or SOT-23-5) on minimum pads: small FETs, the
	// limiter's pass FET.
	sot23 = Thermal{ThetaJA: 250, TjMax: 150, Fast: 100, TauFast: 0.5, Tau: 15}
	// sma is an SMA (DO-214AC) or DO-41 rectifier body: diodes.
	sma = Thermal{ThetaJA: 100, TjMax: 150, Fast: 30, TauFast: 1, Tau: 30}
	// body1206 is a 1206-size polyfuse body.
	body1206 = Thermal{ThetaJA: 150, TjMax: 125, Fast: 45, TauFast: 2, Tau: 20}
	// smaSchottky is a Schottky rectifier in SMA: the same body, less
	// copper under a part rated for 125 °C.
	smaSchottky = Thermal{ThetaJA: 150, TjMax: 125, Fast: 45, TauFast: 1, Tau: 30}
	// sot23IC is an integrated protector in SOT-23-5.
	sot23IC = Thermal{ThetaJA: 200, TjMax: 125, Fast: 80, TauFast: 0.5, Tau: 15}
)

// Ladder returns the Foster network as first-order stages in K/W: the
// package stage, then the board stage.
func (t Thermal) Ladder() rc.Ladder {
	return rc.Ladder{{R: t.Fast, Tau: t.TauFast}, {R: t.ThetaJA - t.Fast, Tau: t.Tau}}
}

// Junction returns the steady junction temperature in °C at a constant
// dissipation p (W) and ambient tambC: Tj = Tamb + θja·P.
func (t Thermal) Junction(p, tambC float64) float64 { return tambC + t.ThetaJA*p }

// Pulse returns the junction temperature in °C at the end of a single
// pulse of p watts lasting s seconds from ambient: Tamb + Zth(s)·P.
func (t Thermal) Pulse(p, s, tambC float64) float64 { return tambC + t.Ladder().Z(s)*p }

// TimeTo returns the seconds a constant dissipation p (W) takes to bring
// the junction from ambient tambC to limitC, or +Inf when it never does
// (θja·P at or below the rise). Zth(t) rises monotonically: bisection.
func (t Thermal) TimeTo(p, tambC, limitC float64) float64 {
	rise := limitC - tambC
	if rise <= 0 {
		return 0
	}
	l := t.Ladder()
	if !(l.R()*p > rise) {
		return math.Inf(1)
	}
	lo, hi := 0.0, math.Max(t.TauFast, t.Tau)
	for l.Z(hi)*p < rise {
		hi *= 2
	}
	for range 200 {
		m := 0.5 * (lo + hi)
		if l.Z(m)*p < rise {
			lo = m
		} else {
			hi = m
		}
		if hi-lo <= 1e-9*hi {
			break
		}
	}
	return hi
}

// reachText says, for a warning, how soon a constant p (W) brings the
// junction to TjMax from tambC: " after about 2.3 s", or "" when never.
func (t Thermal) reachText(p, tambC float64) string {
	s := t.TimeTo(p, tambC, t.TjMax)
	if math.IsInf(s, 1) {
		return ""
	}
	return " after about " + units.Human(s, units.Time, 2)
}

// thermalFields lists the network's keys: theta (θja), tjmax, thetaf (the
// package stage), tauf and tau.
func thermalFields(t *Thermal) []field {
	return []field{
		{key: "theta", kind: plain, p: &t.ThetaJA, lo: 0, hi: 10000, what: "θja in °C/W (0: an ideal heat sink)"},
		{key: "tjmax", kind: units.Temperature, p: &t.TjMax, lo: 25, hi: 400, loOpen: true, what: "the highest junction temperature"},
		{key: "thetaf", kind: plain, p: &t.Fast, lo: 0, hi: 10000, what: "the package stage of θja in °C/W"},
		{key: "tauf", kind: units.Time, p: &t.TauFast, lo: 0, hi: 1e5, loOpen: true, what: "the package stage's time constant"},
		{key: "tau", kind: units.Time, p: &t.Tau, lo: 0, hi: 1e5, loOpen: true, what: "the board stage's time constant"},
	}
}

// check refuses a package stage larger than the whole θja.
func (t Thermal) check(kind string) error {
	if t.Fast > t.ThetaJA {
		return specErrorf(kind, "thetaf", "%g °C/W must be at most theta, %g °C/W (the package stage is part of θja)",
			t.Fast, t.ThetaJA)
	}
	return nil
}

// heated is an element value with a thermal network that specs can set.
type heated interface {
	heat() *Thermal
}

// deriveHeat keeps the package stage inside θja when a spec sets theta
// but not thetaf: theta=0 (an ideal heat sink) or a θja below the
// package's default stage takes the package stage down with it.
func deriveHeat(s settable, given func(string) bool) {
	h, ok := s.(heated)
	if !ok || !given("theta") || given("thetaf") {
		return
	}
	t := h.heat()
	t.Fast = math.Min(t.Fast, t.ThetaJA)
}

// Heating is an element's thermal network under a repeating profile of
// phases with fixed durations, prepared once (the exponentials of every
// stage over every phase) so that the junction temperatures for any
// dissipations cost only multiplications. Make one with NewHeating; it is
// not safe for concurrent use.
type Heating struct {
	th           Thermal
	train        *rc.Train
	secs         []float64
	total        float64
	self         []float64 // per phase: its mean rise per watt in that phase alone
	seg          []rc.Segment
	p, dp, lastT []float64
}

// NewHeating prepares t for a profile of phases lasting secs seconds each
// (each above 0).
//
// What it prepares — the exponentials and each phase's own rise per watt
// — depends on t and secs alone, and a sweep prepares the same network
// on the same profile many times: it is worked out once per set of
// inputs (heatMemo) and shared, read-only; each Heating gets its own
// scratch.
func NewHeating(t Thermal, secs []float64) *Heating {
	in := heatInputs{t: t, secs: secs}
	key := in.hash()
	sh, ok := heatMemo.Find(key, in)
	if !ok {
		sh = buildHeating(t, secs)
		heatMemo.Keep(key, heatInputs{t: t, secs: slices.Clone(secs)}, sh)
	}
	n := len(secs)
	buf := make([]float64, 3*n)
	return &Heating{th: t, train: sh.train.Clone(), secs: sh.secs, total: sh.total, self: sh.self,
		seg: make([]rc.Segment, n), p: buf[:n:n], dp: buf[n : 2*n : 2*n], lastT: buf[2*n:]}
}

// buildHeating is NewHeating without the memo: the shared part.
func buildHeating(t Thermal, secs []float64) *Heating {
	n := len(secs)
	buf := make([]float64, 3*n)
	cut := func() []float64 { s := buf[:n:n]; buf = buf[n:]; return s }
	h := &Heating{th: t, train: rc.NewTrain(t.Ladder(), secs), secs: cut(),
		self: cut(), seg: make([]rc.Segment, n)}
	copy(h.secs, secs)
	unit := cut()
	for _, s := range secs {
		h.total += s
	}
	for k := range secs {
		unit[k] = 1
		h.train.Means(unit, h.seg)
		h.self[k] = h.seg[k].Mean
		unit[k] = 0
	}
	return h
}

// heatInputs is what a Heating's shared part depends on. heatMemo keeps
// the shared part of recent Heatings (internal/memo): train, secs and
// self are never written.
type heatInputs struct {
	t    Thermal
	secs []float64
}

const heatCacheMax = 256

var heatMemo = memo.New[heatInputs, *Heating](heatCacheMax)

func (in heatInputs) hash() uint64 {
	t := in.t
	return uint64(memo.Start().Float(t.ThetaJA).Float(t.TjMax).Float(t.Fast).Float(t.TauFast).Float(t.Tau).Floats(in.secs))
}

// Same is bit equality of the network and every duration.
func (in heatInputs) Same(o heatInputs) bool {
	a, b := in.t, o.t
	return memo.SameBits(a.ThetaJA, b.ThetaJA) && memo.SameBits(a.TjMax, b.TjMax) && memo.SameBits(a.Fast, b.Fast) &&
		memo.SameBits(a.TauFast, b.TauFast) && memo.SameBits(a.Tau, b.Tau) && memo.SameFloats(in.secs, o.secs)
}

// Cycle is the junction's periodic steady state over one profile cycle.
type Cycle struct {
	// PeakC is the highest junction temperature over the cycle, °C: the
	// peak of the hottest pulse.
	PeakC float64
	// Phase is the phase in which it occurs.
	Phase int
	// MeanC is the cycle-average junction temperature, °C: Tamb + θja
	// times the cycle-average dissipation.
	MeanC float64
}

// Junction fills seg (one per phase, may be nil) with the junction
// temperatures in °C over each phase — start, end, mean and peak — in the
// periodic steady state of the profile repeating with watts[k] dissipated
// in phase k, at ambient tambC, and returns the cycle's peak and mean.
func (h *Heating) Junction(tambC float64, watts []float64, seg []rc.Segment) Cycle {
	h.train.Periodic(watts, h.seg)
	c := Cycle{PeakC: math.Inf(-1)}
	mean := 0.0
	for k := range h.seg {
		s := &h.seg[k]
		s.Start += tambC
		s.End += tambC
		s.Mean += tambC
		s.Peak += tambC
		if s.Peak > c.PeakC {
			c.PeakC, c.Phase = s.Peak, k
		}
		mean += s.Mean * h.secs[k]
		if seg != nil {
			seg[k] = *s
		}
	}
	c.MeanC = mean / h.total
	return c
}

// Settled tells how an electro-thermal solve ended.
type Settled struct {
	// OK is false when the temperatures did not settle: a dissipation
	// that rises with temperature faster than the network sheds it
	// (thermal runaway), or no finite power.
	OK bool
	// Steps is the number of iterations taken.
	Steps int
	// Cycle is the junction's peak and mean at the temperatures reached.
	Cycle Cycle
}

// settleCapC is the junction temperature beyond which a solve is taken
// as running away: no part survives it, and the element laws are not
// meant for it.
const settleCapC = 1000

// Settle finds the electro-thermal operating point of the profile: the
// junction temperature tj[k] of each phase (its mean over the phase) at
// which the dissipations power(k, tj[k]) heat the network to exactly
// those temperatures. power gives phase k's dissipation in watts with the
// junction at tjC (the drop at that temperature times the current, plus
// any standing drain's heat). tj holds the starting guess on entry (0 or
// non-finite entries start at ambient) and the answer on return.
//
// Each step is a Newton step per phase on tj[k] = Tamb + rise_k(P), with
// the phase's own sensitivity 1 − self_k·dP_k/dT and the other phases'
// heat taken from the last step: a Jacobi–Newton iteration. dP/dT comes
// from a 10 mK finite difference on the first step and from the secant
// through the last two steps after that, so a step costs one power call
// per phase. It converges in a few steps when the loop gain is small (a
// diode: θ·I·2 mV/°C, well under 1), and still converges where plain
// substitution would oscillate. It stops when no phase moves by more than
// 1e-4 °C (Newton's next step would be of order its square: a drop then
// errs by well under a microvolt), or after 50 steps, or when a phase's own loop gain reaches 1 or
// a temperature passes 1000 °C (runaway: OK false, temperatures left at
// the last finite step).
func (h *Heating) Settle(tambC float64, power func(k int, tjC float64) float64, tj []float64) Settled {
	return h.SettleWithin(tambC, power, tj, 0)
}

// SettleWithin is Settle giving up (OK false) after at most steps
// iterations instead of 50; steps ≤ 0 or above 50 means Settle's 50. A
// caller that solves many times (discharge settles the junction at every
// charge it solves) would spend most of its time in the solves that never
// settle, a heat that jumps with temperature across a current limit
// running all 50 steps; those that do settle take a few.
func (h *Heating) SettleWithin(tambC float64, power func(k int, tjC float64) float64, tj []float64, steps int) Settled {
	if steps <= 0 || steps > 50 {
		steps = 50
	}
	n := len(h.secs)
	for k := range tj[:n] {
		if tj[k] == 0 || math.IsNaN(tj[k]) || math.IsInf(tj[k], 0) {
			tj[k] = tambC
		}
	}
	const dT = 0.01
	var st Settled
	for st.Steps = 1; st.Steps <= steps; st.Steps++ {
		for k := 0; k < n; k++ {
			p := power(k, tj[k])
			if !isFinite(p) {
				st.Cycle = h.Junction(tambC, h.p, nil)
				return st
			}
			if st.Steps == 1 || math.Abs(tj[k]-h.lastT[k]) < 1e-9 {
				p2 := power(k, tj[k]+dT)
				if !isFinite(p2) {
					st.Cycle = h.Junction(tambC, h.p, nil)
					return st
				}
				h.dp[k] = (p2 - p) / dT
			} else {
				h.dp[k] = (p - h.p[k]) / (tj[k] - h.lastT[k])
			}
			h.p[k], h.lastT[k] = p, tj[k]
		}
		h.train.Means(h.p, h.seg)
		worst := 0.0
		for k := 0; k < n; k++ {
			g := tambC + h.seg[k].Mean - tj[k]
			den := 1 - h.self[k]*h.dp[k]
			if den < 0.05 { // the phase heats itself faster than it sheds heat
				st.Cycle = h.Junction(tambC, h.p, nil)
				return st
			}
			step := g / den
			tj[k] += step
			worst = math.Max(worst, math.Abs(step))
		}
		for _, t := range tj[:n] {
			if !(t < settleCapC) || !isFinite(t) {
				for k := range tj[:n] {
					tj[k] = math.Min(tj[k], settleCapC)
				}
				st.Cycle = h.Junction(tambC, h.p, nil)
				return st
			}
		}
		if worst <= 1e-4 {
			st.OK = true
			break
		}
	}
	// The cycle from the last powers, taken at temperatures within 1e-4 °C
	// of the answer: a difference of dP/dT·1e-4 °C, nothing to report.
	st.Cycle = h.Junction(tambC, h.p, nil)
	return st
}

func isFinite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }
