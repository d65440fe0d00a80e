// Package protect models the input-protection elements that sit between a
// battery pack and its load: a wire, series PN and Schottky diodes, a
// P-channel MOSFET in the supply rail (with or without a Zener gate clamp),
// a shunt-and-PNP current limiter, a polyfuse, a crowbar diode with a fuse,
// and an integrated protector. Each answers for its forward drop, heat,
// standby drain, current limits, warnings and wrong-insertion behaviour.
//
// Units: amperes, volts, ohms, watts, °C, dollars. Currents are positive
// from the pack into the load. The package knows nothing of cells or loads
// beyond the numbers passed to it. Drop and Quiescent take the junction
// temperature passed in; each element's thermal network (Thermal, a
// Foster ladder) and Heating give the junction over a repeating profile
// and solve it together with the drops that heat it (Heating.Settle).
//
// Elements are written as specs, "kind:key=value,...", for example
// "diode:is=10n,n=1.8,rs=0.08" or "pmos-clamp:vz=5.1,rg=100k"; Parse reads
// them, Spec writes them back in full, Kinds lists the kinds. Drop is a
// closed form that does not allocate, for engines that call it many
// thousands of times per scenario.
//
// Typical parameter values are generic parts recalled from memory, not
// any maker's data; they are labelled so where they are set.
package protect
