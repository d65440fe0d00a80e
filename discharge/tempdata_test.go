package discharge

import (
	"strings"
	"testing"

	"headroom/curves"
)

// An ambient beyond the cell's temperature table takes the table's end
// figures (curves.Cell.TempFactors clamps): −40 °C then runs exactly as
// −20 °C does, which the warning says; inside the table there is none.
func TestAmbientOutsideTemperatureDataWarns(t *testing.T) {
	c, ok := curves.Lookup("li-ion-18650") // table −20 to 45 °C (typical, from memory)
	if !ok {
		t.Fatal("no li-ion-18650")
	}
	design := func(tempC float64) *Design {
		return &Design{Cell: c, Series: 1, Parallel: 1, Profile: []Phase{{Load: Load{Kind: ConstantCurrent, Amps: 0.5}, Seconds: 1}},
			Floor: 3, TempC: tempC, HoursPerDay: 24}
	}
	has := func(r *Result) bool {
		for _, w := range r.Warnings {
			if strings.Contains(w, "outside the cell's temperature data") {
				return true
			}
		}
		return false
	}
	if r := mustEval(t, design(0)); has(r) {
		t.Errorf("0 °C, inside the table: %q", r.Warnings)
	}
	r := mustEval(t, design(-40))
	if !has(r) || !strings.Contains(strings.Join(r.Warnings, "|"), "shorter than shown") {
		t.Errorf("−40 °C: %q", r.Warnings)
	}
	if r := mustEval(t, design(85)); !has(r) {
		t.Errorf("85 °C: %q", r.Warnings)
	}
}
