package cellfit

import (
	"cmp"
	"errors"
	"fmt"
	"math"
	"slices"
	"sort"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/optimize"

	"headroom/internal/rc"
)

// Options steer a fit.
type Options struct {
	// Auto chooses the number of polarisation branches the logs support:
	// none without current steps, else one or two, whichever fits clearly
	// better (a second branch must lower the cost by 10 %); a count the
	// logs cannot hold (a branch left with no resistance) is passed over.
	Auto bool
	// Branches is the number of branches to fit when Auto is false: 0, 1
	// or 2. With no current steps in the logs it is 0 whatever is asked.
	Branches int
}

// LogFit is how the fitted model matches one log.
type LogFit struct {
	Log       *Log
	Model     []float64 // the model's voltage at each sample
	RMS       float64   // root-mean-square of measured − model, volts
	Worst     float64   // the largest |measured − model|, volts
	WorstLine int       // the file line of the worst sample
	ChargeMAh float64   // delivered to the last loaded sample, mAh
	LastV     float64   // the measured voltage at the last loaded sample
}

// Result is a fitted model with its quality and the limits of the data.
type Result struct {
	Model *Model
	Fits  []LogFit
	// Levels are the distinct load currents seen, amperes, ascending.
	Levels []float64
	// Steps counts the current steps (a change of more than a quarter of
	// the peak current between two samples) in all the logs.
	Steps int
	// TermCurrent is above 0 when the logs cannot tell the resistance from
	// the open-circuit voltage (one load current, no steps): the curve is
	// then the terminal voltage at this current and R0 is 0.
	TermCurrent float64
	// Warnings say plainly what the data cannot support.
	Warnings []string
	// Evaluations is the number of trial time constants the final fit
	// tried (each a linear solve).
	Evaluations int
}

// ErrNoConvergence is returned, wrapped, when the optimiser fails.
var ErrNoConvergence = errors.New("the fit did not converge")

// Weights of the smoothness penalties on the open-circuit curve and on R0
// (squared changes of slope between knots, in volts and ohms at the mean
// knot spacing). Small against a 1 mV residual per log: they only decide
// what the data leaves open (knots with few samples, the ends).
const (
	lambdaE = 1e-6
	lambdaR = 1e-3
)

// The most knots of the open-circuit curve and of R0 against charge: a
// knot for every few tens of mAh of a 2 Ah cell, closer at the ends.
const (
	maxNE = 24
	maxNR = 10
)

// Fit fits one model to all the logs together, each log weighted equally
// whatever its length. Logs are of the same cell type, each starting full
// and rested.
func Fit(logs []*Log, opt Options) (*Result, error) {
	if len(logs) == 0 {
		return nil, errors.New("no logs to fit")
	}
	res := &Result{}
	st := survey(logs)
	res.Levels, res.Steps = st.levels, st.steps

	p := newProblem(logs, st)
	if len(st.levels) == 1 && st.steps == 0 {
		res.TermCurrent = st.levels[0]
		p.nR = 0
		p.QR = nil
		p.penalty()
		p.rows = nil
		res.Warnings = append(res.Warnings, fmt.Sprintf(
			"one load current only (%.3g A) and no current steps: the resistance cannot be told from the open-circuit voltage, so the curve is the terminal voltage at %.3g A and predicts no rate effect",
			st.levels[0], st.levels[0]))
	} else if len(st.levels) == 1 {
		res.Warnings = append(res.Warnings, fmt.Sprintf(
			"one load current only (%.3g A): no rate information beyond what the current steps show; R0 against depth comes from the steps", st.levels[0]))
	}
	if st.steps == 0 {
		res.Warnings = append(res.Warnings,
			"no current steps in the logs: the polarisation (its time constants) cannot be measured, so the cell gets no rc branches and no memory of rests")
	}

	var cands []int
	switch {
	case st.steps == 0:
		cands = []int{0}
	case opt.Auto:
		cands = []int{1, 2}
	default:
		if opt.Branches < 0 || opt.Branches > 2 {
			return nil, fmt.Errorf("%d polarisation branches: want 0, 1 or 2", opt.Branches)
		}
		cands = []int{opt.Branches}
	}
	var best *fitted
	var firstErr error
	for _, nb := range cands {
		f, err := p.fit(nb, st, nil)
		if err != nil {
			// Choosing for the user, a branch count the logs cannot
			// support is passed over; asked for one, it is an error.
			if !opt.Auto || !errors.Is(err, ErrNoConvergence) {
				return nil, err
			}
			firstErr = cmp.Or(firstErr, err)
			continue
		}
		// A second branch must earn its place: 10 % lower cost.
		if best == nil || f.cost < 0.9*best.cost {
			best = f
		}
	}
	if best == nil && opt.Auto {
		f, err := p.fit(0, st, nil)
		if err != nil {
			return nil, err
		}
		best = f
		res.Warnings = append(res.Warnings, fmt.Sprintf("the logs have current steps but show no polarisation a branch could hold (%v): the cell gets no rc branches", firstErr))
	}
	if best == nil {
		return nil, firstErr
	}
	// Logs of different cells cannot all be fitted equally well. Each
	// round reweights every log by the square root of its mean square
	// residual relative to the mean (weights accumulate) and fits again;
	// the round whose worst log fits best is kept. This moves the
	// compromise towards the worst-fitted log, so that no log is left far
	// behind the others.
	nb := len(best.model.RC)
	worst := func(m *Model) float64 {
		w := 0.0
		for _, l := range logs {
			w = math.Max(w, meanSquare(l, m))
		}
		return w
	}
	cur, bestWorst := best, worst(best.model)
	for round := 0; round < balanceRounds && len(logs) > 1; round++ {
		mse := make([]float64, len(logs))
		mean := 0.0
		for li, l := range logs {
			mse[li] = meanSquare(l, cur.model)
			mean += mse[li] / float64(len(logs))
		}
		if !(mean > 0) {
			break
		}
		for li := range logs {
			p.w[li] *= math.Sqrt(mse[li] / mean)
		}
		// Each round starts from the last round's time constants.
		var from []float64
		for _, s := range cur.model.RC {
			from = append(from, math.Log(s.Tau))
		}
		f, err := p.fit(nb, st, from)
		if err != nil {
			return nil, err
		}
		cur = f
		if w := worst(f.model); w < bestWorst {
			best, bestWorst = f, w
		}
	}
	res.Model = best.model
	res.Evaluations = best.iters
	for _, l := range logs {
		lf := LogFit{Log: l, Model: res.Model.Simulate(l, nil)}
		sum := 0.0
		for k := range l.V {
			d := l.V[k] - lf.Model[k]
			sum += d * d
			if math.Abs(d) > lf.Worst {
				lf.Worst, lf.WorstLine = math.Abs(d), l.Line[k]
			}
		}
		lf.RMS = math.Sqrt(sum / float64(l.Len()))
		last := l.LastLoaded()
		lf.ChargeMAh, lf.LastV = l.ChargeTrapezoid(last), l.V[last]
		if math.IsNaN(lf.RMS) {
			return nil, fmt.Errorf("%w: the model gives no finite voltage for %s", ErrNoConvergence, l.Name)
		}
		res.Fits = append(res.Fits, lf)
	}
	return res, nil
}

// balanceRounds is the number of refits with the logs reweighted by
// their residuals.
const balanceRounds = 3

// meanSquare is the mean square of the log's residuals under the model.
func meanSquare(l *Log, m *Model) float64 {
	v := m.Simulate(l, nil)
	s := 0.0
	for k := range v {
		d := l.V[k] - v[k]
		s += d * d
	}
	return s / float64(len(v))
}

// stats is what the logs show before any fitting.
type stats struct {
	qmax     float64   // the largest charge delivered by a log, mAh
	levels   []float64 // distinct load currents, A
	steps    int
	stepQ    []float64 // charge at each step, mAh
	tauFast  float64   // first guesses from the longest relaxation, s
	tauSlow  float64
	dtMin    float64 // the shortest sample interval, s
	duration float64 // the longest log, s
}

// survey finds the load currents, the current steps and first guesses of
// the time constants from the relaxation after the longest step down.
func survey(logs []*Log) stats {
	st := stats{dtMin: math.Inf(1)}
	var loaded []float64
	bestRest := 0.0
	for _, l := range logs {
		peak := l.Peak()
		rest := restCurrent(peak)
		q := 0.0
		for k := range l.T {
			if l.I[k] > rest {
				loaded = append(loaded, l.I[k])
			}
			if k > 0 {
				dt := l.T[k] - l.T[k-1]
				st.dtMin = math.Min(st.dtMin, dt)
				q += l.I[k-1] * dt / 3.6
				if math.Abs(l.I[k]-l.I[k-1]) > 0.25*peak {
					st.steps++
					st.stepQ = append(st.stepQ, q)
				}
			}
			st.qmax = math.Max(st.qmax, q)
		}
		st.duration = math.Max(st.duration, l.T[len(l.T)-1]-l.T[0])
		// The relaxation after each step down to rest: how long the
		// rest lasts and how the voltage recovers.
		for k := 1; k < len(l.T); k++ {
			if !(l.I[k-1] > rest && math.Abs(l.I[k]) <= rest) {
				continue
			}
			e := k
			for e+1 < len(l.T) && math.Abs(l.I[e+1]) <= rest {
				e++
			}
			if d := l.T[e] - l.T[k]; d > bestRest && e-k >= 3 {
				bestRest = d
				rise := l.V[e] - l.V[k]
				if rise <= 0 {
					continue
				}
				// Time to 63 % of the recovery seen: the slow constant;
				// to 63 % of the recovery by a tenth of that: the fast.
				at := func(frac, of float64) float64 {
					for j := k; j <= e; j++ {
						if l.V[j]-l.V[k] >= frac*of {
							return math.Max(l.T[j]-l.T[k], st.dtMin)
						}
					}
					return l.T[e] - l.T[k]
				}
				st.tauSlow = at(1-math.Exp(-1), rise)
				st.tauFast = math.Max(st.tauSlow/10, st.dtMin/2)
			}
		}
	}
	if st.tauSlow == 0 { // steps but no rest longer than three samples
		st.tauSlow = math.Max(10*st.dtMin, 60)
		st.tauFast = math.Max(st.dtMin/2, 1)
	}
	sort.Float64s(loaded)
	for _, i := range loaded {
		if len(st.levels) == 0 || i > 1.2*st.levels[len(st.levels)-1] {
			st.levels = append(st.levels, i)
		}
	}
	// Each level is reported as the median of its samples.
	for j := range st.levels {
		lo := st.levels[j]
		hi := math.Inf(1)
		if j+1 < len(st.levels) {
			hi = st.levels[j+1]
		}
		var in []float64
		for _, i := range loaded {
			if i >= lo && i < hi {
				in = append(in, i)
			}
		}
		st.levels[j] = in[len(in)/2]
	}
	return st
}

// problem holds what stays fixed while the parameters move: the samples'
// charges and their places between the knots.
type problem struct {
	logs   []*Log
	w      []float64   // weight of each log's squared residuals
	q      [][]float64 // charge at each sample, mAh
	QE, QR []float64
	nE, nR int
	D      *mat.Dense // smoothness penalty rows over (E, R0)
	dtMin  float64
	dur    float64
	rows   []logRows // the part of the linear model that no time constant changes
}

// logRows is one log's rows of the linear model over (E, R0), which do
// not depend on the time constants, and their unweighted normal
// equations.
type logRows struct {
	n   []uint8 // entries in each row, at most 4
	idx [][4]int
	val [][4]float64
	N0  []float64 // (nE+nR)², upper triangle
	b0  []float64
	yy  float64
}

// prepare builds the rows that stay fixed while the time constants move.
func (p *problem) prepare() {
	nf := p.nE + p.nR
	p.rows = make([]logRows, len(p.logs))
	var idx []int
	var val []float64
	for li, l := range p.logs {
		lr := &p.rows[li]
		lr.n = make([]uint8, l.Len())
		lr.idx = make([][4]int, l.Len())
		lr.val = make([][4]float64, l.Len())
		lr.N0 = make([]float64, nf*nf)
		lr.b0 = make([]float64, nf)
		for k := range l.T {
			idx, val = p.row(l, li, k, nil, idx[:0], val[:0])
			lr.n[k] = uint8(len(idx))
			copy(lr.idx[k][:], idx)
			copy(lr.val[k][:], val)
			y := l.V[k]
			lr.yy += y * y
			for a, ia := range idx {
				lr.b0[ia] += val[a] * y
				for c := a; c < len(idx); c++ {
					ic := idx[c]
					lr.N0[min(ia, ic)*nf+max(ia, ic)] += val[a] * val[c]
				}
			}
		}
	}
}

// knots spreads n knots over [0, qmax], closer together at both ends
// where a cell's curve bends (cosine spacing).
func knots(n int, qmax float64) []float64 {
	if n == 1 {
		return []float64{0}
	}
	x := make([]float64, n)
	for j := range x {
		x[j] = qmax * (1 - math.Cos(math.Pi*float64(j)/float64(n-1))) / 2
	}
	x[n-1] = qmax
	return x
}

func newProblem(logs []*Log, st stats) *problem {
	p := &problem{logs: logs, dtMin: st.dtMin, dur: st.duration}
	samples := 0
	for _, l := range logs {
		p.w = append(p.w, 1/float64(l.Len()))
		q := make([]float64, l.Len())
		for k := 1; k < l.Len(); k++ {
			q[k] = q[k-1] + l.I[k-1]*(l.T[k]-l.T[k-1])/3.6
		}
		p.q = append(p.q, q)
		samples += l.Len()
	}
	p.nE = min(maxNE, max(2, samples/6))
	p.QE = knots(p.nE, st.qmax)
	// R0 against depth needs currents that differ at each depth: two load
	// levels, or steps all through the discharge.
	p.nR = 1
	if len(st.levels) > 1 || spread(st.stepQ, st.qmax) {
		p.nR = min(maxNR, p.nE)
	}
	p.QR = knots(p.nR, st.qmax)
	p.penalty()
	return p
}

// spread reports whether steps happen in at least four of five equal
// depth bins.
func spread(q []float64, qmax float64) bool {
	var bins [5]bool
	for _, x := range q {
		bins[min(4, max(0, int(5*x/qmax)))] = true
	}
	n := 0
	for _, b := range bins {
		if b {
			n++
		}
	}
	return n >= 4
}

// penalty builds the rows of the smoothness penalty: the change of slope
// at each inner knot, times the mean knot spacing.
func (p *problem) penalty() {
	var rows [][]float64
	add := func(xs []float64, off int, lambda float64) {
		n := len(xs)
		if n < 3 {
			return
		}
		hbar := (xs[n-1] - xs[0]) / float64(n-1)
		s := math.Sqrt(lambda) * hbar
		for j := 1; j < n-1; j++ {
			r := make([]float64, p.nE+p.nR)
			h0, h1 := xs[j]-xs[j-1], xs[j+1]-xs[j]
			r[off+j-1] = s / h0
			r[off+j] = -s/h0 - s/h1
			r[off+j+1] = s / h1
			rows = append(rows, r)
		}
	}
	add(p.QE, 0, lambdaE)
	if p.nR > 0 {
		add(p.QR, p.nE, lambdaR)
	}
	if len(rows) == 0 {
		return
	}
	p.D = mat.NewDense(len(rows), p.nE+p.nR, nil)
	for i, r := range rows {
		p.D.SetRow(i, r)
	}
}

// fitted is one candidate fit.
type fitted struct {
	model *Model
	cost  float64
	iters int
}

// branchResponse fills u with each branch's response to the log's current
// for unit resistance, and s (when not nil) with its derivative with
// respect to τ: u' = a·u + (1 − a)·I over each interval, a = e^(−dt/τ).
func branchResponse(l *Log, tau float64, u, s []float64) {
	uu, ss := 0.0, 0.0
	a, lastDt := 0.0, -1.0
	for k := range l.T {
		u[k] = uu
		if s != nil {
			s[k] = ss
		}
		if k+1 < len(l.T) {
			dt := l.T[k+1] - l.T[k]
			if dt != lastDt {
				a, lastDt = math.Exp(-dt/tau), dt
			}
			if s != nil {
				ss = a*ss + a*dt/(tau*tau)*(uu-l.I[k])
			}
			uu = a*uu + (1-a)*l.I[k]
		}
	}
}

// linear solves for E, R0 and the branch resistances with the time
// constants held (the model is linear in them): weighted normal equations
// plus the smoothness penalty, by Cholesky (gonum/mat). The constraints —
// the open-circuit voltage never rises, resistances are not negative —
// are kept by an active set: each violated one is pinned (E equal to its
// neighbour, a resistance to 0) by a stiff penalty and the system solved
// again, until none is violated. It returns the parameters (E, R0, R) and
// the cost.
func (p *problem) linear(taus []float64) ([]float64, float64, bool) {
	if p.rows == nil {
		p.prepare()
	}
	nb := len(taus)
	nf := p.nE + p.nR
	np := nf + nb
	N := make([]float64, np*np) // upper triangle used
	b := make([]float64, np)
	yy := 0.0
	var u []float64
	var ub [2]float64
	for li, l := range p.logs {
		w := p.w[li]
		lr := &p.rows[li]
		for i := 0; i < nf; i++ {
			b[i] += w * lr.b0[i]
			for j := i; j < nf; j++ {
				N[i*np+j] += w * lr.N0[i*nf+j]
			}
		}
		yy += w * lr.yy
		if nb == 0 {
			continue
		}
		if cap(u) < nb*l.Len() {
			u = make([]float64, nb*l.Len())
		}
		for bi, tau := range taus {
			branchResponse(l, tau, u[bi*l.Len():(bi+1)*l.Len()], nil)
		}
		for k := range l.T {
			y := l.V[k]
			for bi := 0; bi < nb; bi++ {
				ub[bi] = -u[bi*l.Len()+k]
			}
			for bi := 0; bi < nb; bi++ {
				wu := w * ub[bi]
				col := nf + bi
				b[col] += wu * y
				for a := 0; a < int(lr.n[k]); a++ {
					N[lr.idx[k][a]*np+col] += wu * lr.val[k][a]
				}
				for bj := bi; bj < nb; bj++ {
					N[col*np+nf+bj] += wu * ub[bj]
				}
			}
		}
	}
	if p.D != nil {
		rows, cols := p.D.Dims()
		for r := 0; r < rows; r++ {
			d := p.D.RawRowView(r)
			for i := 0; i < cols; i++ {
				if d[i] == 0 {
					continue
				}
				for j := i; j < cols; j++ {
					N[i*np+j] += d[i] * d[j]
				}
			}
		}
	}
	tr := 0.0
	for i := 0; i < np; i++ {
		tr += N[i*np+i]
	}
	for i := 0; i < np; i++ { // a whisker of ridge for degenerate branches
		N[i*np+i] += 1e-12 * tr / float64(np)
	}
	stiff := 1e6 * tr / float64(np)
	pinE := make([]bool, p.nE) // E[j] held equal to E[j-1]
	pinR := make([]bool, np)   // a resistance held at 0
	var th mat.VecDense
	for range np + 1 {
		S := mat.NewSymDense(np, nil)
		for i := 0; i < np; i++ {
			for j := i; j < np; j++ {
				S.SetSym(i, j, N[i*np+j])
			}
		}
		for j := 1; j < p.nE; j++ {
			if pinE[j] {
				S.SetSym(j-1, j-1, S.At(j-1, j-1)+stiff)
				S.SetSym(j, j, S.At(j, j)+stiff)
				S.SetSym(j-1, j, S.At(j-1, j)-stiff)
			}
		}
		for i := p.nE; i < np; i++ {
			if pinR[i] {
				S.SetSym(i, i, S.At(i, i)+stiff)
			}
		}
		var ch mat.Cholesky
		if !ch.Factorize(S) {
			return nil, 0, false
		}
		if err := ch.SolveVecTo(&th, mat.NewVecDense(np, b)); err != nil {
			return nil, 0, false
		}
		x := th.RawVector().Data
		more := false
		for j := 1; j < p.nE; j++ {
			if !pinE[j] && x[j] > x[j-1]+1e-9 {
				pinE[j], more = true, true
			}
		}
		for i := p.nE; i < np; i++ {
			if !pinR[i] && x[i] < 0 {
				pinR[i], more = true, true
			}
		}
		if !more {
			break
		}
	}
	x := slices.Clone(th.RawVector().Data)
	for j := 1; j < p.nE; j++ { // the stiff pins leave ulps
		x[j] = math.Min(x[j], x[j-1])
	}
	for i := p.nE; i < np; i++ {
		x[i] = math.Max(x[i], 0)
	}
	// cost = yᵀWy − 2θᵀb + θᵀNθ (N without the pins).
	cost := yy
	for i := 0; i < np; i++ {
		cost -= 2 * x[i] * b[i]
		for j := i; j < np; j++ {
			if i == j {
				cost += x[i] * x[i] * N[i*np+i]
			} else {
				cost += 2 * x[i] * x[j] * N[i*np+j]
			}
		}
	}
	return x, cost, true
}

// row gives the non-zero entries of sample k's row of the linear model:
// V = Σ E·φ(q) − I·Σ R0·ψ(q) − Σ Rᵢ·uᵢ.
func (p *problem) row(l *Log, li, k int, u [][]float64, idx []int, val []float64) ([]int, []float64) {
	q := p.q[li][k]
	j, f := hat(p.QE, q)
	idx, val = append(idx, j), append(val, 1-f)
	if f != 0 {
		idx, val = append(idx, j+1), append(val, f)
	}
	if p.nR > 0 {
		j, f := hat(p.QR, q)
		idx, val = append(idx, p.nE+j), append(val, -l.I[k]*(1-f))
		if f != 0 {
			idx, val = append(idx, p.nE+j+1), append(val, -l.I[k]*f)
		}
	}
	for bi := range u {
		idx, val = append(idx, p.nE+p.nR+bi), append(val, -u[bi][k])
	}
	return idx, val
}

// tauBounds keeps the time constants between a tenth of the shortest
// sample interval and ten times the longest log.
func (p *problem) tauBounds() (lo, hi float64) {
	return math.Log(p.dtMin / 10), math.Log(10 * p.dur)
}

func clampTaus(x []float64, lo, hi float64) []float64 {
	t := make([]float64, len(x))
	for i, v := range x {
		t[i] = math.Exp(math.Max(lo, math.Min(hi, v)))
	}
	return t
}

// fit fits nb branches: the time constants by gonum's Nelder–Mead over
// their logarithms (from several starts, or from the logarithms in from), each candidate solved linearly
// for everything else (variable projection: Golub and Pereyra, SIAM J.
// Numer. Anal. 10, 1973).
func (p *problem) fit(nb int, st stats, from []float64) (*fitted, error) {
	lo, hi := p.tauBounds()
	var logTau []float64
	evals := 0
	if nb > 0 {
		var starts [][]float64
		f, s := math.Log(st.tauFast), math.Log(st.tauSlow)
		if nb == 1 {
			starts = [][]float64{{s}, {f}}
		} else {
			starts = [][]float64{{f, s}, {f - math.Log(5), s + math.Log(5)}}
		}
		if len(from) == nb {
			starts = [][]float64{from}
		}
		best := math.Inf(1)
		for _, x0 := range starts {
			obj := func(x []float64) float64 {
				_, c, ok := p.linear(clampTaus(x, lo, hi))
				if !ok {
					return math.Inf(1)
				}
				return c
			}
			r, err := optimize.Minimize(optimize.Problem{Func: obj}, x0, &optimize.Settings{
				FuncEvaluations: 300,
				Converger:       &optimize.FunctionConverge{Absolute: 1e-13, Relative: 1e-7, Iterations: 30},
			}, &optimize.NelderMead{})
			if r == nil {
				return nil, fmt.Errorf("%w: %v", ErrNoConvergence, err)
			}
			evals += r.Stats.FuncEvaluations
			if r.F < best {
				best, logTau = r.F, slices.Clone(r.X)
			}
		}
		if math.IsInf(best, 1) || math.IsNaN(best) {
			return nil, fmt.Errorf("%w: no time constants give a solvable fit", ErrNoConvergence)
		}
	}
	taus := clampTaus(logTau, lo, hi)
	th, cost, ok := p.linear(taus)
	if !ok {
		return nil, fmt.Errorf("%w: the linear part is singular", ErrNoConvergence)
	}
	m := &Model{QE: slices.Clone(p.QE), E: th[:p.nE:p.nE], R0: th[p.nE : p.nE+p.nR : p.nE+p.nR]}
	if p.nR > 0 {
		m.QR = slices.Clone(p.QR)
	}
	for b, tau := range taus {
		r := th[p.nE+p.nR+b]
		if r <= 0 {
			return nil, fmt.Errorf("%w: polarisation branch %d (τ %.3g s) has no resistance left: the logs do not show it; fit fewer branches", ErrNoConvergence, b+1, tau)
		}
		if lt := math.Log(tau); lt <= lo+1e-6 || lt >= hi-1e-6 {
			return nil, fmt.Errorf("%w: a time constant ran to its bound (%.3g s): the logs do not show it", ErrNoConvergence, tau)
		}
		m.RC = append(m.RC, rc.Stage{R: r, Tau: tau})
	}
	slices.SortFunc(m.RC, func(a, b rc.Stage) int {
		switch {
		case a.Tau < b.Tau:
			return -1
		case a.Tau > b.Tau:
			return 1
		}
		return 0
	})
	return &fitted{model: m, cost: cost, iters: evals}, nil
}
