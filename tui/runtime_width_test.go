package tui

import (
	"math"
	"testing"
	"unicode/utf8"
)

// Every runtime the screen writes fits its column, from a second to
// decades: the pick view cut "83.9 days" to "83.9 da…" and "22.8 months"
// to "22.8 mo…".
func TestRuntimeFitsColumn(t *testing.T) {
	for e := -4.0; e <= 6; e += 0.01 {
		for _, h := range []float64{math.Pow(10, e), 0.99949 * math.Pow(10, e)} {
			if s := hours(h); utf8.RuneCountInString(s) > runtimeW {
				t.Fatalf("hours(%g) = %q: %d runes, the column holds %d", h, s, utf8.RuneCountInString(s), runtimeW)
			}
		}
	}
}
