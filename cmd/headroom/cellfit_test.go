package main

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"headroom/curves"
)

// The NASA Ames records (testdata/measured, with their source note).
var (
	nasaCC4 = filepath.Join("..", "..", "testdata", "measured", "nasa-li-ion", "cc-4A-B0034.csv")
	nasaCC2 = filepath.Join("..", "..", "testdata", "measured", "nasa-li-ion", "cc-2A-B0036.csv")
)

// cells fit writes a cell file every command reads, with the report on
// stdout; the same logs give the same file byte for byte; the file is not
// replaced without --force; the JSON report carries the figures.
func TestCellsFit(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "b34.toml")
	plot := filepath.Join(dir, "fit.svg")
	code, stdout, stderr := runCLI(t, "cells", "fit", nasaCC4, nasaCC2, "-o", out, "--plot", plot, "--chemistry", "li-ion")
	if code != 0 {
		t.Fatalf("status %d: %s", code, stderr)
	}
	checkClean(t, "cells fit", stdout)
	for _, want := range []string{"cc-4A-B0034.csv", "cc-2A-B0036.csv", "RMS", "branch 2", "τ", "wrote " + out + " and " + plot} {
		if !strings.Contains(stdout, want) {
			t.Errorf("report lacks %q:\n%s", want, stdout)
		}
	}
	first, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	if svg, err := os.ReadFile(plot); err != nil || !bytes.HasPrefix(svg, []byte("<?xml")) {
		t.Errorf("plot: %v, %.20q", err, svg)
	}
	cell, err := curves.Load(out)
	if err != nil {
		t.Fatalf("the written cell does not load: %v", err)
	}
	if cell.Chemistry != "li-ion" || len(cell.RC) != 2 || cell.RefCurrent != 0 || len(cell.Temperature) == 0 {
		t.Errorf("cell %+v", cell)
	}
	if code, _, stderr := runCLI(t, "cells", "check", out); code != 0 {
		t.Errorf("cells check: %s", stderr)
	}
	if code, _, stderr := runCLI(t, "run", "--cell", out, "--series", "1", "--protect", "none", "--load", "4A/10s,0A/10s", "--floor", "2.2"); code != 0 {
		t.Errorf("run with the fitted cell: %s", stderr)
	}
	// Not over an existing file without --force, and nothing written.
	code, _, stderr = runCLI(t, "cells", "fit", nasaCC4, "-o", out)
	if code != 2 || !strings.Contains(stderr, "-o: "+out+" exists: add --force to replace it") {
		t.Errorf("existing file: status %d, %q", code, stderr)
	}
	// Deterministic: refit with --force gives the same bytes.
	if code, _, stderr := runCLI(t, "cells", "fit", nasaCC4, nasaCC2, "-o", out, "--chemistry", "li-ion", "--force"); code != 0 {
		t.Fatal(stderr)
	}
	if again, _ := os.ReadFile(out); !bytes.Equal(first, again) {
		t.Error("the same logs wrote a different file")
	}
	m := runJSON(t, "cells", "fit", nasaCC4, nasaCC2, "-o", filepath.Join(dir, "j.toml"))
	logs, ok := m["logs"].([]any)
	if !ok || len(logs) != 2 {
		t.Fatalf("json logs: %v", m["logs"])
	}
	l0 := logs[0].(map[string]any)
	// The README's 1.7589 Ah (trapezoid rule to the last loaded sample);
	// the JSON keeps six digits.
	if d := num(t, l0, "delivered_mAh"); d < 1758.8 || d > 1759.0 {
		t.Errorf("delivered %v mAh, README 1758.9", d)
	}
	if r := num(t, l0, "rms_mV"); !(r > 0 && r <= 15) {
		t.Errorf("rms %v mV, want above 0 and ≤ 15", r)
	}
}

// Bad logs and flags: status 2, one line on stderr naming the file and
// line or the flag, nothing on stdout, no file written.
func TestCellsFitErrors(t *testing.T) {
	dir := t.TempDir()
	write := func(name, text string) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	noLoad := write("rest.csv", "t,I,V\n0,0,4.1\n10,0.001,4.1\n")
	backwards := write("back.csv", "t,I,V\n0,0,4.1\n10,1,3.9\n5,1,3.8\n")
	charge := write("charge.csv", "t,I,V\n0,1,4.1\n10,-1.5,4.0\n20,1,3.9\n")
	nan := write("nan.csv", "t,I,V\n0,1,4.1\n10,1,NaN\n")
	text := write("text.csv", "t,I,V\n0,1,4.1\n10,one,3.9\n")
	noV := write("nov.csv", "t,I\n0,1\n")
	high := write("high.csv", "t,I,V\n0,1,4.1\n10,1,12\n")
	out := filepath.Join(dir, "out.toml")
	cases := []struct {
		args []string
		want string
	}{
		{[]string{noLoad}, noLoad + ": no discharge"},
		{[]string{backwards}, backwards + " line 4: time 5 s does not increase"},
		{[]string{charge}, charge + " line 3: charge current -1.5 A between discharges"},
		{[]string{nan}, nan + ` line 3: voltage "NaN" is not a finite number`},
		{[]string{text}, text + ` line 3: current "one" is not a finite number`},
		{[]string{noV}, noV + " line 1: no voltage column in the header"},
		{[]string{high}, high + " line 3: voltage 12 V is outside 0–5 V for one cell"},
		{[]string{filepath.Join(dir, "none.csv")}, "none.csv: no such file"},
		{[]string{dir}, dir + ": is a directory"},
		{[]string{nasaCC4, "--chemistry", "unobtainium"}, `--chemistry: unknown chemistry "unobtainium"`},
		{[]string{nasaCC4, "--end-point", "9V"}, `--end-point: "9V": must be above 0 V and at most 5 V`},
		{[]string{nasaCC4, "--temp", "hot"}, "--temp:"},
		{[]string{nasaCC4, "--plot", filepath.Join(dir, "p.gif")}, "--plot:"},
		{[]string{nasaCC4, "--format", "csv"}, `--format: "csv": cells fit writes text or json`},
	}
	for _, c := range cases {
		args := append([]string{"cells", "fit"}, c.args...)
		args = append(args, "-o", out)
		code, stdout, stderr := runCLI(t, args...)
		lines := strings.Split(strings.TrimSuffix(stderr, "\n"), "\n")
		if code != 2 || stdout != "" || len(lines) != 1 || !strings.Contains(stderr, c.want) {
			t.Errorf("%v: status %d, stdout %q, stderr %q; want 2 and one line with %q", c.args, code, stdout, stderr, c.want)
		}
		if c.args[0] != nan { // that one quotes the user's "NaN"
			checkClean(t, strings.Join(c.args, " "), stderr)
		}
		if _, err := os.Stat(out); err == nil {
			t.Fatalf("%v: a file was written", c.args)
		}
	}
	if code, _, stderr := runCLI(t, "cells", "fit", nasaCC4); code != 2 || !strings.Contains(stderr, "-o is required") {
		t.Errorf("no -o: %d %q", code, stderr)
	}
	if code, _, stderr := runCLI(t, "cells", "fit", nasaCC4, "-o", filepath.Join(dir, "x.csv")); code != 2 || !strings.Contains(stderr, "name it .toml") {
		t.Errorf("-o x.csv: %d %q", code, stderr)
	}
}

// One log at one current gives R0 a single point: the report says so in
// words, not "193 mΩ to 193 mΩ (1 points against depth)".
func TestCellsFitOneR0Point(t *testing.T) {
	code, stdout, stderr := runCLI(t, "cells", "fit", nasaCC4, "-o", filepath.Join(t.TempDir(), "one.toml"))
	if code != 0 {
		t.Fatalf("status %d: %s", code, stderr)
	}
	if strings.Contains(stdout, "1 points") || !strings.Contains(stdout, "at every depth (one point") {
		t.Errorf("R0 of one point:\n%s", stdout)
	}
}
