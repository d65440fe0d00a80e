package main

import (
	"strings"
	"testing"
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
