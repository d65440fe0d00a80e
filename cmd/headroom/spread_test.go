package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"math"
	"strings"
	"testing"

	"headroom/discharge"
	"headroom/internal/scenario"
)

func runOK(t *testing.T, args ...string) string {
	t.Helper()
	var out, errb bytes.Buffer
	if code := run(args, strings.NewReader(""), &out, &errb); code != 0 {
		t.Fatalf("%v: exit %d: %s", args, code, errb.String())
	}
	return out.String()
}

// spread --format json gives the keys its users script against, in order worst ≤
// p10 ≤ p50 ≤ p90 ≤ best, and the same output for the same seed.
func TestSpreadJSON(t *testing.T) {
	out := runOK(t, "spread", "--samples", "400", "--format", "json")
	var got struct {
		NominalH    *float64 `json:"nominal_h"`
		WorstH      *float64 `json:"worst_h"`
		BestH       *float64 `json:"best_h"`
		P10H        *float64 `json:"p10_h"`
		P50H        *float64 `json:"p50_h"`
		P90H        *float64 `json:"p90_h"`
		Samples     int      `json:"samples"`
		Seed        *int     `json:"seed"`
		Sensitivity []struct {
			Name  string   `json:"name"`
			LowH  *float64 `json:"low_h"`
			HighH *float64 `json:"high_h"`
		} `json:"sensitivity"`
	}
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	if got.NominalH == nil || got.WorstH == nil || got.BestH == nil || got.P10H == nil || got.P50H == nil || got.P90H == nil || got.Seed == nil {
		t.Fatalf("a key is missing:\n%s", out)
	}
	if got.Samples != 400 || *got.Seed != 1 {
		t.Errorf("samples %d, seed %d: want 400 and 1", got.Samples, *got.Seed)
	}
	if !(*got.WorstH <= *got.P10H && *got.P10H <= *got.P50H && *got.P50H <= *got.P90H && *got.P90H <= *got.BestH) {
		t.Errorf("worst %v, p10 %v, p50 %v, p90 %v, best %v: out of order", *got.WorstH, *got.P10H, *got.P50H, *got.P90H, *got.BestH)
	}
	// The nominal is the run command's runtime (the same engine call).
	r, err := discharge.Evaluate(&scenario.Demo().Design)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(*got.NominalH-r.RuntimeH) > 1e-5*r.RuntimeH { // six significant digits in JSON
		t.Errorf("nominal_h %v, run gives %v", *got.NominalH, r.RuntimeH)
	}
	names := map[string]bool{}
	for _, s := range got.Sensitivity {
		if s.LowH == nil || s.HighH == nil {
			t.Errorf("%s: low_h or high_h missing", s.Name)
		}
		names[s.Name] = true
	}
	for _, n := range []string{"floor", "vf", "capacity", "ambient"} {
		if !names[n] {
			t.Errorf("no %s in the sensitivities of the diode demo", n)
		}
	}
	if again := runOK(t, "spread", "--samples", "400", "--format", "json"); again != out {
		t.Error("the same seed printed different output")
	}
}

// run --spread adds the spread's keys to the run record; CSV stays one
// header and one row.
func TestRunSpreadCSV(t *testing.T) {
	out := runOK(t, "run", "--spread", "--samples", "200", "--protect", "pmos", "--format", "csv")
	rows, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil || len(rows) != 2 {
		t.Fatalf("%v, %d rows:\n%s", err, len(rows), out)
	}
	head := strings.Join(rows[0], ",")
	for _, k := range []string{"runtime_h", "worst_h", "p10_h", "p50_h", "p90_h", "samples", "seed", "vth_low_h", "vth_high_h"} {
		if !strings.Contains(","+head+",", ","+k+",") {
			t.Errorf("no %s column", k)
		}
	}
}

// The text names the p10 in words (or says that more than one in ten
// does not start) and the protector's limit warning on the demo behind
// the integrated protector.
func TestSpreadTextWarnsOnLimit(t *testing.T) {
	out := runOK(t, "spread", "--protect", "ic", "--samples", "300")
	for _, want := range []string{"0 h: more than 1 product in 10 does not start", "ilim at its low limit (375 mA)", "sensitivity:"} {
		if !strings.Contains(out, want) {
			t.Errorf("no %q in:\n%s", want, out)
		}
	}
	out = runOK(t, "spread", "--protect", "pmos", "--samples", "300")
	for _, want := range []string{"in 9 of 10 products", "vth", "ron"} {
		if !strings.Contains(out, want) {
			t.Errorf("no %q in:\n%s", want, out)
		}
	}
}

// table and compare rank by the worst corner and the p10: the column is
// there and falls down the rows.
func TestRankBySpread(t *testing.T) {
	for _, args := range [][]string{
		{"table", "--sort", "worst", "--desc", "--format", "csv"},
		{"compare", "--sort", "p10", "--samples", "200", "--format", "csv"},
	} {
		out := runOK(t, args...)
		rows, err := csv.NewReader(strings.NewReader(out)).ReadAll()
		if err != nil || len(rows) < 3 {
			t.Fatalf("%v: %v\n%s", args, err, out)
		}
		col := -1
		for i, h := range rows[0] {
			if h == args[2]+"_h" {
				col = i
			}
		}
		if col < 0 {
			t.Fatalf("%v: no %s_h column in %v", args, args[2], rows[0])
		}
		prev := math.Inf(1)
		for _, r := range rows[1:] {
			var v float64
			if _, err := fmt.Sscan(r[col], &v); err != nil {
				continue // a design that never runs: last, empty
			}
			if v > prev {
				t.Errorf("%v: %s %v after %v: not ranked longest first", args, args[2], v, prev)
			}
			prev = v
		}
	}
}
