package main

import (
	"os"
	"strings"
	"testing"
)

// The run's element and cells lines say what is there to say: with no
// element there is no junction to report (a "junction 20 °C" read as a
// part at the ambient), and a cell without thermal data (a CSV curve) is
// taken at the ambient, not measured there. With both, the figures stay.
func TestRunTextElementAndCellHeatWords(t *testing.T) {
	line := func(out, key string) string {
		for l := range strings.SplitSeq(out, "\n") {
			if strings.HasPrefix(l, key+" ") {
				return l
			}
		}
		t.Fatalf("no %q line in\n%s", key, out)
		return ""
	}
	out := runOK(t, "run", "--protect", "none")
	if l := line(out, "element"); strings.Contains(l, "junction 20") || !strings.Contains(l, "none") {
		t.Errorf("no element: %q", l)
	}
	if l := line(out, "cells"); !strings.Contains(l, "hottest") || !strings.Contains(l, "°C") {
		t.Errorf("library cell (thermal data): %q", l)
	}
	out = runOK(t, "run", "--cell", "../../testdata/cells/example-cell.csv", "--protect", "diode")
	if l := line(out, "cells"); strings.Contains(l, "hottest") || !strings.Contains(l, "no thermal data") {
		t.Errorf("CSV cell (no thermal data): %q", l)
	}
	if l := line(out, "element"); !strings.Contains(l, "junction") {
		t.Errorf("diode: %q", l)
	}
}

// A junction that finds no settled temperature (an 18650 at 8 A through
// the library's SOT-23 P-MOSFET, θja 250 K/W from memory: about 4 W at
// ambient, far past any settled state) is said to run away, not given the solve's last step as a temperature
// the part would hold (it read "junction 1008 °C").
func TestRunTextJunctionRunaway(t *testing.T) {
	out := runOK(t, "run", "--cell", "li-ion-18650", "--series", "1", "--protect", "pmos", "--load", "8A",
		"--floor", "3.0", "--hours-per-day", "24", "--standby", "0")
	var el string
	for l := range strings.SplitSeq(out, "\n") {
		if strings.HasPrefix(l, "element ") {
			el = l
		}
	}
	if !strings.Contains(el, "runs away") || strings.Contains(el, "°C") {
		t.Errorf("element line %q: want it to say the junction runs away, with no temperature", el)
	}
	if !strings.Contains(out, "junction runs away") || !strings.Contains(out, "150 °C limit") {
		t.Errorf("warnings: want the runaway named against the part's limit:\n%s", out)
	}
	// A junction that settles keeps its figure.
	if out := runOK(t, "run", "--protect", "diode"); !strings.Contains(out, "at the hottest pulse") {
		t.Errorf("the demo's diode: %q", out)
	}
}

// cells check names the thermal pair it read (so a cell file's heat keys
// are seen to be taken), and says nothing of heat for a cell without them.
func TestCellsCheckNamesHeat(t *testing.T) {
	dir := t.TempDir()
	f := dir + "/hot.toml"
	if err := writeFile(f, "curve = [[0, 4.1], [2000, 3.0]]\nheat_capacity = 45\nthermal_resistance = \"24 K/W\"\n"); err != nil {
		t.Fatal(err)
	}
	if out := runOK(t, "cells", "check", f); !strings.Contains(out, "self-heating 45 J/K, 24 K/W") {
		t.Errorf("with thermal data: %q", out)
	}
	if out := runOK(t, "cells", "check", "../../testdata/cells/example-cell.csv"); strings.Contains(out, "self-heating") {
		t.Errorf("a CSV cell: %q", out)
	}
}

func writeFile(path, text string) error { return os.WriteFile(path, []byte(text), 0o644) }
