package main

import (
	"bytes"
	"errors"
	"fmt"
	"path/filepath"
	"strings"

	"headroom/curves"
	"headroom/discharge"
	"headroom/internal/guard"
	"headroom/internal/limited"
	"headroom/internal/scenario"
	"headroom/internal/units"
)

var cellsCmd = &command{
	name:  "cells",
	run:   runCells,
	args:  "[show ID|FILE | check FILE | import LOG.csv --current I -o CELL.csv | fit LOG.csv... -o CELL.toml] [flags]",
	short: "list the cell library, show a cell, check a cell file, import or fit bench logs",
	help: `
  headroom cells [--format text|json|csv|md]
      lists the built-in cells: typical values from memory, no maker's data.
  headroom cells show ID|FILE
      prints a cell's parameters, its curve points and its cautions.
  headroom cells check FILE
      checks a cell file of your own (.csv points "mAh,V[,ohm]" or a .toml
      definition) and says "ok" with a summary, or exactly what is wrong where.
  headroom cells import LOG.csv --current I -o CELL.csv [--force]
      turns a time-voltage log (seconds, volts) recorded at the constant
      current I into a cell curve. The output is written whole or not at
      all, and an existing file is kept unless --force is given.
  headroom cells fit LOG.csv [LOG.csv ...] -o CELL.toml [--chemistry ID]
                 [--temp T] [--end-point V] [--plot FIT.svg] [--force]
                 [--format text|json]
      fits a cell model to bench logs of one cell type: CSV with a header
      naming time (t_s, time or s), current (I_A, current or A; positive
      discharges) and voltage (V or voltage), optionally temperature (T_C
      or temp). Rests before, between and after loads carry the
      polarisation. The model is an open-circuit curve and R0 against
      charge and up to two RC branches, fitted to every sample of every log
      together; the report gives each log's residual (RMS and worst, mV),
      its charge, the fitted values and what the logs cannot show.
      --chemistry borrows a library cell's temperature, self-discharge and
      cycle terms (and cautions); --temp is the logs' temperature (default:
      their first sample's, else 20 °C); --end-point the cell's end-point
      (default: the borrowed cell's, else the lowest logged voltage under
      load); --plot draws measured against fitted voltage (.svg or .png).

examples:
  headroom cells
  headroom cells show hr6-lsd
  headroom cells check testdata/cells/example-cell.csv
  headroom cells fit testdata/measured/nasa-li-ion/cc-4A-B0034.csv testdata/measured/nasa-li-ion/cc-2A-B0036.csv -o nasa.toml
`,
}

func runCells(c *cli, args []string) error {
	if len(args) > 0 {
		switch args[0] {
		case "show":
			return cellsShow(c, args[1:])
		case "check":
			return cellsCheck(c, args[1:])
		case "import":
			return cellsImport(c, args[1:])
		case "fit":
			return cellsFit(c, args[1:])
		case "list":
			args = args[1:]
		}
	}
	fs := newFlags("cells")
	formatFlag := fs.String("format", "text", "")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) > 0 {
		return fmt.Errorf("cells: unknown action %q: expected show, check, import or fit (or nothing for the list)", pos[0])
	}
	f, err := parseFormat(*formatFlag)
	if err != nil {
		return err
	}
	cols := []column[*curves.Cell]{
		{key: "id", head: "id", human: true, machine: true, text: func(c *curves.Cell) string { return c.ID }, val: func(c *curves.Cell) any { return c.ID }},
		{key: "designation", head: "IEC", human: true, machine: true, text: func(c *curves.Cell) string { return c.Designation }, val: func(c *curves.Cell) any { return c.Designation }},
		{key: "chemistry", head: "chemistry", human: true, machine: true, text: func(c *curves.Cell) string { return c.Chemistry }, val: func(c *curves.Cell) any { return c.Chemistry }},
		{key: "nominal_V", head: "nominal V", right: true, human: true, machine: true, text: func(c *curves.Cell) string { return fixed(c.NominalV, 2) }, val: func(c *curves.Cell) any { return c.NominalV }},
		{key: "rated_mAh", head: "rated mAh", right: true, human: true, machine: true, text: func(c *curves.Cell) string { return fixed(c.RatedMAh, 0) }, val: func(c *curves.Cell) any { return c.RatedMAh }},
		{key: "rated_current_A", head: "at", right: true, human: true, machine: true, text: func(c *curves.Cell) string { return human(c.RatedCurrent, units.Current) }, val: func(c *curves.Cell) any { return c.RatedCurrent }},
		{key: "end_point_V", head: "end V", right: true, human: true, machine: true, text: func(c *curves.Cell) string { return fixed(c.EndPoint, 2) }, val: func(c *curves.Cell) any { return c.EndPoint }},
		{key: "rechargeable", head: "recharge", human: true, machine: true, text: func(c *curves.Cell) string { return rechargeWords(c) }, val: func(c *curves.Cell) any { return c.Rechargeable }},
		{key: "cycle_life", machine: true, val: func(c *curves.Cell) any { return c.CycleLife }},
		{key: "price", head: "price", right: true, human: true, machine: true, text: func(c *curves.Cell) string { return money(c.Price) }, val: func(c *curves.Cell) any { return c.Price }},
		{key: "name", head: "name", human: true, machine: true, text: func(c *curves.Cell) string { return c.Name }, val: func(c *curves.Cell) any { return c.Name }},
	}
	lib := curves.Library()
	t := newTable(c.stdout, f, cols)
	t.fit(lib)
	t.header()
	for _, cell := range lib {
		t.row(cell)
	}
	if err := t.end(); err != nil {
		return err
	}
	if f == formatText {
		_, err = fmt.Fprintln(c.stdout, "\nTypical values from memory for generic cells, not any maker's data. Prices in dollars per cell.")
	}
	return err
}

func rechargeWords(c *curves.Cell) string {
	if !c.Rechargeable {
		return "no"
	}
	return fmt.Sprintf("%d cycles", c.CycleLife)
}

// findCell resolves a library id or a cell file path (scenario.FindCell).
func findCell(ref string) (*curves.Cell, error) { return scenario.FindCell(ref) }

func cellsShow(c *cli, args []string) error {
	fs := newFlags("cells show")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if err := wantArgs("cells show", pos, 1, 1, "a cell id or file"); err != nil {
		return err
	}
	cell, err := findCell(pos[0])
	if err != nil {
		return err
	}
	var b bytes.Buffer
	line := func(k, format string, a ...any) { fmt.Fprintf(&b, "%-15s %s\n", k, fmt.Sprintf(format, a...)) }
	fmt.Fprintf(&b, "%s: %s\n", cell.ID, cell.Name)
	if cell.Designation != "" {
		line("designation", "%s", cell.Designation)
	}
	line("chemistry", "%s", cell.Chemistry)
	line("nominal", "%s V", short(cell.NominalV))
	if cell.RatedCurrent > 0 {
		line("rated", "%s mAh at %s to %s V", fixed(cell.RatedMAh, 0), human(cell.RatedCurrent, units.Current), short(cell.EndPoint))
	} else { // an imported cell: the rating is the curve's charge, at no stated current
		line("rated", "%s mAh to %s V (no rating current given)", fixed(cell.RatedMAh, 0), short(cell.EndPoint))
	}
	line("end-point", "%s V", short(cell.EndPoint))
	switch {
	case len(cell.Resistance) == 0 && len(cell.RC) == 0:
		// No resistance of any kind: the curve is what the load sees,
		// whatever it draws (a CSV of points "mAh,V", an imported log).
		line("curve", "the voltage under load at every current (no resistance given, so the current does not move it), %g °C", curves.RefTempC)
	case cell.RefCurrent > 0:
		line("curve", "terminal voltage at %s, %g °C", human(cell.RefCurrent, units.Current), curves.RefTempC)
	default:
		line("curve", "rest (open-circuit) voltage, %g °C", curves.RefTempC)
	}
	line("Peukert k", "%s", short(cell.Peukert))
	line("self-discharge", "%s %% a month at %g °C", sig(100*cell.SelfDischarge, 2), curves.RefTempC)
	if cell.Rechargeable {
		line("rechargeable", "%d cycles, charge efficiency %s %%", cell.CycleLife, short(100*cell.ChargeEfficiency))
	} else {
		line("rechargeable", "no (primary cell)")
	}
	line("price", "%s a cell", money(cell.Price))
	if cell.Source != "" {
		line("source", "%s", cell.Source)
	}
	if len(cell.Resistance) > 0 {
		var rs []string
		for _, r := range cell.Resistance {
			rs = append(rs, fmt.Sprintf("%s %% → %s", fixed(100*r.Depth, 0), human(r.Ohm, units.Resistance)))
		}
		line("resistance", "%s (depth of discharge → ohms)", strings.Join(rs, ", "))
	}
	if len(cell.RC) > 0 {
		var ps []string
		for _, b := range cell.RC {
			// As cells fit writes a branch: "for 2 s" read as how long it lasts.
			ps = append(ps, fmt.Sprintf("%s, τ %s", human(b.R, units.Resistance), human(b.Tau, units.Time)))
		}
		line("polarisation", "%s (RC branches: ohms and time constant τ)", strings.Join(ps, "; "))
	}
	if cell.SelfHeats() {
		line("self-heating", "%s J/K heat capacity, %s K/W to the ambient (time constant %s)",
			short(cell.HeatCapacity), short(cell.ThermalRes), human(cell.ThermalStage().Tau, units.Time))
	} else {
		line("self-heating", "none (the cell stays at the ambient)")
	}
	if cell.CutoffV > 0 {
		line("pack cut-off", "%s a cell, after %s below it", human(cell.CutoffV, units.Voltage), human(cell.CutoffDelay, units.Time))
	}
	if len(cell.Temperature) > 0 {
		var ts []string
		for _, t := range cell.Temperature {
			ts = append(ts, fmt.Sprintf("%g °C ×%s cap ×%s R", t.Celsius, short(t.Capacity), short(t.Resistance)))
		}
		line("temperature", "%s", strings.Join(ts, "; "))
	}
	fmt.Fprintf(&b, "\ncurve points:\n%10s  %7s\n", "mAh", "V")
	for i := 0; i < cell.Curve.Len(); i++ {
		q, v := cell.Curve.Point(i)
		fmt.Fprintf(&b, "%10s  %7s\n", trimZeros(sig(q, 5)), fixed(v, 3))
	}
	fmt.Fprintf(&b, "\ncautions:\n")
	for _, s := range dedupe(discharge.Cautions(cell, 1)) {
		fmt.Fprintf(&b, "  - %s\n", s)
	}
	_, err = c.stdout.Write(b.Bytes())
	return err
}

func cellsCheck(c *cli, args []string) error {
	fs := newFlags("cells check")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if err := wantArgs("cells check", pos, 1, 1, "a cell file (.csv or .toml)"); err != nil {
		return err
	}
	cell, err := curves.Load(pos[0])
	if err != nil {
		return err
	}
	n := cell.Curve.Len()
	q0, v0 := cell.Curve.Point(0)
	q1, v1 := cell.Curve.Point(n - 1)
	thinned := ""
	if t := cell.Thinned; t != nil {
		thinned = " (thinned on load " + thinnedWords(t.From, t.ErrV) + ")"
	}
	heat := "" // the thermal pair read, so a typo'd key is not taken for the cell at the ambient unseen
	if cell.SelfHeats() {
		heat = fmt.Sprintf("; self-heating %s J/K, %s K/W", short(cell.HeatCapacity), short(cell.ThermalRes))
	}
	_, err = fmt.Fprintf(c.stdout, "ok: %s: cell %q, %d points%s from %s to %s mAh, %s V down to %s V; end-point %s V, rated %s mAh, nominal %s V%s\n",
		guard.Clean(pos[0]), cell.ID, n, thinned, sig(q0, 4), sig(q1, 4), fixed(v0, 3), fixed(v1, 3), short(cell.EndPoint), sig(cell.RatedMAh, 4), short(cell.NominalV), heat)
	return err
}

func cellsImport(c *cli, args []string) error {
	fs := newFlags("cells import")
	current := fs.String("current", "", "")
	out := fs.String("o", "", "")
	force := fs.Bool("force", false, "")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if err := wantArgs("cells import", pos, 1, 1, "a log file (seconds, volts)"); err != nil {
		return err
	}
	if *current == "" {
		return errors.New("cells import: --current is required: the constant current of the log, e.g. --current 2A")
	}
	amps, err := units.Parse(*current, units.Current, true)
	if err == nil && (!(amps > 0) || amps > curves.MaxCellCurrent) {
		err = fmt.Errorf("%q: must be above 0 A and at most %g A", *current, curves.MaxCellCurrent)
	}
	if err != nil {
		return fmt.Errorf("--current: %w", err)
	}
	if *out == "" {
		return errors.New("cells import: -o is required: the cell file to write, e.g. -o cell.csv")
	}
	if ext := strings.ToLower(filepath.Ext(*out)); ext != ".csv" {
		return fmt.Errorf("-o: %q: the imported cell is written as CSV points; name it .csv", *out)
	}
	log, err := limited.ReadFile(pos[0], curves.MaxFileSize, "a discharge log (time and voltage columns)")
	if err != nil {
		return err
	}
	cell, err := curves.ImportLog(bytes.NewReader(log), pos[0], amps)
	if err != nil {
		return err
	}
	var b bytes.Buffer
	if err := curves.WriteCSV(&b, cell); err != nil {
		return fmt.Errorf("%s: %w", *out, err)
	}
	if err := writeOutput("-o", *out, b.Bytes(), *force); err != nil {
		return err
	}
	q, v := cell.Curve.Point(cell.Curve.Len() - 1)
	thinned := ""
	if t := cell.Thinned; t != nil {
		thinned = " (thinned " + thinnedWords(t.From, t.ErrV) + ")"
	}
	_, err = fmt.Fprintf(c.stdout, "wrote %s: %d points%s, %s mAh at %s down to %s V\n",
		guard.Clean(*out), cell.Curve.Len(), thinned, sig(q, 4), human(amps, units.Current), fixed(v, 3))
	if err == nil {
		_, err = fmt.Fprintf(c.stdout, "note: the points are the voltage under %s, with no resistance: headroom takes them as the\n"+
			"voltage at any current, so runtimes at lighter loads read short and at heavier loads long.\n"+
			"For a cell that follows the current, log rests around the load and use headroom cells fit.\n", human(amps, units.Current))
	}
	return err
}

// thinnedWords says how a curve was thinned: "from 6, none dropped more
// than 2 mV off", or, when every point left out lay on the line between
// its neighbours kept, "from 6, the points left out on the line between
// those kept" (not "more than 0 V off").
func thinnedWords(from int, errV float64) string {
	if errV < 0.5e-6 {
		return fmt.Sprintf("from %d, the points left out on the line between those kept", from)
	}
	return fmt.Sprintf("from %d, none dropped more than %s off", from, human(errV, units.Voltage))
}
