// Package pick searches for the cheapest design that meets a runtime
// target: every cell (the library and the scenario's own) × the series
// counts that put the pack inside the product's voltage window × parallel
// strings × every protection kind with a short ladder of part values,
// under limits on unit cost, cell count, stranded share, junction
// temperature, reverse behaviour and input voltage.
//
// Runtimes are taken at a Statistic: the nominal engine result, or (with
// a tolerance model) a low percentile or the worst corner.
//
// The search is exact: it returns the same ranked list and the same
// Pareto front of unit cost against runtime as evaluating every design,
// but skips designs that cannot be on either. Designs are taken in order
// of unit cost; a design is skipped when it cannot reach the target or
// rank in the list, and cannot beat the runtime of a cheaper design
// already found. The runtime bound is the same pack with no element: for
// loads that draw no less current at a lower voltage (constant current,
// constant power) an element only adds drop and drain, so it can only
// shorten the run. Every statistic is capped at the nominal runtime, so the
// bound holds at p10 and at the worst corner too.
package pick
