package main

import (
	"bytes"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
)

// catalogueRun runs the program in-process with nothing on stdin.
func catalogueRun(args ...string) (code int, stdout, stderr string) {
	var out, errb bytes.Buffer
	code = run(args, strings.NewReader(""), &out, &errb)
	return code, out.String(), errb.String()
}

// badInput is one input a user can get wrong. place is what the one line
// on stderr must name (a flag, file:line, a key), and what the text that
// says what is wrong.
type badInput struct {
	name  string
	args  []string
	place string
	what  string
}

// TestCatalogueBadInputs feeds the command line inputs that are wrong in
// every way a file or a flag can be wrong and checks what the user sees:
// exit status 2, nothing on stdout, exactly one line on stderr that names
// the place and the problem, and never a panic, a Go stack, NaN or Inf.
func TestCatalogueBadInputs(t *testing.T) {
	dir := t.TempDir()
	file := func(name string, data []byte) string {
		t.Helper()
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, data, 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	text := func(name, s string) string { return file(name, []byte(s)) }

	// Deterministic binary garbage: a byte ramp through NUL and invalid
	// UTF-8.
	garbage := make([]byte, 4096)
	for i := range garbage {
		garbage[i] = byte(i * 131)
	}
	// A 10 MB file of a valid-looking line repeated: readers must refuse
	// it by size, not parse it.
	tenMB := bytes.Repeat([]byte("# a comment line that is long enough to fill ten megabytes quickly.....\n"), 10<<20/72+1)

	empty := text("empty.toml", "")
	comments := text("comments.toml", "# nothing but a comment\n\n   \n")
	bin := file("garbage.toml", garbage)
	binCSV := file("garbage.csv", garbage)
	noNUL := text("latin1.toml", "name = \"caf\xe9\"\n")
	syntax := text("syntax.toml", "cell = \"lr6\"\nload = \"100mA\"\nfloor = = 1.8\n")
	unknown := text("unknown.toml", "cell = \"lr6\"\nlod = \"100mA\"\n")
	wrongType := text("type.toml", "series = \"two\"\n")
	rise := text("rise.csv", "mAh,V\n0,1.2\n100,1.3\n")
	dup := text("dup.csv", "mAh,V\n0,1.5\n0,1.4\n")
	one := text("one.csv", "mAh,V\n0,1.5\n")
	neg := text("neg.csv", "mAh,V\n-5,1.5\n100,1.2\n")
	nan := text("nan.csv", "mAh,V\nNaN,1.5\n100,1.2\n")
	inf := text("inf.csv", "mAh,V\n0,Inf\n100,1.2\n")
	noHead := text("nohead.csv", "0,1.5\n100,1.2\n")
	ragged := text("ragged.csv", "mAh,V\n0,1.5\n100\n")
	badUnit := text("unit.csv", "mAh,V\n0,1.5mA\n100,1.2\n")
	bigTOML := file("big.toml", tenMB)
	bigCSV := file("big.csv", tenMB)
	cellTOML := text("cell.toml", "id = \"x\"\ncurve = [[0, 1.5], [100, 1.2]]\nvoltage = 3\n")
	refBad := text("refbad.toml", "cell = \"rise.csv\"\nload = \"100mA\"\n")
	defineBad := text("define.toml", "cell = \"mine\"\n[[define_cell]]\nid = \"mine\"\ncurve = [[0, 1.5], [1000, 1.6]]\n")
	zeroPhase := text("phase.toml", "[[phase]]\nload = \"450mA\"\nduration = \"3s\"\n[[phase]]\nload = \"15mA\"\nduration = \"0s\"\n")
	nanFloor := text("nanfloor.toml", "load = \"100mA\"\nfloor = nan\n")
	infTemp := text("inftemp.toml", "load = \"100mA\"\ntemp = inf\n")
	sweepBack := text("sweep.toml", "load = \"100mA\"\n[sweep]\nfloor = {from = 2.0, to = 1.0, step = 0.1}\n")
	scaleOut := text("scale.toml", "load = \"2A\"\n[sweep]\nload_scale = [\"100%\", \"100000%\"]\n")
	effOver := text("eff.toml", "load = \"0.8W@120%\"\n")
	dirPath := filepath.Join(dir, "folder.toml")
	dirCell := filepath.Join(dir, "folder.csv")
	for _, d := range []string{dirPath, dirCell} {
		if err := os.Mkdir(d, 0o755); err != nil {
			t.Fatal(err)
		}
	}
	underFile := filepath.Join(empty, "inside.toml") // a path through a file
	missing := filepath.Join(dir, "missing.toml")

	cases := []badInput{
		{"empty file", []string{"run", empty}, "empty.toml", "no settings"},
		{"only comments", []string{"run", comments}, "comments.toml", "no settings"},
		{"binary garbage", []string{"run", bin}, "garbage.toml", "binary"},
		{"binary cell file", []string{"run", "--cell", binCSV}, "garbage.csv line", "binary"},
		{"invalid UTF-8", []string{"run", noNUL}, "latin1.toml", "UTF-8"},
		{"TOML syntax", []string{"run", syntax}, "syntax.toml:3", "expected"},
		{"unknown key", []string{"run", unknown}, "unknown.toml:2", `"lod"`},
		{"wrong TOML type", []string{"run", wrongType}, "type.toml:1", "series"},
		{"rising curve", []string{"run", "--cell", rise}, "rise.csv line 3", "rises"},
		{"duplicate capacity", []string{"run", "--cell", dup}, "dup.csv line 3", "repeats"},
		{"one point", []string{"run", "--cell", one}, "one.csv line 2", "at least 2 points"},
		{"negative capacity", []string{"run", "--cell", neg}, "neg.csv line 2", "negative"},
		{"NaN written out", []string{"run", "--cell", nan}, "nan.csv line 2", "not a finite number"},
		{"Inf written out", []string{"run", "--cell", inf}, "inf.csv line 2", "not a finite number"},
		{"CSV without header", []string{"run", "--cell", noHead}, "nohead.csv line 1", "header"},
		{"CSV ragged row", []string{"run", "--cell", ragged}, "ragged.csv line 3", "columns"},
		{"CSV unit of the wrong kind", []string{"run", "--cell", badUnit}, "unit.csv line 2", "voltage"},
		{"cell TOML unknown key", []string{"run", "--cell", cellTOML}, "cell.toml line 3", `"voltage"`},
		{"scenario names a bad cell file", []string{"run", refBad}, "refbad.toml:1", "rise.csv line 3"},
		{"cell defined in the scenario rises", []string{"run", defineBad}, "define.toml [[define_cell]] 1", "rises"},
		{"zero-length phase in a file", []string{"run", zeroPhase}, "phase.toml: [[phase]] 2", "above 0"},
		{"NaN in a file", []string{"run", nanFloor}, "nanfloor.toml:2", "floor"},
		{"Inf in a file", []string{"run", infTemp}, "inftemp.toml:2", "temp"},
		{"sweep range backwards", []string{"run", sweepBack}, "sweep.toml:3", "below from"},
		{"load scale beyond the load's range", []string{"table", scaleOut}, "scale.toml:3", "load_scale"},
		{"efficiency above 100 % in a file", []string{"run", effOver}, "eff.toml:1", "efficiency"},
		{"10 MB scenario", []string{"run", bigTOML}, "big.toml", "limit"},
		{"10 MB cell file", []string{"run", "--cell", bigCSV}, "big.csv", "limit"},
		{"directory as scenario", []string{"run", dirPath}, "folder.toml", "directory"},
		{"directory as cell file", []string{"run", "--cell", dirCell}, "folder.csv", "directory"},
		{"path through a file", []string{"run", underFile}, "inside.toml", "not a directory"},
		{"missing scenario", []string{"run", missing}, "missing.toml", "no such file"},
		{"unit of the wrong kind", []string{"run", "--floor", "3mA"}, "--floor", "expected a voltage"},
		{"temperature in volts", []string{"run", "--temp", "20V"}, "--temp", "expected a temperature"},
		{"NaN flag", []string{"run", "--floor", "NaN"}, "--floor", "not a number"},
		{"overflowing flag", []string{"run", "--floor", "1e400V"}, "--floor", "not a finite number"},
		{"zero series", []string{"run", "--series", "0"}, "--series", "1 to 48"},
		{"negative series", []string{"run", "--series", "-2"}, "--series", "1 to 48"},
		{"fractional series", []string{"run", "--series", "2.5"}, "--series", "whole number"},
		{"too many in parallel", []string{"run", "--parallel", "17"}, "--parallel", "1 to 16"},
		{"unknown protection key", []string{"run", "--protect", "diode:bogus=1"}, "--protect", `"bogus"`},
		{"unknown protection kind", []string{"run", "--protect", "fuse"}, "--protect", `"fuse"`},
		{"protection value out of range", []string{"run", "--protect", "pmos:vth=9"}, "--protect", "vth"},
		{"zero-length phase", []string{"run", "--load", "120mA/0s,15mA/2s"}, "--load", "above 0"},
		{"efficiency above 100 %", []string{"run", "--load", "0.8W@120%"}, "--load", "efficiency"},
		{"efficiency on a current load", []string{"run", "--load", "120mA@85%"}, "--load", "power load"},
		{"empty load", []string{"run", "--load", " "}, "--load", "empty"},
		{"absurd current", []string{"run", "--load", "5e9A"}, "--load", "100 A"},
		{"LED load missing r", []string{"run", "--load", "led:vf=2"}, "--load", "vf and r"},
		{"too hot", []string{"run", "--temp", "200C"}, "--temp", "-40 to 85"},
		{"more than 24 hours a day", []string{"run", "--hours-per-day", "25"}, "--hours-per-day", "24"},
		{"negative standby", []string{"run", "--standby", "-1mA"}, "--standby", "0 to 10 A"},
		{"negative price", []string{"run", "--price", "-1"}, "--price", "0 or more"},
		{"unknown library cell", []string{"run", "--cell", "lr7"}, "--cell", `"lr7"`},
		{"flag without a value", []string{"run", "--floor"}, "--floor", "needs a value"},
		{"unknown flag", []string{"run", "--flor", "1.8"}, "--flor", "unknown flag"},
		{"unknown command", []string{"frobnicate"}, "frobnicate", "unknown command"},
		{"two scenario files", []string{"run", empty, comments}, "comments.toml", "unexpected argument"},
		{"table of garbage", []string{"table", bin}, "garbage.toml", "binary"},
		{"compare of an empty file", []string{"compare", empty}, "empty.toml", "no settings"},
	}

	// An unreadable file: chmod 000 stops reads only when not root (CI
	// runs as root), so use a FIFO there, which the readers must refuse
	// rather than block on.
	if os.Geteuid() != 0 {
		locked := text("locked.toml", "load = \"100mA\"\n")
		if err := os.Chmod(locked, 0); err != nil {
			t.Fatal(err)
		}
		cases = append(cases, badInput{"unreadable file", []string{"run", locked}, "locked.toml", "permission denied"})
	}
	fifo := filepath.Join(dir, "pipe.toml")
	fifoCSV := filepath.Join(dir, "pipe.csv")
	if syscall.Mkfifo(fifo, 0o600) == nil && syscall.Mkfifo(fifoCSV, 0o600) == nil {
		cases = append(cases,
			badInput{"FIFO as scenario", []string{"run", fifo}, "pipe.toml", "not a regular file"},
			badInput{"FIFO as cell file", []string{"run", "--cell", fifoCSV}, "pipe.csv", "not a regular file"})
	} else {
		t.Log("cannot make a FIFO here: the FIFO cases are left out")
	}

	if len(cases) < 25 {
		t.Fatalf("catalogue has %d bad inputs, want at least 25", len(cases))
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, out, errs := catalogueRun(c.args...)
			if code != 2 {
				t.Errorf("status %d, want 2 (stderr %q)", code, errs)
			}
			if out != "" {
				t.Errorf("stdout %q, want nothing on an error", out)
			}
			if !strings.HasSuffix(errs, "\n") || strings.Count(errs, "\n") != 1 {
				t.Errorf("stderr %q: want exactly one line", errs)
			}
			if !strings.HasPrefix(errs, "headroom: ") {
				t.Errorf("stderr %q: want it to start \"headroom: \"", errs)
			}
			if !strings.Contains(errs, c.place) {
				t.Errorf("stderr %q does not name the place %q", errs, c.place)
			}
			if !strings.Contains(errs, c.what) {
				t.Errorf("stderr %q does not say %q", errs, c.what)
			}
			// NaN and Inf may appear where the line quotes what the user
			// wrote; a stack or a formatting slip may not.
			for _, bad := range []string{"goroutine", "panic:", "internal error", ".go:", "%!"} {
				if strings.Contains(errs, bad) {
					t.Errorf("stderr %q contains %q", errs, bad)
				}
			}
		})
	}
	t.Logf("%d bad inputs", len(cases))
}

// TestCatalogueHopeless runs designs that are valid but cannot work. They
// are answers, not errors: exit status 0, a runtime of exactly 0 h (the
// engine stops at zero charge, so no rounding is involved), nothing
// delivered, the cut-off cause named in a word, and a warning that says in
// plain words why the product does not start.
func TestCatalogueHopeless(t *testing.T) {
	dir := t.TempDir()
	// 2 × LR6, no element, a motor pulse, 1 h a day: a fresh LR6 rests
	// near 1.6 V (IEC 60086-2 alkaline; value from memory), so the pack
	// starts near 3.2 V.
	base := filepath.Join(dir, "toy.toml")
	if err := os.WriteFile(base, []byte("cell = \"lr6\"\nseries = 2\nprotect = \"none\"\nload = \"450mA/3s,15mA/27s\"\nfloor = 1.8\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name  string
		flags []string
		cause string
	}{
		{"floor above the fresh pack", []string{"--floor", "5V"}, "floor"},
		{"resistive load pulls the pack below the floor", []string{"--load", "0.1ohm", "--floor", "1.5"}, "floor"},
		{"a current the pack can never deliver", []string{"--load", "90A"}, "collapse"},
		{"constant power that collapses at once", []string{"--series", "1", "--load", "20W"}, "collapse"},
		{"coin cell asked for half an ampere", []string{"--cell", "cr2032", "--load", "500mA"}, "collapse"},
		{"polyfuse trips on the first motor pulse", []string{"--protect", "pptc:hold=0.05"}, "fuse"},
		{"current limit below the motor pulse", []string{"--protect", "ic:ilim=0.1"}, "current limit"},
		{"shunt limiter set far too low", []string{"--protect", "limiter:rsh=100"}, "current limit"},
	} {
		t.Run(c.name, func(t *testing.T) {
			args := append([]string{"run", base}, c.flags...)
			code, out, errs := catalogueRun(append(args, "--format", "json")...)
			if code != 0 || errs != "" {
				t.Fatalf("status %d, stderr %q: a hopeless design is an answer, not an error", code, errs)
			}
			for _, bad := range []string{"NaN", "Inf", "panic", "goroutine"} {
				if strings.Contains(out, bad) {
					t.Fatalf("output contains %q:\n%s", bad, out)
				}
			}
			var m map[string]any
			if err := json.Unmarshal([]byte(out), &m); err != nil {
				t.Fatalf("output is not JSON: %v\n%s", err, out)
			}
			for _, k := range []string{"runtime_h", "delivered_mAh"} {
				if v, ok := m[k].(float64); !ok || v != 0 {
					t.Errorf("%s = %v, want exactly 0", k, m[k])
				}
			}
			if ref, ok := m["reference_mAh"].(float64); !ok || math.IsNaN(ref) || ref < 0 {
				t.Errorf("reference_mAh = %v, want a number ≥ 0", m["reference_mAh"])
			}
			if got := m["cutoff_cause"]; got != c.cause {
				t.Errorf("cutoff_cause = %v, want %q", got, c.cause)
			}
			ws, _ := m["warnings"].([]any)
			said := false
			for _, w := range ws {
				if s, ok := w.(string); ok && strings.HasPrefix(s, "the product does not start: ") {
					said = true
				}
			}
			if !said {
				t.Errorf("warnings %v: want one saying why the product does not start", ws)
			}
		})
	}
}
