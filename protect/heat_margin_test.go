package protect

import (
	"strings"
	"testing"
)

// A junction under its limit by less than tjMargin is warned about as
// close; one further below is not; one above gets the over-limit warning.
// The 4×D car's SOT-23 MOSFET peaked at 144 °C under its 150 °C rating and
// ran without a word.
func TestHeatMarginWarning(t *testing.T) {
	th := Thermal{TjMax: 150}
	for _, c := range []struct {
		peak float64
		want string
	}{{100, ""}, {129, ""}, {144, "within 20 °C of its 150 °C limit"}, {151, "above its 150 °C limit"}} {
		w := appendHeat(nil, th, Operating{PeakW: 1, PeakC: c.peak, TempC: 20})
		got := strings.Join(w, "; ")
		if c.want == "" && got != "" || c.want != "" && !strings.Contains(got, c.want) {
			t.Errorf("peak %g °C: warnings %q, want %q", c.peak, got, c.want)
		}
	}
}
