// The charge-domain quadrature: time, energy and drains from 0 to the cut-off.

package discharge

import (
	"math"
	"slices"
	"sort"

	"gonum.org/v1/gonum/integrate/quad"

	"headroom/curves"
	"headroom/protect"
)

// gaussN is the Gauss–Legendre order used on each smooth span. The
// integrand between breakpoints is a smooth function of charge (a ratio of
// low-order polynomials and logarithms); 8 nodes integrate it to about 1e-9
// relative on typical designs and 2e-5 at worst (constant power near
// collapse), against a 48-node rule (TestQuadratureConverges).
const gaussN = 8

// gauss holds the nodes and weights on [-1, 1]; computed once, read-only.
var gaussX, gaussW = func() ([]float64, []float64) {
	x := make([]float64, gaussN)
	w := make([]float64, gaussN)
	quad.Legendre{}.FixedLocations(x, w, -1, 1)
	return x, w
}()

// breakpointsTo returns the scaled charges where the curve or the
// resistance table has a corner, sorted, from 0 to the curve's end, in
// buf's backing array when it has room.
func breakpointsTo(buf []float64, c *curves.Cell) []float64 {
	end := c.Curve.End()
	b := buf[:0]
	if n := 2 + c.Curve.Len() + len(c.Resistance); cap(b) < n {
		b = make([]float64, 0, n)
	}
	b = append(b, 0, end)
	for i := range c.Curve.Len() {
		q, _ := c.Curve.Point(i)
		b = append(b, q)
	}
	for _, r := range c.Resistance {
		b = append(b, r.Depth*end)
	}
	slices.Sort(b)
	out := b[:0]
	for _, x := range b {
		if x < 0 || x > end || len(out) > 0 && x-out[len(out)-1] <= 1e-12*end {
			continue
		}
		out = append(out, x)
	}
	return out
}

// rates gathers the per-node quantities the quadrature sums.
type rates struct {
	calendar float64 // pack drain over a calendar hour, mA
	loadW    float64 // power into the load, W (averaged over the day)
	protW    float64 // power in the element, W
	cellW    float64 // power in the cells' resistance, W
	standby  float64 // standby drain, mA
	self     float64 // self-discharge, mA
	peakW    float64 // highest element dissipation among the phases, W
	cellRise float64 // the cells' hottest around this charge, K above the ambient
	target   float64 // the rise this charge's power would settle at, K (node.target)
}

// rates solves variant v at qs into nd and returns what the quadrature
// sums there: each phase's charge and powers at its mean polarisation,
// the element's peak at the phases' worst instants.
func (e *evaluator) rates(qs float64, v *variant, nd *node) rates {
	e.solveNode(qs, v, nd)
	return e.ratesAt(v, nd)
}

// ratesAt is rates with nd already solved for v.
func (e *evaluator) ratesAt(v *variant, nd *node) rates {
	d := e.d
	f := e.duty
	var r rates
	var use, loadW, protW, cellW float64
	for j, o := range nd.mean {
		w := e.w[j]
		use += w * o.Ipack
		loadW += w * o.Vload * o.I
		pw := o.Vdrop*o.I + o.Vin*(o.Ipack-o.I)
		protW += w * pw
		// R0's heat, and the branches': in the periodic steady state the
		// energy a branch stores returns each cycle, so it burns the
		// mean of I·v (per cell, times the S·P cells).
		cellW += w * (o.Ipack*o.Ipack*nd.Rp + e.S*o.Ipack*nd.pol.mean[j])
	}
	r.peakW = peakOf(nd)
	iq := v.el.Quiescent(nd.Epack, e.T)
	idle := d.Standby + iq
	r.standby = (1 - f) * idle * 1000
	r.self = e.self
	r.calendar = f*use*1000 + r.standby + r.self
	r.loadW = f * loadW
	r.protW = f*protW + (1-f)*nd.Epack*iq
	r.cellW = f*cellW + (1-f)*idle*idle*nd.Rp
	r.cellRise = nd.cellPeakC - e.T
	r.target = nd.target
	return r
}

// solvedAt holds what the design's own cut-off search solved at the
// breakpoints (entry j for e.breaks[j]) and evaluate at the cut-off (the
// last entry), when the real variant's integrand is linear in charge
// between breakpoints (keepRates): the rates there and each phase's
// element dissipation, so that the midpoint of a span between two of
// them is the mean of its ends and need not be solved (spanMean).
type solvedAt struct {
	ok   []bool
	r    []rates
	peak []float64 // n per entry, W
	cut  float64   // the cut-off's charge, scaled
}

// keep records nd, solved for the real variant at entry j (len(e.breaks):
// the cut-off, at charge qs).
func (e *evaluator) keep(j int, qs float64, nd *node) {
	k := &e.solved
	n := len(e.loads)
	if k.ok == nil {
		m := len(e.breaks) + 1
		if sp := &e.spare; cap(sp.ok) >= m && cap(sp.peak) >= m*n {
			k.ok, k.r, k.peak = sp.ok[:m], sp.r[:m], sp.peak[:m*n]
			clear(k.ok)
		} else {
			k.ok, k.r, k.peak = make([]bool, m), make([]rates, m), make([]float64, m*n)
		}
	}
	k.ok[j], k.r[j] = true, e.ratesAt(&e.real, nd)
	for i, o := range nd.worst {
		k.peak[j*n+i] = o.Vdrop*o.I + o.Vin*(o.Ipack-o.I)
	}
	if j == len(e.breaks) {
		k.cut = qs
	}
}

// entry is the index of a recorded charge x in solved, -1 if none.
func (e *evaluator) entry(x float64) int {
	k := &e.solved
	if k.ok == nil {
		return -1
	}
	if m := len(e.breaks); k.ok[m] && x == k.cut {
		return m
	}
	j := sort.SearchFloat64s(e.breaks, x)
	if j < len(e.breaks) && e.breaks[j] == x && k.ok[j] {
		return j
	}
	return -1
}

// spanMean sets *r to variant v's rates at the midpoint of [a, b] as the
// mean of the rates recorded at a and b, when both are (keep) and the
// span lies past the rested start's first session: there the integrand
// is linear in charge (evaluator.linear, the junctions held, the
// polarisation day-periodic) and every figure of rates is too, the
// element's peak phase by phase, so the mean is the midpoint's own up to
// rounding. (In the first session the polarisation still builds up as
// e^(−t/τ): not linear.) False otherwise.
func (e *evaluator) spanMean(a, b float64, v *variant, r *rates) bool {
	if v != &e.real || e.pol != nil && !v.periodicOnly && a*v.usePerQ < e.pol.hs {
		return false
	}
	ia, ib := e.entry(a), e.entry(b)
	if ia < 0 || ib < 0 {
		return false
	}
	k := &e.solved
	x, y := &k.r[ia], &k.r[ib]
	*r = rates{
		calendar: 0.5 * (x.calendar + y.calendar), loadW: 0.5 * (x.loadW + y.loadW),
		protW: 0.5 * (x.protW + y.protW), cellW: 0.5 * (x.cellW + y.cellW),
		standby: 0.5 * (x.standby + y.standby), self: 0.5 * (x.self + y.self),
		cellRise: 0.5 * (x.cellRise + y.cellRise), target: 0.5 * (x.target + y.target),
	}
	n := len(e.loads)
	for i := range n {
		r.peakW = math.Max(r.peakW, 0.5*(k.peak[ia*n+i]+k.peak[ib*n+i]))
	}
	return true
}

// peakOf is the highest element dissipation among the phases of nd at
// their worst instants, W.
func peakOf(nd *node) float64 {
	p := 0.0
	for _, o := range nd.worst {
		p = math.Max(p, o.Vdrop*o.I+o.Vin*(o.Ipack-o.I))
	}
	return p
}

// selfDischarge is the pack's self-discharge as a steady drain in mA: the
// cell's fraction per month of the rated capacity, doubling for every 10 °C
// above the reference (common practice rule of thumb for the Arrhenius
// rise of side reactions).
func (e *evaluator) selfDischarge() float64 {
	c := e.cell
	return c.SelfDischarge * c.RatedMAh * e.P / hoursPerMonth * math.Pow(2, (e.T-curves.RefTempC)/10)
}

// integrate fills the time, energy and drain totals from 0 to qsCut and
// the trace.
func (e *evaluator) integrate(v *variant, qsCut, scale float64, r *Result, nd *node) {
	d := e.d
	f := e.duty
	var tot sums
	// A finer rule than the default is a reference (the convergence
	// test): it takes no shortcut.
	q := &e.quad
	*q = quadrature{e: e, v: v, nd: nd, scale: scale, linear: len(e.gx) <= gaussN && e.linear(v)}
	for _, tau := range e.taus {
		if tau >= 1e-3*qsCut*v.usePerQ {
			q.slowest = math.Max(q.slowest, tau)
		}
	}
	if e.therm != nil && math.IsInf(e.sess, 1) && v.usePerQ > 0 {
		e.trail.reset()
		q.lag = &e.trail
	}
	prev := 0.0
	for _, b := range e.ledCorners(v, qsCut, nd, e.transientBreaks(v, qsCut)) {
		if b >= qsCut {
			tot = tot.add(q.span(prev, qsCut, 0, true))
			break
		}
		tot = tot.add(q.span(prev, b, 0, false))
		prev = b
	}
	cal, loadWh, protWh, cellWh, stby, self, peak := tot.h, tot.loadWh, tot.protWh, tot.cellWh, tot.stby, tot.self, tot.peak
	// The element's peak dissipation, and the cells' hottest, can sit at
	// either end of the run. (Known from evaluate's own solves there, for
	// the real variant.)
	rise := tot.cellRise // never below 0: sums start at 0
	for i, x := range [2]float64{0, qsCut} {
		if x >= e.end {
			continue
		}
		p, u := [2]float64{e.peak0, e.peakCut}[i], [2]float64{e.rise0, e.riseCut}[i]
		if math.IsNaN(p) || math.IsNaN(u) || v.heat != e.heat {
			rt := e.rates(x, v, nd)
			p, u = rt.peakW, rt.cellRise
		}
		peak = math.Max(peak, p)
		rise = math.Max(rise, u)
	}
	if q.lag != nil && qsCut > 0 {
		// In continuous use the cells' hottest follows the power's
		// history, not each charge's quasi-static rise (cellheat.go).
		rise = q.lag.hottest(e.therm.st.Tau, v.usePerQ, qsCut)
	}
	r.CellPeakC = e.T + rise
	r.RuntimeDays = cal / 24
	r.RuntimeH = cal * f
	r.DeliveredWh = loadWh
	r.ProtectionLossWh = protWh
	r.CellLossWh = cellWh
	r.StandbyMAh = stby
	r.SelfDischargeMAh = self
	if r.DeliveredMAh > 0 {
		r.StandbyShare = math.Min(1, (stby+self)/r.DeliveredMAh)
	}
	r.ProtectionPeakW = peak

	if d.TracePoints > 1 && qsCut > 0 {
		e.trace(v, qsCut, scale, f, r, nd, q)
	}
}

// ledCorners returns breaks from the second on, with the
// charges added where an LED phase goes dark before qsCut: its current
// falls to zero with a corner there, which a Gauss rule across it
// integrates to only about 1e-5. Each is bisected on lit/dark between
// the breakpoints around it, to 1e-13 of the curve.
func (e *evaluator) ledCorners(v *variant, qsCut float64, nd *node, breaks []float64) []float64 {
	breaks = breaks[1:]
	var leds []int
	for k, l := range e.loads {
		if l.Kind == LED {
			leds = append(leds, k)
		}
	}
	if len(leds) == 0 || qsCut <= 0 {
		return breaks
	}
	lit := func(q float64, k int) bool {
		e.solveNode(q, v, nd)
		return nd.mean[k].I > 0
	}
	out := append([]float64(nil), breaks...)
	for _, k := range leds {
		if !lit(0, k) || lit(qsCut, k) {
			continue // dark from the start, or lit to the cut: no corner
		}
		lo, hi := 0.0, qsCut
		for hi-lo > 1e-13*e.end {
			mid := 0.5 * (lo + hi)
			if lit(mid, k) {
				lo = mid
			} else {
				hi = mid
			}
		}
		out = append(out, hi)
	}
	sort.Float64s(out)
	return out
}

// midpointX and midpointW are the one-node rule on [-1, 1], exact for an
// integrand linear in charge.
var midpointX, midpointW = []float64{0}, []float64{2}

// linear reports whether variant v's integrand is linear in charge
// between breakpoints, so that the midpoint rule is exact there: every
// phase a constant current (its polarisation then fixed too), behind a
// steady element (steadyElement). Then the drain is constant and the
// powers are linear in the cells' voltage, which is linear in charge
// between breakpoints.
func (e *evaluator) linear(v *variant) bool {
	for _, l := range e.loads {
		if l.Kind != ConstantCurrent {
			return false
		}
	}
	return v.steady
}

// steadyElement reports whether el's drop and standing drain ignore the
// pack's voltage: tried at a milliampere, the phases' currents and an
// ampere, at the fresh pack's voltage and at a half and a tenth of it.
func (e *evaluator) steadyElement(el protect.Element) bool {
	switch el.(type) {
	case protect.None, protect.Diode, protect.Schottky:
		// A junction's drop is a function of its current and temperature
		// alone, and it draws nothing standing (protect.Diode): the trials
		// below could only agree.
		return true
	}
	vin := e.S * e.cell.OpenCircuit(0, e.T)
	amps := []float64{1e-3, 1}
	for _, l := range e.loads {
		if l.Kind == ConstantCurrent {
			amps = append(amps, l.Amps)
		}
	}
	for _, i := range amps {
		d0 := el.Drop(i, vin, e.T)
		for _, f := range []float64{0.5, 0.1} {
			if el.Drop(i, f*vin, e.T) != d0 {
				return false
			}
		}
	}
	q0 := el.Quiescent(vin, e.T)
	return el.Quiescent(0.5*vin, e.T) == q0 && el.Quiescent(0.1*vin, e.T) == q0
}

// maxGauss is the most nodes a quadrature rule may have.
const maxGauss = 64

// quadrature integrates one variant over charge: the Gauss rule on each
// span, halving spans where the integrand jumps or steepens.
type quadrature struct {
	e      *evaluator
	v      *variant
	nd     *node
	scale  float64 // pack mAh per scaled cell mAh
	splits int     // halvings so far, bounded by maxSplits
	// linear marks an integrand linear in charge between breakpoints
	// once the rested start's polarisation has settled (see nodesOn);
	// slowest is the longest time constant that counts (transientBreaks).
	linear  bool
	slowest float64
	// lag, when not nil, collects the cells' heat targets at every
	// charge sampled (continuous use with self-heating; cellheat.go).
	lag *heatTrail
	// bufs[d] holds the sampled rates of the span being judged at depth
	// d of the halving: a span reads its own only until it recurses.
	bufs [maxSplit + 2][]rates
	buf0 [gaussN]rates // depth 0's, in place: most spans are never halved
}

// buf is the node buffer for depth d, made on first use.
func (q *quadrature) buf(d int) []rates {
	if q.bufs[d] == nil {
		if d == 0 && len(q.e.gx) <= len(q.buf0) {
			q.bufs[0] = q.buf0[:len(q.e.gx)]
		} else {
			q.bufs[d] = make([]rates, len(q.e.gx))
		}
	}
	return q.bufs[d]
}

// nodesOn is the rule for a span starting at a: the midpoint where the
// integrand is linear, else the evaluator's Gauss rule. In the first
// session the polarisation of a pack that started rested builds up as
// e^(−t/τ), which bends the powers (not the drain): spans there take the
// Gauss rule until the session ends or 30 of the slowest τ have passed
// (e^(−30): settled). The transient's breakpoints (transientBreaks) keep
// those spans short against τ.
func (q *quadrature) nodesOn(a float64) (gx, gw []float64) {
	e := q.e
	if q.linear && (e.pol == nil && e.therm == nil || q.v.periodicOnly || a*q.v.usePerQ >= math.Min(e.sess, 30*q.slowest)) {
		return midpointX, midpointW
	}
	return e.gx, e.gw
}

// rule applies the quadrature rule on [a, b], leaving the sampled rates
// in nodes (in the rule's node order); it returns the sums and how many
// nodes it sampled.
func (q *quadrature) rule(a, b float64, nodes []rates) (sums, int) {
	e := q.e
	gx, gw := q.nodesOn(a)
	half, mid := 0.5*(b-a), 0.5*(a+b)
	var s sums
	// (The midpoint's rates may be the mean of its ends': spanMean.)
	if len(gx) != 1 || q.lag != nil || !e.spanMean(a, b, q.v, &nodes[0]) {
		for j, x := range gx {
			nodes[j] = e.rates(mid+half*x, q.v, q.nd)
			if q.lag != nil {
				q.lag.add(mid+half*x, nodes[j].target)
			}
		}
	}
	for j := range gx {
		rt := &nodes[j]
		dt := gw[j] * half * q.scale / rt.calendar // hours per node
		s.h += dt
		s.loadWh += rt.loadW * dt
		s.protWh += rt.protW * dt
		s.cellWh += rt.cellW * dt
		s.stby += rt.standby * dt
		s.self += rt.self * dt
		s.peak = math.Max(s.peak, rt.peakW)
		s.cellRise = math.Max(s.cellRise, rt.cellRise)
	}
	return s, len(gx)
}

// span is the calendar hours and energies on [a, b]; last marks the span
// ending at the cut-off.
func (q *quadrature) span(a, b float64, depth int, last bool) sums {
	if b <= a {
		return sums{}
	}
	e := q.e
	nodes := q.buf(depth)
	whole, used := q.rule(a, b, nodes)
	nodes = nodes[:used]
	if depth >= maxSplit || q.splits >= maxSplits {
		return whole
	}
	mid := 0.5 * (a + b)
	// Between breakpoints the integrand is smooth unless an operating
	// point jumps: a MOSFET running out of gate drive hands the current
	// to its body diode, a limiter's pass FET saturates. A fixed rule
	// across such a jump errs by up to the jump times the node spacing,
	// so a span whose samples look like a step (one gap between
	// neighbouring nodes holding most of the span's change) is halved
	// until the step is pinned down.
	if looksLikeJump(nodes) {
		q.splits++
		return q.span(a, mid, depth+1, false).add(q.span(mid, b, depth+1, last))
	}
	// The last span ends at the cut-off, which can sit just short of a
	// constant-power load's collapse, where the current rises like a
	// square root (or where an LED's current fades to nothing): there
	// the rule is checked against its two halves and halved until they
	// agree. Constant-current and resistive loads have no such point.
	if last && e.steepEnd && used == len(e.gx) && e.steepTail(nodes) {
		// The halves' samples are not judged: depth+1's buffer is free.
		l, _ := q.rule(a, mid, q.buf(depth+1))
		r, _ := q.rule(mid, b, q.buf(depth+1))
		// (The cells' loss too: a self-heating cell near a collapse
		// steepens it more than the drain.)
		if math.Abs(l.h+r.h-whole.h) > 1e-10*whole.h || math.Abs(l.cellWh+r.cellWh-whole.cellWh) > 1e-10*whole.cellWh {
			q.splits++
			return q.span(a, mid, depth+1, false).add(q.span(mid, b, depth+1, true))
		}
		return l.add(r)
	}
	return whole
}

// steepTail reports whether the integrand's slope at the span's end is
// over twice its slope in the middle: the mark of a singular point just
// past the end. gx need not be ordered; the nodes nearest the end (x → 1)
// and nearest the middle (x → 0) are compared.
func (e *evaluator) steepTail(nodes []rates) bool {
	end, next, m0, m1 := -1, -1, -1, -1
	for j, x := range e.gx {
		switch {
		case end < 0 || x > e.gx[end]:
			next, end = end, j
		case next < 0 || x > e.gx[next]:
			next = j
		}
	}
	for j, x := range e.gx {
		if m0 < 0 || math.Abs(x) < math.Abs(e.gx[m0]) {
			m1, m0 = m0, j
		} else if m1 < 0 || math.Abs(x) < math.Abs(e.gx[m1]) {
			m1 = j
		}
	}
	if end < 0 || next < 0 || m0 < 0 || m1 < 0 || e.gx[m0] == e.gx[m1] {
		return true
	}
	steep := func(g func(j int) float64) bool {
		slopeEnd := math.Abs(g(end)-g(next)) / (e.gx[end] - e.gx[next])
		slopeMid := math.Abs(g(m0)-g(m1)) / math.Abs(e.gx[m0]-e.gx[m1])
		return slopeEnd > 2*slopeMid
	}
	// The drain's hours, and the cells' loss: a self-heating cell near a
	// collapse steepens its loss (current and temperature feeding each
	// other) more than the drain.
	return steep(func(j int) float64 { return 1 / nodes[j].calendar }) ||
		e.therm != nil && steep(func(j int) float64 { return nodes[j].cellW / nodes[j].calendar })
}

// sums are the quadrature's totals over a span: calendar hours, energies
// into the load, the element and the cells, standby and self-discharge
// charge, and the highest element dissipation seen.
type sums struct {
	h, loadWh, protWh, cellWh, stby, self, peak float64
	cellRise                                    float64 // the cells' hottest, K above the ambient (a maximum, as peak)
}

func (s sums) add(t sums) sums {
	return sums{s.h + t.h, s.loadWh + t.loadWh, s.protWh + t.protWh, s.cellWh + t.cellWh,
		s.stby + t.stby, s.self + t.self, math.Max(s.peak, t.peak), math.Max(s.cellRise, t.cellRise)}
}

// maxSplit bounds how often a span with a step in it is halved: 2⁻¹⁶ of a
// span pins a step to well under 1e-4 of the runtime.
const maxSplit = 16

// maxSplits bounds the halvings in one evaluation, whatever the integrand
// does: a few steps pinned to 2⁻¹⁶ each.
const maxSplits = 96

// looksLikeJump reports whether the samples at the nodes (in order of charge)
// change mostly across one gap — the mark of a jump, not of a smooth curve,
// whose change spreads over several gaps — in the integrand 1/calendar or
// in the power into the element or the load (a jump in one phase can hide
// in the sum of the currents but not in the element's heat).
func looksLikeJump(nodes []rates) bool {
	// The powers are judged against the total power, so rounding noise in
	// a near-zero element loss (no element) never looks like a step.
	power := 0.0
	for j := range nodes {
		power = math.Max(power, math.Abs(nodes[j].loadW)+math.Abs(nodes[j].protW))
	}
	return jumpsInOneGap(nodes, 0, func(r *rates) float64 { return 1 / r.calendar }) ||
		jumpsInOneGap(nodes, power, func(r *rates) float64 { return r.protW }) ||
		jumpsInOneGap(nodes, power, func(r *rates) float64 { return r.loadW })
}

// jumpsInOneGap is looksLikeJump for one quantity; changes below 1e-9 of scale (or of
// the quantity itself when scale is 0) count as no change.
func jumpsInOneGap(nodes []rates, scale float64, g func(*rates) float64) bool {
	lo, hi := math.Inf(1), math.Inf(-1)
	maxGap, prev := 0.0, 0.0
	for j := range nodes {
		x := g(&nodes[j])
		lo, hi = math.Min(lo, x), math.Max(hi, x)
		if j > 0 {
			maxGap = math.Max(maxGap, math.Abs(x-prev))
		}
		prev = x
	}
	if scale == 0 {
		scale = math.Max(math.Abs(hi), math.Abs(lo))
	}
	spread := hi - lo
	return spread > 1e-9*scale && maxGap > 0.6*spread
}
