// Package discharge is headroom's runtime engine: a pack of cells, an input
// protection element, a load and the load's floor voltage, integrated to
// runtime, delivered and stranded capacity, heat and cost per hour.
//
// Units and signs: currents in amperes, positive out of the cells into the
// load; voltages in volts; charge in mAh; time in hours (phase durations in
// seconds); power in watts, energy in watt-hours; temperatures in °C; money
// in dollars.
//
// Method (docs/engine.md; docs/cell-model.md). The slow state is the charge q drawn
// from the pack. Each cell is a Thevenin equivalent, E(q) − I·R0 − Σ vᵢ,
// whose RC branches sit at every q in the periodic steady state of the
// repeating profile and of the daily use and rest, in closed form
// (polarisation.go); a fresh pack starts rested. At any q every load phase
// has an operating point at its mean polarisation and one at its worst
// instant, each a 1-D solve of Vload = Vpack(q, I) − Vdrop(I) against the
// load law. Runtime is the quadrature t = ∫₀^qcut dq / Ī(q), with Ī the
// duty-weighted current plus standby and self-discharge; qcut is the first
// q at which a rule fails: a phase below the floor at its worst instant, a
// constant-power collapse, a current limit, a fuse, a rechargeable pack's
// cut-off (a dip longer than its delay), or the end-point on the cell
// voltage averaged over the time current flows. Between breakpoints the
// integrand is smooth, so each span takes a fixed Gauss–Legendre rule
// (gonum integrate/quad), or the midpoint where it is linear; no time
// steps are taken.
//
// Rate effect (curves.Cell.CapacityFactor). The sag sets part of it; the
// charge axis is stretched by the rest of Peukert's law, at one effective
// per-cell current: the Peukert-weighted average (Σ dᵢ·Iᵢᵏ)^(1/k) over the
// day with the fresh pack.
//
// Evaluate is a pure function: it may be called from many goroutines.
package discharge
