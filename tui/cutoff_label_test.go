package tui

import (
	"strings"
	"testing"

	"github.com/charmbracelet/x/ansi"
)

// The reason a product stops is a sentence of its own ("resets on the
// 450 mA motor wag pulse", "the fuse opens on …"); it sat after the label
// "Stops because", which read "Stops because resets on …". The label names
// the figure instead, as run's "cut-off" line does.
func TestCutoffLabelReads(t *testing.T) {
	for _, wh := range [][2]int{{80, 24}, {120, 40}} {
		got := ansi.Strip(sized(wh[0], wh[1]).View())
		if strings.Contains(got, "because resets") || strings.Contains(got, "because stops") {
			t.Errorf("%d×%d: the cut-off reads %q", wh[0], wh[1], "Stops because resets …")
		}
		if !strings.Contains(got, "Cut-off       resets on the") {
			t.Errorf("%d×%d: no cut-off line saying the product resets:\n%s", wh[0], wh[1], got)
		}
	}
}
