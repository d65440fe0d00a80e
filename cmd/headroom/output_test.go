package main

import (
	"encoding/csv"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"headroom/internal/scenario"
)

// Golden files pin the four output formats for the built-in demo, so a
// change to a report's layout or to the engine's figures is seen in review.
// The figures themselves are checked against outside sources in package
// discharge; here the question is only whether the output is stable and
// well-formed.
func TestGolden(t *testing.T) {
	cases := []struct {
		name string
		args []string
	}{
		{"run_text", []string{"run"}},
		{"run_json", []string{"run", "--format", "json"}},
		{"run_csv", []string{"run", "--format", "csv"}},
		{"run_md", []string{"run", "--format", "md"}},
		{"run_flags_text", []string{"run", "--cell", "hr6", "--series", "2", "--protect", "schottky", "--load", "150mA", "--floor", "2.0"}},
		{"table_text", []string{"table", "--sort", "runtime", "--desc"}},
		{"table_json", []string{"table", "--format", "json"}},
		{"table_csv", []string{"table", "--format", "csv"}},
		{"table_md", []string{"table", "--format", "md", "--sort", "cost"}},
		{"table_example_text", []string{"table", example}},
		{"compare_text", []string{"compare"}},
		{"compare_csv", []string{"compare", "--format", "csv"}},
		{"compare_example_md", []string{"compare", example, "--format", "md"}},
		{"cells_text", []string{"cells"}},
		{"cells_show_hr6", []string{"cells", "show", "hr6"}},
		{"usage", []string{"help"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, out, errs := runCLI(t, c.args...)
			if code != 0 || errs != "" {
				t.Fatalf("status %d, stderr %q", code, errs)
			}
			checkClean(t, c.name, out)
			golden(t, c.name, out)
		})
	}
}

// The machine formats must parse: JSON with encoding/json, CSV with
// encoding/csv, each row as wide as the header.
func TestMachineFormatsParse(t *testing.T) {
	for _, args := range [][]string{
		{"table"}, {"table", example}, {"compare"}, {"compare", example}, {"cells"},
	} {
		_, out, _ := runCLI(t, append(args, "--format", "json")...)
		var rows []map[string]any
		if err := json.Unmarshal([]byte(out), &rows); err != nil || len(rows) == 0 {
			t.Errorf("%v json: %v (%d rows)", args, err, len(rows))
		}
		_, out, _ = runCLI(t, append(args, "--format", "csv")...)
		recs, err := csv.NewReader(strings.NewReader(out)).ReadAll()
		if err != nil || len(recs) < 2 {
			t.Errorf("%v csv: %v (%d lines)", args, err, len(recs))
		}
	}
	_, out, _ := runCLI(t, "run", "--format", "csv")
	recs, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil || len(recs) != 2 {
		t.Fatalf("run csv: %v, %d lines, want a header and one row", err, len(recs))
	}
	// The keys promised to scripts (README, output formats), in JSON and CSV alike.
	m := runJSON(t, "run")
	for _, k := range []string{"runtime_h", "runtime_days", "delivered_mAh", "delivered_Wh", "reference_mAh",
		"stranded_mAh", "stranded_by_protection_mAh", "stranded_by_floor_mAh", "protection_loss_Wh",
		"cell_loss_Wh", "cell_peak_C", "protection_peak_W", "cutoff_phase", "cutoff_cause", "cost_per_hour", "warnings", "cautions"} {
		if _, ok := m[k]; !ok {
			t.Errorf("run json: key %q missing", k)
		}
		if !contains(recs[0], k) {
			t.Errorf("run csv: column %q missing", k)
		}
	}
	if _, ok := m["warnings"].([]any); !ok {
		t.Errorf("warnings = %v, want an array (empty when none)", m["warnings"])
	}
}

func contains(xs []string, x string) bool {
	for _, y := range xs {
		if y == x {
			return true
		}
	}
	return false
}

// A table has one row per combination: the demo's 4 cells × 6 elements ×
// 2 floors = 48, the example's 3 cells × 4 elements × 2 loads × 3 floors =
// 72 (counted from the files by hand). Sorted, a numeric column is ordered.
func TestTableRows(t *testing.T) {
	for _, c := range []struct {
		args []string
		rows int
	}{
		{[]string{"table"}, 48},
		{[]string{"table", example}, 72},
	} {
		_, out, _ := runCLI(t, append(c.args, "--format", "csv")...)
		recs, err := csv.NewReader(strings.NewReader(out)).ReadAll()
		if err != nil {
			t.Fatal(err)
		}
		if len(recs)-1 != c.rows {
			t.Errorf("%v: %d rows, want %d", c.args, len(recs)-1, c.rows)
		}
	}
	for _, desc := range []bool{false, true} {
		args := []string{"table", example, "--sort", "runtime", "--format", "csv"}
		if desc {
			args = append(args, "--desc")
		}
		_, out, _ := runCLI(t, args...)
		recs, _ := csv.NewReader(strings.NewReader(out)).ReadAll()
		col := indexOf(recs[0], "runtime_h")
		prev := math.Inf(-1)
		if desc {
			prev = math.Inf(1)
		}
		for _, r := range recs[1:] {
			v, err := strconv.ParseFloat(r[col], 64)
			if err != nil {
				t.Fatalf("runtime_h %q: %v", r[col], err)
			}
			if !desc && v < prev || desc && v > prev {
				t.Fatalf("desc=%v: runtime %v after %v: not sorted", desc, v, prev)
			}
			prev = v
		}
	}
}

func indexOf(xs []string, x string) int {
	for i, y := range xs {
		if y == x {
			return i
		}
	}
	return -1
}

// compare's series rule, worked by hand for the demo's 2×LR6 (nominal
// 3.0 V, fresh 3.15 V, limit 1.5 × 3.15 = 4.725 V): one 3.6 V Li-ion cell
// (4.2 V fresh) is closest; NiMH 2 × 1.2 = 2.4 V and 3 × 1.2 = 3.6 V tie at
// 0.6 V and the tie goes to fewer cells; a 9 V block fits no count; a
// CR2032 at 3.0 V fits as one cell but cannot drive the 450 mA pulse.
func TestCompare(t *testing.T) {
	_, out, errs := runCLI(t, "compare", "--format", "json")
	if errs != "" {
		t.Fatal(errs)
	}
	var rows []map[string]any
	if err := json.Unmarshal([]byte(out), &rows); err != nil {
		t.Fatal(err)
	}
	series := map[string]float64{}
	for _, r := range rows {
		series[r["cell"].(string)] = r["series"].(float64)
	}
	for cell, want := range map[string]float64{"lr6": 2, "li-ion-18650": 1, "hr6": 2, "lifepo4": 1, "cr2032": 1, "fr6": 2} {
		if series[cell] != want {
			t.Errorf("%s: series %v, want %v", cell, series[cell], want)
		}
	}
	if _, ok := series["6lr61"]; ok {
		t.Errorf("6lr61 listed, but 9.6 V fresh exceeds 4.725 V")
	}
	// Ranked by cost per hour among the designs that run, those lasting a
	// day of use first, then those that do not (the demo's NiMH pairs run
	// minutes above its floor), those that do not run last.
	prev, stopped, short := -1.0, false, false
	for _, r := range rows {
		rt := r["runtime_h"].(float64)
		if day := r["lasts_a_day"].(bool); rt > 0 && !day && !short {
			short, prev = true, -1 // a new tier
		} else if rt > 0 && day && short {
			t.Errorf("%s lasts a day of use but ranks after a row that does not", r["cell"])
		}
		if rt == 0 {
			// A design that never runs has no cost per hour: null.
			if r["cost_per_hour"] != nil {
				t.Errorf("%s never runs but has cost_per_hour %v, want null", r["cell"], r["cost_per_hour"])
			}
			stopped = true
			continue
		}
		if stopped {
			t.Errorf("%s runs after a row that does not", r["cell"])
		}
		cost := r["cost_per_hour"].(float64)
		if cost < prev {
			t.Errorf("%s: cost %v after %v: not ranked", r["cell"], cost, prev)
		}
		prev = cost
	}
	// With a $0.60 budget and a diode ($0.03): r6 2 × $0.25 + $0.03 =
	// $0.53 and cr2032 $0.40 + $0.03 = $0.43 are within it, the rest is not
	// (library prices, typical from memory).
	_, out, _ = runCLI(t, "compare", "--budget", "0.60", "--within-budget", "--format", "json")
	rows = nil
	if err := json.Unmarshal([]byte(out), &rows); err != nil {
		t.Fatal(err)
	}
	var cells []string
	for _, r := range rows {
		cells = append(cells, r["cell"].(string))
		// Prices are dollars and cents: half a cent is the rounding.
		if c := r["pack_and_protection"].(float64); c > 0.60+0.005 {
			t.Errorf("%s costs %v, over the $0.60 budget", r["cell"], c)
		}
	}
	if strings.Join(cells, ",") != "r6,cr2032" {
		t.Errorf("within budget: %v, want r6,cr2032", cells)
	}
	_, out, _ = runCLI(t, "compare")
	if !strings.Contains(out, "OVER") || !strings.Contains(out, "no series count fits: 6lr61") {
		t.Errorf("compare text lacks the budget mark or the misfits line:\n%s", out)
	}
}

// Designs that never start, and odd but valid ones, print no NaN or Inf in
// any format.
func TestNoNaNOrInf(t *testing.T) {
	designs := [][]string{
		{"--cell", "cr2032", "--series", "1"},                     // cannot drive the motor: runtime 0
		{"--floor", "5"},                                          // floor above the fresh pack
		{"--load", "0A"},                                          // no load at all
		{"--load", "2W@80%", "--protect", "limiter:rsh=4.7"},      // clamped
		{"--load", "led:vf=2.0,r=47", "--hours-per-day", "24"},    // LED
		{"--load", "33ohm", "--temp", "-40", "--standby", "0"},    // cold resistor
		{"--protect", "pptc:hold=0.1A,trip=0.2A", "--price", "0"}, // fuse trips
	}
	for _, d := range designs {
		for _, f := range formatNames {
			code, out, errs := runCLI(t, append(append([]string{"run"}, d...), "--format", f)...)
			if code != 0 {
				t.Errorf("%v %s: status %d, %s", d, f, code, errs)
			}
			checkClean(t, strings.Join(d, " ")+" "+f, out)
		}
	}
	m := runJSON(t, "run", "--cell", "cr2032", "--series", "1")
	// Exact: a design that cannot start has no runtime, and no cost per
	// hour to speak of (null, as in table and compare).
	if num(t, m, "runtime_h") != 0 || m["cost_per_hour"] != nil {
		t.Errorf("cr2032 under a 450 mA pulse: runtime %v, cost %v; want 0, null", m["runtime_h"], m["cost_per_hour"])
	}
	if !strings.HasPrefix(m["cutoff_text"].(string), "does not start") {
		t.Errorf("cutoff_text %q, want it to say the product does not start", m["cutoff_text"])
	}
}

// A design that never runs has no cost per hour: sorted by cost it goes
// after every design that runs, descending as well as ascending. A floor of
// 3.1 V stops the demo's 2×AA (3.15 V fresh, sagging on its 450 mA pulse)
// before it starts, whatever the element, while 1.8 V lets most run.
func TestTableCostSortNeverRunsLast(t *testing.T) {
	demo := string(scenario.DemoTOML())
	sweep := strings.Replace(demo, `floor = ["1.8V", "2.0V"]`, `floor = ["3.1V", "1.8V"]`, 1)
	if sweep == demo {
		t.Fatal("demo scenario has no floor sweep to replace")
	}
	path := filepath.Join(t.TempDir(), "sweep.toml")
	if err := os.WriteFile(path, []byte(sweep), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, desc := range []bool{false, true} {
		args := []string{"table", path, "--sort", "cost", "--format", "csv"}
		if desc {
			args = append(args, "--desc")
		}
		_, out, errs := runCLI(t, args...)
		if errs != "" {
			t.Fatalf("desc=%v: %s", desc, errs)
		}
		recs, err := csv.NewReader(strings.NewReader(out)).ReadAll()
		if err != nil {
			t.Fatal(err)
		}
		col := indexOf(recs[0], "runtime_h")
		stopped, runs := 0, 0
		for _, r := range recs[1:] {
			v, err := strconv.ParseFloat(r[col], 64)
			if err != nil {
				t.Fatalf("runtime_h %q: %v", r[col], err)
			}
			if v > 0 {
				runs++
				if stopped > 0 {
					t.Fatalf("desc=%v: a design that runs comes after %d that never run", desc, stopped)
				}
			} else {
				stopped++
			}
		}
		if stopped == 0 || runs == 0 {
			t.Fatalf("desc=%v: %d rows run, %d never run; the check needs both", desc, runs, stopped)
		}
	}
}

// compare's Markdown keeps what its marks mean: the demo's NiMH pairs last
// under a day behind the diode (README, "Which chemistry"), so their
// runtimes carry "*" and the table is followed by what "*" means, escaped
// so that Markdown does not read it as a list; cells carry no padding.
func TestCompareMarkdownExplainsMarks(t *testing.T) {
	code, out, errs := runCLI(t, "compare", "--format", "md")
	if code != 0 {
		t.Fatalf("status %d: %s", code, errs)
	}
	if !strings.Contains(out, "| 0.43* |") {
		t.Errorf("no hr6-lsd row marked as lasting under a day:\n%s", out)
	}
	if !strings.Contains(out, "\n\\* lasts less than a day's use (1 h a day)") {
		t.Errorf("the mark is not explained under the table:\n%s", out)
	}
	if !strings.Contains(out, "No series count fits: 6lr61.") {
		t.Errorf("the cell that does not fit is not named:\n%s", out)
	}
	if strings.Contains(out, "  |") {
		t.Errorf("a cell keeps the text layout's padding:\n%s", out)
	}
}

// The chart's tick labels are numbers as people write them: the demo by
// charge runs to about 2700 mAh, whose 500 mAh steps gonum labels
// "2500.00"; ours read "2500".
func TestPlotTickLabels(t *testing.T) {
	svg, err := chart(scenario.Demo(), true, "svg")
	if err != nil {
		t.Fatal(err)
	}
	if strings.Contains(string(svg), "2500.00") || !strings.Contains(string(svg), ">2500<") {
		t.Errorf("tick labels of the charge axis: %s", regexp.MustCompile(`>[0-9.]+<`).FindAllString(string(svg), -1))
	}
}

// spread's Markdown says, as its text does, that the default tolerances are
// remembered typical values, not the parts' data.
func TestSpreadMarkdownSaysDefaultsAreTypical(t *testing.T) {
	code, out, errs := runCLI(t, "spread", "--format", "md", "--samples", "50")
	if code != 0 {
		t.Fatalf("status %d: %s", code, errs)
	}
	if !strings.Contains(out, "typical values from memory") {
		t.Errorf("no note on the default tolerances:\n%s", out)
	}
}

// compare of a toy ends with the toy-safety caution, as run and pick do
// (its line-up offers Li-ion and coin cells); a product that is not a toy
// does not get it.
func TestCompareToyCaution(t *testing.T) {
	_, toy, _ := runCLI(t, "compare")
	_, not, _ := runCLI(t, "compare", "--toy", "no")
	if !strings.Contains(toy, "IEC 62115") || strings.Contains(not, "IEC 62115") {
		t.Errorf("toy caution: toy %v, not a toy %v", strings.Contains(toy, "IEC 62115"), strings.Contains(not, "IEC 62115"))
	}
}
