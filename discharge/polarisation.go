// The cells' polarisation: each RC branch in its periodic steady state
// under the repeating profile and, with a daily pattern, under the day's
// use and rest.

package discharge

import (
	"math"
	"slices"

	"headroom/internal/memo"
	"headroom/internal/rc"
)

// Polarisation (docs/engine.md; docs/cell-model.md). Each RC branch of a cell
// (rc.Stage: R at the ambient, τ) is driven by the cell's current, a
// piecewise-constant train: phase k carries I_k for d_k seconds and the
// profile repeats with period Tp. The profile is short against the run,
// so at every charge the branch sits in its periodic steady state:
// over one period it maps v → a·v + b with a = e^(−Tp/τ), and its fixed
// point v* is the value at the start of each cycle (rc.Stage.Periodic).
//
// A daily pattern (H hours of use, then 24 − H hours of standby at
// current Is) is a second periodic level: over the session the branch
// goes v_end = v* + e^(−H/τ)·(v0 − v*) (the drift from the periodic
// solution is one exponential), over the rest v0 = c + (v_end − c)·e^(−rest/τ)
// with c = Is·R; the day-periodic start v0 solves both:
//
//	v0 = [c·(1 − B) + B·(1 − A)·v*] / (1 − A·B),  A = e^(−H/τ), B = e^(−rest/τ)
//
// Inside the session the branch at time t after its start is the
// periodic value plus (v0 − v*)·e^(−t/τ). Within a phase each branch is
// monotone (one exponential towards I_k·R) and the drift is monotone
// across cycles, so a phase's worst instant is its start or its end in
// the session's first or last cycle: four candidates, summed over the
// branches at each, the largest taken.
//
// What is approximated: the slow drift of E and R0 with charge (quasi-
// static, the run being long against Tp and the day); a session that is
// not a whole number of cycles is taken as if it were; the first session
// of a fresh pack, which starts rested rather than day-periodic.

// branch holds one stage's decay factors for the profile and the day,
// fixed for the evaluation: only the currents change between charges.
type branch struct {
	R   float64 // ohms at the ambient
	tau float64 // seconds
	// pSelf[k] is phase k's periodic mean per ampere of its own current,
	// vSelf[k] the fixed point v* per ampere of phase k's current.
	pSelf, vSelf []float64
	a            []float64 // e^(−d_k/τ)
	m            []float64 // mean of the approach over phase k: (τ/d_k)·(1 − a_k)
	settle       float64   // 1 − e^(−Tp/τ)
	average      bool      // τ ≫ Tp: the branch holds the profile's average
	// Day level (zero without a daily pattern).
	A, B                    float64   // e^(−H/τ), e^(−rest/τ)
	oneA, oneB, oneAB, sess float64   // 1 − A, 1 − B, 1 − A·B; mean of e^(−t/τ) over the session
	last                    float64   // e^(−t_last/τ), t_last the start of the session's last cycle
	s, e                    []float64 // e^(−t/τ) at the start and end of phase k within a cycle
	lateA, lateK            []float64 // e^(−(d_k − delay)/τ); e^(−(start_k + d_k − delay)/τ)
}

// polarisation is the set of branches of one cell under one design.
type polarisation struct {
	br      []branch
	w       []float64 // duty weights of the phases
	late    []bool    // phase k lasts at least the cut-off delay
	day     bool
	vs, ve  []float64 // scratch: each branch's periodic start and end of phase k
	hs      float64   // seconds of use in a day's session; +Inf in continuous use
	period  float64   // seconds of one cycle of the profile
	slowest float64   // the longest time constant, s
}

// polState is the polarisation (volts per cell, summed over the
// branches) that one set of phase currents gives.
type polState struct {
	worst []float64 // at phase k's worst instant
	mean  []float64 // averaged over phase k and over the session
	late  []float64 // delay seconds before the end of phase k, worst cycle
	// self[k] is how much phase k's own mean rises per ampere of its own
	// current (volts per ampere, per cell): the map is linear in the
	// currents, so the operating point can take that part exactly, as a
	// resistance, and iterate only on the other phases'.
	self []float64
	cand []float64 // scratch: 4 candidates per phase, 2 late ones
	// decay, when not nil, gets each branch's share of the cells' heat
	// that is still building up in a rested pack's first session:
	// Σₖ wₖ·Iₖ·v*·sₖ·mₖ (watts per cell), which the branch's mean power
	// falls short of its periodic value by, times e^(−t/τ) (cellheat.go);
	// decayNow that e^(−t/τ) (both 0 outside the first session).
	decay, decayNow []float64
}

// init lays s out on f, ten figures per phase.
func (s *polState) init(f []float64) {
	n := len(f) / 10
	*s = polState{worst: f[:n:n], mean: f[n : 2*n : 2*n], late: f[2*n : 3*n : 3*n], self: f[3*n : 4*n : 4*n], cand: f[4*n:]}
}

// initHeat lays s out on f for n phases with room for nb branches'
// decay and decayNow (cellheat.go): 10·n + 2·nb figures.
func (s *polState) initHeat(f []float64, n, nb int) {
	s.init(f[: 10*n : 10*n])
	s.decay, s.decayNow = f[10*n:10*n+nb:10*n+nb], f[10*n+nb:10*n+2*nb]
}

// newPolarisation prepares the branches for phases of durations dur (s,
// weights w), a daily session of hours h (0 or 24: continuous use) and a
// cut-off delay (s, 0: none). stages carry R at the ambient.
//
// The branches' decay factors depend on nothing else, and a sweep
// evaluates the same cell on the same profile many times: they are
// worked out once per set of inputs (polMemo) and shared, read-only;
// each call gets its own scratch and flags.
//
// The result is written into out (nil: a new one) with its scratch in
// scratch (2·len(dur) figures; nil or short: a new array).
func newPolarisation(stages []rc.Stage, dur, w []float64, h, delay float64, out *polarisation, scratch []float64) *polarisation {
	in := polInputs{stages: stages, dur: dur, w: w, h: h, delay: delay}
	key := in.hash()
	p, ok := polMemo.Find(key, in)
	if !ok {
		p = buildPolarisation(stages, dur, w, h, delay)
		// (The shared one keeps no array of the caller's: each call
		// sets its own weights, below.)
		p.w = nil
		polMemo.Keep(key, polInputs{stages: slices.Clone(stages), dur: slices.Clone(dur), w: slices.Clone(w), h: h, delay: delay}, p)
	}
	n := len(dur)
	if out == nil {
		out = new(polarisation)
	}
	*out = *p
	out.w = w
	if len(scratch) < 2*n {
		scratch = make([]float64, 2*n)
	}
	out.vs, out.ve = scratch[:n:n], scratch[n:2*n]
	return out
}

// polInputs are the inputs one set of shared branches was built from.
type polInputs struct {
	stages   []rc.Stage
	dur, w   []float64
	h, delay float64
}

// polMemo keeps the branches of recent inputs (internal/memo); the
// polarisation kept is shared: its br and late are never written.
const polCacheMax = 512

var polMemo = memo.New[polInputs, *polarisation](polCacheMax)

func (in polInputs) hash() uint64 {
	x := memo.Start()
	for _, st := range in.stages {
		x = x.Float(st.R).Float(st.Tau)
	}
	x = x.Float(float64(len(in.dur)))
	for k := range in.dur {
		x = x.Float(in.dur[k]).Float(in.w[k])
	}
	return uint64(x.Float(in.h).Float(in.delay))
}

// Same is equality of every input (the stages and durations by value).
func (in polInputs) Same(o polInputs) bool {
	return slices.Equal(in.stages, o.stages) && slices.Equal(in.dur, o.dur) && slices.Equal(in.w, o.w) &&
		memo.SameBits(in.h, o.h) && memo.SameBits(in.delay, o.delay)
}

// sameBits is memo.SameBits.
func sameBits(a, b float64) bool { return memo.SameBits(a, b) }

// buildPolarisation is newPolarisation without the memo.
func buildPolarisation(stages []rc.Stage, dur, w []float64, h, delay float64) *polarisation {
	n := len(dur)
	p := &polarisation{w: w, late: make([]bool, n), vs: make([]float64, n), ve: make([]float64, n)}
	tp := 0.0
	for _, d := range dur {
		tp += d
	}
	single := n == 1 // a steady load: no phase ends
	for k, d := range dur {
		p.late[k] = delay > 0 && (single || d >= delay)
	}
	hs, rest := h*3600, (24-h)*3600
	p.day = h > 0 && h < 24
	for _, st := range stages {
		tau := st.Tau
		p.slowest = math.Max(p.slowest, tau)
		b := branch{R: st.R, tau: tau, a: make([]float64, n), m: make([]float64, n),
			s: make([]float64, n), e: make([]float64, n), lateA: make([]float64, n), lateK: make([]float64, n)}
		b.settle = -math.Expm1(-tp / tau)
		b.average = tau/tp > 1e12
		t := 0.0
		for k, d := range dur {
			b.a[k] = math.Exp(-d / tau)
			b.m[k] = 1
			if x := d / tau; x > 1e-12 {
				b.m[k] = -math.Expm1(-x) / x
			}
			b.s[k] = math.Exp(-t / tau)
			b.e[k] = math.Exp(-(t + d) / tau)
			if p.late[k] {
				dl := d - delay
				if single {
					dl = math.Inf(1)
				}
				b.lateA[k] = math.Exp(-dl / tau)
				b.lateK[k] = math.Exp(-(t + dl) / tau)
			}
			t += d
		}
		if p.day {
			b.A, b.B = math.Exp(-hs/tau), math.Exp(-rest/tau)
			b.oneA, b.oneB, b.oneAB = -math.Expm1(-hs/tau), -math.Expm1(-rest/tau), -math.Expm1(-(hs+rest)/tau)
			b.sess = 1
			if x := hs / tau; x > 1e-12 {
				b.sess = b.oneA / x
			}
			b.last = math.Exp(-math.Max(hs-tp, 0) / tau)
		}
		p.br = append(p.br, b)
	}
	// Each phase's own share of its mean, per ampere: the periodic part
	// and the fixed point v* that the rested start and the day's drift
	// act on (see state).
	unit := make([]float64, n)
	for bi := range p.br {
		b := &p.br[bi]
		b.pSelf, b.vSelf = make([]float64, n), make([]float64, n)
		for k := range unit {
			unit[k] = 1
			vstar := b.periodic(unit, p.w, p.vs, p.ve)
			b.pSelf[k] = b.R + (p.vs[k]-b.R)*b.m[k]
			b.vSelf[k] = vstar
			unit[k] = 0
		}
	}
	p.period = tp
	p.hs = math.Inf(1)
	if p.day {
		p.hs = hs
	}
	return p
}

// periodic fills vs and ve with the branch's value at the start and the
// end of each phase in the periodic steady state under currents I, and
// returns its fixed point v* (the value at the start of a cycle). One
// period from zero gives b; the fixed point is b / (1 − a)
// (rc.Stage.Periodic, with the decays kept).
func (b *branch) periodic(I, w, vs, ve []float64) float64 {
	var vstar float64
	if b.average {
		for k := range I {
			vstar += w[k] * I[k] * b.R
		}
	} else {
		v := 0.0
		for k := range I {
			x := b.R * I[k]
			v = x + (v-x)*b.a[k]
		}
		vstar = v / b.settle
	}
	v := vstar
	for k := range I {
		x := b.R * I[k]
		vs[k] = v
		v = x + (v-x)*b.a[k]
		ve[k] = v
	}
	return vstar
}

// state fills out for the per-cell phase currents I (A), the per-cell
// current during the day's rest irest (A), at t seconds of use since the
// fresh pack. In the first session — the whole run in continuous use —
// the pack started rested, so each branch is its periodic value less
// v*·e^(−t'/τ) at time t' of the cycle that starts at t; later sessions
// are day-periodic.
func (p *polarisation) state(I []float64, irest, t float64, out *polState) {
	n := len(I)
	clear(out.worst)
	clear(out.mean)
	clear(out.late)
	clear(out.cand)
	clear(out.self)
	first := t < p.hs
	for bi := range p.br {
		b := &p.br[bi]
		vstar := b.periodic(I, p.w, p.vs, p.ve)
		var dev, now, gain float64
		if out.decay != nil {
			out.decay[bi], out.decayNow[bi] = 0, 0
		}
		if first {
			// v0 = 0: the drift is −v*, decayed to the cycle at t.
			dev, now = -vstar, math.Exp(-t/b.tau)
			if out.decay != nil {
				out.decayNow[bi] = now
			}
		} else {
			c := b.R * irest
			v0 := (c*b.oneB + b.B*b.oneA*vstar) / b.oneAB
			dev = v0 - vstar
			gain = b.B*b.oneA/b.oneAB - 1 // ∂dev/∂v* at a fixed rest current
		}
		for k := range I {
			x := b.R * I[k]
			mean := x + (p.vs[k]-x)*b.m[k]
			c := out.cand[6*k : 6*k+6]
			if first {
				d := dev * now
				m := mean + d*b.s[k]*b.m[k]
				if out.decay != nil {
					out.decay[bi] += p.w[k] * I[k] * vstar * b.s[k] * b.m[k]
				}
				out.mean[k] += m
				out.self[k] += b.pSelf[k] - b.vSelf[k]*now*b.s[k]*b.m[k]
				if n == 1 {
					// A steady load: its worst instant is now, as is its
					// mean (the "cycle" is a bookkeeping second).
					c[0] += m
					c[1] += m
				} else {
					c[0] += p.vs[k] + d*b.s[k]
					c[1] += p.ve[k] + d*b.e[k]
				}
				c[2], c[3] = c[0], c[1]
				if p.late[k] && n == 1 {
					c[4] += m
					c[5] = c[4]
				} else if p.late[k] {
					lv := x + (p.vs[k]-x)*b.lateA[k]
					c[4] += lv + d*b.lateK[k]
					c[5] = c[4]
				}
				continue
			}
			out.mean[k] += mean + dev*b.sess
			out.self[k] += b.pSelf[k] + b.vSelf[k]*gain*b.sess
			c[0] += p.vs[k] + dev*b.s[k]
			c[1] += p.ve[k] + dev*b.e[k]
			c[2] += p.vs[k] + dev*b.last*b.s[k]
			c[3] += p.ve[k] + dev*b.last*b.e[k]
			if p.late[k] {
				lv := x + (p.vs[k]-x)*b.lateA[k]
				c[4] += lv + dev*b.lateK[k]
				c[5] += lv + dev*b.last*b.lateK[k]
			}
		}
	}
	for k := 0; k < n; k++ {
		c := out.cand[6*k : 6*k+6]
		out.worst[k] = max(c[0], c[1], c[2], c[3])
		out.late[k] = max(c[4], c[5])
	}
}
