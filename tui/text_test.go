package tui

import (
	"strings"
	"testing"
)

// A number and its unit stay on one line ("(pack 4.00 / V)" broke there).
func TestWrapKeepsUnitWithNumber(t *testing.T) {
	for _, w := range []int{10, 14, 17, 20, 24} {
		for _, l := range wrapLines("Cells in each string; the pack is 2 × 1.50 V = 4.00 V nominal at 450 mA.", w) {
			for _, u := range []string{"V", "mA", "V nominal"} {
				if strings.HasPrefix(l, u+" ") || l == u || strings.HasPrefix(l, u+".") {
					t.Errorf("width %d: line %q starts with a unit torn from its number", w, l)
				}
			}
		}
	}
}
