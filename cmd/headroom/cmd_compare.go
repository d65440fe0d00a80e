package main

import (
	"errors"
	"flag"
	"fmt"
	"math"
	"sort"
	"strings"

	"headroom/curves"
	"headroom/discharge"
	"headroom/internal/guard"
	"headroom/internal/scenario"
)

var compareCmd = &command{
	name:  "compare",
	run:   runCompare,
	args:  "[scenario.toml] [--budget DOLLARS] [--within-budget] [--sort cost|runtime|worst|p10] [--format text|json|csv|md]",
	short: "every chemistry that fits the product, ranked by cost per hour of use",
	help: `
Tries every library cell (and the scenario file's own cells) in the product:
the same load, protection element, floor, ambient, daily pattern and parallel
count as the file's design. With no file the built-in demo is used.

Series count, per chemistry: the count whose nominal pack voltage is closest
to the design's (ties go to fewer cells), among the counts whose fresh
open-circuit pack voltage is at most ` + fmt.Sprint(scenario.FreshLimit) + ` × the design's and above the floor.
A chemistry with no such count does not fit and is listed as such.

Columns: runtime in hours of use, packs bought (primary) or charges
(rechargeable) per year at the daily pattern, cost per hour of use (primary:
pack price ÷ runtime; rechargeable: pack price ÷ cycle life plus the charging
energy, per hour), cost per year, stranded % of the reference, the pack +
protection part cost, and the chemistry's main caution. Rows are ranked by
cost per hour, cheapest first; a pack (or a charge) that lasts less than a
day of the product's use is marked * and ranked after those that last a
day; designs that never start go last.

flags:
  --budget DOLLARS  most a pack + protection part may cost (default: the
                    file's budget key); dearer rows are marked OVER
  --within-budget   leave out the rows over budget instead of marking them
  --sort KEY        cost (cheapest per hour first, the default), runtime
                    (longest first), worst or p10 (the longest worst-corner
                    or p10 runtime over the tolerances first; see headroom
                    spread)
  --samples N, --seed S, --tol NAME=SPREAD
                    the spread's samples, seed and tolerances
  --format FORMAT   text, json, csv or md (default text)

design flags (as in headroom run; compare then ranks every cell for it):
` + designFlagHelp() + `
examples:
  headroom compare
  headroom compare testdata/scenarios/example.toml --budget 2.50 --within-budget
  headroom compare --sort runtime --format md
`,
}

type compareRow struct {
	cell         *curves.Cell
	series, par  int
	r            *discharge.Result
	perYear      float64 // packs or charges a year
	costPerYear  float64
	partCost     float64 // pack + protection element
	overBudget   bool
	budgetActive bool
	short        bool    // lasts less than a day of use (scenario.LineupRow.Short)
	rank         float64 // worst-corner or p10 runtime, for --sort worst|p10
}

func runCompare(c *cli, args []string) error {
	fs := newFlags("compare")
	addDesignFlags(fs)
	budgetFlag := fs.String("budget", "", "")
	within := fs.Bool("within-budget", false, "")
	sortFlag := fs.String("sort", "cost", "")
	formatFlag := fs.String("format", "text", "")
	sf := addSpreadFlags(fs)
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if err := wantArgs("compare", pos, 0, 1, "a scenario file"); err != nil {
		return err
	}
	f, err := parseFormat(*formatFlag)
	if err != nil {
		return err
	}
	key := strings.ToLower(strings.TrimSpace(*sortFlag))
	_, ranked := rankKeys[key]
	if key != "cost" && key != "runtime" && !ranked {
		return fmt.Errorf("--sort: %q is not a compare column: expected cost, runtime, worst or p10", *sortFlag)
	}
	s, err := designScenario(fs, pos)
	if err != nil {
		return err
	}
	fromFlags(fs, s, pos)
	if err := sf.apply(s); err != nil {
		return err
	}
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
	budget := s.Budget
	if *budgetFlag != "" {
		if budget, err = scenario.ParsePrice(*budgetFlag); err != nil {
			return fmt.Errorf("--budget: %w", err)
		}
	}
	if *within && budget <= 0 {
		return fmt.Errorf("--within-budget: no budget: give --budget DOLLARS or a budget key in the file")
	}

	d := s.Design
	lineKey := key
	if ranked {
		lineKey = "runtime"
	}
	rows, misfits, err := lineupRows(s, &d, budget, *within, lineKey)
	if err != nil {
		return err
	}
	if ranked {
		bar := newMeter(c.stderr, isTerminal(c.stderr), "cells through the spread", len(rows))
		err := rankRows(s, &d, rows, key, bar)
		bar.end()
		if err != nil {
			return err
		}
	}

	if f == formatText {
		if err := compareContext(c, s, &d, budget); err != nil {
			return err
		}
	}
	cols := compareColumns(budget > 0)
	if ranked {
		cols = append(cols[:len(cols)-1:len(cols)-1], rankColumn(key, func(r compareRow) float64 { return r.rank }), cols[len(cols)-1])
	}
	t := newTable(c.stdout, f, cols)
	t.fit(rows)
	t.header()
	for _, r := range rows {
		t.row(r)
	}
	if err := t.end(); err != nil {
		return err
	}
	if f == formatText && anyShort(rows) {
		_, err = fmt.Fprintf(c.stdout, "\n* lasts less than a day's use (%s): the pack swapped or charged more than once a day;\n  ranked after the cells that last a day, whatever their cost per hour.\n", useWords(&d))
	}
	if f == formatText && len(misfits) > 0 {
		_, err = fmt.Fprintf(c.stdout, "\nno series count fits: %s\n", strings.Join(misfits, ", "))
	}
	// A Markdown table pasted into a review keeps what its marks mean ("\*":
	// a bare "* " would start a list).
	if f == formatMD && anyShort(rows) {
		_, err = fmt.Fprintf(c.stdout, "\n\\* lasts less than a day's use (%s): ranked after the cells that last a day, whatever their cost per hour.\n", useWords(&d))
	}
	if f == formatMD && len(misfits) > 0 {
		_, err = fmt.Fprintf(c.stdout, "\nNo series count fits: %s.\n", strings.Join(misfits, ", "))
	}
	if f == formatText {
		_, err = fmt.Fprintf(c.stdout, "\nFull cautions: headroom cells show ID. Charger and charging losses beyond the\ncharge efficiency are not counted for rechargeables.\n")
	}
	if (f == formatText || f == formatMD) && d.Toy {
		// The product's own caution, as run and pick give it: the line-up
		// offers Li-ion and coin cells for a toy.
		_, err = fmt.Fprintf(c.stdout, "\n%s\n", discharge.ToyCaution)
	}
	return err
}

func compareContext(c *cli, s *scenario.Scenario, d *discharge.Design, budget float64) error {
	name := s.Name
	if name == "" {
		name = guard.Clean(s.Path)
	}
	freshD := float64(d.Series) * d.Cell.OpenCircuit(0, d.TempC)
	b := fmt.Sprintf("%s: chemistries for load %s; protect %s; floor %s V; %s h of use a day\n",
		name, loadWords(d), s.ProtectSpec, fixed(d.Floor, 2), short(hoursPerDay(d)))
	b += fmt.Sprintf("series count: nominal pack voltage closest to %s V (%d × %s), fresh at most %s V (%g × %s V)\n",
		short(float64(d.Series)*d.Cell.NominalV), d.Series, d.Cell.ID, fixed(scenario.FreshLimit*freshD, 2), scenario.FreshLimit, fixed(freshD, 2))
	if budget > 0 {
		b += fmt.Sprintf("budget for pack + protection part: %s\n", money(budget))
	}
	_, err := fmt.Fprintln(c.stdout, b)
	return err
}

func compareColumns(withBudget bool) []column[compareRow] {
	num := func(key, head string, d int, get func(compareRow) float64) column[compareRow] {
		return column[compareRow]{key: key, head: head, right: true, human: true, machine: true,
			text: func(r compareRow) string { return fixed(get(r), d) }, val: func(r compareRow) any { return get(r) }}
	}
	cols := []column[compareRow]{
		{key: "cell", head: "cell", human: true, machine: true,
			text: func(r compareRow) string { return r.cell.ID }, val: func(r compareRow) any { return r.cell.ID }},
		{key: "chemistry", machine: true, val: func(r compareRow) any { return r.cell.Chemistry }},
		{head: "S×P", human: true, text: func(r compareRow) string { return fmt.Sprintf("%d×%d", r.series, r.par) }},
		{key: "series", machine: true, val: func(r compareRow) any { return r.series }},
		{key: "parallel", machine: true, val: func(r compareRow) any { return r.par }},
		{key: "runtime_h", head: "runtime h", right: true, human: true, machine: true,
			text: func(r compareRow) string {
				if r.short {
					return fixed(r.r.RuntimeH, 2) + "*"
				}
				return fixed(r.r.RuntimeH, 2) + " " // the figures stay aligned
			},
			val: func(r compareRow) any { return r.r.RuntimeH }},
		{key: "lasts_a_day", machine: true, val: func(r compareRow) any { return r.r.RuntimeH > 0 && !r.short }},
		{key: "rechargeable", machine: true, val: func(r compareRow) any { return r.cell.Rechargeable }},
		{key: "packs_per_year", head: "per year", right: true, human: true, machine: true,
			text: func(r compareRow) string {
				if r.perYear == 0 {
					return "—"
				}
				if r.cell.Rechargeable {
					return sig(r.perYear, 3) + " charges"
				}
				return sig(r.perYear, 3) + " packs"
			},
			val: func(r compareRow) any { return orNaN(r.r.RuntimeH, r.perYear) }},
		{key: "cost_per_hour", head: "$/h", right: true, human: true, machine: true,
			text: func(r compareRow) string {
				if r.r.RuntimeH == 0 {
					return "—"
				}
				return money(r.r.CostPerHour)
			},
			val: func(r compareRow) any { return orNaN(r.r.RuntimeH, r.r.CostPerHour) }},
		{key: "cost_per_year", head: "$/year", right: true, human: true, machine: true,
			text: func(r compareRow) string {
				if r.r.RuntimeH == 0 {
					return "—"
				}
				return money(r.costPerYear)
			},
			val: func(r compareRow) any { return orNaN(r.r.RuntimeH, r.costPerYear) }},
		num("stranded_pct", "stranded %", 1, func(r compareRow) float64 { return strandedPct(r.r) }),
		{key: "pack_price", machine: true, val: func(r compareRow) any { return r.r.PackPrice }},
		{key: "pack_and_protection", head: "pack+part", right: true, human: true, machine: true,
			text: func(r compareRow) string { return money(r.partCost) }, val: func(r compareRow) any { return r.partCost }},
	}
	if withBudget {
		cols = append(cols, column[compareRow]{key: "over_budget", head: "budget", human: true, machine: true,
			text: func(r compareRow) string {
				if r.overBudget {
					return "OVER"
				}
				return "ok"
			},
			val: func(r compareRow) any { return r.overBudget }})
	}
	cols = append(cols,
		column[compareRow]{key: "cutoff_cause", machine: true, val: func(r compareRow) any { return string(r.r.CutoffCause) }},
		column[compareRow]{key: "caution", head: "caution", human: true, machine: true,
			text: func(r compareRow) string { return curves.ShortCaution(r.cell) }, val: func(r compareRow) any { return curves.ShortCaution(r.cell) }},
	)
	return cols
}

// anyShort reports whether a row lasts less than a day of use.
func anyShort(rows []compareRow) bool {
	for _, r := range rows {
		if r.short {
			return true
		}
	}
	return false
}

// useWords is the design's daily use in words: "1 h a day", or
// "continuous use".
func useWords(d *discharge.Design) string {
	if d.HoursPerDay > 0 && d.HoursPerDay < 24 {
		return short(d.HoursPerDay) + " h a day"
	}
	return "24 h a day"
}

// orNaN gives v, or NaN (written as null in JSON, empty in CSV) when the
// design never runs and a per-hour or per-year figure means nothing.
func orNaN(runtimeH, v float64) float64 {
	if runtimeH <= 0 {
		return math.NaN()
	}
	return v
}

// lineupRows evaluates every library cell and the scenario's own in design
// d's place (scenario.Lineup: series count by scenario.FitSeries), marks rows over budget (leaving
// them out when within), and ranks them by key ("cost" or "runtime");
// misfits are the cells no series count fits. compare and the report
// share it.
func lineupRows(s *scenario.Scenario, dp *discharge.Design, budget float64, within bool, key string) (rows []compareRow, misfits []string, err error) {
	d := *dp
	el := d.Protect
	elCost := 0.0
	if el != nil {
		elCost = el.Cost()
	}
	var cells []*curves.Cell
	seen := map[string]bool{}
	for _, list := range [][]*curves.Cell{curves.Library(), s.FileCells} {
		for _, cell := range list {
			if !seen[cell.ID] {
				seen[cell.ID] = true
				cells = append(cells, cell)
			}
		}
	}
	// The screen's line-up is the same function (scenario.Lineup).
	for _, lr := range scenario.RankLineup(scenario.Lineup(&d, cells, nil), key == "runtime") {
		if errors.Is(lr.Err, scenario.ErrNoFit) {
			misfits = append(misfits, lr.Cell.ID)
			continue
		}
		if lr.Err != nil {
			return nil, nil, fmt.Errorf("compare %s: %w", lr.Cell.ID, lr.Err)
		}
		r := lr.Result
		row := compareRow{cell: lr.Cell, series: lr.Series, par: d.Parallel, r: r, partCost: r.PackPrice + elCost, budgetActive: budget > 0, short: lr.Short()}
		if r.RuntimeDays > 0 {
			row.perYear = 365 / r.RuntimeDays
		}
		row.costPerYear = r.CostPerHour * hoursPerDay(&d) * 365
		row.overBudget = budget > 0 && row.partCost > budget+1e-9
		if within && row.overBudget {
			continue
		}
		rows = append(rows, row)
	}
	return rows, misfits, nil
}

// rankRows sets each row's worst-corner or p10 runtime (key) and ranks
// the rows by it, longest first; designs that never start go last.
func rankRows(s *scenario.Scenario, d *discharge.Design, rows []compareRow, key string, bar *meter) error {
	for i := range rows {
		cd := *d
		cd.Cell, cd.Series, cd.TracePoints = rows[i].cell, rows[i].series, 0
		if !(rows[i].cell == d.Cell && rows[i].series == d.Series) {
			cd.PackPrice = 0
		}
		v, err := rankFigure(s, &cd, key)
		if err != nil {
			return fmt.Errorf("--sort %s: %s: %w", key, rows[i].cell.ID, err)
		}
		rows[i].rank = v
		bar.step(i + 1)
	}
	sort.SliceStable(rows, func(i, j int) bool {
		a, b := rows[i], rows[j]
		if (a.r.RuntimeH > 0) != (b.r.RuntimeH > 0) {
			return a.r.RuntimeH > 0
		}
		return a.rank > b.rank
	})
	return nil
}
