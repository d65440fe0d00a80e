package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"headroom/internal/spice"
	"headroom/internal/spicetest"
	"headroom/internal/units"
)

// A coin-cell remote's 5 ms radio burst reads "5 ms" in the load line,
// not "0.005 s" (a stranger reading the run counted zeros).
func TestRunLoadLineShortPhases(t *testing.T) {
	code, out, errs := runCLI(t, "run", "--cell", "cr2032", "--series", "1", "--protect", "none",
		"--floor", "2V", "--load", "15mA/5ms,2uA/995ms")
	if code != 0 {
		t.Fatalf("status %d: %s", code, errs)
	}
	if !strings.Contains(out, "15 mA for 5 ms, 2 µA for 995 ms") {
		t.Errorf("load line does not give the phases in ms:\n%s", out)
	}
}

// A hot element: the 4×D ride-on's MOSFET carries a 5 A start pulse and
// runs near 144 °C in headroom, which shortens the run through its drop;
// the circuit keeps it at the ambient, so it runs longer there. The span
// simulated must still reach the floor (it stopped short: ngspice said
// "meas tfloor failed"), and the crossing must agree with headroom's runtime
// on an ideal heat sink (theta=0), which is what the circuit models.
// Outside check: ngspice's transient analysis; 1 % as in
// TestNetlistRunsInNgspice.
func TestNetlistSpanCoversHotElement(t *testing.T) {
	spicetest.Require(t)
	design := []string{"--cell", "lr20", "--series", "4", "--floor", "4V", "--load", "5A/0.3s,2A/30s",
		"--hours-per-day", "24", "--standby", "0"}
	out := filepath.Join(t.TempDir(), "car.cir")
	code, _, errs := runCLI(t, append(append([]string{"netlist", "--protect", "pmos"}, design...), "-o", out)...)
	if code != 0 {
		t.Fatalf("status %d: %s", code, errs)
	}
	net, _ := os.ReadFile(out)
	res, err := spice.Run(string(net))
	if err != nil {
		t.Fatal(err)
	}
	got, ok := spice.Values(res)["tfloor"]
	if !ok {
		t.Fatalf("ngspice measured no crossing of the floor:\n%s", res)
	}
	want := num(t, runJSON(t, append([]string{"run", "--protect", "pmos:theta=0"}, design...)...), "runtime_h")
	if rel := (got - want) / want; rel > 0.01 || rel < -0.01 {
		t.Errorf("ngspice %.6g h, headroom on a heat sink %.6g h: %.3g %% apart (1 %% allowed)", got, want, 100*rel)
	}
}

// plot's closing line is a sentence: "1 protection option", and what the
// axes are, not the bare flag value ("1 protection options, time").
func TestPlotSaysWhatItDrew(t *testing.T) {
	out := filepath.Join(t.TempDir(), "c.svg")
	code, stdout, errs := runCLI(t, "plot", "--protect", "pmos", "-o", out)
	if code != 0 {
		t.Fatalf("status %d: %s", code, errs)
	}
	if want := "1 protection option, voltage against hours of use"; !strings.Contains(stdout, want) {
		t.Errorf("got %q, want it to say %q", stdout, want)
	}
}

// A product that stops before one day's use is over: 18650 at 3 A runs
// under an hour, used 1 h a day. It was "51.9 min of use = 19.6 h at 1 h a
// day" (19.6 h of calendar time, which it never reaches); it stops within
// the first day's session.
func TestRunWithinFirstDay(t *testing.T) {
	code, out, errs := runCLI(t, "run", "--cell", "li-ion-18650", "--series", "1", "--load", "3A",
		"--protect", "none", "--floor", "2.5V", "--hours-per-day", "1")
	if code != 0 {
		t.Fatalf("status %d: %s", code, errs)
	}
	if !strings.Contains(out, "of use, within the first day at 1 h a day") {
		t.Errorf("the runtime line does not say it stops within the first day:\n%s", out)
	}
}

// A log whose middle points lie on a straight line is thinned without any
// error; the message said "none dropped more than 0 V off".
func TestImportThinnedWords(t *testing.T) {
	dir := t.TempDir()
	log := filepath.Join(dir, "log.csv")
	// 2 A for 600 s is 333 mAh a row; 1.40, 1.30, 1.20 V lie on one line.
	if err := os.WriteFile(log, []byte("s,V\n0,1.55\n600,1.40\n1200,1.30\n1800,1.20\n2400,1.05\n3000,0.90\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, errs := runCLI(t, "cells", "import", log, "--current", "2A", "-o", filepath.Join(dir, "c.csv"))
	if code != 0 {
		t.Fatalf("status %d: %s", code, errs)
	}
	if strings.Contains(out, "0 V off") || !strings.Contains(out, "the points left out on the line between those kept") {
		t.Errorf("thinning without error reads %q", out)
	}
}

// spread's text gives its runtimes in the units run and the screen use:
// the demo's worst corner is under an hour and read "0.731 h" here while
// the screen said "43.9 min". Checked against spread's own JSON.
func TestSpreadTextDurations(t *testing.T) {
	code, out, errs := runCLI(t, "spread", "--protect", "diode")
	if code != 0 {
		t.Fatalf("status %d: %s", code, errs)
	}
	worst := num(t, runJSON(t, "spread", "--protect", "diode"), "worst_h")
	if worst >= 1 {
		t.Skipf("worst corner %g h: not under an hour any more", worst)
	}
	if want := "worst      " + units.Duration(worst, 3) + ":"; !strings.Contains(out, want) || !strings.Contains(want, " min:") {
		t.Errorf("want %q in:\n%s", want, out)
	}
}

// report -o NAME.md writes Markdown without --format md (it wrote HTML
// under a .md name), and a format that contradicts the name is refused
// with one line, status 2 and nothing written.
func TestReportFormatFromName(t *testing.T) {
	dir := t.TempDir()
	md := filepath.Join(dir, "r.md")
	if code, _, errs := runCLI(t, "report", "-o", md); code != 0 {
		t.Fatalf("status %d: %s", code, errs)
	}
	if b, _ := os.ReadFile(md); !strings.HasPrefix(string(b), "# ") {
		t.Errorf("r.md does not start as Markdown: %.40q", b)
	}
	for _, c := range [][]string{{"--format", "md", "-o", filepath.Join(dir, "x.html")}, {"--format", "html", "-o", filepath.Join(dir, "x.md")}} {
		code, _, errs := runCLI(t, append([]string{"report"}, c...)...)
		if code != 2 || strings.Count(strings.TrimSpace(errs), "\n") != 0 || !strings.Contains(errs, "-o: ") {
			t.Errorf("%v: status %d, %q; want status 2 and one line about -o", c, code, errs)
		}
		if _, err := os.Stat(c[3]); err == nil {
			t.Errorf("%v: wrote %s anyway", c, c[3])
		}
	}
}
