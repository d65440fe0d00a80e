package ticks

import (
	"strings"
	"testing"
)

// The labels of an axis share the fewest decimals that each needs;
// expected labels written by hand from gonum's default tick values.
func TestPlainLabels(t *testing.T) {
	cases := []struct {
		lo, hi float64
		want   string
	}{
		{0, 2750, "0 2500"},        // gonum: "0.00 2500.00"
		{0, 55, "0 25 50"},         // gonum: "0.00 25.00 50.00"
		{1.65, 3.1, "1.8 2.4 3.0"}, // one decimal kept on 3.0 beside 2.4
	}
	for _, c := range cases {
		var got []string
		for _, tk := range (Plain{}).Ticks(c.lo, c.hi) {
			if tk.Label != "" {
				got = append(got, tk.Label)
			}
		}
		if strings.Join(got, " ") != c.want {
			t.Errorf("%g to %g: %q, want %q", c.lo, c.hi, got, c.want)
		}
	}
}
