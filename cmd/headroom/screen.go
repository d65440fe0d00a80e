package main

import (
	"io"

	"headroom/internal/scenario"
	"headroom/tui"
)

// openScreen opens the interactive screen on s. It is a variable so that
// tests can replace it without starting a real terminal program.
var openScreen = func(s *scenario.Scenario, stdout io.Writer) error {
	return tui.Run(s)
}
