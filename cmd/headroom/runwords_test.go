package main

import (
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
