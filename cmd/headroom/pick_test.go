package main

import (
	"encoding/csv"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestPickDesignsRunBack: every design pick lists, fed back to run as
// --cell, --series, --parallel and --protect (the spec it prints), gives
// the same runtime and stranded share: the two commands describe the same
// design (exact: both print six significant digits of one deterministic
// engine result).
func TestPickDesignsRunBack(t *testing.T) {
	m := runJSON(t, "pick", "--need", "20h", "--block-reversed")
	designs, _ := m["designs"].([]any)
	if len(designs) == 0 {
		t.Fatal("no designs: the check checks nothing")
	}
	for _, x := range designs {
		d := x.(map[string]any)
		for _, k := range []string{"cell", "series", "parallel", "protect", "unit_cost", "runtime_h", "runtime_days", "stranded_pct", "cost_per_hour", "reverse"} {
			if _, ok := d[k]; !ok {
				t.Fatalf("design lacks %q: %v", k, d)
			}
		}
		if rev := d["reverse"].(map[string]any); rev["whole_pack"] != "blocked" {
			t.Errorf("%v: --block-reversed but the reversed pack %v", d["protect"], rev["whole_pack"])
		}
		r := runJSON(t, "run", "--cell", d["cell"].(string), "--series", fmt.Sprint(d["series"]),
			"--parallel", fmt.Sprint(d["parallel"]), "--protect", d["protect"].(string))
		for _, k := range []string{"runtime_h", "stranded_pct"} {
			if fmt.Sprint(r[k]) != fmt.Sprint(d[k]) {
				t.Errorf("%v %v: pick says %s %v, run says %v", d["cell"], d["protect"], k, d[k], r[k])
			}
		}
	}
	for _, k := range []string{"front", "near_misses"} {
		if _, ok := m[k].([]any); !ok {
			t.Errorf("no %s list", k)
		}
	}
}

// TestPickBadInput: one line naming the flag or key, status 2.
func TestPickBadInput(t *testing.T) {
	dir := t.TempDir()
	_, text, _ := runCLI(t, "demo")
	// The third line of the [pick] table, after the demo's own lines.
	third := strings.Count(text+"\n[pick]\nneed = \"20h\"\n", "\n") + 1
	write := func(name, extra string) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(text+"\n"+extra), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	unknown := write("unknown.toml", "[pick]\nneed = \"20h\"\nwhen = 3\n")
	badTop := write("badtop.toml", "[pick]\nneed = \"20h\"\ntop = -1\n")
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"pick", "--need", "0"}, "--need: 0: the target must be above 0 hours"},
		{[]string{"pick", "--need", "-5h"}, "--need: -5h: the target must be above 0 hours"},
		{[]string{"pick"}, "--need: no runtime target"},
		{[]string{"pick", "--need", "20h", "--budget", "-1"}, "--budget: -1: a budget cannot be negative"},
		{[]string{"pick", "--need", "20h", "--max-input", "1.5V"}, "--max-input: 1.5 V is not above the floor 1.8 V"},
		{[]string{"pick", "--need", "20h", "--max-cells", "2", "--max-parallel", "3"}, "--max-parallel: 3 strings cannot fit in at most 2 cells"},
		{[]string{"pick", "--need", "20h", "--max-junction", "15C"}, "--max-junction: 15 °C is not above the ambient 20 °C"},
		{[]string{"pick", "--need", "20h", "--at", "mean"}, `--at: "mean": expected nominal, p10 or worst`},
		{[]string{"pick", "--need", "20h", "--by", "runtime"}, `--by: "runtime": expected cost or cost-per-hour`},
		{[]string{"pick", "--need", "20h", "--frobnicate"}, "unknown flag --frobnicate"},
		{[]string{"pick", "--need", "20h", "--plot", "x.pdf"}, `--plot: "x.pdf": expected a file name ending in .svg or .png`},
		{[]string{"pick", unknown}, fmt.Sprintf(`unknown.toml:%d: unknown key "pick.when"`, third)},
		{[]string{"pick", badTop}, fmt.Sprintf("badtop.toml:%d: pick.top: -1: must be 1 to 1000", third)},
	} {
		code, out, errs := runCLI(t, c.args...)
		if code != 2 || out != "" || strings.Count(errs, "\n") != 1 || !strings.Contains(errs, c.want) || strings.Contains(errs, "\x1b") {
			t.Errorf("%v: status %d, stdout %q, stderr %q; want one line with %q", c.args, code, out, errs, c.want)
		}
	}
}

// TestPickImpossible: a target nothing reaches is an answer (status 0)
// naming the longest design and what stopped it.
func TestPickImpossible(t *testing.T) {
	code, out, errs := runCLI(t, "pick", "--need", "5000h")
	if code != 0 || errs != "" {
		t.Fatalf("status %d, stderr %q", code, errs)
	}
	for _, want := range []string{"No design meets every limit.", "The longest-running design within the other limits", "Held back: refused before evaluation: "} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
}

// TestPickCSV: one table, a set column telling the lists apart, and a
// row per listed design.
func TestPickCSV(t *testing.T) {
	_, out, _ := runCLI(t, "pick", "--need", "20h", "--format", "csv")
	recs, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil || len(recs) < 2 || recs[0][0] != "set" {
		t.Fatalf("csv: %v\n%s", err, out)
	}
	sets := map[string]int{}
	for _, r := range recs[1:] {
		sets[r[0]]++
	}
	if sets["design"] != 10 || sets["front"] == 0 {
		t.Errorf("rows per set %v", sets)
	}
}

// pick gives the toy-safety caution for a toy (the demo) and not for a
// product that is not one.
func TestPickToyCautionOnlyForToys(t *testing.T) {
	notToy := filepath.Join(t.TempDir(), "lamp.toml")
	if err := os.WriteFile(notToy, []byte("name = \"lamp\"\nload = \"100mA\"\nfloor = \"1.0V\"\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	_, toy, _ := runCLI(t, "pick", "--need", "20h")
	_, not, errs := runCLI(t, "pick", notToy, "--need", "1h")
	if !strings.Contains(toy, "IEC 62115") || strings.Contains(not, "IEC 62115") || not == "" {
		t.Errorf("toy caution: toy %v, not a toy %v (%s)", strings.Contains(toy, "IEC 62115"), strings.Contains(not, "IEC 62115"), errs)
	}
}
