package main

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"headroom/curves"

	"headroom/discharge"
	"headroom/internal/scenario"
)

// Every range of a design's values has one home, discharge's ranges (ranges.go): the
// flag parser, the scenario reader and Design.Validate accept the limit
// and refuse the value just past it, all alike (the screen's knobs:
// tui TestLimitsOneHome). The prices once had a ceiling in the reader and
// none in Validate.
func TestLimitsOneHome(t *testing.T) {
	cases := []struct {
		flag, key string // command-line flag, scenario key
		ok, bad   string // the limit, and just past it
		set       func(d *discharge.Design, bad bool)
	}{
		{"series", "series", fmt.Sprint(discharge.MaxSeries), fmt.Sprint(discharge.MaxSeries + 1),
			func(d *discharge.Design, bad bool) { d.Series = discharge.MaxSeries + b2i(bad) }},
		{"parallel", "parallel", fmt.Sprint(discharge.MaxParallel), fmt.Sprint(discharge.MaxParallel + 1),
			func(d *discharge.Design, bad bool) { d.Parallel = discharge.MaxParallel + b2i(bad) }},
		{"temp", "temp", fmt.Sprint(discharge.MaxTempC), fmt.Sprint(discharge.MaxTempC + 1),
			func(d *discharge.Design, bad bool) { d.TempC = discharge.MaxTempC + float64(b2i(bad)) }},
		{"standby", "standby", fmt.Sprint(discharge.MaxStandbyA), fmt.Sprint(discharge.MaxStandbyA + 1),
			func(d *discharge.Design, bad bool) { d.Standby = discharge.MaxStandbyA + float64(b2i(bad)) }},
		{"price", "price", fmt.Sprint(discharge.MaxPrice), fmt.Sprint(discharge.MaxPrice + 1),
			func(d *discharge.Design, bad bool) { d.PackPrice = discharge.MaxPrice + float64(b2i(bad)) }},
		{"", "electricity_price", fmt.Sprint(discharge.MaxPrice), fmt.Sprint(discharge.MaxPrice + 1),
			func(d *discharge.Design, bad bool) { d.ElectricityPrice = discharge.MaxPrice + float64(b2i(bad)) }},
	}
	for _, c := range cases {
		if c.flag != "" {
			for _, v := range []string{c.ok, c.bad} {
				fs := newFlags("run")
				addDesignFlags(fs)
				if _, err := parseArgs(fs, []string{"--" + c.flag, v}); err != nil {
					t.Fatal(err)
				}
				err := applyDesignFlags(fs, scenario.Demo())
				if (err == nil) != (v == c.ok) {
					t.Errorf("--%s %s: error %v", c.flag, v, err)
				}
			}
		}
		for _, v := range []string{c.ok, c.bad} {
			_, err := scenario.Parse([]byte(c.key+" = "+v+"\n"), "l.toml", "")
			if (err == nil) != (v == c.ok) {
				t.Errorf("scenario %s = %s: error %v", c.key, v, err)
			}
		}
		for _, bad := range []bool{false, true} {
			d := scenario.Demo().Design
			c.set(&d, bad)
			if err := d.Validate(); (err == nil) == bad {
				t.Errorf("Validate with %s past the limit %v: error %v", c.key, bad, err)
			}
		}
	}
	// The budget is a price too.
	if _, err := scenario.Parse([]byte(fmt.Sprintf("budget = %v\n", discharge.MaxPrice+1)), "l.toml", ""); err == nil {
		t.Errorf("a budget past discharge.MaxPrice was taken")
	}
}

func b2i(b bool) int {
	if b {
		return 1
	}
	return 0
}

// compare's rows are scenario.Lineup's, in scenario.RankLineup's order:
// the same cells, series counts and runtimes (the screen's line-up calls
// the same function: tui TestLineupOneHome).
func TestCompareIsTheLineup(t *testing.T) {
	code, out, errs := runCLI(t, "compare", "--format", "json")
	if code != 0 {
		t.Fatalf("compare: status %d, %s", code, errs)
	}
	var got []map[string]any
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatalf("compare json: %v\n%s", err, out)
	}
	s := scenario.Demo()
	var cells []*curves.Cell
	seen := map[string]bool{}
	for _, c := range append(curves.Library(), s.FileCells...) {
		if !seen[c.ID] {
			seen[c.ID] = true
			cells = append(cells, c)
		}
	}
	var want []scenario.LineupRow
	for _, r := range scenario.RankLineup(scenario.Lineup(&s.Design, cells, nil), false) {
		if r.Err == nil {
			want = append(want, r)
		}
	}
	if len(got) != len(want) {
		t.Fatalf("compare has %d rows, the line-up %d", len(got), len(want))
	}
	for i, w := range want {
		g := got[i]
		// Runtime to 1e-5 relative: the JSON output rounds to six
		// significant digits (at most 5e-6 relative).
		if g["cell"] != w.Cell.ID || g["series"] != float64(w.Series) ||
			math.Abs(g["runtime_h"].(float64)-w.Result.RuntimeH) > 1e-5*w.Result.RuntimeH {
			t.Errorf("row %d: compare %v %v %v, line-up %s %d %v", i+1, g["cell"], g["series"], g["runtime_h"], w.Cell.ID, w.Series, w.Result.RuntimeH)
		}
	}
}

// Every reader of a user file goes through internal/limited: a scenario,
// a cell file given to --cell or to cells check, and a discharge log all
// name a folder, a FIFO and an oversized file the same way. And both
// ways of naming a cell (--cell, cells show) resolve through
// scenario.ResolveCell, so an unknown id reads the same.
func TestFileReadsOneHome(t *testing.T) {
	dir := t.TempDir()
	folder := filepath.Join(dir, "folder.csv")
	if err := os.Mkdir(folder, 0o755); err != nil {
		t.Fatal(err)
	}
	big := filepath.Join(dir, "big.csv")
	if err := os.WriteFile(big, make([]byte, curves.MaxFileSize+1), 0o644); err != nil {
		t.Fatal(err)
	}
	bigTOML := filepath.Join(dir, "big.toml")
	if err := os.WriteFile(bigTOML, make([]byte, scenario.MaxFileSize+1), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"run", folder}, ": is a directory, expected a scenario file (.toml)"},
		{[]string{"run", "--cell", folder}, ": is a directory, expected a cell file (.csv or .toml)"},
		{[]string{"cells", "check", folder}, ": is a directory, expected a cell file (.csv or .toml)"},
		{[]string{"cells", "import", folder, "--current", "1A", "-o", filepath.Join(dir, "o.csv")}, ": is a directory, expected a discharge log"},
		{[]string{"run", bigTOML}, fmt.Sprintf(": %d bytes, larger than the %d-byte limit for a scenario file", scenario.MaxFileSize+1, scenario.MaxFileSize)},
		{[]string{"cells", "check", big}, fmt.Sprintf(": %d bytes, larger than the %d-byte limit for a cell file", curves.MaxFileSize+1, curves.MaxFileSize)},
		{[]string{"cells", "import", big, "--current", "1A", "-o", filepath.Join(dir, "o.csv")}, fmt.Sprintf(": %d bytes, larger than the %d-byte limit for a discharge log", curves.MaxFileSize+1, curves.MaxFileSize)},
		{[]string{"run", "--cell", "nosuch"}, `--cell: unknown cell "nosuch": not a library id`},
		{[]string{"cells", "show", "nosuch"}, `unknown cell "nosuch": not a library id`},
	} {
		code, _, errs := runCLI(t, c.args...)
		if code != 2 || !strings.Contains(errs, c.want) {
			t.Errorf("%v: status %d, %q; want 2 and %q", c.args, code, errs, c.want)
		}
	}
}

// compare's caution column is curves.ShortCaution, the short form kept
// beside the full cautions.
func TestCompareCautionOneHome(t *testing.T) {
	code, out, errs := runCLI(t, "compare", "--format", "json")
	if code != 0 {
		t.Fatalf("compare: status %d, %s", code, errs)
	}
	var rows []map[string]any
	if err := json.Unmarshal([]byte(out), &rows); err != nil {
		t.Fatal(err)
	}
	for _, r := range rows {
		c, ok := curves.Lookup(r["cell"].(string))
		if !ok {
			continue
		}
		if r["caution"] != curves.ShortCaution(c) {
			t.Errorf("%s: caution %q, curves.ShortCaution %q", c.ID, r["caution"], curves.ShortCaution(c))
		}
	}
	if len(rows) == 0 {
		t.Fatal("compare gave no rows")
	}
}
