package main

import (
	"flag"
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"

	"headroom/internal/guard"
	"headroom/internal/scenario"
	"headroom/internal/units"
)

var tableCmd = &command{
	name:  "table",
	run:   runTable,
	args:  "[scenario.toml] [--sort COLUMN] [--desc] [--format text|json|csv|md]",
	short: "a runtime table over every option and swept value in a scenario file",
	help: `
Evaluates every combination of the scenario file's [options] (cells, series,
parallel, protect, loads) and [sweep] values (floor, temp, load_scale), one
row each. Columns: cell, pack (S×P), protection, the load when more than one
is listed, the swept values, runtime in hours of use and in days at the daily
pattern, delivered mAh, stranded % of the reference, energy burnt in the
protection element, its peak dissipation, cost per hour of use and the
cut-off cause. With no file the built-in demo is used.

Rows stream out in the file's order as they are computed. --sort needs every
row first (at most 1,000,000); ties keep the file's order.

flags:
  --sort COLUMN    runtime, days, delivered, stranded, loss, heat, cost, cell,
                   protect, floor, temp, load, scale, worst or p10 (ascending);
                   worst and p10 are each row's worst-corner and p10 runtime
                   over the tolerances (see headroom spread), in a column
  --desc           sort descending
  --samples N, --seed S, --tol NAME=SPREAD
                   the spread's samples, seed and tolerances, for --sort p10
                   and worst
  --format FORMAT  text, json, csv or md (default text)

design flags (each sets that value for every row, as in headroom run):
` + designFlagHelp() + `
examples:
  headroom table testdata/scenarios/example.toml
  headroom table --sort runtime --desc --format md
  headroom table testdata/scenarios/example.toml --sort cost --format csv > runtimes.csv
`,
}

// tableRow is one evaluated combination, kept small so a sorted table of
// many rows stays light.
type tableRow struct {
	cell             string
	series, parallel int
	protect, load    string
	floor, temp      float64
	scale            float64

	runtimeH, days, delivered, stranded float64
	lossWh, peakW, cost                 float64
	cause, phase                        string
	err                                 string
	rank                                float64 // worst-corner or p10 runtime, for --sort worst|p10
}

func (r tableRow) cutoff() string {
	if r.err != "" {
		return "invalid: " + r.err
	}
	return r.cause + " on " + trimAllZeros(r.phase)
}

func rowOf(row scenario.Row) tableRow {
	c := row.Combo
	t := tableRow{cell: c.CellID, series: c.Series, parallel: c.Parallel, protect: c.Protect, load: c.Load,
		floor: c.Floor, temp: c.TempC, scale: c.LoadScale}
	if row.Err != nil {
		nan := math.NaN()
		t.runtimeH, t.days, t.delivered, t.stranded, t.lossWh, t.peakW, t.cost = nan, nan, nan, nan, nan, nan, nan
		t.err = row.Err.Error()
		return t
	}
	r := row.Result
	t.runtimeH, t.days, t.delivered = r.RuntimeH, r.RuntimeDays, r.DeliveredMAh
	t.stranded = strandedPct(r)
	t.lossWh, t.peakW, t.cost = r.ProtectionLossWh, r.ProtectionPeakW, r.CostPerHour
	if r.RuntimeH <= 0 {
		t.cost = math.NaN() // no cost per hour for a product that never runs: shown as "—"
	}
	t.cause, t.phase = string(r.CutoffCause), r.CutoffPhase
	return t
}

// costKey sorts a design that never runs (no cost per hour, its runtime
// is 0) after every design that does, however cheap, in either direction:
// NaN keys go last (see runTable).
func costKey(r tableRow) float64 {
	if r.runtimeH <= 0 {
		return math.NaN()
	}
	return r.cost
}

// sortKeys are the --sort columns: a number, or a text compared as text.
var sortKeys = map[string]func(tableRow) (float64, string){
	"runtime":   func(r tableRow) (float64, string) { return r.runtimeH, "" },
	"days":      func(r tableRow) (float64, string) { return r.days, "" },
	"delivered": func(r tableRow) (float64, string) { return r.delivered, "" },
	"stranded":  func(r tableRow) (float64, string) { return r.stranded, "" },
	"loss":      func(r tableRow) (float64, string) { return r.lossWh, "" },
	"heat":      func(r tableRow) (float64, string) { return r.peakW, "" },
	"cost":      func(r tableRow) (float64, string) { return costKey(r), "" },
	"floor":     func(r tableRow) (float64, string) { return r.floor, "" },
	"temp":      func(r tableRow) (float64, string) { return r.temp, "" },
	"scale":     func(r tableRow) (float64, string) { return r.scale, "" },
	"cell":      func(r tableRow) (float64, string) { return 0, r.cell },
	"protect":   func(r tableRow) (float64, string) { return 0, r.protect },
	"load":      func(r tableRow) (float64, string) { return 0, r.load },
	"worst":     func(r tableRow) (float64, string) { return r.rank, "" },
	"p10":       func(r tableRow) (float64, string) { return r.rank, "" },
}

var sortOrder = []string{"runtime", "days", "delivered", "stranded", "loss", "heat", "cost", "cell", "protect", "floor", "temp", "load", "scale", "worst", "p10"}

// maxSortedRows bounds the rows held for --sort (about 200 bytes each).
const maxSortedRows = 1_000_000

func tableColumns(s *scenario.Scenario) []column[tableRow] {
	wid := func(xs []string) int {
		w := 0
		for _, x := range xs {
			w = max(w, len([]rune(x)))
		}
		return w
	}
	var cellIDs []string
	for _, c := range s.Cells {
		cellIDs = append(cellIDs, c.ID)
	}
	num := func(key, head string, d int, get func(tableRow) float64) column[tableRow] {
		return column[tableRow]{key: key, head: head, right: true, human: true, machine: true, width: 7,
			text: func(r tableRow) string { return fixed(get(r), d) }, val: func(r tableRow) any { return get(r) }}
	}
	cols := []column[tableRow]{
		{key: "cell", head: "cell", human: true, machine: true, width: wid(cellIDs),
			text: func(r tableRow) string { return r.cell }, val: func(r tableRow) any { return r.cell }},
		{head: "S×P", human: true, width: 4, text: func(r tableRow) string { return fmt.Sprintf("%d×%d", r.series, r.parallel) }},
		{key: "series", machine: true, val: func(r tableRow) any { return r.series }},
		{key: "parallel", machine: true, val: func(r tableRow) any { return r.parallel }},
		{key: "protect", head: "protect", human: true, machine: true, width: wid(s.ProtectSpecs),
			text: func(r tableRow) string { return r.protect }, val: func(r tableRow) any { return r.protect }},
	}
	if len(s.Loads) > 1 {
		cols = append(cols, column[tableRow]{key: "load", head: "load", human: true, machine: true, width: wid(s.LoadSpecs),
			text: func(r tableRow) string { return r.load }, val: func(r tableRow) any { return r.load }})
	}
	if len(s.Floors) > 1 {
		cols = append(cols, num("floor_V", "floor V", 2, func(r tableRow) float64 { return r.floor }))
	}
	if len(s.Temps) > 1 {
		cols = append(cols, num("temp_C", "°C", 0, func(r tableRow) float64 { return r.temp }))
	}
	if len(s.LoadScales) > 1 {
		cols = append(cols, num("load_scale", "load ×", 2, func(r tableRow) float64 { return r.scale }))
	}
	cols = append(cols,
		num("runtime_h", "runtime h", 2, func(r tableRow) float64 { return r.runtimeH }),
		num("runtime_days", "days", 1, func(r tableRow) float64 { return r.days }),
		num("delivered_mAh", "mAh", 0, func(r tableRow) float64 { return r.delivered }),
		num("stranded_pct", "stranded %", 1, func(r tableRow) float64 { return r.stranded }),
		num("protection_loss_Wh", "loss Wh", 3, func(r tableRow) float64 { return r.lossWh }),
		num("protection_peak_W", "heat W", 3, func(r tableRow) float64 { return r.peakW }),
		// Eleven columns hold every units.Dollars text below $1000 an
		// hour ("$0.0000010", "< $0.000001"), so a streamed table fits.
		column[tableRow]{key: "cost_per_hour", head: "$/h", right: true, human: true, machine: true, width: 11,
			text: func(r tableRow) string { return money(r.cost) }, val: func(r tableRow) any { return r.cost }},
		column[tableRow]{key: "cutoff_cause", machine: true, val: func(r tableRow) any { return r.cause }},
		column[tableRow]{key: "cutoff_phase", machine: true, val: func(r tableRow) any { return r.phase }},
		column[tableRow]{key: "error", machine: true, val: func(r tableRow) any { return r.err }},
		column[tableRow]{head: "cut-off", human: true, text: tableRow.cutoff},
	)
	return cols
}

func runTable(c *cli, args []string) error {
	fs := newFlags("table")
	addDesignFlags(fs)
	sortFlag := fs.String("sort", "", "")
	desc := fs.Bool("desc", false, "")
	formatFlag := fs.String("format", "text", "")
	sf := addSpreadFlags(fs)
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if err := wantArgs("table", pos, 0, 1, "a scenario file"); err != nil {
		return err
	}
	f, err := parseFormat(*formatFlag)
	if err != nil {
		return err
	}
	key := strings.ToLower(strings.TrimSpace(*sortFlag))
	if _, ok := sortKeys[key]; key != "" && !ok {
		return fmt.Errorf("--sort: %q is not a column: expected one of %s", *sortFlag, strings.Join(sortOrder, ", "))
	}
	if *desc && key == "" {
		return fmt.Errorf("--desc: sorts descending, so it needs --sort COLUMN")
	}
	s, err := designScenario(fs, pos)
	if err != nil {
		return err
	}
	fromFlags(fs, s, pos)
	if err := sf.apply(s); err != nil {
		return err
	}
	_, ranked := rankKeys[key]
	if !ranked {
		given := ""
		fs.Visit(func(fl *flag.Flag) {
			if sf.given(fl.Name) && given == "" {
				given = fl.Name
			}
		})
		if given != "" {
			return fmt.Errorf("--%s: sets the spread, so it needs --sort worst or --sort p10", given)
		}
	}
	n := s.Count()
	if key != "" && n > maxSortedRows {
		return fmt.Errorf("--sort: %d rows, more than the %d a sorted table holds; sort fewer combinations or leave out --sort to stream them", n, maxSortedRows)
	}
	if f == formatText {
		if err := tableContext(c, s, n); err != nil {
			return err
		}
	}
	cols := tableColumns(s)
	if ranked {
		cols = append(cols, rankColumn(key, func(r tableRow) float64 { return r.rank }))
	}
	t := newTable(c.stdout, f, cols)
	if key == "" {
		t.header()
		s.Sweep(func(row scenario.Row) bool {
			t.row(rowOf(row))
			return t.err == nil // stop on a closed pipe
		})
		return t.end()
	}
	rows := make([]tableRow, 0, n)
	var rankErr error
	bar := newMeter(c.stderr, isTerminal(c.stderr), "rows", n)
	s.Sweep(func(row scenario.Row) bool {
		r := rowOf(row)
		r.rank = math.NaN()
		if ranked && row.Err == nil {
			d := row.Combo.Design
			if r.rank, rankErr = rankFigure(s, &d, key); rankErr != nil {
				rankErr = fmt.Errorf("--sort %s: row %d: %w", key, row.Combo.Index+1, rankErr)
				return false
			}
		}
		rows = append(rows, r)
		bar.step(len(rows))
		return true
	})
	bar.end()
	if rankErr != nil {
		return rankErr
	}
	get := sortKeys[key]
	sort.SliceStable(rows, func(i, j int) bool {
		a, as := get(rows[i])
		b, bs := get(rows[j])
		// Figures that agree to nine significant digits (rechargeables'
		// cost per hour of use, which is per charge drawn, and so the same
		// behind every element on one load) keep the sweep's order: their
		// last bits are rounding, and must not reorder the table.
		a, b = sortable(a), sortable(b)
		// Invalid rows, and for cost those that never run (NaN), go last
		// whatever the direction.
		if an, bn := math.IsNaN(a), math.IsNaN(b); an || bn {
			return !an && bn
		}
		if as != bs {
			if *desc {
				return as > bs
			}
			return as < bs
		}
		if *desc {
			return a > b
		}
		return a < b
	})
	t.fit(rows)
	t.header()
	for _, r := range rows {
		t.row(r)
	}
	return t.end()
}

// sortable is x rounded to nine significant digits, for ordering rows.
func sortable(x float64) float64 {
	if x == 0 || math.IsNaN(x) || math.IsInf(x, 0) {
		return x
	}
	v, _ := strconv.ParseFloat(strconv.FormatFloat(x, 'g', 9, 64), 64)
	return v
}

// tableContext writes, for people, what every row shares.
func tableContext(c *cli, s *scenario.Scenario, n int) error {
	d := &s.Design
	var parts []string
	if len(s.Loads) == 1 {
		parts = append(parts, "load "+loadWords(d))
	}
	if len(s.Floors) == 1 {
		parts = append(parts, "floor "+fixed(d.Floor, 2)+" V")
	}
	if len(s.Temps) == 1 {
		parts = append(parts, human(d.TempC, units.Temperature))
	}
	if d.HoursPerDay > 0 {
		parts = append(parts, short(d.HoursPerDay)+" h of use a day")
	}
	if d.Standby > 0 {
		parts = append(parts, "standby "+human(d.Standby, units.Current))
	}
	name := s.Name
	if name == "" {
		name = guard.Clean(s.Path)
	}
	rows := "rows"
	if n == 1 {
		rows = "row"
	}
	_, err := fmt.Fprintf(c.stdout, "%s: %d %s\n%s\n\n", name, n, rows, strings.Join(parts, "; "))
	return err
}
