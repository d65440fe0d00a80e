// Package discharge is headroom's runtime engine: a pack of cells, an input
// protection element, a load and the load's floor voltage, integrated to
// runtime, delivered and stranded capacity, heat and cost per hour.
//
// Units and signs: currents in amperes, positive out of the cells into the
// load; voltages in volts; charge in mAh; time in hours (phase durations in
// seconds); power in watts, energy in watt-hours; temperatures in °C; money
// in dollars.
//
// Method (docs/engine.md). The only state is the charge q drawn from the pack.
// At any q every load phase has one operating point, found by a 1-D solve of
// Vload = Vpack(q, I) − Vdrop(I) against the load law. Runtime is the
// quadrature t = ∫₀^qcut dq / Ī(q), with Ī the duty-weighted current plus
// standby and self-discharge; the cut-off charge qcut is the first q at which
// any phase's operating point fails (below the floor, collapse of a
// constant-power load, a current limit, a fuse, or a cell at its end-point).
// Between the breakpoints of the cell's curve and resistance table the
// integrand is smooth, so each span takes a fixed Gauss–Legendre rule
// (gonum integrate/quad) and no time steps are taken.
//
// Rate effect. Pulsed loads scale capacity by one effective current per
// cell, the Peukert-weighted average (Σ dᵢ·Iᵢᵏ)^(1/k) of the phases'
// currents at half depth of discharge; each phase's own current sets its
// I·R sag.
//
// Evaluate is a pure function: it may be called from many goroutines.
package discharge
