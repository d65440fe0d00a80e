package discharge

import (
	"math"

	"headroom/internal/units"
	"headroom/protect"
)

// Stranded charge and its split between the protection element and the
// floor.
//
// Four runs of the same cells and load are compared, each to its own
// cut-off, in pack mAh:
//
//	qEF  with the element and the floor (the design as built: delivered)
//	q0F  without the element, with the floor
//	qE0  with the element, without the floor
//	q00  with neither: the reference
//
// Stranded = q00 − qEF. Removing the element first and then the floor gives
// (q0F − qEF) to the element and (q00 − q0F) to the floor; removing the
// floor first gives (qE0 − qEF) to the floor and (q00 − qE0) to the
// element. The two orders disagree whenever the causes interact (a drop
// that makes the floor bite sooner), so headroom gives each cause the mean
// of its two shares (the Shapley value of a two-player game, Shapley 1953):
//
//	by protection = ½·[(q0F − qEF) + (q00 − qE0)]
//	by the floor  = ½·[(qE0 − qEF) + (q00 − q0F)]
//
// which add up to q00 − qEF exactly and do not depend on an order. Nothing
// is clamped: an element that lowers a resistive load's current can let
// the cells run longer, and then its share is negative (it recovers
// charge), as can the stranded total.
//
// Each run's charge is its cut-off on the curve times its own capacity
// scale (parallel strings times the rate and temperature factor at the
// currents that run draws), so the reference depends on the cells, the
// load, the ambient and nothing the designer puts between them.

// strandedSplit computes the three cut-offs other than the design's own
// (real, cut off at qsCut, scaled charge; scale, pack mAh per scaled mAh)
// and fills the delivered, reference and stranded charges of r.
func (e *evaluator) strandedSplit(real *variant, qsCut, scale float64, r *Result, nd *node) {
	d := e.d
	_, none := real.el.(protect.None)
	// The floor, the least LED current and the pack's own under-voltage
	// cut-off are the product's stops: the reference leaves them all out,
	// so they go together as "the floor".
	// (The three live in the evaluator: no allocation each.)
	noEl, noFloor, neither := &e.runs[0], &e.runs[1], &e.runs[2]
	*noEl = variant{el: protect.None{}, lim: protect.NoLimit(), floor: d.Floor, cutoff: true, steady: true, minLED: d.MinLEDAmps}
	*noFloor = *real
	noFloor.floor, noFloor.cutoff, noFloor.minLED, noFloor.ordered = 0, false, 0, false
	// noFloor's junctions are real's: at each charge they settle where
	// their heat sets them, which no stop changes (heat.go).
	*neither = variant{el: protect.None{}, lim: protect.NoLimit(), floor: 0, steady: true}
	// The runs without the element draw what the bare cells draw: their
	// own capacity scale and their own clock (the time a charge stands
	// for, which sets how far the rested first session has gone), both
	// from the bare pack's drain, as a separate run of that design would.
	// The run without the floor draws what the design draws, and keeps
	// the design's (copied with it).
	// The drops of the design's element, nd holding it solved at its
	// cut-off (worksAsBare): below the floor in every phase?
	lowDrops := !none && !e.general
	for k := range e.loads {
		lowDrops = lowDrops && nd.worst[k].Vdrop < d.Floor && nd.mean[k].Vdrop < d.Floor
	}
	scale0 := scale
	if !none {
		if !e.general && e.drawsAsBare(real) {
			// The bare cells draw what the design draws, to the bit:
			// the same scale and clock.
			neither.usePerQ, neither.periodicOnly = real.usePerQ, real.periodicOnly
			e.skipped++
		} else {
			scale0 = e.capacityScale(neither, nd)
		}
		noEl.usePerQ, noEl.periodicOnly = neither.usePerQ, neither.periodicOnly
	}

	// Each scan resumes near a cut-off already found; cutoff starts over
	// from zero when the run it is given does not work there (removing
	// the element can shorten a run). With no stop to remove the runs
	// without the floor are the runs with it; with no element, the runs
	// without the element are the runs with it.
	noStop := d.Floor == 0 && d.MinLEDAmps == 0 && d.Cell.CutoffV == 0
	qs0F, qsE0 := qsCut, qsCut
	// What the design's own search found where it failed: a run found
	// to fail at the same charge by the same rule (found.hard,
	// bareFails) need not be searched. (The junctions at a charge are the
	// same in every run with the element: heat.go.)
	own := e.last
	if e.general || own.v != real || own.lo != qsCut {
		own = found{}
	}
	var fE0, f0F found
	if !none {
		if e.general || !e.bareFails(real, noEl, own) {
			f0F = e.search(noEl, nd, qsCut, !e.general && e.drawsAsBare(real))
			qs0F = f0F.lo
		} else {
			// It fails there by the same rule, one of the cells' own.
			f0F, f0F.v = own, noEl
			e.skipped++
		}
	}
	if !noStop {
		if own.hard() && !e.heatRaisesR() {
			// The design fails there by a rule that is not a stop: so
			// does this run (the same rule ranks first), which works
			// wherever the design does. (Not where the cells' heat can
			// let a failure go again, heatRaisesR: this run's scan from
			// its own start may step over it, as a separate run's
			// would.)
			fE0 = own
			fE0.v = noFloor
			e.skipped++
		} else {
			// It works wherever the design does, and where the cells
			// without the element work too when it fails only where they
			// do (worksAsBare): its scan resumes at the later of the two.
			from := qsCut
			if lowDrops && e.worksAsBare(noFloor, noEl) && qs0F > from {
				from = qs0F
				e.resumed++
			}
			fE0 = e.search(noFloor, nd, from, true)
			qsE0 = fE0.lo
		}
	}
	qs00 := qsE0
	switch {
	case noStop:
		qs00 = qs0F
	case none:
	case !e.general && f0F.hard() && !e.heatRaisesR():
		qs00 = qs0F
		e.skipped++
	case e.general || !e.bareFails(noFloor, neither, fE0):
		qs00 = e.search(neither, nd, qs0F, true).lo
	default:
		e.skipped++
	}

	// Removing a stop can never end a run sooner: it only takes a way to
	// fail away. Where a search says otherwise (the junctions settled at a
	// different point, the cell's rested start) the run without the stop
	// is taken to end where the run with it does. The element, unlike the
	// stops, may shorten or lengthen a run, and is never held so.
	qsE0, qs00 = math.Max(qsE0, qsCut), math.Max(qs00, qs0F)

	qEF, qE0 := qsCut*scale, qsE0*scale
	q0F, q00 := qs0F*scale0, qs00*scale0

	// Differences of cut-offs that agree to the search's resolution (1e-12
	// of the curve, times a few roundings) are no charge anyone stranded:
	// they are set to zero, and the reference is then delivered + stranded
	// exactly (it moves by at most 2e-9 of the curve).
	tiny := 1e-9 * math.Max(q00, e.end*scale)
	snap := func(x float64) float64 {
		if math.Abs(x) <= tiny {
			return 0
		}
		return x
	}
	byEl := snap(0.5 * ((q0F - qEF) + (q00 - qE0)))
	byFloor := snap(q00 - qEF - byEl)
	r.DeliveredMAh = qEF
	r.StrandedByProtectionMAh = byEl
	r.StrandedByFloorMAh = byFloor
	r.StrandedMAh = byEl + byFloor
	// Never below zero: the reference can be nothing (the bare cells cannot
	// run the load at all) while the element lets the design run, and then
	// the sum above cancels to rounding.
	r.ReferenceMAh = math.Max(0, qEF+r.StrandedMAh)
}

// bareFails reports whether variant bare, variant v without its element
// (protect.None, no limit) and with no stop v lacks, fails where v's
// search f found v to fail and works wherever v works, so that its
// cut-off is v's. So it is when the element leaves the cells' side of
// every node as it is: every phase a constant current (its own at every
// charge), an element that draws nothing standing and drops nothing
// below zero (a junction), and the same clock. bare's load then sees at
// least v's voltage through the same cells, so it fails only where v
// does; and where v fails first by a rule of the cells' own (the
// end-point, the charge running out, the pack's cut-off when bare keeps
// it) bare fails too.
func (e *evaluator) bareFails(v, bare *variant, f found) bool {
	if e.heatRaisesR() { // a failure may go again (see strandedSplit)
		return false
	}
	switch f.why {
	case CauseEndPoint, causeSpent:
	case CauseCutoff:
		if !bare.cutoff {
			return false
		}
	default:
		return false
	}
	if f.v != v || bare.usePerQ != v.usePerQ || bare.periodicOnly != v.periodicOnly ||
		bare.floor > v.floor || bare.minLED > v.minLED || bare.cutoff && !v.cutoff {
		return false
	}
	if _, ok := bare.el.(protect.None); !ok {
		return false
	}
	return e.drawsAsBare(v)
}

// worksAsBare reports whether variant v (the design's element, no stop)
// works wherever variant bare (no element, its own stops) does, at every
// charge: so it is when the element leaves the cells' side of every node
// as it is (drawsAsBare, the same clock), has no limit of its own and
// its junctions hold still, so that its drops are fixed for the run —
// the caller checks them below bare's floor. The cells are then the
// same in both runs; v has only the cells' rules (the end-point, the
// charge running out), which bare has too, and a load voltage that
// falls to nothing, where bare's pack is still at its floor: above every
// drop.
func (e *evaluator) worksAsBare(v, bare *variant) bool {
	if !e.drawsAsBare(v) || v.floor != 0 || v.cutoff || v.minLED != 0 || v.over != nil ||
		!math.IsInf(v.lim.Clamp, 1) || !math.IsInf(v.lim.Trip, 1) ||
		v.heat != nil && !v.heat.still ||
		bare.usePerQ != v.usePerQ || bare.periodicOnly != v.periodicOnly {
		return false
	}
	_, ok := bare.el.(protect.None)
	return ok
}

// drawsAsBare reports whether variant v's cells carry what they would
// carry without its element, at every charge: every phase a constant
// current (its own at every charge, solve) behind an element that draws
// nothing standing and drops nothing below zero (a junction, or none).
func (e *evaluator) drawsAsBare(v *variant) bool {
	switch v.el.(type) {
	case protect.None, protect.Diode, protect.Schottky:
	default:
		return false
	}
	for _, l := range e.loads {
		if l.Kind != ConstantCurrent {
			return false
		}
	}
	return true
}

// capacityScale is pack mAh per scaled cell mAh for variant v — parallel
// strings times the cell's capacity factor at its effective current on the
// fresh pack (effectiveAmps, the rule evaluate uses) — and sets v's clock.
func (e *evaluator) capacityScale(v *variant, nd *node) float64 {
	e.solveNode(0, v, nd)
	scale := e.P * e.d.Cell.CapacityFactor(e.effectiveAmps(v, nd), e.d.TempC)
	e.clock(v, scale, nd)
	return scale
}

// Started reports whether the design ran at all: false when it fails on
// the fresh pack, and then a stranded share means nothing.
func (r *Result) Started() bool { return r.RuntimeH > 0 && r.DeliveredMAh > 0 }

// StrandedShare is the stranded charge as a fraction of the reference, and
// false when it has no meaning: the design never starts (CutoffText says
// why) or the reference is empty.
func (r *Result) StrandedShare() (float64, bool) {
	if !r.Started() || !(r.ReferenceMAh > 0) {
		return 0, false
	}
	return r.StrandedMAh / r.ReferenceMAh, true
}

// ProtectionShareText is the element's share of the stranded charge in
// words, for reports and the screen: "924 mAh by the protection drop", or
// when the element lengthens the run, "−300 mAh by the protection (it
// lowers the load's current, so the cells run longer)".
func (r *Result) ProtectionShareText() string {
	x := r.StrandedByProtectionMAh
	if x < 0 {
		return units.MAh(x, 3) + " by the protection (it lowers the load's current, so the cells run longer)"
	}
	return units.MAh(x, 3) + " by the protection drop"
}
