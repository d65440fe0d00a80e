// Package protect models the input-protection elements that sit between a
// battery pack and its load: a wire, series PN and Schottky diodes, a
// P-channel MOSFET in the supply rail (with or without a Zener gate clamp),
// a shunt-and-PNP current limiter, a polyfuse, a crowbar diode with a fuse,
// and an integrated protector. Each answers for its forward drop, heat,
// standby drain, current limits, warnings and wrong-insertion behaviour.
//
// Units: amperes, volts, ohms, watts, °C, dollars. Currents are positive
// from the pack into the load. The package knows nothing of cells or loads
// beyond the numbers passed to it.
package protect
