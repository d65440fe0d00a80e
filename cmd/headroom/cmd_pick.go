package main

import (
	"bytes"
	"encoding/json"
	"flag"
	"fmt"
	"io"
	"path/filepath"
	"strings"
	"time"

	"github.com/charmbracelet/bubbles/progress"

	"headroom/curves"
	"headroom/discharge"
	"headroom/internal/pick"
	"headroom/internal/scenario"
	"headroom/internal/units"
)

var pickCmd = &command{
	name:  "pick",
	args:  "[scenario.toml] --need TIME [flags]",
	short: "the cheapest designs that meet a runtime target",
	help: `
Searches every cell (the library and the file's own), every series count
whose fresh pack starts above the floor and at most at the product's input
limit, 1 to 4 strings in parallel, and every protection kind with a short
ladder of stock part values, for the designs that run at least the target
and meet every limit below. A file's [options] narrow the search (a bare
kind such as "pmos" stands for its ladder); --all ignores them. The same
keys may be set in a [pick] table of the file (need = "20h",
block_reversed = true, ...); flags win. With no file the built-in demo is
used, and the file's budget key is the default budget.

Prints the passing designs ranked by unit cost (cells plus element) or by
cost per hour of use, the Pareto front of unit cost against runtime (the
designs meeting every limit but the target that no other design beats on
both), and the designs that just miss, with the limit that stopped them.
A target nothing reaches is an answer, not an error: it says how long the
longest design ran and what held the others back.

flags:
` + pickFlagHelp() + `  --all                       search the whole space, ignoring the file's [options]
  --plot FILE.svg|FILE.png    draw the front and every other design as points
  --force                     replace the --plot file if it exists
  --format text|json|csv|md   output format (default text)

Limits, one sentence each:
  need            the runtime in hours of use, at the statistic --at names, must be at
                  least this.
  budget          the cells plus the protection part must cost at most this per unit.
  max-cells       the pack may hold at most this many cells (series × parallel).
  max-stranded    at most this share of the cells' charge at this load may be left unused.
  max-junction    the protection part's junction must stay at or below this temperature.
  block-reversed  the whole pack put in backwards must be blocked; one flipped cell must
                  never put a reversed voltage on the load (no series part can see it).
  max-input       the fresh pack's open-circuit voltage must be at most this (default
                  1.5 × the file's own design).

examples:
  headroom pick --need 20h
  headroom pick --need 20h --block-reversed --max-junction 125C --by cost-per-hour
  headroom pick testdata/scenarios/example.toml --need 3d --budget 2.50 --format json
  headroom pick --need 30h --all --plot front.svg
`,
}

func init() { pickCmd.run = runPick }

func pickFlagHelp() string {
	var b strings.Builder
	for _, k := range pick.Keys {
		arg := k.Flag()
		if k.Arg != "" {
			arg += " " + k.Arg
		}
		fmt.Fprintf(&b, "  --%-26s%s\n", arg, k.Usage)
	}
	return b.String()
}

// pickSource says where each setting came from, for error messages.
type pickSource struct {
	file  string
	lines map[string]int
	flags map[string]bool
}

func (p pickSource) name(key string) string {
	if p.flags[key] {
		return "--" + strings.ReplaceAll(key, "_", "-")
	}
	if l, ok := p.lines[key]; ok {
		return fmt.Sprintf("%s:%d: pick.%s", p.file, l, key)
	}
	return "--" + strings.ReplaceAll(key, "_", "-")
}

func runPick(c *cli, args []string) error {
	fs := newFlags("pick")
	vals := map[string]*string{}
	var block *bool
	for _, k := range pick.Keys {
		if k.Name == "block_reversed" {
			block = fs.Bool(k.Flag(), false, "")
			continue
		}
		vals[k.Name] = fs.String(k.Flag(), "", "")
	}
	all := fs.Bool("all", false, "")
	plotTo := fs.String("plot", "", "")
	force := fs.Bool("force", false, "")
	formatFlag := fs.String("format", "text", "")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if err := wantArgs("pick", pos, 0, 1, "a scenario file"); err != nil {
		return err
	}
	f, err := parseFormat(*formatFlag)
	if err != nil {
		return err
	}
	if *plotTo != "" {
		ext := strings.ToLower(filepath.Ext(*plotTo))
		if ext != ".svg" && ext != ".png" {
			return fmt.Errorf("--plot: %q: expected a file name ending in .svg or .png", *plotTo)
		}
	}
	s, err := loadScenario(pos)
	if err != nil {
		return err
	}
	src := pickSource{file: s.Path, lines: map[string]int{}, flags: map[string]bool{}}
	if src.file == "" {
		src.file = "demo.toml"
	}
	lim := pick.DefaultLimits()
	lim.Budget = s.Budget
	for _, set := range s.Pick {
		k, _ := pick.LookupKey(set.Key)
		src.lines[set.Key] = set.Line
		if err := k.Set(&lim, set.Value); err != nil {
			return fmt.Errorf("%s: %w", src.name(set.Key), err)
		}
	}
	var ferr error
	fs.Visit(func(fl *flag.Flag) {
		k, ok := pick.LookupKey(fl.Name)
		if !ok || ferr != nil {
			return
		}
		src.flags[k.Name] = true
		v := fl.Value.String()
		if ferr = k.Set(&lim, v); ferr != nil {
			ferr = fmt.Errorf("--%s: %w", fl.Name, ferr)
		}
	})
	if ferr != nil {
		return ferr
	}
	_ = block // read through fs.Visit with the other keys
	sp, err := pick.SpaceOf(s, *all)
	if err != nil {
		return err
	}

	bar := newPickBar(c)
	start := time.Now()
	st, err := pick.StatisticFor(lim.At, s.Tolerances, s.Seed)
	if err != nil {
		return fmt.Errorf("%s: %s", src.name("at"), strings.TrimPrefix(err.Error(), "at: "))
	}
	out, err := pick.Search(sp, lim, st, bar.update)
	bar.done()
	if err != nil {
		key, rest, _ := strings.Cut(err.Error(), ": ")
		if key == "need" && !src.flags["need"] && src.lines["need"] == 0 {
			return fmt.Errorf("--need: no runtime target: give one, e.g. --need 20h, or need in a [pick] table")
		}
		return fmt.Errorf("%s: %s", src.name(key), rest)
	}
	took := time.Since(start)

	if *plotTo != "" {
		data, err := frontChart(s, out, strings.TrimPrefix(strings.ToLower(filepath.Ext(*plotTo)), "."))
		if err != nil {
			return err
		}
		if err := writeOutput("--plot", *plotTo, data, *force); err != nil {
			return err
		}
	}
	switch f {
	case formatJSON:
		return pickJSON(c.stdout, out)
	case formatText:
		return pickText(c.stdout, s, sp, out, took, *plotTo)
	}
	return pickTables(c.stdout, f, out)
}

// pickBar is the progress bar on stderr: drawn only on a terminal and
// only once the search has run for half a second.
type pickBar struct {
	c     *cli
	on    bool
	drawn bool
	start time.Time
	bar   progress.Model
}

func newPickBar(c *cli) *pickBar {
	return &pickBar{c: c, on: isTerminal(c.stderr), start: time.Now(),
		bar: progress.New(progress.WithDefaultGradient(), progress.WithWidth(40))}
}

func (b *pickBar) update(done, total int) {
	if !b.on || total == 0 || time.Since(b.start) < 500*time.Millisecond {
		return
	}
	b.drawn = true
	fmt.Fprintf(b.c.stderr, "\rsearching %s", b.bar.ViewAs(float64(done)/float64(total)))
}

func (b *pickBar) done() {
	if b.drawn {
		fmt.Fprintf(b.c.stderr, "\r%s\r", strings.Repeat(" ", 60))
	}
}

// pickRow is one design in a list, with the list it belongs to.
type pickRow struct {
	set  string // "design", "front" or "near_miss"
	rank int
	d    *pick.Design
}

func reverseWords(d *pick.Design) string { return d.Reverse.WholePack.Outcome.String() }

func pickColumns() []column[pickRow] {
	num := func(key, head string, dec int, get func(pickRow) float64) column[pickRow] {
		return column[pickRow]{key: key, head: head, right: true, human: true, machine: true,
			text: func(r pickRow) string { return fixed(get(r), dec) }, val: func(r pickRow) any { return get(r) }}
	}
	return []column[pickRow]{
		{key: "set", machine: true, val: func(r pickRow) any { return r.set }},
		{key: "rank", head: "#", right: true, human: true, machine: true,
			text: func(r pickRow) string { return fmt.Sprint(r.rank) }, val: func(r pickRow) any { return r.rank }},
		{key: "cell", head: "cell", human: true, machine: true,
			text: func(r pickRow) string { return r.d.Cell.ID }, val: func(r pickRow) any { return r.d.Cell.ID }},
		{head: "S×P", human: true, text: func(r pickRow) string { return fmt.Sprintf("%d×%d", r.d.Series, r.d.Parallel) }},
		{key: "series", machine: true, val: func(r pickRow) any { return r.d.Series }},
		{key: "parallel", machine: true, val: func(r pickRow) any { return r.d.Parallel }},
		{key: "protect", head: "protect", human: true, machine: true,
			text: func(r pickRow) string { return r.d.Spec }, val: func(r pickRow) any { return r.d.Spec }},
		{key: "unit_cost", head: "unit cost", right: true, human: true, machine: true,
			text: func(r pickRow) string { return money(r.d.UnitCost) }, val: func(r pickRow) any { return r.d.UnitCost }},
		num("runtime_h", "runtime h", 1, func(r pickRow) float64 { return r.d.Result.RuntimeH }),
		num("runtime_days", "days", 1, func(r pickRow) float64 { return r.d.Result.RuntimeDays }),
		num("stranded_pct", "stranded %", 1, func(r pickRow) float64 { return 100 * r.d.StrandedShare() }),
		{key: "heat_w", head: "heat", right: true, human: true, machine: true,
			text: func(r pickRow) string { return human(r.d.Result.ProtectionPeakW, units.Power) },
			val:  func(r pickRow) any { return r.d.Result.ProtectionPeakW }},
		num("junction_c", "Tj °C", 0, func(r pickRow) float64 { return r.d.Result.JunctionC }),
		{key: "reverse", head: "reversed pack", human: true, machine: true,
			text: func(r pickRow) string { return reverseWords(r.d) }, val: func(r pickRow) any { return reverseWords(r.d) }},
		{key: "one_cell_flipped", machine: true, val: func(r pickRow) any { return r.d.Reverse.OneCell.Outcome.String() }},
		{key: "cost_per_hour", head: "$/h", right: true, human: true, machine: true,
			text: func(r pickRow) string {
				if r.d.Result.RuntimeH == 0 {
					return "—"
				}
				return money(r.d.Result.CostPerHour)
			},
			val: func(r pickRow) any { return orNaN(r.d.Result.RuntimeH, r.d.Result.CostPerHour) }},
		{key: "missed", machine: true, val: func(r pickRow) any { return missWords(r.d) }},
	}
}

func missWords(d *pick.Design) string {
	var w []string
	for _, m := range d.Misses {
		w = append(w, m.Detail)
	}
	return strings.Join(w, "; ")
}

func rowsOf(set string, ds []pick.Design) []pickRow {
	out := make([]pickRow, len(ds))
	for i := range ds {
		out[i] = pickRow{set: set, rank: i + 1, d: &ds[i]}
	}
	return out
}

// pickTables writes CSV (one table, a set column telling the lists
// apart) or Markdown (three tables under headings).
func pickTables(w io.Writer, f format, out *pick.Outcome) error {
	sets := []struct {
		key, title string
		rows       []pickRow
	}{
		{"design", "Designs meeting every limit", rowsOf("design", out.Designs)},
		{"front", "Pareto front: unit cost against runtime", rowsOf("front", out.Front)},
		{"near_miss", "Near misses", rowsOf("near_miss", out.NearMisses)},
	}
	if f == formatCSV {
		t := newTable(w, f, pickColumns())
		t.header()
		for _, s := range sets {
			for _, r := range s.rows {
				t.row(r)
			}
		}
		return t.end()
	}
	for i, s := range sets {
		if i > 0 {
			fmt.Fprintln(w)
		}
		fmt.Fprintf(w, "### %s\n\n", s.title)
		if len(s.rows) == 0 {
			fmt.Fprintln(w, "none")
			continue
		}
		cols := pickColumns()
		if s.key == "near_miss" {
			cols = append(cols, column[pickRow]{head: "missed by", human: true, text: func(r pickRow) string { return missWords(r.d) }})
		}
		t := newTable(w, f, cols)
		t.header()
		for _, r := range s.rows {
			t.row(r)
		}
		if err := t.end(); err != nil {
			return err
		}
	}
	return nil
}

// pickJSON writes {designs, front, near_misses, ...}.
func pickJSON(w io.Writer, out *pick.Outcome) error {
	num := func(x float64) any {
		if s := machineNum(x); s != "" {
			return json.Number(s)
		}
		return nil
	}
	design := func(d *pick.Design) map[string]any {
		m := map[string]any{
			"cell": d.Cell.ID, "series": d.Series, "parallel": d.Parallel, "protect": d.Spec,
			"unit_cost": num(d.UnitCost), "runtime_h": num(d.Result.RuntimeH), "runtime_days": num(d.Result.RuntimeDays),
			"stranded_pct": num(100 * d.StrandedShare()), "cost_per_hour": num(orNaN(d.Result.RuntimeH, d.Result.CostPerHour)),
			"heat_w": num(d.Result.ProtectionPeakW), "junction_c": num(d.Result.JunctionC),
			"cutoff_cause": string(d.Result.CutoffCause),
			"reverse": map[string]any{"whole_pack": d.Reverse.WholePack.Outcome.String(), "one_cell": d.Reverse.OneCell.Outcome.String(),
				"one_cell_load_v": num(d.Reverse.OneCell.Volts)},
		}
		if len(d.Misses) > 0 {
			var ms []map[string]any
			for _, x := range d.Misses {
				ms = append(ms, map[string]any{"constraint": string(x.Constraint), "by": num(x.Gap), "detail": x.Detail})
			}
			m["missed"] = ms
		}
		return m
	}
	list := func(ds []pick.Design) []map[string]any {
		out := []map[string]any{}
		for i := range ds {
			out = append(out, design(&ds[i]))
		}
		return out
	}
	screened := map[string]int{}
	for k, v := range out.Screened {
		screened[string(k)] = v
	}
	doc := map[string]any{
		"need_h": num(out.Limits.Need), "at": out.Limits.At, "by": out.Limits.By.String(),
		"designs": list(out.Designs), "front": list(out.Front), "near_misses": list(out.NearMisses),
		"longest": nil,
		"counts": map[string]any{"space": out.Space, "screened": screened, "no_start": out.NoStart,
			"evaluated": out.Evaluated, "bound_runs": out.Nominal, "pruned": out.Pruned, "errors": out.Errors, "passing_found": out.Passing},
		"max_input_v": num(out.MaxInput),
	}
	if out.Limits.Budget > 0 {
		doc["budget"] = num(out.Limits.Budget)
	}
	if out.Longest != nil {
		doc["longest"] = design(out.Longest)
	}
	var b bytes.Buffer
	enc := json.NewEncoder(&b)
	enc.SetIndent("", "  ")
	enc.SetEscapeHTML(false)
	if err := enc.Encode(doc); err != nil {
		return err
	}
	_, err := w.Write(b.Bytes())
	return err
}

// pickText writes the search for people.
func pickText(w io.Writer, s *scenario.Scenario, sp *pick.Space, out *pick.Outcome, took time.Duration, plotTo string) error {
	d := &sp.Base
	lim := out.Limits
	name := s.Name
	if name == "" {
		name = s.Path
	}
	var b strings.Builder
	fmt.Fprintf(&b, "%s: designs running at least %s h of use (%s)\n", name, short(lim.Need), atWords(lim.At))
	fmt.Fprintf(&b, "load %s; floor %s V; %s h of use a day\n", loadWords(d), fixed(d.Floor, 2), short(hoursPerDay(d)))
	var limits []string
	if lim.Budget > 0 {
		limits = append(limits, "unit cost at most "+money(lim.Budget))
	}
	if lim.MaxCells > 0 {
		limits = append(limits, fmt.Sprintf("at most %d cells", lim.MaxCells))
	}
	if lim.MaxStranded < 1 {
		limits = append(limits, "stranded at most "+short(100*lim.MaxStranded)+" %")
	}
	if lim.MaxJunction < 1e300 {
		limits = append(limits, "junction at most "+short(lim.MaxJunction)+" °C")
	}
	if lim.BlockReversed {
		limits = append(limits, "reversed pack blocked")
	}
	limits = append(limits, "fresh pack at most "+fixed(out.MaxInput, 2)+" V")
	fmt.Fprintf(&b, "limits: %s\n", strings.Join(limits, "; "))
	fmt.Fprintf(&b, "searched %d designs in %s: %s; %d evaluated, %d skipped as unable to win (%d nominal runs for bounds)\n\n",
		out.Space, took.Round(time.Millisecond), screenedWords(out), out.Evaluated, out.Pruned, out.Nominal)
	if _, err := io.WriteString(w, b.String()); err != nil {
		return err
	}

	if len(out.Designs) == 0 {
		fmt.Fprintf(w, "No design meets every limit.\n")
		if l := out.Longest; l != nil {
			fmt.Fprintf(w, "The longest-running design within the other limits, %s %d×%d %s at %s, runs %s h: %s.\n",
				l.Cell.ID, l.Series, l.Parallel, l.Spec, money(l.UnitCost), short(l.Result.RuntimeH), sp.Design(l.Candidate).CutoffText(l.Result))
		} else {
			fmt.Fprintf(w, "No design meets the other limits at all.\n")
		}
		if h := heldBack(out); h != "" {
			fmt.Fprintf(w, "Held back: %s.\n", h)
		}
	} else {
		sortedBy := "unit cost"
		if lim.By == pick.ByCostPerHour {
			sortedBy = "cost per hour of use"
		}
		fmt.Fprintf(w, "Designs meeting every limit, cheapest %s first (%d shown of %d found):\n", sortedBy, len(out.Designs), out.Passing)
		t := newTable(w, formatText, pickColumns())
		rows := rowsOf("design", out.Designs)
		t.fit(rows)
		t.header()
		for _, r := range rows {
			t.row(r)
		}
		if err := t.end(); err != nil {
			return err
		}
	}

	fmt.Fprintf(w, "\nPareto front, unit cost against runtime (every limit but the target):\n")
	for _, f := range out.Front {
		mark := " "
		if f.Passes() {
			mark = "✓"
		}
		fmt.Fprintf(w, "  %s %8s  %7s h  %s %d×%d %s\n", mark, money(f.UnitCost), fixed(f.Result.RuntimeH, 1), f.Cell.ID, f.Series, f.Parallel, f.Spec)
	}
	if len(out.NearMisses) > 0 {
		fmt.Fprintf(w, "\nNear misses:\n")
		for _, n := range out.NearMisses {
			fmt.Fprintf(w, "  %8s  %7s h  %s %d×%d %s: %s\n", money(n.UnitCost), fixed(n.Result.RuntimeH, 1), n.Cell.ID, n.Series, n.Parallel, n.Spec, missWords(&n))
		}
	}
	if plotTo != "" {
		fmt.Fprintf(w, "\nwrote %s\n", plotTo)
	}
	fmt.Fprintf(w, "\n✓ meets the target. Reversed pack: what a pack put in backwards does; one flipped\ncell is never seen by a series part (the load gets two cells' voltage less).\n")
	// The listed cells' main cautions, once per cell.
	seen := map[string]bool{}
	var cautions []string
	for _, list := range [][]pick.Design{out.Designs, out.Front} {
		for _, d := range list {
			if !seen[d.Cell.ID] {
				seen[d.Cell.ID] = true
				cautions = append(cautions, fmt.Sprintf("  %s: %s", d.Cell.ID, curves.ShortCaution(d.Cell)))
			}
		}
	}
	if len(cautions) > 0 {
		fmt.Fprintf(w, "Cautions (full text: headroom cells show ID):\n%s\n", strings.Join(cautions, "\n"))
	}
	if !d.Toy { // the product's own caution, for a toy only, as run gives it
		return nil
	}
	_, err := fmt.Fprintf(w, "%s\n", strings.Replace(discharge.ToyCaution, "; ", ";\n", 1))
	return err
}

// screenedPhrase says why designs were refused before evaluation.
var screenedPhrase = map[pick.Constraint]string{
	pick.Budget:  "%d over budget",
	pick.Cells:   "%d with too many cells",
	pick.Reverse: "%d letting a reversed pack through",
	pick.Input:   "%d above the input limit",
}

// atWords says which runtime is judged.
func atWords(at string) string {
	switch at {
	case "worst":
		return "at the worst corner of the file's tolerances"
	case "p10":
		return fmt.Sprintf("at the tenth percentile of %d samples over the file's tolerances", pick.DefaultSamples)
	}
	return "nominal"
}

func screenedWords(out *pick.Outcome) string {
	var parts []string
	for _, c := range []pick.Constraint{pick.Budget, pick.Cells, pick.Reverse, pick.Input} {
		if n := out.Screened[c]; n > 0 {
			parts = append(parts, fmt.Sprintf(screenedPhrase[c], n))
		}
	}
	if out.NoStart > 0 {
		parts = append(parts, fmt.Sprintf("%d series counts cannot start", out.NoStart))
	}
	if len(parts) == 0 {
		return "none refused up front"
	}
	return strings.Join(parts, ", ")
}

// heldBack says which limits removed designs, for an impossible target.
func heldBack(out *pick.Outcome) string {
	var parts []string
	for _, c := range []pick.Constraint{pick.Budget, pick.Cells, pick.Reverse, pick.Input} {
		if n := out.Screened[c]; n > 0 {
			parts = append(parts, fmt.Sprintf(screenedPhrase[c], n))
		}
	}
	if len(parts) == 0 {
		return ""
	}
	return "refused before evaluation: " + strings.Join(parts, ", ")
}
