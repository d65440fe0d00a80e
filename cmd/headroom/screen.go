package main

import (
	"io"

	"headroom/internal/scenario"
	"headroom/tui"
)

// openScreen opens the interactive screen on s. It is a variable so that
// tests can replace it; its body becomes tui.Run(s) once package tui lands.
var openScreen = func(s *scenario.Scenario, stdout io.Writer) error {
	return tui.Run(s)
}
