// Package curves describes electrochemical cells: a validated
// piecewise-linear discharge curve, the terms that move it with current,
// temperature and time, a built-in library of generic cells, and readers
// for cells users bring (CSV points, TOML definitions, time–voltage logs).
//
// Units and conventions:
//   - charge in mAh (delivered from full), always at least 0;
//   - voltage in volts per cell (a 6LR61 block counts as one 9 V "cell");
//   - current in amperes, positive flowing out of the cell;
//   - resistance in ohms (Ω);
//   - temperature in °C; curves are stated at RefTempC (20 °C);
//   - self-discharge as a fraction of rated capacity per month;
//   - prices in dollars per cell.
//
// A curve is the terminal voltage at the cell's reference current, or the
// rest voltage when that current is 0. The engine reads a cell through
// Cell.Terminal and Cell.CapacityFactor and treats it as exhausted when the
// scaled charge reaches Curve.End or the terminal voltage reaches EndPoint.
//
// Cells are read-only once built: the library hands out shared pointers.
//
// Errors a file can cause name the file and line, for example
// "cells.csv line 7: voltage rises from 1.21 V to 1.25 V".
package curves
