package main

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"unicode/utf8"

	"headroom/curves"
)

// Every error a user or a file can cause exits with status 2 and one line
// on stderr that names the flag or file:line and what was expected; stdout
// stays empty.
func TestErrors(t *testing.T) {
	dir := t.TempDir()
	write := func(name, text string) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	badLine := write("bad-line.toml", "name = \"x\"\ncell = \"lr6\"\nseries = 0\n")
	badSyntax := write("bad-syntax.toml", "name = \"x\"\nseries = = 2\n")
	badProtect := write("bad-protect.toml", "name = \"x\"\n\nprotect = \"diode:zz=1\"\n")
	badCell := write("bad-cell.csv", "mAh,V\n0,1.5\n100,1.6\n")
	existing := write("exists.svg", "keep me")
	existingCSV := write("exists.csv", "keep me")
	log := write("log.csv", "t,V\n0,1.5\n60,1.4\n120,1.3\n")
	badTol := write("bad-tol.toml", "name = \"x\"\nfloor = \"1.8V\"\n\n[tolerance]\nfloor = { min = \"1.9V\", max = \"1.7V\" }\n")
	badTolName := write("bad-tol-name.toml", "name = \"x\"\n[tolerance]\nvt = \"5%\"\n")

	cases := []struct {
		class string
		args  []string
		want  string // the whole stderr line after "headroom: ", or a part of it
		exact bool
	}{
		{"bad flag value", []string{"run", "--series", "0"}, "--series: 0 cells in series: must be 1 to 48", true},
		{"bad spread flag", []string{"compare", "--samples", "500"}, "--samples: sets the spread, so it needs --sort worst or --sort p10", true},
		{"bad spread flag", []string{"table", "--seed", "3"}, "--seed: sets the spread, so it needs --sort worst or --sort p10", true},
		{"bad spread flag", []string{"spread", "--samples", "0"}, `--samples: "0" must be a whole number from 1 to 1000000`, true},
		{"bad spread flag", []string{"spread", "--samples", "1000001"}, `--samples: "1000001" must be a whole number from 1 to 1000000`, true},
		{"bad spread flag", []string{"run", "--spread", "--samples", "x"}, `--samples: "x" must be a whole number from 1 to 1000000`, true},
		{"bad spread flag", []string{"spread", "--tol", "capacity=-5%"}, "--tol: capacity: spread -5% is negative: expected 0 % or more", true},
		{"bad spread flag", []string{"spread", "--tol", "load=100%"}, "--tol: load: spread 100% would take load current or power, product to product to zero or below: expected under 100 %", true},
		{"bad spread flag", []string{"spread", "--tol", "floor=2V..1.7V"}, "--tol: floor: min 2 V is above max 1.7 V", true},
		{"bad spread flag", []string{"spread", "--tol", "ambient=10%"}, "--tol: ambient: a percentage means nothing", false},
		{"bad spread flag", []string{"spread", "--tol", "vt=5%"}, `--tol: unknown tolerance "vt": expected one of capacity, lot_capacity, resistance,`, false},
		{"bad tolerance in file", []string{"spread", badTol}, badTol + ":5: [tolerance] floor: min 1.9 V is above max 1.7 V", true},
		{"bad tolerance in file", []string{"spread", badTolName}, badTolName + `:3: [tolerance] unknown key "vt": expected samples, seed or a tolerance (capacity,`, false},
		{"bad flag value", []string{"run", "--series", "two"}, `--series: "two" is not a whole number`, true},
		{"bad flag value", []string{"run", "--parallel", "17"}, "--parallel: 17 strings in parallel: must be 1 to 16", true},
		{"bad flag value", []string{"run", "--hours-per-day", "25"}, "--hours-per-day: 25 hours a day: must be above 0 and at most 24 (at least 1 s)", true},
		{"bad flag value", []string{"run", "--load", "5V"}, "--load: load \"5V\": expected a current", false},
		{"bad flag value", []string{"run", "--format", "xml"}, `--format: "xml" is not an output format: expected text, json, csv or md`, true},
		{"missing flag value", []string{"run", "--series"}, "--series: needs a value", true},
		{"unknown flag", []string{"run", "--bogus", "1"}, "unknown flag --bogus (see headroom run -h for the flags)", false},
		{"unknown flag", []string{"cells", "show", "lr6", "--format", "json"}, "unknown flag --format (see headroom cells show -h for the flags)", false},
		{"wrong unit kind", []string{"run", "--floor", "3mA"}, `--floor: "3mA" is a current (A), expected a voltage (V)`, true},
		{"wrong unit kind", []string{"run", "--standby", "2V"}, `--standby: "2V" is a voltage (V), expected a current (A)`, true},
		{"wrong unit kind", []string{"run", "--temp", "300K"}, `--temp: "300K": unknown unit "K", expected a temperature (C)`, true},
		{"NaN value", []string{"run", "--floor", "NaN"}, `--floor: "NaN" is not a number`, true},
		{"unknown subcommand", []string{"frobnicate"}, `unknown command "frobnicate": expected one of run, spread, table, compare, pick, cells, plot, report, netlist, demo, help`, false},
		{"missing file", []string{"run", filepath.Join(dir, "nope.toml")}, "nope.toml: no such file or directory", false},
		{"missing file", []string{"table", filepath.Join(dir, "nope.toml")}, "nope.toml: no such file or directory", false},
		{"directory instead of file", []string{"run", dir}, "is a directory, expected a scenario file (.toml)", false},
		{"directory instead of file", []string{"cells", "check", dir}, dir + ": is a directory, expected a cell file (.csv or .toml)", true},
		{"bad scenario line", []string{"run", badLine}, badLine + ":3: series: 0 cells in series: must be 1 to 48", true},
		{"bad scenario line", []string{"table", badSyntax}, badSyntax + ":2:", false},
		{"bad scenario line", []string{"run", badProtect}, badProtect + `:3: protect: diode: unknown key "zz"`, false},
		{"unknown protect key", []string{"run", "--protect", "diode:foo=1"}, `--protect: diode: unknown key "foo": expected one of is, n, rs`, false},
		{"unknown protect kind", []string{"run", "--protect", "wire"}, `--protect: unknown element "wire": expected one of none, diode`, false},
		{"unknown cell", []string{"run", "--cell", "aa99"}, `--cell: unknown cell "aa99": not a library id`, false},
		{"unknown cell", []string{"cells", "show", "aa99"}, `unknown cell "aa99"`, false},
		{"bad cell file", []string{"cells", "check", badCell}, "bad-cell.csv line 3:", false},
		{"bad cell file", []string{"run", "--cell", badCell}, "--cell: ", false},
		{"bad --sort", []string{"table", "--sort", "speed"}, `--sort: "speed" is not a column: expected one of runtime, days`, false},
		{"bad --sort", []string{"compare", "--sort", "speed"}, `--sort: "speed" is not a compare column: expected cost, runtime, worst or p10`, true},
		{"--desc without --sort", []string{"table", "--desc"}, "--desc: sorts descending, so it needs --sort COLUMN", true},
		{"no budget", []string{"compare", "--within-budget", example, "--budget", "0"}, "--within-budget: no budget", false},
		{"too many arguments", []string{"run", example, example}, "run: unexpected argument", false},
		{"overwrite refused", []string{"plot", "-o", existing}, "-o: " + existing + " exists: add --force to replace it", true},
		{"overwrite refused", []string{"cells", "import", log, "--current", "1A", "-o", existingCSV}, "-o: " + existingCSV + " exists: add --force to replace it", true},
		{"bad plot name", []string{"plot", "-o", filepath.Join(dir, "chart.jpg")}, "expected a file name ending in .svg or .png", false},
		{"bad report name", []string{"report", "-o", filepath.Join(dir, "report.pdf")}, "expected a file name ending in .html or .md", false},
		{"bad --by", []string{"plot", "-o", filepath.Join(dir, "c.svg"), "--by", "volts"}, `--by: "volts": expected time or charge`, true},
		{"import without current", []string{"cells", "import", log, "-o", filepath.Join(dir, "x.csv")}, "--current is required", false},
		{"import current kind", []string{"cells", "import", log, "--current", "2V", "-o", filepath.Join(dir, "x.csv")}, `--current: "2V" is a voltage (V), expected a current (A)`, true},
	}
	for _, c := range cases {
		code, out, errs := runCLI(t, c.args...)
		name := c.class + ": " + strings.Join(c.args, " ")
		if code != 2 {
			t.Errorf("%s: status %d, want 2 (stderr %q)", name, code, errs)
			continue
		}
		if out != "" {
			t.Errorf("%s: stdout %q, want nothing", name, out)
		}
		if strings.Count(errs, "\n") != 1 || !strings.HasSuffix(errs, "\n") {
			t.Errorf("%s: stderr %q, want exactly one line", name, errs)
		}
		msg := strings.TrimSuffix(strings.TrimPrefix(errs, "headroom: "), "\n")
		if c.exact && msg != c.want || !c.exact && !strings.Contains(msg, c.want) {
			t.Errorf("%s:\n got  %q\n want %q", name, msg, c.want)
		}
		for _, bad := range []string{"panic", "goroutine ", ".go:"} {
			if strings.Contains(errs, bad) {
				t.Errorf("%s: stderr contains %q", name, bad)
			}
		}
	}
	// Refused overwrites leave the files as they were.
	for _, p := range []string{existing, existingCSV} {
		if b, _ := os.ReadFile(p); string(b) != "keep me" {
			t.Errorf("%s was changed to %q", p, b)
		}
	}
}

// Help: "-h" and "--help" for every command print the usage with real
// examples on stdout and exit 0; the examples themselves run (files they
// write go to a temporary folder).
func TestHelpAndItsExamples(t *testing.T) {
	for _, cmd := range commands {
		for _, h := range []string{"-h", "--help"} {
			code, out, errs := runCLI(t, cmd.name, h)
			if code != 0 || errs != "" || !strings.HasPrefix(out, "usage: headroom "+cmd.name) || !strings.Contains(out, "examples:") {
				t.Errorf("headroom %s %s: status %d, stderr %q, stdout:\n%s", cmd.name, h, code, errs, out)
			}
		}
	}
	for _, h := range []string{"-h", "--help"} {
		if code, out, _ := runCLI(t, h); code != 0 || !strings.Contains(out, "commands:") {
			t.Errorf("headroom %s: status %d:\n%s", h, code, out)
		}
	}

	tmp := t.TempDir()
	t.Chdir("../..") // the examples name paths from the repository's root
	made := map[string]string{}
	n := 0
	for _, cmd := range commands {
		_, help, _ := strings.Cut(cmd.help, "examples:\n")
		for _, line := range strings.Split(help, "\n") {
			line = strings.TrimSpace(line)
			if !strings.HasPrefix(line, "headroom ") {
				continue
			}
			f := strings.Fields(line)[1:]
			redirect := ""
			var args []string
			for i := 0; i < len(f); i++ {
				switch {
				case f[i] == ">":
					redirect = filepath.Join(tmp, f[i+1])
					made[f[i+1]] = redirect
					i++
				case f[i] == "-o" || f[i] == "--plot":
					args = append(args, f[i], filepath.Join(tmp, fmt.Sprint(n, "-", f[i+1])))
					i++
				case made[f[i]] != "":
					args = append(args, made[f[i]])
				default:
					args = append(args, f[i])
				}
			}
			var out, errb bytes.Buffer
			code := run(args, strings.NewReader(""), &out, &errb)
			if code != 0 {
				t.Errorf("help example %q: status %d, %s", line, code, errb.String())
			}
			if redirect != "" {
				if err := os.WriteFile(redirect, out.Bytes(), 0o644); err != nil {
					t.Fatal(err)
				}
			}
			n++
		}
	}
	if n < 2*len(commands) {
		t.Errorf("only %d help examples for %d commands", n, len(commands))
	}
}

// cells import: a synthetic log at a constant 2 A for 1 h with a linear
// fall from 4.1 V to 3.3 V, then 5 min of rest recovery. Charge is
// current × time: 2 A × 3600 s / 3.6 = 2000 mAh (the definition of the
// mAh). The written CSV must read back as a cell ending there.
func TestCellsImport(t *testing.T) {
	dir := t.TempDir()
	var b strings.Builder
	b.WriteString("Time(s),Voltage(V)\n")
	for s := 0; s <= 3600; s += 60 {
		fmt.Fprintf(&b, "%d,%.4f\n", s, 4.1-0.8*float64(s)/3600)
	}
	for s := 3660; s <= 3900; s += 60 {
		fmt.Fprintf(&b, "%d,%.4f\n", s, 3.5)
	}
	log := filepath.Join(dir, "log.csv")
	if err := os.WriteFile(log, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "cell.csv")
	code, stdout, errs := runCLI(t, "cells", "import", log, "--current", "2A", "-o", out)
	if code != 0 {
		t.Fatalf("status %d: %s", code, errs)
	}
	if !strings.HasPrefix(stdout, "wrote "+out) {
		t.Errorf("stdout %q", stdout)
	}
	// The points are the voltage under the log's current with no
	// resistance: the user is told what that means, and show says it too
	// (not "rest (open-circuit) voltage", which it is not).
	if !strings.Contains(stdout, "note: the points are the voltage under 2 A, with no resistance") {
		t.Errorf("import says nothing of the curve's current: %q", stdout)
	}
	if _, show, _ := runCLI(t, "cells", "show", out); !strings.Contains(show, "the voltage under load at every current") || strings.Contains(show, "open-circuit") {
		t.Errorf("cells show of an imported cell:\n%s", show)
	}
	cell, err := curves.Load(out)
	if err != nil {
		t.Fatal(err)
	}
	q, v := cell.Curve.Point(cell.Curve.Len() - 1)
	// 0.1 %: the CSV writes charges with enough digits that only rounding
	// of the last printed digit remains.
	if d := q/2000 - 1; d > 1e-3 || d < -1e-3 {
		t.Errorf("last charge %v mAh, want 2000", q)
	}
	// 1 mV: the log's own resolution (four decimals).
	if d := v - 3.3; d > 1e-3 || d < -1e-3 {
		t.Errorf("last voltage %v V, want 3.3", v)
	}
	// A second run refuses, --force replaces, and check accepts the file.
	if code, _, _ := runCLI(t, "cells", "import", log, "--current", "2A", "-o", out); code != 2 {
		t.Errorf("second import: status %d, want 2", code)
	}
	if code, _, errs := runCLI(t, "cells", "import", log, "--current", "1A", "-o", out, "--force"); code != 0 {
		t.Errorf("--force: status %d: %s", code, errs)
	}
	code, stdout, _ = runCLI(t, "cells", "check", out)
	if code != 0 || !strings.HasPrefix(stdout, "ok: ") {
		t.Errorf("cells check: status %d, %q", code, stdout)
	}
	// The example cell files of the repository check out too.
	for _, f := range []string{"../../testdata/cells/example-cell.csv", "../../testdata/cells/example-cell.toml"} {
		if code, stdout, errs := runCLI(t, "cells", "check", f); code != 0 || !strings.HasPrefix(stdout, "ok: ") {
			t.Errorf("cells check %s: status %d, %q %q", f, code, stdout, errs)
		}
	}
}

// plot writes a PNG or an SVG atomically and never over a file unless
// --force is given.
func TestPlot(t *testing.T) {
	dir := t.TempDir()
	png := filepath.Join(dir, "demo.png")
	svg := filepath.Join(dir, "example.svg")
	if code, _, errs := runCLI(t, "plot", "-o", png); code != 0 {
		t.Fatalf("png: %d %s", code, errs)
	}
	if code, _, errs := runCLI(t, "plot", example, "-o", svg, "--by", "charge"); code != 0 {
		t.Fatalf("svg: %d %s", code, errs)
	}
	if b, _ := os.ReadFile(png); !bytes.HasPrefix(b, []byte("\x89PNG\r\n\x1a\n")) {
		t.Errorf("%s is not a PNG", png)
	}
	b, _ := os.ReadFile(svg)
	for _, want := range []string{"<svg", "charge drawn from the pack (mAh)", "voltage (V)", "floor 2.70 V", "pmos"} {
		if !bytes.Contains(b, []byte(want)) {
			t.Errorf("svg lacks %q", want)
		}
	}
	if code, _, _ := runCLI(t, "plot", "-o", png); code != 2 {
		t.Errorf("overwrite without --force: status %d, want 2", code)
	}
	if code, _, errs := runCLI(t, "plot", "-o", png, "--force"); code != 0 {
		t.Errorf("--force: %d %s", code, errs)
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 2 {
		t.Errorf("%d files in the folder, want 2 (no temporary files left)", len(entries))
	}
}

// demo prints the embedded scenario, and that text runs.
func TestDemo(t *testing.T) {
	code, out, _ := runCLI(t, "demo")
	if code != 0 || !strings.Contains(out, "INVENTED") {
		t.Fatalf("status %d:\n%s", code, out)
	}
	p := filepath.Join(t.TempDir(), "demo.toml")
	if err := os.WriteFile(p, []byte(out), 0o644); err != nil {
		t.Fatal(err)
	}
	_, a, _ := runCLI(t, "run", p, "--format", "csv")
	_, b, _ := runCLI(t, "run", "--format", "csv")
	ra, _ := csv.NewReader(strings.NewReader(a)).ReadAll()
	rb, _ := csv.NewReader(strings.NewReader(b)).ReadAll()
	if len(ra) != 2 || len(rb) != 2 || strings.Join(ra[1], ",") != strings.Join(rb[1], ",") {
		t.Errorf("the printed demo file and the built-in demo differ:\n%s\n%s", a, b)
	}
}

// A command's help lines up: within one block of flag lines ("  -x ARG"
// then two or more spaces), every description starts in the same column,
// and no line ends in a space. Found by reading run -h, report -h and
// netlist -h, whose last flags stood two columns right of the rest.
func TestHelpColumnsLineUp(t *testing.T) {
	flagLine := regexp.MustCompile(`^  (-\S+(?: \S+)?)(\s{2,})\S`)
	for _, cmd := range commands {
		_, out, _ := runCLI(t, cmd.name, "-h")
		col, first := -1, ""
		for _, l := range strings.Split(out, "\n") {
			if strings.HasSuffix(l, " ") {
				t.Errorf("headroom %s -h: line ends in a space: %q", cmd.name, l)
			}
			m := flagLine.FindStringSubmatch(l)
			if m == nil {
				if !strings.HasPrefix(l, "    ") { // a continuation line keeps the block
					col = -1
				}
				continue
			}
			c := utf8.RuneCountInString(m[1]) + len(m[2])
			if col < 0 {
				col, first = c, l
			} else if c != col {
				t.Errorf("headroom %s -h: %q starts its description in column %d, %q in %d", cmd.name, l, c+2, first, col+2)
			}
		}
	}
}
