package main

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"headroom/cellfit"
	"headroom/curves"
	"headroom/internal/scenario"
	"headroom/internal/units"
)

// cellsFit fits a cell model to bench logs and writes it as a cell TOML
// file (headroom cells fit).
func cellsFit(c *cli, args []string) error {
	fs := newFlags("cells fit")
	out := fs.String("o", "", "")
	chem := fs.String("chemistry", "", "")
	temp := fs.String("temp", "", "")
	endPoint := fs.String("end-point", "", "")
	plotOut := fs.String("plot", "", "")
	force := fs.Bool("force", false, "")
	formatFlag := fs.String("format", "text", "")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if err := wantArgs("cells fit", pos, 1, 64, "one or more log files (CSV: time, current, voltage)"); err != nil {
		return err
	}
	f, err := parseFormat(*formatFlag)
	if err != nil {
		return err
	}
	if f != formatText && f != formatJSON {
		return fmt.Errorf("--format: %q: cells fit writes text or json", *formatFlag)
	}
	if *out == "" {
		return errors.New("cells fit: -o is required: the cell file to write, e.g. -o mycell.toml")
	}
	if ext := strings.ToLower(filepath.Ext(*out)); ext != ".toml" {
		return fmt.Errorf("-o: %q: the fitted cell is written as TOML; name it .toml", *out)
	}
	plotExt := ""
	if *plotOut != "" {
		plotExt = strings.ToLower(strings.TrimPrefix(filepath.Ext(*plotOut), "."))
		if plotExt != "svg" && plotExt != "png" {
			return fmt.Errorf("--plot: %q: expected a file name ending in .svg or .png", *plotOut)
		}
	}
	var borrow *curves.Cell
	if *chem != "" {
		if borrow, err = cellfit.LookupChemistry(strings.TrimSpace(*chem)); err != nil {
			return fmt.Errorf("--chemistry: %w", err)
		}
	}
	end := 0.0
	if *endPoint != "" {
		end, err = units.Parse(*endPoint, units.Voltage, true)
		if err == nil && !(end > 0 && end <= cellfit.MaxCellV) {
			err = fmt.Errorf("%q: must be above 0 V and at most %g V (one cell)", *endPoint, cellfit.MaxCellV)
		}
		if err != nil {
			return fmt.Errorf("--end-point: %w", err)
		}
	}
	tempSet := *temp != ""
	tempC := curves.RefTempC
	if tempSet {
		if tempC, err = scenario.ParseTemp(*temp); err != nil {
			return fmt.Errorf("--temp: %w", err)
		}
	}
	// Refuse an existing output before the work, not after it.
	for _, p := range []struct{ flag, path string }{{"-o", *out}, {"--plot", *plotOut}} {
		if p.path != "" && !*force && fileExists(p.path) {
			return fmt.Errorf("%s: %s exists: add --force to replace it", p.flag, p.path)
		}
	}
	if *plotOut != "" && filepath.Clean(*plotOut) == filepath.Clean(*out) {
		return errors.New("--plot: the chart and the cell file must be different files")
	}

	var logs []*cellfit.Log
	for _, p := range pos {
		l, err := readLogFile(p)
		if err != nil {
			return err
		}
		logs = append(logs, l)
	}
	if !tempSet {
		// The logs' own starting temperature, when they all have one.
		sum, n := 0.0, 0
		for _, l := range logs {
			if l.TempC != nil {
				sum, n = sum+l.TempC[0], n+1
			}
		}
		if n == len(logs) {
			tempC = math.Round(sum/float64(n)*10) / 10
		}
	}
	res, err := cellfit.Fit(logs, cellfit.Options{Auto: true})
	if err != nil {
		return fmt.Errorf("cells fit: %w", err)
	}
	id := strings.TrimSuffix(filepath.Base(*out), filepath.Ext(*out))
	cell, err := res.Cell(cellfit.CellOptions{ID: id, Borrow: borrow, TempC: tempC, EndPoint: end})
	if err != nil {
		return fmt.Errorf("cells fit: %w", err)
	}
	rep := res.Report(cell, tempC)
	var toml bytes.Buffer
	if err := curves.WriteCellTOML(&toml, cell, rep.Comment()); err != nil {
		return fmt.Errorf("%s: %w", *out, err)
	}
	// What headroom writes, headroom reads back.
	if _, err := curves.ReadCellTOML(bytes.NewReader(toml.Bytes()), *out); err != nil {
		return failure{fmt.Errorf("cells fit: internal error: the written cell does not read back: %w", err)}
	}
	var chart []byte
	if *plotOut != "" {
		if chart, err = res.Plot(plotExt); err != nil {
			return failure{fmt.Errorf("--plot: %w", err)}
		}
	}
	if err := scenario.WriteFile(*out, toml.Bytes(), *force); err != nil {
		if errors.Is(err, scenario.ErrExists) {
			return fmt.Errorf("-o: %s exists: add --force to replace it", *out)
		}
		return err
	}
	if chart != nil {
		if err := scenario.WriteFile(*plotOut, chart, *force); err != nil {
			if errors.Is(err, scenario.ErrExists) {
				return fmt.Errorf("--plot: %s exists: add --force to replace it (the cell file %s was written)", *plotOut, *out)
			}
			return fmt.Errorf("%w (the cell file %s was written)", err, *out)
		}
	}
	if f == formatJSON {
		return writeFitJSON(c, rep, *out, *plotOut)
	}
	return writeFitText(c, rep, cell, *out, *plotOut, borrow)
}

// readLogFile opens a bench log with messages naming it: a regular file,
// read as a stream (logs may be large; the reader limits the rows).
func readLogFile(path string) (*cellfit.Log, error) {
	st, err := os.Stat(path)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, scenario.UnwrapPath(err))
	}
	if st.IsDir() {
		return nil, fmt.Errorf("%s: is a directory, expected a log file", path)
	}
	if !st.Mode().IsRegular() {
		return nil, fmt.Errorf("%s: not a regular file (%s), expected a log file", path, st.Mode().Type())
	}
	fh, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, scenario.UnwrapPath(err))
	}
	defer fh.Close()
	return cellfit.ReadLog(fh, path)
}

func writeFitText(c *cli, rep *cellfit.Report, cell *curves.Cell, out, plotOut string, borrow *curves.Cell) error {
	var b bytes.Buffer
	if n := len(rep.Logs); n == 1 {
		fmt.Fprintf(&b, "cells fit: one log\n\n")
	} else {
		fmt.Fprintf(&b, "cells fit: %d logs fitted together, each log weighted alike\n\n", n)
	}
	name := 4
	for _, l := range rep.Logs {
		name = max(name, len([]rune(l.File)))
	}
	fmt.Fprintf(&b, "%-*s  %7s  %7s  %10s  %14s  %7s  %s\n", name, "log", "samples", "load", "delivered", "model", "RMS", "worst")
	for _, l := range rep.Logs {
		model := "—"
		if l.ModelOK {
			model = fmt.Sprintf("%s (%+.1f%%)", fixed(l.ModelMAh, 0), 100*(l.ModelMAh/l.Delivered-1))
		}
		fmt.Fprintf(&b, "%-*s  %7d  %7s  %10s  %14s  %7s  %s at line %d\n", name, l.File, l.Samples, human(l.LoadA, units.Current),
			fixed(l.Delivered, 1)+" mAh", model, fixed(l.RMSmV, 1)+" mV", fixed(l.WorstmV, 1)+" mV", l.WorstLine)
	}
	fmt.Fprintf(&b, "\ndelivered: to the last loaded sample (trapezoid rule); model: the written cell on the\nlog's own current down to that sample's voltage; RMS and worst: measured − model.\n")
	fmt.Fprintf(&b, "\nfitted at %s °C", trimZeros(fixed(rep.TempC, 1)))
	if borrow != nil && len(cell.Temperature) > 0 {
		fmt.Fprintf(&b, " (the file states them at %g °C through %s's temperature table)", curves.RefTempC, borrow.ID)
	}
	fmt.Fprintf(&b, ":\n")
	line := func(k, format string, a ...any) { fmt.Fprintf(&b, "  %-14s %s\n", k, fmt.Sprintf(format, a...)) }
	if rep.RefCurrent > 0 {
		line("curve", "terminal voltage at %s: %s V full to %s V at %s mAh (%d points)", human(rep.RefCurrent, units.Current),
			fixed(rep.FullV, 3), fixed(rep.CurveEndV, 3), fixed(rep.CurveEndMAh, 0), rep.CurvePoints)
	} else {
		line("open-circuit", "%s V full, %s V at half, %s V at %s mAh (%d points)", fixed(rep.FullV, 3),
			fixed(rep.HalfV, 3), fixed(rep.DeepestV, 3), fixed(rep.DeepestMAh, 0), rep.CurvePoints)
		if rep.CurveEndMAh > rep.DeepestMAh*(1+1e-9) {
			line("", "extrapolated to %s V at %s mAh", fixed(rep.CurveEndV, 3), fixed(rep.CurveEndMAh, 0))
		}
	}
	if len(rep.R0) == 1 { // not "193 mΩ to 193 mΩ (1 points against depth)"
		line("R0", "%s at every depth (one point: the logs show no change with depth)", human(rep.R0[0][1], units.Resistance))
	} else if len(rep.R0) > 0 {
		lo, hi := math.Inf(1), 0.0
		for _, p := range rep.R0 {
			lo, hi = min(lo, p[1]), max(hi, p[1])
		}
		line("R0", "%s full, %s at the end of the logs; %s to %s (%d points against depth)", human(rep.R0[0][1], units.Resistance),
			human(rep.R0[len(rep.R0)-1][1], units.Resistance), human(lo, units.Resistance), human(hi, units.Resistance), len(rep.R0))
	} else {
		line("R0", "none (in the curve)")
	}
	if len(rep.Branches) == 0 {
		line("rc", "none")
	}
	for i, br := range rep.Branches {
		line(fmt.Sprintf("branch %d", i+1), "%s, τ %s s", human(br.Ohm, units.Resistance), short(br.Tau))
	}
	line("end-point", "%s V", short(rep.EndPoint))
	var lv []string
	for _, x := range rep.Levels {
		lv = append(lv, human(x, units.Current))
	}
	line("data", "load currents %s; %d current steps", strings.Join(lv, ", "), rep.Steps)
	for _, l := range rep.Logs {
		for _, s := range l.Skipped {
			fmt.Fprintf(&b, "note: %s: %s\n", l.File, s)
		}
	}
	if len(rep.Warnings) > 0 {
		fmt.Fprintf(&b, "\nwarnings:\n")
		for _, w := range rep.Warnings {
			fmt.Fprintf(&b, "  - %s\n", w)
		}
	}
	fmt.Fprintf(&b, "\nwrote %s", out)
	if plotOut != "" {
		fmt.Fprintf(&b, " and %s", plotOut)
	}
	fmt.Fprintf(&b, "\n")
	_, err := c.stdout.Write(b.Bytes())
	return err
}

// round6 keeps six significant digits, like the other machine outputs.
func round6(x float64) float64 {
	if !finite(x) {
		return x
	}
	y, _ := strconv.ParseFloat(strconv.FormatFloat(x, 'g', 6, 64), 64)
	return y
}

func writeFitJSON(c *cli, rep *cellfit.Report, out, plotOut string) error {
	r := *rep
	r.Logs = append([]cellfit.LogReport(nil), rep.Logs...)
	for i := range r.Logs {
		l := &r.Logs[i]
		l.LoadA, l.Delivered, l.LastV, l.RMSmV, l.WorstmV, l.ModelMAh = round6(l.LoadA), round6(l.Delivered), round6(l.LastV), round6(l.RMSmV), round6(l.WorstmV), round6(l.ModelMAh)
	}
	r.FullV, r.HalfV, r.DeepestV = round6(r.FullV), round6(r.HalfV), round6(r.DeepestV)
	r.DeepestMAh, r.CurveEndMAh, r.CurveEndV = round6(r.DeepestMAh), round6(r.CurveEndMAh), round6(r.CurveEndV)
	r.R0 = nil
	for _, p := range rep.R0 {
		r.R0 = append(r.R0, [2]float64{round6(p[0]), round6(p[1])})
	}
	r.Branches = nil
	for _, br := range rep.Branches {
		r.Branches = append(r.Branches, cellfit.BranchReport{Ohm: round6(br.Ohm), Tau: round6(br.Tau)})
	}
	r.Levels = nil
	for _, x := range rep.Levels {
		r.Levels = append(r.Levels, round6(x))
	}
	if r.Warnings == nil {
		r.Warnings = []string{}
	}
	v := struct {
		Cell string `json:"cell_file"`
		Plot string `json:"plot_file,omitempty"`
		*cellfit.Report
	}{out, plotOut, &r}
	data, err := json.MarshalIndent(v, "", "  ")
	if err != nil {
		return err
	}
	_, err = c.stdout.Write(append(data, '\n'))
	return err
}
