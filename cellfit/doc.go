// Package cellfit turns bench logs of a cell — time, current, terminal
// voltage, and optionally temperature — into a cell model: an open-circuit
// curve against charge, the instant resistance R0 against charge, and up to
// two polarisation branches (a Thevenin equivalent), fitted by least
// squares to every sample of every log together.
//
// Units and conventions follow package curves: seconds, amperes positive
// out of the cell (discharging), volts per cell, charge in mAh delivered
// since the start of each log, ohms. A log starts with the cell full and
// rested. Each sample's current is taken to hold until the next sample.
//
// The model here is the fit's own time-domain simulation (exact
// exponential steps between samples); it does not use the runtime engine,
// so that a fit can be checked against the engine independently.
package cellfit
