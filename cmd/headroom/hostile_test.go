package main

import (
	"bytes"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"unicode"
	"unicode/utf8"

	"headroom/internal/scenario"
	"headroom/tui"
)

// tomlString writes s as a TOML basic string, every rune that is not
// printable ASCII as a \U escape, so any name reaches the reader intact.
func tomlString(s string) string {
	var b strings.Builder
	b.WriteByte('"')
	for _, r := range s {
		switch {
		case r == '"' || r == '\\':
			b.WriteByte('\\')
			b.WriteRune(r)
		case r >= 0x20 && r < 0x7f:
			b.WriteRune(r)
		case r >= 0xd800 && r <= 0xdfff:
			// not a Unicode scalar: TOML cannot hold it
		default:
			fmt.Fprintf(&b, "\\U%08X", r)
		}
	}
	b.WriteByte('"')
	return b.String()
}

// fileSafe makes s usable as one file name (no separator, no NUL).
func fileSafe(s string) string {
	s = strings.Map(func(r rune) rune {
		if r == '/' || r == 0 {
			return -1
		}
		return r
	}, s)
	if !utf8.ValidString(s) || len(s) > 100 {
		s = strings.ToValidUTF8(s, "?")
		if len(s) > 100 {
			s = s[:100]
		}
	}
	s = strings.TrimSpace(s) // references to cells are trimmed
	if s == "" || s == "." || s == ".." || strings.HasPrefix(s, "-") {
		s = "x"
	}
	return s
}

// noControl fails when out holds a control character other than a line
// break: an escape sequence from a name would drive the terminal.
func noControl(t *testing.T, what, out string) {
	t.Helper()
	for i, r := range out {
		if r != '\n' && (unicode.IsControl(r) || r == 0x202e) {
			lo := max(0, i-30)
			t.Fatalf("%s: control character %U at byte %d: %q", what, r, i, out[lo:min(len(out), i+30)])
		}
	}
}

// hostileOutputs writes a scenario whose name, note, phase name and own
// cell (id, name, chemistry, source) are name, in a file named after it
// with a cell file named after it, and runs every headless command and
// format on it; every output and every error must be free of control
// characters.
func hostileOutputs(t *testing.T, name string) {
	dir := t.TempDir()
	base := fileSafe(name)
	q := tomlString(name)
	cellPath := filepath.Join(dir, base+".csv")
	if err := os.WriteFile(cellPath, []byte("mAh,V\n0,1.5\n1000,1.2\n2000,0.9\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	text := fmt.Sprintf(`name = %[1]s
note = %[1]s
cell = "own"
[options]
cells = ["own", "lr6", %[2]s]
protect = ["none", "diode"]
[[phase]]
name = %[1]s
load = "100mA"
duration = "2s"
[[phase]]
load = "10mA"
duration = "8s"
[[define_cell]]
id = "own"
name = %[1]s
chemistry = %[1]s
designation = %[1]s
source = %[1]s
curve = [[0, 1.5], [1500, 1.1], [2500, 0.9]]
`, q, tomlString(base+".csv"))
	path := filepath.Join(dir, base+".toml")
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	var runs [][]string
	for _, f := range []string{"text", "json", "csv", "md"} {
		runs = append(runs,
			[]string{"run", path, "--format", f},
			[]string{"table", path, "--format", f},
			[]string{"compare", path, "--format", f},
			[]string{"cells", "show", cellPath, "--format", f},
		)
	}
	runs = append(runs,
		[]string{"cells", "check", cellPath},
		[]string{"run", "--cell", cellPath},
		[]string{"plot", path, "-o", filepath.Join(dir, "chart.svg"), "--force"},
		[]string{"run", path, "--floor", name},
		[]string{"run", filepath.Join(dir, base+"-missing.toml")},
		[]string{"cells", "check", filepath.Join(dir, base+"-missing.csv")},
	)
	for _, args := range runs {
		code, out, errs := runCLI(t, args...)
		if code != 0 && code != 2 {
			t.Fatalf("%q: status %d", args, code)
		}
		if args[0] != "plot" && len(args) > 2 && args[2] == "--format" && code != 0 {
			t.Fatalf("%q: status %d: %s", args, code, errs)
		}
		noControl(t, strings.Join(args, " ")+" (stdout)", out)
		noControl(t, strings.Join(args, " ")+" (stderr)", errs)
	}
	if b, err := os.ReadFile(filepath.Join(dir, "chart.svg")); err == nil {
		noControl(t, "plot svg", strings.ReplaceAll(string(b), "\t", ""))
	}
}

// A scenario named to set the terminal's title (and cells and files
// named likewise) reach no output with their escape sequences.
func TestNamesReachNoTerminalRaw(t *testing.T) {
	for _, name := range []string{"X\x1b]2;pwned\a", "red\x1b[31mtext\x1b[0m\r\x1b[2K", "c1\u009b2J bidi\u202eexe", "bell\a\x7f\x08"} {
		hostileOutputs(t, name)
	}
}

// FuzzTextOutputsClean: any name, in any of the places a user can give
// one, leaves every text output free of control characters.
func FuzzTextOutputsClean(f *testing.F) {
	f.Add("X\x1b]2;pwned\a")
	f.Add("plain")
	f.Add("\u009b31m\r\n\t")
	f.Fuzz(func(t *testing.T, name string) {
		if len(name) > 200 {
			return
		}
		hostileOutputs(t, name)
	})
}

// writeFiles writes name → text files into a new folder and returns it.
func writeFiles(t *testing.T, files map[string]string) string {
	t.Helper()
	dir := t.TempDir()
	for name, text := range files {
		if err := os.WriteFile(filepath.Join(dir, name), []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	return dir
}

// A cell may not claim what no cell holds: 1e307 mAh once crashed plot
// ("index out of range") and the screen, and a price of 1e308 printed as
// null. Each is refused with the file, line and range; at the caps every
// figure is a number.
func TestCellClaimsBounded(t *testing.T) {
	dir := writeFiles(t, map[string]string{
		"huge.csv":       "mAh,V\n0,1.5\n5e306,1.2\n1e307,0.9\n",
		"huge.toml":      "id = \"h\"\nrated_mAh = 1e308\ncurve = [[0, 1.5], [2000, 0.9]]\n",
		"pricey.toml":    "id = \"p\"\nprice = 1e308\ncurve = [[0, 1.5], [2000, 0.9]]\n",
		"amps.toml":      "id = \"a\"\nref_current = \"1e9A\"\ncurve = [[0, 1.5], [2000, 0.9]]\n",
		"cap.toml":       "id = \"cap\"\nprice = 1e6\nrated_mAh = 1e6\ncurve = [[0, 1.5], [1e6, 0.9]]\n",
		"s-huge.toml":    "cell = \"huge.csv\"\n",
		"s-pricey.toml":  "cell = \"pricey.toml\"\n",
		"s-cap.toml":     "cell = \"cap.toml\"\nseries = 48\nparallel = 16\nprice = 1e6\nload = \"1uA\"\n",
		"s-defined.toml": "cell = \"d\"\n[[define_cell]]\nid = \"d\"\nprice = 1e308\ncurve = [[0, 1.5], [2000, 0.9]]\n",
	})
	p := func(n string) string { return filepath.Join(dir, n) }
	refused := []struct {
		args []string
		want string
	}{
		{[]string{"plot", p("s-huge.toml"), "-o", p("x.svg")}, "huge.csv line 3: charge 5e+306 mAh is above 1000000 mAh (1000 Ah)"},
		{[]string{"run", "--cell", p("huge.csv")}, "huge.csv line 3: charge 5e+306 mAh is above 1000000 mAh"},
		{[]string{"cells", "check", p("huge.toml")}, "huge.toml line 2: rated_mAh: 1e+308 must be above 0 and at most 1000000 mAh"},
		{[]string{"run", p("s-pricey.toml"), "--format", "json"}, "pricey.toml line 2: price: 1e+308 must be 0 to 1000000 dollars"},
		{[]string{"run", p("s-defined.toml")}, "[[define_cell]] 1: price: 1e+308 must be 0 to 1000000 dollars"},
		{[]string{"cells", "check", p("amps.toml")}, "ref_current: 1e+09 A must be 0 to 100 A"},
	}
	for _, c := range refused {
		code, out, errs := runCLI(t, c.args...)
		if code != 2 || out != "" || !strings.Contains(errs, c.want) || strings.Contains(errs, "internal error") {
			t.Errorf("%q: status %d, stderr %q; want 2 and %q", c.args, code, errs, c.want)
		}
	}
	for _, f := range []string{"json", "csv", "text"} {
		code, out, errs := runCLI(t, "run", p("s-cap.toml"), "--format", f)
		if code != 0 || strings.Contains(out, "null") || strings.Contains(out, "—") {
			t.Errorf("at the caps (%s): status %d %s\n%s", f, code, errs, out)
		}
		checkClean(t, "at the caps", out)
	}
}

// What cells import writes, the readers read: a 50,000-sample log once
// became a 1.3 MB CSV the 1 MB readers refused. The curve is thinned to at
// most curves.MaxCurvePoints points, and the message states by how much.
func TestImportedLogReadsBack(t *testing.T) {
	var b strings.Builder
	b.WriteString("time_s,volts\n")
	n := 50000
	for i := 0; i < n; i++ {
		x := float64(i) / float64(n)
		// A falling alkaline-like log with a 2 mV sawtooth of logger noise.
		v := 1.6 - 0.5*x - 0.3*x*x*x*x*x*x*x*x + 0.002*float64(i%5)/4
		fmt.Fprintf(&b, "%.1f,%.4f\n", float64(i)*0.6, v)
	}
	dir := writeFiles(t, map[string]string{"log.csv": b.String()})
	out := filepath.Join(dir, "cell.csv")
	code, stdout, errs := runCLI(t, "cells", "import", filepath.Join(dir, "log.csv"), "--current", "500mA", "-o", out)
	if code != 0 || !strings.Contains(stdout, "points (thinned from ") {
		t.Fatalf("import: %d %s %s", code, stdout, errs)
	}
	st, _ := os.Stat(out)
	if st.Size() > 64<<10 {
		t.Errorf("imported file is %d bytes; a few hundred points need far less", st.Size())
	}
	code, stdout, errs = runCLI(t, "cells", "check", out)
	if code != 0 || !strings.HasPrefix(stdout, "ok: ") {
		t.Fatalf("check of the imported file: %d %s %s", code, stdout, errs)
	}
}

// Nonsense prefixes and values past their range are refused with the
// flag and the range, and a unit split from its value by the shell is
// named as such. Each of these once ran (at 100 A, 8,333,333 mAh, a row of
// 300 zeros) or blamed a file called "V".
func TestNonsenseValuesRefused(t *testing.T) {
	dir := writeFiles(t, map[string]string{
		"log.csv": "t,V\n0,1.5\n60,1.4\n120,1.3\n",
		"cr.csv":  "mAh,V\r0,1.5\r100,1.4\r200,1.0\r",
		"ph.toml": "[[phase]]\nload = \"1e-300A\"\nduration = \"1s\"\n",
	})
	out := filepath.Join(dir, "cell.csv")
	cases := []struct {
		args []string
		want string
	}{
		{[]string{"run", "--load", "0.0001MA"}, `--load: load: "0.0001MA": the prefix M (×1e+06) makes no sense for a current (A): use p, n, u, m or none`},
		{[]string{"run", "--load", "2kA/1s,1mA/9s"}, "the prefix k"},
		{[]string{"run", "--load", "1e-300A"}, "--load: current 1e-300 A: must be 0 or at least 1 pA"},
		{[]string{"run", "--load", "1e-300W"}, "--load: power 1e-300 W: must be 0 or at least 1 pW"},
		{[]string{"run", filepath.Join(dir, "ph.toml")}, "[[phase]] 1: current 1e-300 A: must be 0 or at least 1 pA"},
		{[]string{"run", "--load", strings.Repeat("1mA/1s,", 64) + "1mA/1s"}, "--load: 65 phases: a load profile has at most 64"},
		{[]string{"cells", "import", filepath.Join(dir, "log.csv"), "--current", "1MA", "-o", out}, `--current: "1MA": the prefix M`},
		{[]string{"cells", "import", filepath.Join(dir, "log.csv"), "--current", "200A", "-o", out}, `--current: "200A": must be above 0 A and at most 100 A`},
		{[]string{"run", "--standby", "1e-300A"}, "--standby: standby 1e-300 A: must be 0 to 10 A (above 0, at least 1 pA)"},
		{[]string{"run", "--hours-per-day", "1e-300"}, "--hours-per-day: 1e-300 hours a day: must be above 0 and at most 24 (at least 1 s)"},
		{[]string{"run", "--price", "1e-300"}, "--price: price 1e-300: must be 0 or more and at most 1000000 (above 0, at least 0.000001)"},
		{[]string{"run", "--floor", "1.8", "V"}, `--floor 1.8 V: a value and its unit go together: write --floor 1.8V, or quote them: "1.8 V"`},
		{[]string{"run", "--load", "2", "A"}, "--load 2 A: a value and its unit go together"},
		{[]string{"run", "--floor=1.8", "V"}, "--floor=1.8 V: a value and its unit go together: write --floor=1.8V"},
	}
	for _, c := range cases {
		code, stdout, errs := runCLI(t, c.args...)
		if code != 2 || stdout != "" || !strings.Contains(errs, c.want) {
			t.Errorf("%q: status %d, stderr %q; want 2 and %q", c.args, code, errs, c.want)
		}
	}
	// A quoted value with a space is fine, and so is a CR-only CSV (it
	// once read as one line of 5 columns).
	if code, _, errs := runCLI(t, "run", "--floor", "1.8 V"); code != 0 {
		t.Errorf("--floor \"1.8 V\": %d %s", code, errs)
	}
	if code, stdout, errs := runCLI(t, "cells", "check", filepath.Join(dir, "cr.csv")); code != 0 || !strings.Contains(stdout, "3 points") {
		t.Errorf("CR-only CSV: %d %s %s", code, stdout, errs)
	}
}

// A signal that closes the screen exits 128 + its number with one plain
// line (SIGTERM once exited 0; SIGINT printed "program was killed: program
// was interrupted").
func TestScreenSignalExitCode(t *testing.T) {
	for _, sig := range []syscall.Signal{syscall.SIGHUP, syscall.SIGINT, syscall.SIGQUIT, syscall.SIGTERM} {
		var out, errb bytes.Buffer
		c := newCLI(strings.NewReader(""), &out, &errb)
		c.terminal = true
		c.openScreen = func(*scenario.Scenario, io.Writer) error { return &tui.SignalError{Signal: sig} }
		code := c.main(nil)
		errs := errb.String()
		if code != 128+int(sig) || out.Len() != 0 || strings.Count(errs, "\n") != 1 ||
			!strings.Contains(errs, "the screen was closed by SIG") || strings.Contains(errs, "program was") {
			t.Errorf("%v: status %d, stderr %q; want %d and one plain line", sig, code, errs, 128+int(sig))
		}
	}
}

// Work stays bounded by what the caps allow: a chart of 20,000 protection
// options once took 16 s and 1.9 GB, and nothing bounded the cells a
// scenario could bring to the screen's line-up.
func TestWorkCaps(t *testing.T) {
	list := func(n int, s string) string {
		return "[" + strings.TrimSuffix(strings.Repeat(s+",", n), ",") + "]"
	}
	var cells strings.Builder
	cells.WriteString("cell = \"c0\"\n")
	for i := range 17 {
		fmt.Fprintf(&cells, "[[define_cell]]\nid = \"c%d\"\ncurve = [[0, 1.5], [100, 1.0]]\n", i)
	}
	dir := writeFiles(t, map[string]string{
		"plot17.toml":  "[options]\nprotect = " + list(17, `"diode"`) + "\n",
		"plot16.toml":  "[options]\nprotect = " + list(16, `"diode"`) + "\n",
		"opts.toml":    "[options]\nprotect = " + list(1001, `"none"`) + "\n",
		"cells17.toml": cells.String(),
	})
	p := func(n string) string { return filepath.Join(dir, n) }
	cases := []struct {
		args []string
		want string
	}{
		{[]string{"plot", p("plot17.toml"), "-o", p("x.svg")}, "plot: 17 protection options; a chart draws at most 16"},
		{[]string{"table", p("opts.toml")}, "opts.toml:2: options.protect: 1001 entries, at most 1000"},
		{[]string{"run", p("cells17.toml")}, "cells17.toml: 17 [[define_cell]] tables, at most 16"},
	}
	for _, c := range cases {
		code, out, errs := runCLI(t, c.args...)
		if code != 2 || out != "" || !strings.Contains(errs, c.want) {
			t.Errorf("%q: status %d, stderr %q; want 2 and %q", c.args, code, errs, c.want)
		}
	}
	if code, _, errs := runCLI(t, "plot", p("plot16.toml"), "-o", p("y.svg")); code != 0 {
		t.Errorf("16 options, the most a chart draws: %d %s", code, errs)
	}
}
