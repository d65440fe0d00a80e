package main

import (
	"io"

	"headroom/internal/scenario"
	"headroom/tui"
)

// openTUI opens the interactive screen on s: the cli's openScreen, which
// tests replace without starting a real terminal program.
func openTUI(s *scenario.Scenario, stdout io.Writer) error {
	return tui.Run(s)
}
